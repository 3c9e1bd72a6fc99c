package main

import (
	"bufio"
	"bytes"
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strings"
	"testing"

	"github.com/keyloom/keyloom"
)

const (
	modelPath  = "../testdata/models/demo-v1.klm"
	inputsPath = "../testdata/routes/inputs.txt"
)

// readInputs returns the shared cross-route input table.
func readInputs(t *testing.T) []string {
	t.Helper()
	f, err := os.Open(inputsPath)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var in []string
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		var s string
		if err := json.Unmarshal(sc.Bytes(), &s); err != nil {
			t.Fatalf("%s line %d: %v", inputsPath, len(in)+1, err)
		}
		in = append(in, s)
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	if len(in) == 0 {
		t.Fatalf("%s is empty", inputsPath)
	}
	return in
}

// writeExpected writes the Go facade's answers for every input, one JSON
// line each, to path (Suggest) and corrPath (Correct): the reference the C
// program compares its answers with.
func writeExpected(t *testing.T, path, corrPath string, inputs []string) {
	t.Helper()
	eng, err := keyloom.Open(modelPath, keyloom.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer eng.Close()
	var buf, cbuf bytes.Buffer
	for _, in := range inputs {
		res, err := eng.Suggest(in)
		if err != nil {
			t.Fatalf("Suggest(%q): %v", in, err)
		}
		corr, err := eng.Correct(in)
		if err != nil {
			t.Fatalf("Correct(%q): %v", in, err)
		}
		for _, x := range []struct {
			b *bytes.Buffer
			v any
		}{{&buf, res}, {&cbuf, corr}} {
			js, err := json.Marshal(x.v)
			if err != nil {
				t.Fatal(err)
			}
			x.b.Write(js)
			x.b.WriteByte('\n')
		}
	}
	if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(corrPath, cbuf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
}

// run runs a command and fails the test with its output if it fails.
func run(t *testing.T, dir string, env []string, name string, args ...string) string {
	t.Helper()
	cmd := exec.Command(name, args...)
	cmd.Dir = dir
	cmd.Env = append(os.Environ(), env...)
	out, err := cmd.CombinedOutput()
	if err != nil {
		t.Fatalf("%s %s: %v\n%s", name, strings.Join(args, " "), err, out)
	}
	return string(out)
}

// TestCAPI builds the shared library, compiles the C test program against
// keyloom.h and runs it. It fails (never skips) when gcc or cgo is missing:
// the C route must not silently go untested. The expected answers are
// computed here, from the Go facade, so the check is "C answers == Go
// answers for the same model and input", not a stored snapshot.
func TestCAPI(t *testing.T) {
	if runtime.GOOS == "windows" {
		t.Fatal("capi: the test harness links with gcc and rpath; run it on a Unix host")
	}
	gcc, err := exec.LookPath("gcc")
	if err != nil {
		t.Fatalf("gcc is required for the C interface test (CI installs it): %v", err)
	}
	goTool := filepath.Join(runtime.GOROOT(), "bin", "go")
	dir := t.TempDir()
	lib := filepath.Join(dir, "libkeyloom.so")
	run(t, ".", []string{"CGO_ENABLED=1"}, goTool, "build", "-buildmode=c-shared", "-o", lib, ".")

	bin := filepath.Join(dir, "klm_test")
	run(t, ".", nil, gcc, "-std=c11", "-D_POSIX_C_SOURCE=200809L", "-Wall", "-Wextra", "-Werror",
		"-I", ".", "-o", bin, filepath.Join("test", "klm_test.c"),
		"-L", dir, "-lkeyloom", "-Wl,-rpath,"+dir, "-lpthread")

	inputs := readInputs(t)
	expected := filepath.Join(dir, "expected-suggest.jsonl")
	expCorr := filepath.Join(dir, "expected-correct.jsonl")
	writeExpected(t, expected, expCorr, inputs)

	model, err := filepath.Abs(modelPath)
	if err != nil {
		t.Fatal(err)
	}
	in, err := filepath.Abs(inputsPath)
	if err != nil {
		t.Fatal(err)
	}
	out := run(t, dir, nil, bin, model, in, expected, expCorr, dir)
	t.Log(strings.TrimSpace(out))
	if !strings.Contains(out, " 0 failed") {
		t.Errorf("klm_test output lacks a zero failure count:\n%s", out)
	}
}
