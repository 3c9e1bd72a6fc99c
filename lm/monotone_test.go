package lm

import (
	"encoding/binary"
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
			low, lb, high, hb, sel := encodeMono(vals, monoSample)
			s := monoSeq{n: n, low: newVec(low, n, lb), lbits: lb, high: high[:(hb+63)/64], hbits: hb, sample: newVec(packVec(sel, bitsFor(uint64(hb))), len(sel), bitsFor(uint64(hb)))}
			for i, want := range vals {
				if got := s.at(i); got != want {
					t.Fatalf("n=%d gap=%d: at(%d) = %d, want %d", n, gap, i, got, want)
				}
			}
		}
	}
}

// TestLayoutVersionsAgree checks that every layout version answers exactly
// as the version-1 layout (plain starts, plain word IDs) does, on every
// (context, word) pair of the small model and on top-k with and without an
// ID range, and that the newest layout is chosen for a suffix-closed model.
func TestLayoutVersionsAgree(t *testing.T) {
	for _, order := range []int{3, 4} {
		x := buildText(t, smallText(t), order, ScanOptions{Pretokenized: true}, 8)
		versions := []int{1, 2, 3, 4, 5}
		models := make([]*Model, len(versions))
		for i, ver := range versions {
			sec, err := AppendSection(nil, x.b, LayoutOptions{QuantBits: 8, Version: ver})
			if err != nil {
				t.Fatal(err)
			}
			if got := binary.LittleEndian.Uint32(sec); got != uint32(ver) {
				t.Fatalf("order %d: asked for version %d, wrote %d", order, ver, got)
			}
			if models[i], err = LoadSection(sec); err != nil {
				t.Fatal(err)
			}
			if err := models[i].Check(); err != nil {
				t.Fatalf("order %d version %d: Check: %v", order, ver, err)
			}
		}
		if sec, err := AppendSection(nil, x.b, LayoutOptions{QuantBits: 8}); err != nil {
			t.Fatal(err)
		} else if got := binary.LittleEndian.Uint32(sec); got != sectionVersion {
			t.Fatalf("order %d: the default layout of a suffix-closed model is version %d, want %d", order, got, sectionVersion)
		}
		V := uint32(models[0].VocabSize())
		the, of := x.ids(t, []string{"the"})[0], x.ids(t, []string{"of"})[0]
		ctxs := [][]uint32{nil, {1}, {5, 9}, {the}, {of, the}, {the, of, the}}
		for a := range min(V, 40) {
			ctxs = append(ctxs, []uint32{a, the}, []uint32{of, a}, []uint32{the, a, of})
		}
		for _, m := range models[1:] {
			for _, ctx := range ctxs {
				for w := range V {
					if a, b := models[0].LogProb(ctx, w), m.LogProb(ctx, w); a != b {
						t.Fatalf("order %d LogProb(%v, %d): version 1 %v, newer %v", order, ctx, w, a, b)
					}
				}
				for _, r := range [][2]uint32{{0, V}, {V / 4, V / 2}, {the, the + 30}} {
					a := models[0].TopK(ctx, r[0], r[1], 5, nil)
					b := m.TopK(ctx, r[0], r[1], 5, nil)
					if !slices.Equal(a, b) {
						t.Errorf("order %d TopK(%v, %v): version 1 %v, newer %v", order, ctx, r, a, b)
					}
				}
			}
			v1, vn := models[0].Backoff(x.b.Vocab), m.Backoff(x.b.Vocab)
			for n := range order {
				if !slices.Equal(v1.Levels[n].IDs, vn.Levels[n].IDs) || !slices.Equal(v1.Levels[n].LogP, vn.Levels[n].LogP) {
					t.Errorf("order %d: Backoff level %d differs between version 1 and a newer layout", order, n+1)
				}
			}
		}
	}
}

// TestMonoDamageNoPanic flips every byte of a small current-layout section:
// loading, queries and Check must never panic (bad bytes never panic).
func TestMonoDamageNoPanic(t *testing.T) {
	for _, order := range []int{2, 3} {
		x := buildText(t, smallText(t), order, ScanOptions{Pretokenized: true}, 4)
		sec, err := AppendSection(nil, x.b, LayoutOptions{QuantBits: 4})
		if err != nil {
			t.Fatal(err)
		}
		damage(sec)
	}
}

// damage flips every byte of sec in turn and runs loading, queries and Check.
func damage(sec []byte) {
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

// TestMonoSeqAt2 checks that at2 reads the same two values as two calls of
// at, on the Elias-Fano and the plain form.
func TestMonoSeqAt2(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 2))
	for _, n := range []int{2, 3, 64, 65, 129, 3000} {
		for _, gap := range []int{1, 3, 300} {
			vals := make([]uint64, n)
			for i := 1; i < n; i++ {
				vals[i] = vals[i-1] + uint64(rng.IntN(gap+1))
			}
			low, lb, high, hb, sel := encodeMono(vals, monoSample)
			sw := bitsFor(uint64(hb))
			seqs := []monoSeq{
				{n: n, low: newVec(low, n, lb), lbits: lb, high: high[:(hb+63)/64], hbits: hb, sample: newVec(packVec(sel, sw), len(sel), sw)},
				{n: n, plain: true, vals: newVec(packVec(vals, 64), n, 64)},
			}
			for _, s := range seqs {
				for i := range n - 1 {
					if a, b := s.at2(i); a != vals[i] || b != vals[i+1] {
						t.Fatalf("n=%d gap=%d plain=%v: at2(%d) = %d, %d; want %d, %d", n, gap, s.plain, i, a, b, vals[i], vals[i+1])
					}
				}
			}
		}
	}
}
