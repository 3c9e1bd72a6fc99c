package correct

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestRowPlainMatchesGo checks rowPlain (assembly on amd64 without the
// purego tag) against rowPlainGo, bit for bit, on rows as the search
// makes them: the rows along the intended word of every pair of
// corpora/misspellings-dev.tsv under the built-in error model, and random
// rows of 0 to 48 typed bytes whose entries are non-negative (zeros,
// ties, the search's inf and sums of it included). A cross-check of two
// implementations of one recurrence, no external source; the recurrence
// itself is checked against plain edit distance
// (github.com/agnivade/levenshtein) in TestUnitDistanceMatchesLevenshtein.
func TestRowPlainMatchesGo(t *testing.T) {
	check := func(t *testing.T, name string, P, sub, ins []float32, dc float32) {
		t.Helper()
		n := len(sub)
		got, want := make([]float32, n+1), make([]float32, n+1)
		gm, wm := rowPlain(got, P, sub, ins, dc), rowPlainGo(want, P, sub, ins, dc)
		for j := range want {
			if math.Float32bits(got[j]) != math.Float32bits(want[j]) {
				t.Fatalf("%s: row %v, want %v", name, got, want)
			}
		}
		if math.Float32bits(gm) != math.Float32bits(wm) {
			t.Fatalf("%s: minimum %v, want %v", name, gm, wm)
		}
	}
	t.Run("development rows", func(t *testing.T) {
		ch := qwertyChannel(t)
		var s search
		rows := 0
		for _, p := range devPairs(t) {
			typed := p.Typed
			if len(typed) > maxTyped {
				continue
			}
			for _, intended := range p.Intended {
				if len(intended) > maxTyped {
					continue
				}
				s.reset(ch, nil, typed, inf, len(intended))
				for d := 0; d < len(intended); d++ {
					c := intended[d]
					P := s.rows[d*s.w : (d+1)*s.w]
					dc := ch.del[c]
					if d >= 1 && intended[d-1] == c {
						dc = min(dc, ch.delDbl)
					}
					check(t, typed+"/"+intended, P, s.subRow(c), s.ins[:s.n], dc)
					rows++
					s.path[d] = c
					s.advance(d, c)
					s.computeRowDepth(d + 1)
				}
			}
		}
		if rows < 10000 {
			t.Fatalf("%d rows checked: too few", rows)
		}
	})
	t.Run("random rows", func(t *testing.T) {
		rng := rand.New(rand.NewPCG(16, 7))
		pick := func() float32 {
			switch rng.IntN(6) {
			case 0:
				return 0
			case 1:
				return inf
			case 2:
				return float32(rng.IntN(4)) // ties
			}
			return rng.Float32() * 14
		}
		for trial := 0; trial < 20000; trial++ {
			n := rng.IntN(maxTyped + 1)
			P, sub, ins := make([]float32, n+1), make([]float32, n), make([]float32, n)
			for j := range P {
				P[j] = pick()
				if j < n {
					sub[j], ins[j] = pick(), pick()
				}
			}
			check(t, "random", P, sub, ins, pick())
		}
	})
}
