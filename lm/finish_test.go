package lm

import (
	"fmt"
	"math/rand/v2"
	"slices"
	"testing"
)

// refTable is the reference for buildTable: the n-grams renamed one ID at a
// time, summed in a standard library map and sorted with slices.Compare.
func refTable(n int, srcs []gramSource) table {
	sum := map[[MaxOrder]uint32]uint64{}
	add := func(k key2, c uint64, to []uint32) {
		var ids [MaxOrder]uint32
		for j, id := range unpackKey(k, n, nil) {
			ids[j] = to[id]
		}
		sum[ids] += c
	}
	for _, s := range srcs {
		if s.grams != nil {
			for k, c := range s.grams.all {
				add(key2{k, 0}, c, s.to)
			}
		}
		for _, e := range s.ents {
			add(e.k, e.c, s.to)
		}
	}
	keys := make([][]uint32, 0, len(sum))
	for k := range sum {
		keys = append(keys, slices.Clone(k[:n]))
	}
	slices.SortFunc(keys, slices.Compare)
	t := table{n: n, ids: make([]uint32, 0, len(keys)*n), cnt: make([]uint64, len(keys))}
	for i, k := range keys {
		var a [MaxOrder]uint32
		copy(a[:], k)
		t.ids = append(t.ids, k...)
		t.cnt[i] = sum[a]
	}
	return t
}

// TestBuildTable checks buildTable against refTable for every order, for a
// small vocabulary (keys and counts sorted as packed 8-byte words), a
// vocabulary of 2^21 - 1 words with large counts (too wide to pack: the
// entry sort), a table source with its own ID map and entry sources that
// repeat keys.
func TestBuildTable(t *testing.T) {
	for _, tc := range []struct {
		vocab  int
		maxCnt uint64
	}{
		{vocab: 3, maxCnt: 1},
		{vocab: 700, maxCnt: 1000},
		{vocab: 5000, maxCnt: 1 << 30},
		{vocab: MaxVocab, maxCnt: 1 << 40},
	} {
		for n := 2; n <= MaxOrder; n++ {
			t.Run(fmt.Sprintf("vocab=%d/max=%d/n=%d", tc.vocab, tc.maxCnt, n), func(t *testing.T) {
				rng := rand.New(rand.NewPCG(uint64(tc.vocab), uint64(n)))
				perm := rng.Perm(tc.vocab)
				to := make([]uint32, tc.vocab)
				for i, p := range perm {
					to[i] = uint32(p)
				}
				randIDs := func() []uint32 {
					ids := make([]uint32, n)
					for j := range ids {
						ids[j] = uint32(rng.IntN(min(tc.vocab, 40)))
						if rng.IntN(4) == 0 {
							ids[j] = uint32(rng.IntN(tc.vocab))
						}
					}
					return ids
				}
				var srcs []gramSource
				for range 2 {
					var ents []ent
					for range 600 {
						ents = append(ents, ent{packLong(randIDs()), 1 + rng.Uint64N(tc.maxCnt)})
					}
					srcs = append(srcs, gramSource{ents: ents, to: to})
				}
				if n <= 3 {
					m := newCountMap()
					gid := make([]uint32, tc.vocab) // a worker's IDs: reversed
					for i := range gid {
						gid[i] = to[tc.vocab-1-i]
					}
					for range 3000 {
						m.add(packLong(randIDs())[0], uint32(1+rng.Uint64N(min(tc.maxCnt, 1<<20))))
					}
					srcs = append(srcs, gramSource{grams: m, to: gid})
				}
				want := refTable(n, srcs)
				got := buildTable(n, srcs, tc.vocab, 1+n%2)
				if !slices.Equal(got.ids, want.ids) || !slices.Equal(got.cnt, want.cnt) {
					t.Fatalf("buildTable: %d n-grams, want %d (or the same number with other IDs or counts)", got.len(), want.len())
				}
			})
		}
	}
}
