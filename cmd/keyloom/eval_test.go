package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func buildOpticks(t *testing.T, dir string) string {
	t.Helper()
	model := filepath.Join(dir, "o3.klm")
	if code, _, errs := runCmd(t, dir, "build", "--tokenized", "--out", model, filepath.Join(refDir, "opticks-train.txt")); code != 0 {
		t.Fatal(errs)
	}
	return model
}

func TestEvalJSONKeys(t *testing.T) {
	dir := t.TempDir()
	model := buildOpticks(t, dir)
	test := filepath.Join(dir, "t.txt")
	lines := strings.SplitN(readTestFile(t, filepath.Join(refDir, "opticks-test.txt")), "\n", 31)
	os.WriteFile(test, []byte(strings.Join(lines[:30], "\n")), 0o644)
	code, out, errs := runCmd(t, dir, "eval", "--json", "--tokenized", "--plot", filepath.Join(dir, "p.svg"), "--model", model, test)
	if code != 0 {
		t.Fatalf("eval: %d %s", code, errs)
	}
	var rep map[string]any
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"ksr", "top1", "top3", "perplexity", "oov_rate", "words", "keystrokes", "keystrokes_baseline", "latency_p50_us", "latency_p99_us", "model_bytes"} {
		if _, ok := rep[k]; !ok {
			t.Errorf("eval --json lacks %q", k)
		}
	}
	// The ceiling (DESIGN.md "Measurements"): KSR ≤ 1 − words/(letters+spaces).
	if ksr, w, base := rep["ksr"].(float64), rep["words"].(float64), rep["keystrokes_baseline"].(float64); ksr > 1-w/base || ksr <= 0 {
		t.Errorf("ksr %v outside (0, %v]", ksr, 1-w/base)
	}
	if st, err := os.Stat(filepath.Join(dir, "p.svg")); err != nil || st.Size() < 1000 {
		t.Errorf("plot not written: %v", err)
	}
}

func TestEvalBadInput(t *testing.T) {
	dir := t.TempDir()
	model := buildOpticks(t, dir)
	write := func(name, s string) string {
		p := filepath.Join(dir, name)
		os.WriteFile(p, []byte(s), 0o644)
		return p
	}
	cases := []struct {
		name, text string
		ok         bool
	}{
		{"empty", "", false},
		{"one-word", "light", true},
		{"other-script", "свет и цвет. 光と色。", true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, out, errs := runCmd(t, dir, "eval", "--json", "--model", model, write(c.name, c.text))
			if (code == 0) != c.ok {
				t.Errorf("eval %s: code %d (%s %s)", c.name, code, out, errs)
			}
			if strings.Contains(errs, "panic") {
				t.Error(errs)
			}
		})
	}
	if code, _, _ := runCmd(t, dir, "eval", "--k", "9", "--model", model, write("x", "a b")); code != 2 {
		t.Errorf("--k 9: code %d, want 2", code)
	}
}

func readTestFile(t *testing.T, p string) string {
	t.Helper()
	b, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// TestEvalNoiseJSON types held-out Opticks sentences with 8 % of letters
// wrong and checks the report: every corrupted word lands in exactly one
// row of the breakdown, the repaired ones are those picked while typing or
// corrected on space, and the share of corrupted words is near what
// independent letter errors at that rate give, 1 − (1 − 0.08)^len summed
// over the words (the binomial probability of at least one error; the
// typist's rate is a per-letter rate, after Azenkot & Zhai 2012). The band
// is wide (±30 %): letters differ in how often they are missed.
func TestEvalNoiseJSON(t *testing.T) {
	dir := t.TempDir()
	model := buildOpticks(t, dir)
	test := filepath.Join(dir, "t.txt")
	lines := strings.SplitN(readTestFile(t, filepath.Join(refDir, "opticks-test.txt")), "\n", 81)
	text := strings.Join(lines[:80], "\n")
	os.WriteFile(test, []byte(text), 0o644)
	code, out, errs := runCmd(t, dir, "eval", "--json", "--tokenized", "--noise", "0.08", "--model", model, test)
	if code != 0 {
		t.Fatalf("eval --noise: %d %s", code, errs)
	}
	var rep struct {
		Noisy struct {
			Words, Corrupted, Repaired, Broken int64
			Misses                             map[string]any
		}
	}
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatal(err)
	}
	r := rep.Noisy
	count := func(k string) int64 {
		v, ok := r.Misses[k].(float64)
		if !ok {
			t.Fatalf("misses lacks %q: %v", k, r.Misses)
		}
		return int64(v)
	}
	var sum int64
	for _, k := range []string{"predicted", "applied", "real_word", "not_offered", "first_not_applied", "ranked_lower", "wrong_applied"} {
		sum += count(k)
	}
	if sum != r.Corrupted {
		t.Errorf("breakdown sums to %d, want the %d corrupted words", sum, r.Corrupted)
	}
	if got := count("predicted") + count("applied"); got != r.Repaired {
		t.Errorf("predicted + applied = %d, repaired = %d", got, r.Repaired)
	}
	var want float64
	var words int64
	for _, w := range strings.Fields(text) {
		if strings.IndexFunc(w, func(c rune) bool { return c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' }) < 0 {
			continue
		}
		words++
		want += 1 - math.Pow(1-0.08, float64(len(w)))
	}
	if got := float64(r.Corrupted); got < 0.7*want || got > 1.3*want {
		t.Errorf("%d corrupted words of %d, want about %.0f (±30 %%)", r.Corrupted, r.Words, want)
	}
	t.Logf("%d words (%d with letters), %d corrupted (binomial %.0f), %d repaired, %d clean broken", r.Words, words, r.Corrupted, want, r.Repaired, r.Broken)
}

// TestEvalCorrectFolds runs eval --correct with and without
// cross-validation on an invented list of misspelled Opticks words.
func TestEvalCorrectFolds(t *testing.T) {
	dir := t.TempDir()
	model := buildOpticks(t, dir)
	list := filepath.Join(dir, "list.tsv")
	// Invented pairs (common slips and spelling errors of words in the text).
	pairs := "lihgt\tlight\nrefraction\trefraction\nrefracion\trefraction\ncolours\tcolours\ncoulors\tcolours\nprisim\tprism\n" +
		"reflexion\treflexion\nrefelxion\treflexion\nexperiement\texperiment\nobservd\tobserved\nglas\tglass\nrayes\trays\n"
	if err := os.WriteFile(list, []byte(pairs), 0o644); err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name  string
		args  []string
		code  int
		folds float64
	}{
		{"no folds", nil, 0, 0},
		{"three folds", []string{"--folds", "3"}, 0, 3},
		{"one fold", []string{"--folds", "1"}, 2, 0},
		{"more folds than pairs", []string{"--folds", "13"}, 2, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			args := append([]string{"eval", "--json", "--model", model, "--correct", list}, tc.args...)
			code, out, errs := runCmd(t, dir, args...)
			if code != tc.code {
				t.Fatalf("exit %d, want %d: %s", code, tc.code, errs)
			}
			if code != 0 {
				return
			}
			var rep map[string]float64
			if err := json.Unmarshal([]byte(out), &rep); err != nil {
				t.Fatal(err)
			}
			// Every pair is corrected once; a top-1 hit is a top-3 hit.
			if rep["n"] != 12 || rep["folds"] != tc.folds || rep["top1"] > rep["top3"] || rep["top3"] > 1 {
				t.Errorf("report %v, want n 12, folds %v, top1 ≤ top3 ≤ 1", rep, tc.folds)
			}
			// refraction, colours and reflexion are typed right, so the
			// lexicon knows them; a typed word left alone has no proposal.
			if rep["known_typed"] < 3 || rep["known_left"] > rep["known_typed"] || rep["known_left"] > rep["no_correction"] {
				t.Errorf("report %v, want known_typed ≥ 3 and known_left ≤ known_typed, no_correction", rep)
			}
		})
	}
}
