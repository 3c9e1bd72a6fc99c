package main

import (
	"context"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// tmuxSession runs one command in a detached tmux session on a private
// server socket, so that no other tmux server is touched.
type tmuxSession struct {
	t      *testing.T
	socket string
}

// startTmux starts cmd in a 100×20 tmux window.
func startTmux(t *testing.T, cmd string) *tmuxSession {
	t.Helper()
	s := &tmuxSession{t: t, socket: fmt.Sprintf("keyloom-type-test-%d", os.Getpid())}
	t.Cleanup(func() { exec.Command("tmux", "-L", s.socket, "kill-server").Run() })
	s.run("new-session", "-d", "-x", "100", "-y", "20", "-s", "kl", cmd)
	return s
}

func (s *tmuxSession) run(args ...string) string {
	s.t.Helper()
	out, err := exec.Command("tmux", append([]string{"-L", s.socket}, args...)...).CombinedOutput()
	if err != nil {
		s.t.Fatalf("tmux %v: %v: %s", args, err, out)
	}
	return string(out)
}

// keys sends tmux key names (Tab, Enter, Escape, F2, M-3).
func (s *tmuxSession) keys(names ...string) {
	s.t.Helper()
	s.run(append([]string{"send-keys", "-t", "kl"}, names...)...)
}

// text types literal text.
func (s *tmuxSession) text(txt string) { s.t.Helper(); s.run("send-keys", "-t", "kl", "-l", txt) }

// waitFor polls the pane until ok accepts it (with runs of blanks folded to
// one space), and returns the last capture.
func (s *tmuxSession) waitFor(what string, ok func(string) bool) string {
	s.t.Helper()
	var scr string
	for deadline := time.Now().Add(10 * time.Second); time.Now().Before(deadline); time.Sleep(50 * time.Millisecond) {
		out, err := exec.Command("tmux", "-L", s.socket, "capture-pane", "-p", "-t", "kl").CombinedOutput()
		if err != nil {
			s.t.Fatalf("capture-pane: %v: %s", err, out)
		}
		scr = string(out)
		if ok(strings.Join(strings.Fields(scr), " ")) {
			return scr
		}
	}
	s.t.Fatalf("timed out waiting for %s; screen:\n%s", what, scr)
	return scr
}

// TestTypeInTmux drives the real binary in a real terminal (tmux): the strip
// shows the facade's predictions, Alt+3, F2 and Tab accept, Enter learns, Escape quits
// and the overlay is saved.
func TestTypeInTmux(t *testing.T) {
	if _, err := exec.LookPath("tmux"); err != nil {
		t.Skip("tmux not installed (.ci/tui.sh installs it)")
	}
	dir := t.TempDir()
	bin := filepath.Join(dir, "keyloom")
	ctx, cancel := context.WithTimeout(context.Background(), 3*time.Minute)
	defer cancel()
	if out, err := exec.CommandContext(ctx, "go", "build", "-o", bin, ".").CombinedOutput(); err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	model, err := filepath.Abs(demoModel)
	if err != nil {
		t.Fatal(err)
	}
	user := filepath.Join(dir, "me.overlay")
	done := filepath.Join(dir, "exit-code")
	s := startTmux(t, fmt.Sprintf("%s type --model %s --user %s; echo $? > %s; sleep 30", bin, model, user, done))

	s.waitFor("the editor", func(scr string) bool { return strings.Contains(scr, "learning on") })
	const typed = "see you at the "
	_, want, _ := facadeWords(t, 3, typed)
	s.text(typed)
	strip := fmt.Sprintf("next 1 %s 2 %s 3 %s", want[0], want[1], want[2])
	s.waitFor("predictions "+strip, func(scr string) bool { return strings.Contains(scr, strip) })

	// Alt+3 and F2 arrive from a real terminal as escape sequences.
	for _, k := range []struct {
		name string
		pick int
	}{{"M-3", 2}, {"F2", 1}} {
		s.keys(k.name)
		s.waitFor(k.name+" picking "+want[k.pick], func(scr string) bool { return strings.Contains(scr, "» "+typed+want[k.pick]) })
		s.keys("C-u")
		s.waitFor("an empty line", func(scr string) bool { return strings.Contains(scr, "» next") })
		s.text(typed)
		s.waitFor("predictions again", func(scr string) bool { return strings.Contains(scr, strip) })
	}

	s.keys("Tab")
	s.waitFor("the accepted word", func(scr string) bool { return strings.Contains(scr, "» "+typed+want[0]) })

	s.keys("Enter")
	s.waitFor("the line learned", func(scr string) bool {
		return strings.Contains(scr, "┊ "+typed+want[0]) && strings.Contains(scr, "5 words learned (1 line)")
	})

	s.keys("C-l")
	s.waitFor("learning off", func(scr string) bool { return strings.Contains(scr, "learning off") })

	s.keys("Escape")
	var code []byte
	for deadline := time.Now().Add(10 * time.Second); time.Now().Before(deadline); time.Sleep(50 * time.Millisecond) {
		if code, err = os.ReadFile(done); err == nil && len(code) > 0 {
			break
		}
	}
	if strings.TrimSpace(string(code)) != "0" {
		t.Fatalf("exit code %q; screen:\n%s", code, s.waitFor("anything", func(string) bool { return true }))
	}
	scr := s.waitFor("the save message", func(scr string) bool { return strings.Contains(scr, "saved "+user) })
	if st, err := os.Stat(user); err != nil || st.Mode().Perm() != 0o600 {
		t.Errorf("overlay: %v %v\n%s", st, err, scr)
	}
}
