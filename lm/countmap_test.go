package lm

import (
	"fmt"
	"maps"
	"math/rand/v2"
	"testing"
)

// TestCountMap checks countMap against the standard library's map (the
// reference) on keys that repeat, across several doublings of the table,
// including key 0 and the largest 63-bit key, then after a reset.
func TestCountMap(t *testing.T) {
	for _, tc := range []struct {
		name     string
		distinct int
		adds     int
	}{
		{"empty", 0, 0},
		{"one-key", 1, 10},
		{"below-first-growth", 100, 1000},
		{"many-doublings", 50_000, 200_000},
	} {
		t.Run(tc.name, func(t *testing.T) {
			rng := rand.New(rand.NewPCG(7, uint64(tc.distinct)))
			pool := make([]uint64, tc.distinct)
			for i := range pool {
				pool[i] = rng.Uint64() >> 1
			}
			if tc.distinct > 2 {
				pool[0], pool[1] = 0, 1<<63-1
			}
			m := newCountMap()
			for round := range 2 {
				want := map[uint64]uint64{}
				for i := range tc.adds {
					k := pool[i%len(pool)]
					if i >= len(pool) {
						k = pool[rng.IntN(len(pool))]
					}
					c := uint32(1 + rng.IntN(3))
					m.add(k, c)
					want[k] += uint64(c)
				}
				if m.len() != len(want) {
					t.Fatalf("round %d: len = %d, want %d", round, m.len(), len(want))
				}
				got := map[uint64]uint64{}
				for k, c := range m.all {
					if _, dup := got[k]; dup {
						t.Fatalf("round %d: all yields key %#x twice", round, k)
					}
					got[k] = c
				}
				if !maps.Equal(got, want) {
					t.Fatalf("round %d: all yields %d keys that differ from the %d wanted", round, len(got), len(want))
				}
				for k, c := range want {
					if g := m.get(k); uint64(g) != c {
						t.Fatalf("round %d: get(%#x) = %d, want %d", round, k, g, c)
					}
				}
				const absent = 1<<62 + 12345
				if _, in := want[absent]; !in && m.get(absent) != 0 {
					t.Fatalf("round %d: get(%#x) = %d, want 0", round, uint64(absent), m.get(absent))
				}
				m.reset()
				if m.len() != 0 || m.maxCount() != 0 {
					t.Fatalf("round %d: after reset len = %d, maxCount = %d, want 0, 0", round, m.len(), m.maxCount())
				}
			}
		})
	}
}

// BenchmarkCountMapAdd adds random keys to a countMap and, for comparison,
// to the standard library's map[uint64]uint32 that counted n-grams before.
func BenchmarkCountMapAdd(b *testing.B) {
	for _, distinct := range []int{1 << 12, 1 << 21} {
		rng := rand.New(rand.NewPCG(1, 1))
		keys := make([]uint64, 1<<21)
		for i := range keys {
			keys[i] = uint64(rng.IntN(distinct)) * 0x9e3779b97f4a7c15 >> 1
		}
		b.Run(fmt.Sprintf("countMap/distinct=%d", distinct), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				m := newCountMap()
				for _, k := range keys {
					m.add(k, 1)
				}
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*len(keys)), "ns/add")
		})
		b.Run(fmt.Sprintf("map/distinct=%d", distinct), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				m := map[uint64]uint32{}
				for _, k := range keys {
					m[k]++
				}
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*len(keys)), "ns/add")
		})
	}
}
