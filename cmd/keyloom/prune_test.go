package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/keyloom/keyloom"
	"github.com/keyloom/keyloom/lm"
)

// TestPruneFitsBudgets runs `keyloom prune --max-bytes B` for 20 budgets from
// far too small to above the unpruned file. The check is the contract of the
// issue (common practice, no source): the file written, as the file system
// measures it, is at most the budget and opens; a budget that cannot be met
// fails with errBudgetTooSmall naming a smallest size that is above the
// budget and is itself reachable.
func TestPruneFitsBudgets(t *testing.T) {
	dir := t.TempDir()
	model := buildOpticks(t, dir)
	st, err := os.Stat(model)
	if err != nil {
		t.Fatal(err)
	}
	raw, err := os.ReadFile(model)
	if err != nil {
		t.Fatal(err)
	}
	s, err := newPruneSearch(context.Background(), &env{stdout: io.Discard, stderr: io.Discard}, raw, "")
	if err != nil {
		t.Fatal(err)
	}
	s.minBits, s.maxBits, s.minVocab = 4, 8, 1000
	lo, hi := 2_000.0, 1.2*float64(st.Size())
	for i := range 20 {
		budget := int64(lo * math.Pow(hi/lo, float64(i)/19))
		t.Run(fmt.Sprint(budget), func(t *testing.T) {
			out := filepath.Join(dir, fmt.Sprintf("p%d.klm", i))
			code, _, errs := runCmd(t, dir, "prune", "--model", model, "--max-bytes", fmt.Sprint(budget), "--out", out)
			_, ferr := s.fit(budget)
			var be *budgetError
			if errors.As(ferr, &be) {
				if code != 1 {
					t.Errorf("exit code %d for an impossible budget, want 1 (%s)", code, errs)
				}
				if be.Smallest <= budget {
					t.Errorf("smallest size %d is not above the budget %d", be.Smallest, budget)
				}
				if _, err := s.fit(be.Smallest); err != nil {
					t.Errorf("the smallest size named, %d bytes, cannot be reached: %v", be.Smallest, err)
				}
				return
			}
			if ferr != nil || code != 0 {
				t.Fatalf("prune: code %d, %s, %v", code, errs, ferr)
			}
			fst, err := os.Stat(out)
			if err != nil {
				t.Fatal(err)
			}
			if fst.Size() > budget {
				t.Errorf("wrote %d bytes for a budget of %d", fst.Size(), budget)
			}
			eng, err := keyloom.Open(out, keyloom.Options{VerifyChecksums: true})
			if err != nil {
				t.Fatalf("pruned file does not open: %v", err)
			}
			eng.Close()
		})
	}
}

// TestPruneSweep checks the sweep's JSON, table and plot, and that a larger
// budget never keeps fewer n-grams or gives a larger file (the search only
// ever adds n-grams as the budget grows; common practice, no source).
func TestPruneSweep(t *testing.T) {
	dir := t.TempDir()
	model := buildOpticks(t, dir)
	test := filepath.Join(dir, "t.txt")
	lines := strings.SplitN(readTestFile(t, filepath.Join(refDir, "opticks-test.txt")), "\n", 41)
	if err := os.WriteFile(test, []byte(strings.Join(lines[:40], "\n")), 0o644); err != nil {
		t.Fatal(err)
	}
	plot := filepath.Join(dir, "curve.svg")
	code, out, errs := runCmd(t, dir, "prune", "--model", model, "--sweep", "60KB,150KB,300KB", "--test", test, "--tokenized", "--plot", plot, "--json")
	if code != 0 {
		t.Fatalf("prune --sweep: %d %s", code, errs)
	}
	var reps []pruneReport
	if err := json.Unmarshal([]byte(out), &reps); err != nil {
		t.Fatal(err)
	}
	if len(reps) != 3 {
		t.Fatalf("%d reports, want 3", len(reps))
	}
	for i, r := range reps {
		if int64(r.Bytes) > r.Budget {
			t.Errorf("budget %d: %d bytes", r.Budget, r.Bytes)
		}
		if !(r.Perplexity > 1) || !(r.KSR > 0 && r.KSR < 1) {
			t.Errorf("budget %d: perplexity %v, KSR %v", r.Budget, r.Perplexity, r.KSR)
		}
		if i > 0 && (r.Bytes < reps[i-1].Bytes || r.Kept < reps[i-1].Kept) {
			t.Errorf("budget %d gives %d bytes, %.3f kept; budget %d gave %d, %.3f", r.Budget, r.Bytes, r.Kept, reps[i-1].Budget, reps[i-1].Bytes, reps[i-1].Kept)
		}
	}
	if st, err := os.Stat(plot); err != nil || st.Size() < 1000 {
		t.Errorf("plot not written: %v", err)
	}
	code, out, errs = runCmd(t, dir, "prune", "--model", model, "--sweep", "60KB,150KB")
	if code != 0 || strings.Count(out, "\n") != 3 {
		t.Errorf("table: code %d, %q %s", code, out, errs)
	}
}

func TestPruneUsage(t *testing.T) {
	dir := t.TempDir()
	model := buildOpticks(t, dir)
	cases := []struct {
		name string
		args []string
	}{
		{"no-budget", []string{"--model", model}},
		{"both", []string{"--model", model, "--max-bytes", "1MB", "--sweep", "1MB", "--out", "x"}},
		{"no-out", []string{"--model", model, "--max-bytes", "1MB"}},
		{"bad-size", []string{"--model", model, "--max-bytes", "lots", "--out", "x"}},
		{"bits", []string{"--model", model, "--max-bytes", "1MB", "--out", "x", "--min-bits", "2"}},
		{"plot-without-sweep", []string{"--model", model, "--max-bytes", "1MB", "--out", "x", "--plot", "p.svg"}},
		{"sweep-with-out", []string{"--model", model, "--sweep", "1MB", "--out", "x"}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if code, _, errs := runCmd(t, dir, append([]string{"prune"}, tc.args...)...); code != 2 {
				t.Errorf("exit code %d, want 2 (usage): %s", code, errs)
			}
		})
	}
	// The kept words survive vocabulary pruning.
	keep := filepath.Join(dir, "keep.txt")
	if err := os.WriteFile(keep, []byte("# words\nPrism\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "small.klm")
	if code, _, errs := runCmd(t, dir, "prune", "--model", model, "--max-bytes", "14KB", "--min-vocab", "100", "--keep", keep, "--out", out); code != 0 {
		t.Fatalf("prune: %d %s", code, errs)
	}
	eng, err := keyloom.Open(out, keyloom.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer eng.Close()
	if _, ok := eng.Lexicon().ID("prism"); !ok {
		t.Error("--keep word \"prism\" was dropped")
	}
	if n := eng.Lexicon().Len(); n >= 4660 {
		t.Errorf("vocabulary %d words: not pruned", n)
	}
}

// TestPruneWithCounts builds a model from count shards, prunes it with
// --counts pointing at those shards, and checks that the file fits its budget
// and opens; counts of another text are refused with an error that says so.
// Whether count weighting lowers held-out perplexity is checked in lm
// (TestEntropyPruningVersusCountCutoffs).
func TestPruneWithCounts(t *testing.T) {
	dir := t.TempDir()
	shardDir := func(name, text string) string {
		t.Helper()
		c, err := lm.NewCounter(3)
		if err != nil {
			t.Fatal(err)
		}
		if err := c.AddText(context.Background(), strings.NewReader(text), lm.ScanOptions{Pretokenized: true}, nil); err != nil {
			t.Fatal(err)
		}
		d := filepath.Join(dir, name)
		if err := os.Mkdir(d, 0o755); err != nil {
			t.Fatal(err)
		}
		f, err := os.Create(filepath.Join(d, "part-00000"))
		if err != nil {
			t.Fatal(err)
		}
		defer f.Close()
		if err := c.WriteShard(f); err != nil {
			t.Fatal(err)
		}
		return d
	}
	lines := strings.SplitAfter(readTestFile(t, filepath.Join(refDir, "opticks-train.txt")), "\n")
	own := shardDir("own", strings.Join(lines[:1500], ""))
	other := shardDir("other", strings.Join(lines[1500:2000], ""))
	model := filepath.Join(dir, "c.klm")
	if code, _, errs := runCmd(t, dir, "build", "--from-counts", own, "--out", model); code != 0 {
		t.Fatal(errs)
	}
	out := filepath.Join(dir, "small.klm")
	const budget = 60_000
	if code, _, errs := runCmd(t, dir, "prune", "--model", model, "--counts", own, "--max-bytes", fmt.Sprint(budget), "--out", out); code != 0 {
		t.Fatalf("prune --counts: %d %s", code, errs)
	}
	if st, err := os.Stat(out); err != nil || st.Size() > budget {
		t.Fatalf("pruned file: %v, %v bytes for a budget of %d", err, st, budget)
	}
	eng, err := keyloom.Open(out, keyloom.Options{VerifyChecksums: true})
	if err != nil {
		t.Fatalf("pruned file does not open: %v", err)
	}
	eng.Close()
	code, _, errs := runCmd(t, dir, "prune", "--model", model, "--counts", other, "--max-bytes", fmt.Sprint(budget), "--out", out)
	if code == 0 || !strings.Contains(errs, "counts") {
		t.Errorf("prune with another text's counts: code %d, %q; want an error about the counts", code, errs)
	}
}
