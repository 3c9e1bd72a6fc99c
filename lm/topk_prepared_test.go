package lm

import (
	"fmt"
	"math/rand/v2"
	"path/filepath"
	"slices"
	"testing"
)

// topKNodes over the groups contexts finds must answer as ranking every
// word by LogProb does (bruteTopK, the model's own definition of a word's
// probability scored one word at a time), and every candidate it hands
// back must carry exactly LogProb's value, since the blended search uses
// those values in place of scoring the words again.
func TestTopKNodesCandidates(t *testing.T) {
	x := buildText(t, readFile(t, filepath.Join("testdata", "opticks-train.txt")), 3, ScanOptions{Pretokenized: true}, 8)
	const seed = 11
	t.Logf("seed %d", seed)
	rng := rand.New(rand.NewPCG(seed, 3))
	V := uint32(len(x.b.Vocab))
	for i := range 40 {
		var ctx []uint32
		if i%3 != 2 {
			lv := &x.b.Levels[rng.IntN(2)]
			ctx = slices.Clone(lv.Key(rng.IntN(lv.Len())))
		} else {
			ctx = []uint32{rng.Uint32N(V)}
		}
		lo, hi := uint32(0), V
		if i%2 == 1 {
			lo = rng.Uint32N(V)
			hi = min(V, lo+1+rng.Uint32N(400))
		}
		k := []int{1 + rng.IntN(4), 4, 9}[i%3]
		t.Run(fmt.Sprintf("%v/%d-%d/k%d", ctx, lo, hi, k), func(t *testing.T) {
			var nb [MaxOrder]node
			var cands baseCands
			got := x.m.topKNodes(x.m.contexts(ctx, &nb), lo, hi, k, nil, &cands)
			if want := bruteTopK(x.m, ctx, lo, hi, k); !slices.Equal(got, want) {
				t.Errorf("topKNodes = %v, want %v", got, want)
			}
			for _, s := range got {
				if lp, ok := cands.logP(s.ID); !ok || lp != s.LogP {
					t.Errorf("result %v missing from the candidates (%v, %v)", s, lp, ok)
				}
			}
			for _, s := range cands.s[:cands.n] {
				if want := x.m.LogProb(ctx, s.ID); s.LogP != want {
					t.Errorf("candidate %d: log p %v, LogProb says %v", s.ID, s.LogP, want)
				}
			}
		})
	}
}
