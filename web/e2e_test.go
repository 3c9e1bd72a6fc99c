//go:build browser

// Package web holds the WebAssembly route: the engine compiled for browsers
// (wasm/), the Keyloom Notes page (static/) and its end-to-end test, which
// needs Node.js, playwright-core (npm ci) and Chromium, so it builds only
// with the "browser" tag:
//
//	bash .ci/web.sh                         # installs what is missing, then runs it
//	go test -tags browser -count=1 ./web/   # when everything is installed
package web

import (
	"bufio"
	"context"
	"encoding/json"
	"errors"
	"net/http"
	"net/http/httptest"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/keyloom/keyloom"
)

const (
	modelFile  = "../testdata/models/demo-v1.klm"
	inputsFile = "../testdata/routes/inputs.txt"
	// chromiumDefault is where Debian's chromium package puts the browser.
	chromiumDefault = "/usr/bin/chromium"
)

// corrector is the facade's correction entry point, detected as the bridge
// (wasm/main.go) detects it, so both sides agree whether it exists.
type corrector interface {
	Correct(beforeCursor string) (*keyloom.Correction, error)
}

// expectedAnswer is one line of the shared input table with the facade's answers.
type expectedAnswer struct {
	Before  string              `json:"before"`
	Suggest keyloom.Result      `json:"suggest"`
	Correct *keyloom.Correction `json:"correct"`
}

type expectedTable struct {
	CanCorrect bool             `json:"canCorrect"`
	Inputs     []expectedAnswer `json:"inputs"`
}

// readInputs reads the shared input table: one JSON string per line.
func readInputs(t *testing.T) []string {
	t.Helper()
	f, err := os.Open(inputsFile)
	if err != nil {
		t.Fatalf("shared input table: %v", err)
	}
	defer f.Close()
	var out []string
	sc := bufio.NewScanner(f)
	for n := 1; sc.Scan(); n++ {
		var s string
		if err := json.Unmarshal(sc.Bytes(), &s); err != nil {
			t.Fatalf("%s:%d: %v", inputsFile, n, err)
		}
		out = append(out, s)
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	if len(out) == 0 {
		t.Fatalf("%s is empty", inputsFile)
	}
	return out
}

// facadeAnswers asks the Go facade, now, what the browser must answer.
func facadeAnswers(t *testing.T, inputs []string) expectedTable {
	t.Helper()
	eng, err := keyloom.Open(modelFile, keyloom.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer eng.Close()
	c, canCorrect := any(eng).(corrector)
	tab := expectedTable{CanCorrect: canCorrect}
	for _, in := range inputs {
		res, err := eng.Suggest(in)
		if err != nil {
			t.Fatalf("Suggest(%q): %v", in, err)
		}
		a := expectedAnswer{Before: in, Suggest: res}
		if canCorrect {
			if a.Correct, err = c.Correct(in); err != nil {
				t.Fatalf("Correct(%q): %v", in, err)
			}
		}
		tab.Inputs = append(tab.Inputs, a)
	}
	return tab
}

// requireTools fails, with the command that installs them, when the browser
// or the test driver is missing: CI installs them (.ci/web.sh).
func requireTools(t *testing.T) (node, chromium string) {
	t.Helper()
	node, err := exec.LookPath("node")
	if err != nil {
		t.Fatal("node is not installed: run bash .ci/web.sh")
	}
	chromium = os.Getenv("CHROMIUM")
	if chromium == "" {
		chromium = chromiumDefault
	}
	if _, err := os.Stat(chromium); err != nil {
		t.Fatalf("chromium is not installed at %s: run bash .ci/web.sh", chromium)
	}
	if _, err := os.Stat("node_modules/playwright-core/package.json"); err != nil {
		t.Fatal("playwright-core is not installed: run (cd web && npm ci)")
	}
	return node, chromium
}

var summaryLine = regexp.MustCompile(`(?m)^(\d+) passed, (\d+) failed$`)

func TestBrowserNotes(t *testing.T) {
	node, chromium := requireTools(t)
	inputs := readInputs(t)
	work := t.TempDir()

	expected := filepath.Join(work, "expected.json")
	b, err := json.MarshalIndent(facadeAnswers(t, inputs), "", "  ")
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(expected, b, 0o644); err != nil {
		t.Fatal(err)
	}

	dist := filepath.Join(work, "dist")
	start := time.Now()
	if out, err := exec.Command("bash", "build.sh", dist).CombinedOutput(); err != nil {
		t.Fatalf("build.sh: %v\n%s", err, out)
	}
	t.Logf("build.sh (wasm build and page copy) took %v", time.Since(start).Round(time.Millisecond))
	wasm, err := os.Stat(filepath.Join(dist, "main.wasm"))
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("main.wasm is %d bytes", wasm.Size())

	// The page is served from dist; the model from testdata through the
	// page's ?model= parameter, as an embedder with its own model would.
	mux := http.NewServeMux()
	mux.Handle("/", http.FileServer(http.Dir(dist)))
	mux.Handle("/models/", http.StripPrefix("/models/", http.FileServer(http.Dir(filepath.Dir(modelFile)))))
	srv := httptest.NewServer(mux) // listens on 127.0.0.1:0
	defer srv.Close()

	// The screenshot outlives the test so that a person can look at it.
	shots, err := os.MkdirTemp("", "keyloom-web-e2e-")
	if err != nil {
		t.Fatal(err)
	}
	shot := filepath.Join(shots, "notes.png")

	ctx, cancel := context.WithTimeout(context.Background(), 4*time.Minute)
	defer cancel()
	cmd := exec.CommandContext(ctx, node, "e2e/run.mjs", srv.URL+"/?model=/models/demo-v1.klm", expected, shot)
	cmd.Env = append(os.Environ(), "CHROMIUM="+chromium, "PLAYWRIGHT_SKIP_BROWSER_DOWNLOAD=1")
	start = time.Now()
	out, runErr := cmd.CombinedOutput()
	t.Logf("browser run took %v:\n%s", time.Since(start).Round(time.Millisecond), out)
	if errors.Is(ctx.Err(), context.DeadlineExceeded) {
		t.Fatal("browser run timed out")
	}
	if runErr != nil {
		t.Fatalf("browser run failed: %v", runErr)
	}
	m := summaryLine.FindSubmatch(out)
	if m == nil {
		t.Fatal("browser run printed no summary line")
	}
	passed, _ := strconv.Atoi(string(m[1]))
	failed, _ := strconv.Atoi(string(m[2]))
	// One check per table line, plus the interaction checks.
	if failed != 0 || passed < len(inputs)+1 {
		t.Fatalf("browser run: %d passed, %d failed (want at least %d passed)", passed, failed, len(inputs)+1)
	}
	if n := strings.Count(string(out), "matches the Go facade"); n != len(inputs) {
		t.Errorf("browser compared %d table lines, want %d", n, len(inputs))
	}
	shotFiles := []string{shot}
	if _, ok := any((*keyloom.Engine)(nil)).(corrector); ok {
		shotFiles = append(shotFiles, strings.TrimSuffix(shot, ".png")+"-fix.png")
	}
	for _, f := range shotFiles {
		png, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		if len(png) < 8 || string(png[1:4]) != "PNG" {
			t.Fatalf("%s is not a PNG file", f)
		}
		t.Logf("screenshot: %s", f)
	}
}
