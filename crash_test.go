package keyloom

import (
	"fmt"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"
)

const crashChildEnv = "KEYLOOM_TEST_SAVE_CHILD"

// TestMain lets the test binary act as the child process of TestSaveSurvivesKill.
func TestMain(m *testing.M) {
	if arg := os.Getenv(crashChildEnv); arg != "" {
		os.Exit(saveChild(arg))
	}
	os.Exit(m.Run())
}

// saveChild loads the overlay at path, learns its round's marker word and
// saves again and again until it is killed.
func saveChild(arg string) int {
	path, round, _ := strings.Cut(arg, "|")
	e, err := Open("testdata/models/demo-v1.klm", Options{})
	if err != nil {
		return 3
	}
	if _, err := os.Stat(path); err == nil {
		if err := e.OpenOverlay(path); err != nil {
			return 4
		}
	}
	n, _ := strconv.Atoi(round)
	e.Learn(marker(n) + " " + marker(n) + ".")
	fmt.Println("ready")
	for {
		if err := e.Save(path); err != nil {
			return 5
		}
	}
}

// marker is a word made of letters only (letter-digit mixes are never
// learned: they look like passwords) that names round r.
func marker(r int) string {
	b := []byte("zqmark")
	for i := 0; i < 3; i++ {
		b = append(b, byte('a'+r%26))
		r /= 26
	}
	return string(b)
}

// markers returns the rounds whose marker word the overlay at path knows.
func markers(t *testing.T, e *Engine, path string, upTo int) []int {
	t.Helper()
	if _, err := os.Stat(path); os.IsNotExist(err) {
		return nil // no save has completed yet: the old state is "no file"
	}
	if err := e.OpenOverlay(path); err != nil {
		t.Fatalf("reopen after kill: %v", err)
	}
	var out []int
	v := e.user.ov.Load().View()
	for r := 0; r <= upTo; r++ {
		if v.Known(marker(r)) {
			out = append(out, r)
		}
	}
	return out
}

// TestSaveSurvivesKill kills a process at random moments while it saves the
// overlay, 200 times: every reopen must succeed and hold either the old or
// the new contents, never a mix or nothing (the atomic-write requirement).
func TestSaveSurvivesKill(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "user.overlay")
	e, err := Open("testdata/models/demo-v1.klm", Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer e.Close()
	seed := uint64(time.Now().UnixNano())
	t.Logf("seed %d", seed)
	rng := rand.New(rand.NewPCG(seed, 7))
	var have []int // markers in the file before the round
	rounds := 200
	for r := 0; r < rounds; r++ {
		cmd := exec.Command(os.Args[0], "-test.run=^$")
		cmd.Env = append(os.Environ(), crashChildEnv+"="+path+"|"+strconv.Itoa(r))
		out, err := cmd.StdoutPipe()
		if err != nil {
			t.Fatal(err)
		}
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		buf := make([]byte, 6)
		if _, err := out.Read(buf); err != nil {
			t.Fatalf("round %d: child did not start: %v", r, err)
		}
		delay := time.Duration(rng.IntN(40000)) * time.Microsecond
		if r%20 == 19 {
			delay = 300 * time.Millisecond // let some saves finish even on a slow machine
		}
		time.Sleep(delay)
		cmd.Process.Kill()
		cmd.Wait()
		got := markers(t, e, path, r)
		newer := append(append([]int(nil), have...), r)
		if fmt.Sprint(got) != fmt.Sprint(have) && fmt.Sprint(got) != fmt.Sprint(newer) {
			t.Fatalf("round %d: overlay holds markers %v, want %v (old) or %v (new)", r, got, have, newer)
		}
		have = got
		if matches, _ := filepath.Glob(filepath.Join(dir, "*")); len(matches) > 1 && r == rounds-1 {
			t.Logf("temporary files left by killed writers: %d (harmless, never read)", len(matches)-1)
		}
	}
	if len(have) == 0 {
		t.Errorf("no save ever completed in %d rounds", rounds)
	}
	t.Logf("%d of %d rounds completed a save before the kill", len(have), rounds)
}

// TestSaveRemovesStaleTemps checks that leftovers of interrupted saves are
// cleaned up once they are old enough, and fresh ones are left alone.
func TestSaveRemovesStaleTemps(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "u.overlay")
	old := filepath.Join(dir, ".u.overlay.tmp-111")
	fresh := filepath.Join(dir, ".u.overlay.tmp-222")
	other := filepath.Join(dir, ".other.tmp-333")
	for _, p := range []string{old, fresh, other} {
		os.WriteFile(p, []byte("x"), 0o600)
	}
	long := time.Now().Add(-time.Hour)
	os.Chtimes(old, long, long)
	os.Chtimes(other, long, long)
	e, err := Open("testdata/models/demo-v1.klm", Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer e.Close()
	if err := e.Save(path); err != nil {
		t.Fatal(err)
	}
	for p, want := range map[string]bool{old: false, fresh: true, other: true, path: true} {
		if _, err := os.Stat(p); (err == nil) != want {
			t.Errorf("%s exists = %v, want %v", filepath.Base(p), err == nil, want)
		}
	}
}
