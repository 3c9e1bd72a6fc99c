package lm

import (
	"math/rand/v2"
	"slices"
	"testing"
)

// TestSortEnts checks the radix sort against the standard library's sort.
func TestSortEnts(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for _, n := range []int{0, 1, 100, 255, 256, 5000, 70000} {
		for _, long := range []bool{false, true} {
			ents := make([]ent, n)
			for i := range ents {
				ents[i] = ent{k: key2{rng.Uint64() >> (1 + rng.UintN(40)), 0}, c: uint64(i)}
				if long && i%7 == 0 {
					ents[i].k[1] = rng.Uint64()
				}
			}
			want := slices.Clone(ents)
			slices.SortStableFunc(want, cmpEnt)
			sortEnts(ents)
			for i := range ents {
				if ents[i].k != want[i].k {
					t.Fatalf("n=%d long=%v: entry %d = %v, want %v", n, long, i, ents[i].k, want[i].k)
				}
			}
		}
	}
}
