package correct

import (
	"math/rand"
	"os"
	"strings"
	"testing"
	"time"
)

// typedSample returns test inputs for the search: the lower-cased typed
// side of every every-th development pair (devPairs) that Correct
// accepts (at most max of them, 0 for no limit), then n random strings of
// minLen to minLen+spread-1 letters, apostrophes and hyphens drawn from
// seed, fixed so that failures replay.
func typedSample(t testing.TB, every, max int, seed int64, n, minLen, spread int) []string {
	t.Helper()
	var typed []string
	pairs := devPairs(t)
	for i := 0; i < len(pairs) && (max == 0 || len(typed) < max); i += every {
		w := strings.ToLower(pairs[i].Typed)
		if len(w) <= maxTyped && latinOnly(w) {
			typed = append(typed, w)
		}
	}
	rng := rand.New(rand.NewSource(seed))
	for range n {
		b := make([]byte, minLen+rng.Intn(spread))
		for i := range b {
			b[i] = "abcdefghijklmnopqrstuvwxyz'-"[rng.Intn(28)]
		}
		typed = append(typed, string(b))
	}
	return typed
}

// devPairs reads misspellings-dev.tsv (development half of the English
// Wikipedia "Lists of common misspellings/For machines", see
// corpora/ and shared/data/SOURCES.md).
func devPairs(t testing.TB) []Pair {
	t.Helper()
	f, err := os.Open("../corpora/misspellings-dev.tsv")
	if err != nil {
		t.Fatalf("open: %v", err)
	}
	defer f.Close()
	p, err := ParsePairs(f)
	if err != nil {
		t.Fatalf("ParsePairs: %v", err)
	}
	return p
}

type devScore struct {
	n, top1, top3, applied, appliedRight int
	elapsed                              time.Duration
}

func (s devScore) pct(k int) float64 { return 100 * float64(k) / float64(s.n) }

// scoreDev corrects every pair and counts hits: a hit when any listed
// correction equals a candidate case-insensitively.
func scoreDev(c *Corrector, pairs []Pair, miss func(Pair, []Candidate)) devScore {
	var s devScore
	var buf []Candidate
	start := time.Now()
	for _, p := range pairs {
		var dec Decision
		buf, dec = c.Correct(p.Typed, nil, 3, buf)
		s.n++
		hit := func(k int) bool {
			for _, cand := range buf[:min(k, len(buf))] {
				for _, w := range p.Intended {
					if strings.EqualFold(cand.Word, w) {
						return true
					}
				}
			}
			return false
		}
		if hit(1) {
			s.top1++
		}
		if hit(3) {
			s.top3++
		} else if miss != nil {
			miss(p, buf)
		}
		if dec.Apply {
			s.applied++
			if hit(1) {
				s.appliedRight++
			}
		}
	}
	s.elapsed = time.Since(start)
	return s
}

// Targets from the project brief: top-1 ≥ 90 %, top-3 ≥ 97 % on the dev
// list with the default model (project goal, no outside source). The
// cross-validated figures are held to them too: they estimate the
// held-out half of the list, which the goal is about. (Rules seen in only
// one fold cannot help the held-out fold, so CV is below train-on-all;
// measured 93.28 % and 97.01 %, BENCHMARKS.md.)
const (
	wantTop1 = 90.0
	wantTop3 = 97.0
)

func TestDevAccuracy(t *testing.T) {
	pairs := devPairs(t)
	c, _, _ := devCorrector(t, Options{})
	s := scoreDev(c, pairs, nil)
	t.Logf("train-on-all: n=%d top1=%.2f%% top3=%.2f%% auto-applied %d (%.1f%% right) %v/word",
		s.n, s.pct(s.top1), s.pct(s.top3), s.applied, 100*float64(s.appliedRight)/float64(max(s.applied, 1)), s.elapsed/time.Duration(s.n))
	if s.pct(s.top1) < wantTop1 || s.pct(s.top3) < wantTop3 {
		t.Errorf("train-on-all top1 %.1f%% top3 %.1f%%, want ≥ %v%% and ≥ %v%%", s.pct(s.top1), s.pct(s.top3), wantTop1, wantTop3)
	}
	// Auto-apply should be right far more often than not: false corrections
	// are worse than misses (common practice, no source).
	if prec := float64(s.appliedRight) / float64(max(s.applied, 1)); prec < 0.95 {
		t.Errorf("auto-apply precision %.3f, want ≥ 0.95", prec)
	}

	// k-fold cross-validation: the error model is trained on k-1 folds and
	// tested on the held-out one.
	const k = 5
	var cv devScore
	for f := 0; f < k; f++ {
		train, test := SplitPairs(pairs, f, k)
		em := TrainErrorModel(train, TrainOptions{})
		cf, _, _ := devCorrector(t, Options{ErrorModel: em})
		fs := scoreDev(cf, test, nil)
		t.Logf("fold %d: top1=%.2f%% top3=%.2f%%", f, fs.pct(fs.top1), fs.pct(fs.top3))
		cv.n += fs.n
		cv.top1 += fs.top1
		cv.top3 += fs.top3
		cv.applied += fs.applied
		cv.appliedRight += fs.appliedRight
	}
	t.Logf("%d-fold CV: top1=%.2f%% top3=%.2f%% auto-applied %d (%.1f%% right)", k, cv.pct(cv.top1), cv.pct(cv.top3), cv.applied, 100*float64(cv.appliedRight)/float64(max(cv.applied, 1)))
	if cv.pct(cv.top1) < wantTop1 || cv.pct(cv.top3) < wantTop3 {
		t.Errorf("CV top1 %.2f%% top3 %.2f%%, want ≥ %v%% and ≥ %v%%", cv.pct(cv.top1), cv.pct(cv.top3), wantTop1, wantTop3)
	}
}
