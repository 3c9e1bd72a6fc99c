package main

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"
)

// runIO runs the tool in-process with the given standard input.
func runIO(t *testing.T, stdin string, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	e := &env{stdin: strings.NewReader(stdin), stdout: &out, stderr: &errb, cacheDir: t.TempDir()}
	code := run(context.Background(), e, args)
	return code, out.String(), errb.String()
}

// TestCountMapReduceBuild runs the streaming map/reduce pipeline locally —
// `count map` on three input splits cut at line ends, the lines sorted by
// bytes (what the engine's shuffle, or LC_ALL=C sort, does), `count reduce`
// — then `build --from-counts` and checks the model file is byte-identical
// to `build` over the whole text, and to bounded (--mem) and single-worker
// builds (the model must not depend on how counting was organised).
func TestCountMapReduceBuild(t *testing.T) {
	text, err := os.ReadFile(filepath.Join(refDir, "opticks-train.txt"))
	if err != nil {
		t.Fatal(err)
	}
	text = text[:120000]
	text = text[:bytes.LastIndexByte(text, '\n')+1]
	lines := strings.SplitAfter(string(text), "\n")
	var mapped []string
	for i := range 3 {
		split := strings.Join(lines[i*len(lines)/3:(i+1)*len(lines)/3], "")
		code, out, errs := runIO(t, split, "count", "map", "--tokenized", "--order", "3")
		if code != 0 {
			t.Fatalf("count map on split %d: code %d: %s", i, code, errs)
		}
		mapped = append(mapped, strings.SplitAfter(out, "\n")...)
	}
	sort.Strings(mapped)
	code, reduced, errs := runIO(t, strings.Join(mapped, ""), "count", "reduce")
	if code != 0 {
		t.Fatalf("count reduce: code %d: %s", code, errs)
	}

	// The metadata records source names: give the text file and the shard
	// directory the same name, in two different working directories.
	textDir, shardRoot := t.TempDir(), t.TempDir()
	if err := os.WriteFile(filepath.Join(textDir, "corpus"), text, 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.Mkdir(filepath.Join(shardRoot, "corpus"), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(shardRoot, "corpus", "part-00000"), []byte(reduced), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(shardRoot, "corpus", "_SUCCESS"), nil, 0o644); err != nil {
		t.Fatal(err)
	}
	out := t.TempDir()
	build := func(dir, name string, args ...string) []byte {
		t.Helper()
		t.Chdir(dir)
		path := filepath.Join(out, name)
		args = append([]string{"build", "--out", path, "--order", "3"}, args...)
		if code, _, errs := runIO(t, "", args...); code != 0 {
			t.Fatalf("keyloom %v: code %d: %s", args, code, errs)
		}
		b, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		return b
	}
	want := build(textDir, "whole", "--tokenized", "--workers", "1", "corpus")
	cases := []struct {
		name string
		dir  string
		args []string
	}{
		{"from-counts", shardRoot, []string{"--from-counts", "corpus"}},
		{"from-counts/mem", shardRoot, []string{"--from-counts", "corpus", "--mem", "16KB"}},
		{"workers=2", textDir, []string{"--tokenized", "--workers", "2", "corpus"}},
		{"workers=2/mem", textDir, []string{"--tokenized", "--workers", "2", "--mem", "64KB", "corpus"}},
	}
	for _, tc := range cases {
		if got := build(tc.dir, strings.ReplaceAll(tc.name, "/", "-"), tc.args...); !bytes.Equal(got, want) {
			t.Errorf("%s: model file differs from the single-process build (%d vs %d bytes)", tc.name, len(got), len(want))
		}
	}
}

// TestCountUsage checks the command-line mistakes of count and build's new flags.
func TestCountUsage(t *testing.T) {
	cases := []struct {
		name string
		args []string
		want int
	}{
		{"no-step", []string{"count"}, 2},
		{"unknown-step", []string{"count", "shuffle"}, 2},
		{"map-bad-order", []string{"count", "map", "--order", "9"}, 2},
		{"map-bad-mem", []string{"count", "map", "--mem", "lots"}, 2},
		{"map-file-arg", []string{"count", "map", "x.txt"}, 2},
		{"help", []string{"count", "--help"}, 0},
		{"build-bad-mem", []string{"build", "--out", "x", "--mem", "-3", "a.txt"}, 2},
		{"build-bad-workers", []string{"build", "--out", "x", "--workers", "0", "a.txt"}, 2},
		{"build-missing-shards", []string{"build", "--out", "x", "--from-counts", "/nonexistent/keyloom-shards"}, 1},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if code, _, errs := runIO(t, "", tc.args...); code != tc.want {
				t.Errorf("keyloom %v: code %d, want %d (%s)", tc.args, code, tc.want, errs)
			}
		})
	}
}
