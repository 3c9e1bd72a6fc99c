package lm

import (
	"math/rand/v2"
	"slices"
	"testing"
)

// TestMonoSeqRoundTrip checks the Elias-Fano coding against the values it
// was given (the definition of the coding: every value reads back).
func TestMonoSeqRoundTrip(t *testing.T) {
	seed := uint64(99)
	t.Logf("seed %d", seed)
	rng := rand.New(rand.NewPCG(seed, 1))
	for _, n := range []int{1, 2, 63, 64, 65, 200, 5000} {
		for _, gap := range []int{1, 2, 3, 50, 5000} {
			vals := make([]uint64, n)
			v := uint64(0)
			for i := range vals {
				if i > 0 {
					v += uint64(rng.IntN(gap + 1))
				}
				vals[i] = v
			}
			low, lb, high, hb, sel := encodeMono(vals)
			s := monoSeq{n: n, low: newVec(low, n, lb), lbits: lb, high: high[:(hb+63)/64], hbits: hb, sample: newVec(packVec(sel, bitsFor(uint64(hb))), len(sel), bitsFor(uint64(hb)))}
			for i, want := range vals {
				if got := s.at(i); got != want {
					t.Fatalf("n=%d gap=%d: at(%d) = %d, want %d", n, gap, i, got, want)
				}
			}
		}
	}
}

// TestLayoutVersionsAgree checks that the current layout answers exactly as
// the version-1 layout (plain starts) does.
func TestLayoutVersionsAgree(t *testing.T) {
	x := buildText(t, smallText(t), 3, ScanOptions{Pretokenized: true}, 8)
	var models [2]*Model
	for i, ver := range []int{1, 0} {
		sec, err := AppendSection(nil, x.b, LayoutOptions{QuantBits: 8, Version: ver})
		if err != nil {
			t.Fatal(err)
		}
		if models[i], err = LoadSection(sec); err != nil {
			t.Fatal(err)
		}
		if err := models[i].Check(); err != nil {
			t.Fatalf("version %d: Check: %v", ver, err)
		}
	}
	V := uint32(models[0].VocabSize())
	for _, ctx := range [][]uint32{nil, {1}, {5, 9}, {x.ids(t, []string{"the"})[0]}, x.ids(t, []string{"of", "the"})} {
		for w := range V {
			if a, b := models[0].LogProb(ctx, w), models[1].LogProb(ctx, w); a != b {
				t.Fatalf("LogProb(%v, %d): version 1 %v, version 2 %v", ctx, w, a, b)
			}
		}
		a := models[0].TopK(ctx, 0, V, 5, nil)
		b := models[1].TopK(ctx, 0, V, 5, nil)
		if !slices.Equal(a, b) {
			t.Errorf("TopK(%v): version 1 %v, version 2 %v", ctx, a, b)
		}
	}
}

// TestMonoDamageNoPanic flips every byte of a small current-layout section:
// loading, queries and Check must never panic (bad bytes never panic).
func TestMonoDamageNoPanic(t *testing.T) {
	x := buildText(t, smallText(t), 2, ScanOptions{Pretokenized: true}, 4)
	sec, err := AppendSection(nil, x.b, LayoutOptions{QuantBits: 4})
	if err != nil {
		t.Fatal(err)
	}
	for i := range sec {
		b := slices.Clone(sec)
		b[i] ^= 0xa5
		m, err := LoadSection(b)
		if err != nil {
			continue
		}
		m.Check()
		V := uint32(m.VocabSize())
		for _, ctx := range [][]uint32{nil, {1}, {3, 4}} {
			m.LogProb(ctx, 2)
			m.TopK(ctx, 0, V, 3, nil)
			m.TopK(ctx, V/3, V/2, 3, nil)
		}
	}
}
