package correct

import (
	"fmt"
	"slices"
	"testing"
)

// widestHits runs the widest pass of c for w as runPass does, with the
// keys' walk first or (oneWalk) the keys as a filter of one walk, and
// returns the words found and their costs, sorted by ID.
func widestHits(t *testing.T, c *Corrector, w string, oneWalk bool) []hit {
	t.Helper()
	s := &search{below: c.below}
	s.reset(c.ch, c.lex, w, float32(c.opts.MaxCost), min(len(w)+maxExtra, 2*maxTyped))
	old := c.oneWalk
	c.oneWalk = oneWalk
	c.runPass(s, w, 2, c.opts.MaxCost, true)
	c.oneWalk = old
	h := slices.Clone(s.hits)
	slices.SortFunc(h, func(a, b hit) int { return int(a.id) - int(b.id) })
	return h
}

// TestKeyWalkSameWords checks that the widest pass walked in two (the
// keys alone, then the weighted rows along the words they keep) finds
// exactly the words, at exactly the costs, of the one walk with the keys
// as a filter, which TestSkeletonPassKeepsWords checks against the whole
// lexicon's walk and plain edit distances (the Damerau-Levenshtein
// distance restricted to optimal string alignment, Damerau 1964; the
// reference is this package's unitChannel). Words: every development
// misspelling and random strings, some short (a short typed skeleton lets
// the keys through much of the lexicon).
func TestKeyWalkSameWords(t *testing.T) {
	c, _ := subtlexTrieCorrector(t)
	typed := typedSample(t, 1, 0, 4, 60, 1, 12)
	tests := []struct {
		name  string
		words []string
	}{
		{"development", typed[:len(typed)-60]},
		{"random", typed[len(typed)-60:]},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			found := 0
			for _, w := range tt.words {
				one, two := widestHits(t, c, w, true), widestHits(t, c, w, false)
				found += len(one)
				if fmt.Sprint(one) != fmt.Sprint(two) {
					t.Errorf("%q: the two walks found %v, the one walk %v", w, two, one)
				}
			}
			if found == 0 {
				t.Error("no word found at all: the comparison tests nothing")
			}
		})
	}
}

// TestKeyWalkSameCandidates checks that Correct gives every development
// misspelling the same eight candidates (word, ID, kind, cost, score) and
// the same decision with the widest pass walked in two as in one walk
// with the keys as a filter: over the SUBTLEX-US trie with the engine's
// cap (benchCap) and over the SUBTLEX-US ∪ SCOWL flat lexicon with no cap.
// (The pass's words themselves are checked by TestKeyWalkSameWords.)
func TestKeyWalkSameCandidates(t *testing.T) {
	d := corpus(t)
	trie := newTrieLex(t, d.subtlexLex)
	capped, err := New(trie, d.unigramScorer(trie.words), Options{MaxStates: benchCap})
	if err != nil {
		t.Fatal(err)
	}
	flat, _, _ := devCorrector(t, Options{})
	tests := []struct {
		name string
		c    *Corrector
	}{
		{"trie-cap", capped},
		{"flat-nocap", flat},
	}
	pairs := devPairs(t)
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			wide := 0
			for _, p := range pairs {
				tt.c.oneWalk = true
				one, dOne := tt.c.Correct(p.Typed, nil, 8, nil)
				tt.c.oneWalk = false
				two, dTwo := tt.c.Correct(p.Typed, nil, 8, nil)
				if fmt.Sprint(one, dOne) != fmt.Sprint(two, dTwo) {
					t.Errorf("%q: two walks gave %v %v, one walk %v %v", p.Typed, two, dTwo, one, dOne)
				}
				if len(one) > 0 && one[0].Cost > secondPass {
					wide++
				}
			}
			if wide == 0 {
				t.Error("no best candidate from the widest pass: the comparison tests nothing")
			}
			t.Logf("%d words whose best candidate costs over %d nats", wide, secondPass)
		})
	}
}
