package main

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// runCmd runs the tool in-process and returns its exit code and output.
func runCmd(t *testing.T, cache string, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	e := &env{stdin: strings.NewReader(""), stdout: &out, stderr: &errb, cacheDir: cache}
	code := run(context.Background(), e, args)
	return code, out.String(), errb.String()
}

const refDir = "../../lm/testdata"

func TestHelp(t *testing.T) {
	for _, args := range [][]string{{"help"}, {"--help"}, {"build", "--help"}, {"suggest", "-h"}, {"eval", "--help"}, {"inspect", "--help"}, {"demo", "--help"}} {
		code, out, _ := runCmd(t, t.TempDir(), args...)
		if code != 0 || strings.Count(out, "usage:") != 1 {
			t.Errorf("keyloom %v: code %d, want the usage once, output %q", args, code, out)
		}
	}
	if code, _, _ := runCmd(t, t.TempDir(), "frobnicate"); code != 2 {
		t.Errorf("unknown command: code %d, want 2", code)
	}
}

// TestBuildEvalMatchesReference builds a lossless order-3 model from the
// Opticks split and checks `eval --ppl --json` against the independent Python
// reference (lm/testdata/reference/mkn.py; Chen & Goodman 1998 formulas).
func TestBuildEvalMatchesReference(t *testing.T) {
	dir := t.TempDir()
	model := filepath.Join(dir, "o3.klm")
	code, out, errs := runCmd(t, dir, "build", "--tokenized", "--qbits", "0", "--order", "3", "--out", model, filepath.Join(refDir, "opticks-train.txt"))
	if code != 0 {
		t.Fatalf("build: code %d: %s %s", code, out, errs)
	}
	code, out, errs = runCmd(t, dir, "eval", "--ppl", "--json", "--tokenized", "--model", model, filepath.Join(refDir, "opticks-test.txt"))
	if code != 0 {
		t.Fatalf("eval: code %d: %s", code, errs)
	}
	var got map[string]float64
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatalf("eval --json: %v\n%s", err, out)
	}
	var ref map[string]any
	b, err := os.ReadFile(filepath.Join(refDir, "reference", "opticks-order3.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"perplexity", "perplexity_with_oov", "oov", "tokens"} {
		want := ref[k].(float64)
		if math.Abs(got[k]-want) > 1e-9*want {
			t.Errorf("eval %s = %v, want %v (reference)", k, got[k], want)
		}
	}
	// inspect --json has the documented keys.
	code, out, errs = runCmd(t, dir, "inspect", "--json", "--verify", model)
	if code != 0 {
		t.Fatalf("inspect: %d %s", code, errs)
	}
	var rep map[string]any
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"bytes", "ngrams", "bytes_per_ngram", "sections", "layouts"} {
		if _, ok := rep[k]; !ok {
			t.Errorf("inspect --json lacks %q", k)
		}
	}
	// A model estimated from counts is written in the newest layouts
	// (lm/FORMAT.md version 6, trie/FORMAT.md version 3).
	if l, _ := rep["layouts"].(map[string]any); l["lexicon"] != 3.0 || l["ngrams"] != 6.0 {
		t.Errorf("inspect layouts = %v, want lexicon 3 and ngrams 6", rep["layouts"])
	}
	// Bigram and trigram counts equal the reference's distinct n-grams.
	ng, refNG := rep["ngrams"].([]any), ref["ngrams"].([]any)
	if len(ng) != 3 || ng[1] != refNG[1] || ng[2] != refNG[2] {
		t.Errorf("inspect ngrams = %v, reference %v", ng, refNG)
	}
}

func TestSuggestJSON(t *testing.T) {
	dir := t.TempDir()
	text := filepath.Join(dir, "t.txt")
	os.WriteFile(text, []byte("See you at the shed. See you at the shed tomorrow. See you at the hall.\n"), 0o644)
	model := filepath.Join(dir, "m.klm")
	if code, _, errs := runCmd(t, dir, "build", "--out", model, text); code != 0 {
		t.Fatal(errs)
	}
	code, out, errs := runCmd(t, dir, "suggest", "--json", "--model", model, "see you at the ")
	if code != 0 {
		t.Fatal(errs)
	}
	var res struct {
		Predictions []struct{ Word string }
	}
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatal(err)
	}
	// "shed" follows "at the" twice, "hall" once: by any smoothing that
	// discounts, shed ranks first (common practice, no source).
	if len(res.Predictions) == 0 || res.Predictions[0].Word != "shed" {
		t.Errorf("suggest = %s, want shed first", out)
	}
	code, out, _ = runCmd(t, dir, "suggest", "--model", model, "See you at the Sh")
	if code != 0 || !strings.Contains(out, "Shed") {
		t.Errorf("completion with typed capital: %q", out)
	}
}

func TestBuildBadInput(t *testing.T) {
	dir := t.TempDir()
	write := func(name string, b []byte) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, b, 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	junk := make([]byte, 4096)
	for i := range junk {
		junk[i] = byte(i * 7919 % 256)
	}
	huge := bytes.Repeat([]byte("a"), 1<<20)
	cases := []struct {
		name string
		file string
		ok   bool
	}{
		{"empty", write("empty.txt", nil), false},
		{"binary", write("junk.bin", junk), true}, // bytes that happen to spell letters count as words
		{"huge-word", write("huge.txt", append(huge, []byte(" and then some words.")...)), true},
		{"invalid-utf8", write("bad.txt", []byte("caf\xe9 au lait \xff\xfe is nice.")), true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, _, errs := runCmd(t, dir, "build", "--out", filepath.Join(dir, c.name+".klm"), c.file)
			if (code == 0) != c.ok {
				t.Errorf("build %s: code %d (%s), want success=%v", c.name, code, errs, c.ok)
			}
			if strings.Contains(errs, "panic") {
				t.Errorf("panic: %s", errs)
			}
		})
	}
	if code, _, _ := runCmd(t, dir, "inspect", write("not.klm", []byte("hello"))); code != 1 {
		t.Errorf("inspect of a text file: code %d, want 1", code)
	}
	if code, _, _ := runCmd(t, dir, "build", "--qbits", "3", "--out", "x", "y"); code != 2 {
		t.Errorf("--qbits 3: code %d, want 2", code)
	}
}

func TestDemo(t *testing.T) {
	code, out, errs := runCmd(t, t.TempDir(), "demo")
	if code != 0 {
		t.Fatalf("demo: %d %s", code, errs)
	}
	for _, want := range []string{"Built a demo model", "perplexity", "invented"} {
		if !strings.Contains(out, want) {
			t.Errorf("demo output lacks %q:\n%s", want, out)
		}
	}
}
