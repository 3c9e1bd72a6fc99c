package correct

import (
	"fmt"
	"slices"
	"testing"
)

// keysPassHits runs the keys' pass's walk of c for w (walkKeys at
// budget, no ranker) and returns the words found and their costs, sorted
// by ID.
func keysPassHits(t *testing.T, c *Corrector, w string, budget float64) []hit {
	t.Helper()
	s := &search{below: c.below}
	s.reset(c.ch, c.lex, w, float32(budget), min(len(w)+maxExtra, 2*maxTyped))
	c.walkKeys(s, w)
	h := slices.Clone(s.hits)
	slices.SortFunc(h, func(a, b hit) int { return int(a.id) - int(b.id) })
	return h
}

// wholeHits walks the whole lexicon of c for w within budget and returns
// the words found that skelKeeps keeps, with their costs, sorted by ID.
func wholeHits(t *testing.T, c *Corrector, w string, budget float64) []hit {
	t.Helper()
	s := &search{below: c.below}
	s.reset(c.ch, c.lex, w, float32(budget), min(len(w)+maxExtra, 2*maxTyped))
	s.run()
	var h []hit
	var buf []byte
	for _, x := range s.hits {
		buf = c.lex.AppendWord(buf[:0], x.id)
		if skelKeeps(w, string(buf)) {
			h = append(h, x)
		}
	}
	slices.SortFunc(h, func(a, b hit) int { return int(a.id) - int(b.id) })
	return h
}

// TestKeysPassMiddleWords checks the words the keys' pass ranks as its
// middle share: walked once at the full budget, the words it finds within
// secondPass are exactly those the whole lexicon's walk at secondPass
// finds and the keys keep (skelKeeps, plain optimal-string-alignment
// distances, Damerau 1964, computed directly), at exactly the same
// costs; so ranking them first and the rest after the middle pass's test
// is the middle pass over the keys followed by the widest pass. (The
// whole lexicon's walk is checked against the row recurrence by
// TestBelowBoundKeepsWords.) Words: development misspellings and random
// strings, some short.
func TestKeysPassMiddleWords(t *testing.T) {
	c, _ := subtlexTrieCorrector(t)
	typed := typedSample(t, 4, 0, 16, 40, 2, 10)
	tests := []struct {
		name  string
		words []string
	}{
		{"development", typed[:len(typed)-40]},
		{"random", typed[len(typed)-40:]},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			found, above := 0, 0
			for _, w := range tt.words {
				all := keysPassHits(t, c, w, c.opts.MaxCost)
				var mid []hit
				for _, h := range all {
					if h.cost <= secondPass {
						mid = append(mid, h)
					} else {
						above++
					}
				}
				want := wholeHits(t, c, w, secondPass)
				found += len(want)
				if fmt.Sprint(mid) != fmt.Sprint(want) {
					t.Errorf("%q: keys' pass within %d nats %v, whole lexicon under the keys %v", w, secondPass, mid, want)
				}
			}
			if found == 0 || above == 0 {
				t.Errorf("%d middle and %d wider words found: the comparison tests too little", found, above)
			}
		})
	}
}

// TestKeysPassRanksAsTwoPasses checks that Correct with the keys' pass
// gives every development misspelling the candidates (words, costs,
// scores) and the decision of the two passes it stands for, walked apart
// over the same keys: the middle pass over the keys at secondPass, ending
// the search when its best candidate reaches passRef(1), then the widest
// one (written out in the test with walkKeys and the ranker). SUBTLEX-US
// trie, with and without the engine's cap (benchCap).
func TestKeysPassRanksAsTwoPasses(t *testing.T) {
	d := corpus(t)
	lex := newTrieLex(t, d.subtlexLex)
	typed := typedSample(t, 1, 0, 1, 0, 1, 1)
	for _, limit := range []int{0, benchCap} {
		t.Run(fmt.Sprint("cap-", limit), func(t *testing.T) {
			c, err := New(lex, d.unigramScorer(lex.words), Options{MaxStates: limit})
			if err != nil {
				t.Fatal(err)
			}
			keys, ended := 0, 0
			for _, w := range typed {
				id, in := c.lex.ID(w)
				widest, _ := c.widestPass(w, id, in, in)
				if in || !c.keysAfterNarrow(widest) {
					continue
				}
				var got, want scratch
				got.rk.start(c, nil, id, in, 8, nil)
				c.searchUpTo(&got.s, &got.rk, w, widest, true)

				// The two passes apart.
				s, rk := &want.s, &want.rk
				rk.start(c, nil, id, in, 8, nil)
				s.below, s.capRows = c.below, c.capRows
				for i, budget := range []float64{firstPass, secondPass, c.opts.MaxCost} {
					s.reset(c.ch, c.lex, w, float32(budget), min(len(w)+maxExtra, 2*maxTyped))
					s.rk = rk
					if i == 0 {
						s.run()
					} else {
						c.walkKeys(s, w)
					}
					if len(rk.top) > 0 && rk.top[0].Score >= c.passRef(i) {
						if i == 1 {
							ended++
						}
						break
					}
					if i == 1 {
						keys++
					}
				}
				if fmt.Sprint(got.rk.top) != fmt.Sprint(rk.top) {
					t.Errorf("%q: keys' pass %v, two passes %v", w, got.rk.top, rk.top)
				}
			}
			if keys == 0 || ended == 0 {
				t.Errorf("%d words went on past the middle share and %d ended in it: the comparison tests too little", keys, ended)
			}
		})
	}
}
