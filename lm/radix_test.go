package lm

import (
	"fmt"
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

// TestSortEntsSqueezed checks the radix sort of squeezed keys (three ID
// fields narrower than 21 bits, small counts: key and count sorted as one
// 8-byte word) against the standard library's sort, counts included.
func TestSortEntsSqueezed(t *testing.T) {
	byKeyCount := func(a, b ent) int {
		if c := cmpEnt(a, b); c != 0 {
			return c
		}
		return cmpU64(a.c, b.c)
	}
	for _, n := range []int{256, 5000, 70000} {
		for _, width := range []uint{1, 7, 14, 21} {
			t.Run(fmt.Sprintf("n=%d/width=%d", n, width), func(t *testing.T) {
				rng := rand.New(rand.NewPCG(uint64(n), uint64(width)))
				ents := make([]ent, n)
				for i := range ents {
					f := func() uint64 { return rng.Uint64N(1 << width) }
					ents[i] = ent{k: key2{f()<<42 | f()<<21 | f(), 0}, c: rng.Uint64N(1 << 12)}
				}
				want := slices.Clone(ents)
				slices.SortFunc(want, byKeyCount)
				sortEnts(ents)
				if !slices.IsSortedFunc(ents, cmpEnt) {
					t.Fatal("sortEnts: keys out of order")
				}
				slices.SortFunc(ents, byKeyCount) // equal keys keep no order
				if !slices.Equal(ents, want) {
					t.Fatal("sortEnts: entries differ from the sorted input")
				}
			})
		}
	}
}

// TestRadixSortParallel checks the parallel radix sort against the standard
// library's stable sort on the same bits, for several goroutine counts and
// lengths around the parallel threshold.
func TestRadixSortParallel(t *testing.T) {
	for _, n := range []int{parallelSortMin - 1, parallelSortMin, 200_001} {
		for _, workers := range []int{1, 2, 3} {
			for _, bitsRange := range [][2]uint{{0, 64}, {12, 39}, {20, 5}} {
				lo, width := bitsRange[0], bitsRange[1]
				t.Run(fmt.Sprintf("n=%d/workers=%d/bits=%d+%d", n, workers, lo, width), func(t *testing.T) {
					rng := rand.New(rand.NewPCG(uint64(n), uint64(workers)))
					p := make([]uint64, n)
					for i := range p {
						p[i] = rng.Uint64()
					}
					key := func(v uint64) uint64 {
						if width == 64 {
							return v
						}
						return v >> lo & (1<<width - 1)
					}
					want := slices.Clone(p)
					slices.SortStableFunc(want, func(a, b uint64) int { return cmpU64(key(a), key(b)) })
					got := radixSortParallel(p, nil, lo, width, workers)
					if !slices.Equal(got, want) {
						t.Fatal("radixSortParallel differs from the stable sort")
					}
				})
			}
		}
	}
}
