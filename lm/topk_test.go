package lm

import (
	"fmt"
	"math/rand/v2"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// bruteTopK is the obvious reference: score every word, sort, cut.
func bruteTopK(m *Model, ctx []uint32, lo, hi uint32, k int) []Scored {
	bos, eos, unk := m.Specials()
	var all []Scored
	for w := lo; w < hi; w++ {
		if w == bos || w == eos || w == unk {
			continue
		}
		all = append(all, Scored{w, m.LogProb(ctx, w)})
	}
	slices.SortFunc(all, compareScored)
	return all[:min(k, len(all))]
}

func TestTopKMatchesBruteForce(t *testing.T) {
	text := readFile(t, filepath.Join("testdata", "opticks-train.txt"))
	seed := uint64(7)
	t.Logf("seed %d", seed)
	for _, c := range []struct{ order, q int }{{1, 0}, {3, 0}, {4, 0}, {3, 8}} {
		order := c.order
		x := buildText(t, text, order, ScanOptions{Pretokenized: true}, c.q)
		rng := rand.New(rand.NewPCG(seed, uint64(order)))
		V := uint32(len(x.b.Vocab))
		for i := range 60 {
			var ctx []uint32
			if i%3 != 2 && order > 1 { // mostly seen contexts
				lv := &x.b.Levels[min(order-2, rng.IntN(order-1))]
				ctx = slices.Clone(lv.Key(rng.IntN(lv.Len())))
			} else {
				for range rng.IntN(3) {
					ctx = append(ctx, rng.Uint32N(V))
				}
			}
			lo, hi := uint32(0), V
			if i%2 == 1 { // a prefix-like range
				lo = rng.Uint32N(V)
				hi = min(V, lo+1+rng.Uint32N(400))
			}
			// Small k mostly; MaxK found a group scan with no room left
			// for the special tokens it skips.
			k := []int{1 + rng.IntN(8), MaxK, 9 + rng.IntN(MaxK-9)}[i%3]
			t.Run(fmt.Sprintf("order%d/q%d/%v/%d-%d/k%d", order, c.q, ctx, lo, hi, k), func(t *testing.T) {
				got := x.m.TopK(ctx, lo, hi, k, nil)
				want := bruteTopK(x.m, ctx, lo, hi, k)
				if !slices.Equal(got, want) {
					t.Errorf("TopK = %v, want %v", got, want)
				}
			})
		}
		// Contexts of the held-out text at k = MaxK, where frequent
		// contexts put </s> among a group's best successors.
		test := strings.Fields(readFile(t, filepath.Join("testdata", "opticks-test.txt")))
		for i := 2; i < 300 && order > 1; i++ {
			ctx := x.ids(t, test[i-2:i])
			if got, want := x.m.TopK(ctx, 0, V, MaxK, nil), bruteTopK(x.m, ctx, 0, V, MaxK); !slices.Equal(got, want) {
				t.Errorf("order %d q%d TopK(%v, k=%d) = %v, want %v", order, c.q, test[i-2:i], MaxK, got, want)
			}
		}
	}
}

func TestTopKZeroAlloc(t *testing.T) {
	x := buildText(t, readFile(t, filepath.Join("testdata", "opticks-train.txt")), 3, ScanOptions{Pretokenized: true}, 8)
	ctx := x.ids(t, []string{"of", "the"})
	dst := make([]Scored, 0, 8)
	allocs := testing.AllocsPerRun(100, func() { dst = x.m.TopK(ctx, 0, uint32(x.m.VocabSize()), 3, dst[:0]) })
	if allocs != 0 {
		t.Errorf("TopK allocates %v times per call, want 0", allocs)
	}
}
