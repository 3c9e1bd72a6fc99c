package main

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestLearnForgetMerge(t *testing.T) {
	dir := t.TempDir()
	model := buildOpticks(t, dir)
	text := filepath.Join(dir, "u.txt")
	os.WriteFile(text, []byte("Meet me at the Quillon shed.\n\nMeet me at the Quillon shed tomorrow.\n\nMy card is 4111 1111 1111 1111 and mail wren@example.org ok.\n"), 0o644)
	user := filepath.Join(dir, "u.ov")
	if code, _, errs := runCmd(t, dir, "learn", "--model", model, "--user", user, text); code != 0 {
		t.Fatal(errs)
	}
	st, err := os.Stat(user)
	if err != nil {
		t.Fatal(err)
	}
	if st.Mode().Perm() != 0o600 {
		t.Errorf("overlay mode %v, want 0600 (typed text is personal data)", st.Mode().Perm())
	}
	raw, _ := os.ReadFile(user)
	for _, secret := range []string{"4111", "wren@", "example.org"} {
		if bytes.Contains(raw, []byte(secret)) {
			t.Errorf("overlay file contains the secret %q", secret)
		}
	}
	_, out, _ := runCmd(t, dir, "suggest", "--json", "--model", model, "--user", user, "meet me at the qu")
	if !strings.Contains(out, "Quillon") {
		t.Errorf("learned word not suggested: %s", out)
	}
	merged := filepath.Join(dir, "merged.klm")
	if code, _, errs := runCmd(t, dir, "merge", "--model", model, "--user", user, "--out", merged); code != 0 {
		t.Fatal(errs)
	}
	if _, out, _ := runCmd(t, dir, "suggest", "--model", merged, "meet me at the qu"); !strings.Contains(out, "Quillon") {
		t.Errorf("merged model lacks the overlay: %s", out)
	}
	if code, _, errs := runCmd(t, dir, "forget", "--model", model, "--user", user, "quillon"); code != 0 {
		t.Fatal(errs)
	}
	raw, _ = os.ReadFile(user)
	if bytes.Contains(bytes.ToLower(raw), []byte("quillon")) {
		t.Errorf("forgotten word still in the overlay file")
	}
	if _, out, _ := runCmd(t, dir, "suggest", "--model", model, "--user", user, "meet me at the qu"); strings.Contains(out, "Quillon") {
		t.Errorf("forgotten word still suggested: %s", out)
	}
	// A damaged overlay is refused with a clear error.
	bad := filepath.Join(dir, "bad.ov")
	os.WriteFile(bad, raw[:len(raw)/2], 0o600)
	if code, _, errs := runCmd(t, dir, "suggest", "--model", model, "--user", bad, "meet "); code != 1 || !strings.Contains(errs, "overlay") {
		t.Errorf("damaged overlay: code %d, %q", code, errs)
	}
}

func TestExportImportARPA(t *testing.T) {
	dir := t.TempDir()
	model := buildOpticks(t, dir)
	arpa := filepath.Join(dir, "m.arpa")
	if code, _, errs := runCmd(t, dir, "export", "--arpa", "--model", model, "--out", arpa); code != 0 {
		t.Fatal(errs)
	}
	test := filepath.Join(refDir, "opticks-test.txt")
	ppl := func(m string) float64 {
		t.Helper()
		code, out, errs := runCmd(t, dir, "eval", "--ppl", "--json", "--tokenized", "--model", m, test)
		var r map[string]float64
		if code != 0 || json.Unmarshal([]byte(out), &r) != nil || r["perplexity"] == 0 {
			t.Fatalf("eval %s: exit %d: %s %s", m, code, out, errs)
		}
		return r["perplexity"]
	}
	before := ppl(model)
	tests := []struct {
		name  string
		qbits string
		tol   float64 // relative perplexity difference allowed
	}{
		// ARPA keeps 7 decimals of log10: a lossless import is the same
		// model within that rounding.
		{"lossless", "0", 1e-4},
		// The default 8-bit import quantizes the probabilities again:
		// 8-bit codebooks cost well under 1 % perplexity (Whittaker & Raj
		// 2001, from memory); 0.5 % is common practice, no source.
		{"8-bit", "8", 5e-3},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			back := filepath.Join(dir, "back-"+tc.name+".klm")
			if code, _, errs := runCmd(t, dir, "build", "--from-arpa", arpa, "--qbits", tc.qbits, "--out", back); code != 0 {
				t.Fatal(errs)
			}
			if after := ppl(back); abs(after-before) > tc.tol*before {
				t.Errorf("perplexity %v before export, %v after a %s import", before, after, tc.name)
			}
		})
	}
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}

func TestEvalSplit(t *testing.T) {
	dir := t.TempDir()
	model := buildOpticks(t, dir)
	text := filepath.Join(dir, "user.txt")
	var b strings.Builder
	for i := range 60 {
		b.WriteString([]string{"Meet me at the Quillon shed after lunch.\n", "Bring the blue ladder to the shed.\n", "Thanks a million for the ladder.\n"}[i%3])
	}
	os.WriteFile(text, []byte(b.String()), 0o644)
	code, out, errs := runCmd(t, dir, "eval", "--json", "--split", "0.8", "--model", model, text)
	if code != 0 {
		t.Fatal(errs)
	}
	var rep map[string]map[string]any
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatal(err)
	}
	for _, side := range []string{"base", "personal"} {
		for _, k := range []string{"ksr", "top1", "top3", "perplexity", "oov_rate", "words", "keystrokes", "keystrokes_baseline", "latency_p50_us", "latency_p99_us", "model_bytes"} {
			if _, ok := rep[side][k]; !ok {
				t.Errorf("%s lacks %q", side, k)
			}
		}
	}
	// Repeated phrases learned from the first 80 % must help on the rest
	// (the point of personalization; common practice, no source).
	if rep["personal"]["ksr"].(float64) <= rep["base"]["ksr"].(float64) {
		t.Errorf("personal KSR %v not above base %v", rep["personal"]["ksr"], rep["base"]["ksr"])
	}
}
