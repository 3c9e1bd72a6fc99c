package lm

import (
	"context"
	"encoding/binary"
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// sectionVersionOf returns the layout version in a section's header.
func sectionVersionOf(sec []byte) int { return int(binary.LittleEndian.Uint32(sec)) }

// opticks builds the Opticks training text's model of the given order,
// lossless.
func opticks(t testing.TB, order int) built {
	t.Helper()
	return buildText(t, readFile(t, filepath.Join("testdata", "opticks-train.txt")), order, ScanOptions{Pretokenized: true}, 0)
}

// longGroupText is a small invented text in which the context "x y" has
// 20 successors, one of them seen twice: its version-6 group stores its
// count sum (more than countSumMin records with counts wider than 0 bits).
func longGroupText() string {
	var sb strings.Builder
	for i := range 20 {
		fmt.Fprintf(&sb, "x y w%d\n", i)
	}
	sb.WriteString("x y w0\nw0 x y\n")
	return sb.String()
}

// layoutV lays b out in a given version and loads it; Check must pass.
func layoutV(t testing.TB, b *Backoff, q, version int) (*Model, []byte) {
	t.Helper()
	sec, err := AppendSection(nil, b, LayoutOptions{QuantBits: q, Version: version})
	if err != nil {
		t.Fatal(err)
	}
	m, err := LoadSection(sec)
	if err != nil {
		t.Fatalf("LoadSection: %v", err)
	}
	if err := m.Check(); err != nil {
		t.Fatalf("version %d q%d: Check: %v", version, q, err)
	}
	return m, sec
}

// TestCountedLayoutChosen checks when version 6 is written: by default for
// a model that comes from Estimate (order ≥ 3), and never for a model whose
// highest order its counts do not explain; version 5 then takes its place.
func TestCountedLayoutChosen(t *testing.T) {
	toy := readFile(t, filepath.Join("testdata", "reference", "toy-train.txt"))
	x3 := buildText(t, toy, 3, ScanOptions{Pretokenized: true}, 0)
	x4 := buildText(t, toy, 4, ScanOptions{Pretokenized: true}, 0)
	x2 := buildText(t, toy, 2, ScanOptions{Pretokenized: true}, 0)
	edit := func(f func(b *Backoff)) *Backoff {
		b := *x3.b
		b.Levels = slices.Clone(b.Levels)
		top := &b.Levels[2]
		top.LogP = slices.Clone(top.LogP)
		b.Discounts = slices.Clone(b.Discounts)
		f(&b)
		return &b
	}
	arpa, err := ReadARPA(context.Background(), strings.NewReader(string(writeARPA(t, x3.b))))
	if err != nil {
		t.Fatal(err)
	}
	pruned, err := Prune(context.Background(), x3.b, PruneOptions{Threshold: 1e-6})
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name    string
		b       *Backoff
		version int // asked for
		want    int
	}{
		{"estimate order 3", x3.b, 0, 6},
		{"estimate order 4", x4.b, 0, 6},
		{"estimate order 2", x2.b, 0, 2},
		{"asked for 6", x3.b, 6, 6},
		{"asked for 5", x3.b, 5, 5},
		{"no counts", edit(func(b *Backoff) { b.TopCounts = nil }), 0, 5},
		{"counts of another length", edit(func(b *Backoff) { b.TopCounts = b.TopCounts[1:] }), 0, 5},
		{"edited probability", edit(func(b *Backoff) { b.Levels[2].LogP[7] -= 0.01 }), 0, 5},
		{"discount out of range", edit(func(b *Backoff) { b.Discounts[2][0] = 1.5 }), 0, 5},
		{"ARPA import", arpa, 0, 5},
		{"pruned", pruned, 0, 5},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			m, sec := layoutV(t, c.b, 8, c.version)
			if got := sectionVersionOf(sec); got != c.want {
				t.Fatalf("version %d written, want %d", got, c.want)
			}
			if got := m.lv[m.order-1].counted; got != (c.want == 6) {
				t.Fatalf("counted highest order = %v in version %d", got, c.want)
			}
		})
	}
}

// TestCountedMatchesReference lays the Opticks models of orders 3 and 4 out
// losslessly in version 6 and compares them with the independent reference
// (testdata/reference/mkn.py, written from Chen & Goodman 1998, TR-10-98
// §3.4): its sample probabilities and its test perplexity, within 1e-9
// (rounding only: version 6 recomputes the highest order from counts by
// the same formula).
func TestCountedMatchesReference(t *testing.T) {
	for _, order := range []int{3, 4} {
		t.Run(fmt.Sprintf("order%d", order), func(t *testing.T) {
			ref := loadReference(t, fmt.Sprintf("opticks-order%d.json", order))
			x := opticks(t, order)
			m, sec := layoutV(t, x.b, 0, 6)
			if v := sectionVersionOf(sec); v != 6 {
				t.Fatalf("version %d written", v)
			}
			for _, s := range ref.Samples {
				ctx, w := x.ids(t, s.Context), x.ids(t, []string{s.Word})[0]
				if got := m.LogProb(ctx, w); !near(got, s.LnP, 1e-9) {
					t.Errorf("ln p(%s | %v) = %.12f, reference %.12f", s.Word, s.Context, got, s.LnP)
				}
			}
			bos, eos, unk := x.b.specials()
			res, err := Perplexity(context.Background(), m, x.lookup, bos, eos, unk,
				strings.NewReader(readFile(t, filepath.Join("testdata", "opticks-test.txt"))), ScanOptions{Pretokenized: true})
			if err != nil {
				t.Fatal(err)
			}
			if !near(res.Perplexity, ref.Perplexity, 1e-9) {
				t.Errorf("perplexity %.10f, reference %.10f", res.Perplexity, ref.Perplexity)
			}
		})
	}
}

// TestCountedAccuracy compares the 8-bit version-6 and version-5 layouts of
// the Opticks models (orders 3 and 4) with the exact model at every stored
// n-gram (context, word), and bounds version 6's error at the highest
// order: with a = max(c − D, 0)/S ≥ 0 exact and the second term x = γ·p(w|h′)
// read as x·e^ε (ε the sum of the quantization errors of ln γ and of ln
// p(w|h′)), |ln(a + x·e^ε) − ln(a + x)| ≤ |ε| (the logarithm of a sum
// moves less than that of one of its terms; Chen & Goodman 1998 for the
// formula). Losslessly, version 6 must equal the exact model within 1e-12.
func TestCountedAccuracy(t *testing.T) {
	for _, order := range []int{3, 4} {
		t.Run(fmt.Sprintf("order%d", order), func(t *testing.T) {
			x := opticks(t, order)
			vocab := x.b.Vocab
			m0, _ := layoutV(t, x.b, 0, 6)
			m6, _ := layoutV(t, x.b, 8, 6)
			m5, _ := layoutV(t, x.b, 8, 5)
			q6 := m6.Backoff(vocab) // the stored (quantized) values
			N := order
			mid, qmid := &x.b.Levels[N-2], &q6.Levels[N-2]
			var max5, max6, sum5, sum6 float64
			var tmax5, tmax6, tsum5, tsum6, dmax, dsum float64 // highest order only; d: version 6 vs 5
			cnt, tcnt := 0, 0
			for n := 1; n <= N; n++ {
				lv := &x.b.Levels[n-1]
				for i := range lv.Len() {
					k := lv.Key(i)
					ctx, w := k[:n-1], k[n-1]
					exact := x.b.LogProb(ctx, w)
					if math.IsInf(exact, -1) {
						continue // <s>
					}
					if got := m0.LogProb(ctx, w); !near(got, exact, 1e-12) {
						t.Fatalf("lossless version 6: ln p(%d | %v) = %v, exact %v", w, ctx, got, exact)
					}
					d5, d6 := math.Abs(m5.LogProb(ctx, w)-exact), math.Abs(m6.LogProb(ctx, w)-exact)
					max5, max6 = max(max5, d5), max(max6, d6)
					sum5 += d5
					sum6 += d6
					cnt++
					if n < N {
						continue
					}
					tmax5, tmax6 = max(tmax5, d5), max(tmax6, d6)
					tsum5 += d5
					tsum6 += d6
					dd := math.Abs(m6.LogProb(ctx, w) - m5.LogProb(ctx, w))
					dmax = max(dmax, dd)
					dsum += dd
					tcnt++
					j, s := mid.Find(k[:N-1]), mid.Find(k[1:])
					eps := math.Abs(qmid.Bow[j]-mid.Bow[j]) + math.Abs(qmid.LogP[s]-mid.LogP[s])
					if d6 > eps+1e-12 {
						t.Fatalf("ln p(%d | %v): version 6 off by %v, more than the quantization errors' sum %v", w, ctx, d6, eps)
					}
				}
			}
			t.Logf("%d n-grams, |Δ ln p| vs exact at 8 bits: version 5 max %.4f mean %.5f; version 6 max %.4f mean %.5f",
				cnt, max5, sum5/float64(cnt), max6, sum6/float64(cnt))
			t.Logf("highest order (%d n-grams): version 5 max %.4f mean %.5f; version 6 max %.4f mean %.5f; version 6 vs 5 max %.4f mean %.5f",
				tcnt, tmax5, tsum5/float64(tcnt), tmax6, tsum6/float64(tcnt), dmax, dsum/float64(tcnt))
			// Words the highest order does not store after contexts of
			// the held-out text: both versions back off through coded
			// weights (version 6 codes those of order N − 1 with
			// weights of its own, weightedbook.go).
			test := strings.Fields(readFile(t, filepath.Join("testdata", "opticks-test.txt")))
			topLv := &x.b.Levels[N-1]
			var u5, u6 float64
			ucnt := 0
			for i := N - 1; i < 60; i++ {
				ctx := x.ids(t, test[i-N+1:i])
				for w := range uint32(len(vocab)) {
					exact := x.b.LogProb(ctx, w)
					if topLv.Find(append(slices.Clone(ctx), w)) >= 0 || math.IsInf(exact, -1) {
						continue
					}
					u5 += math.Abs(m5.LogProb(ctx, w) - exact)
					u6 += math.Abs(m6.LogProb(ctx, w) - exact)
					ucnt++
				}
			}
			t.Logf("backed-off words after %d held-out contexts (%d pairs): mean |Δ ln p| version 5 %.5f, version 6 %.5f", 60-N+1, ucnt, u5/float64(ucnt), u6/float64(ucnt))
			if sum6 > sum5 {
				t.Errorf("version 6's mean error %.5f exceeds version 5's %.5f", sum6/float64(cnt), sum5/float64(cnt))
			}
		})
	}
}

// countedSpots finds, in a version-6 Opticks section, one group of each
// kind the damage tests need: counts wider than 0 with a stored sum, and
// counts wider than 0 without (short). It returns their nodes.
func countedSpots(t *testing.T, m *Model) (withSum, short node) {
	t.Helper()
	keys, ok := m.levelKeys(2)
	if !ok {
		t.Fatal("levelKeys(2) fails on a valid section")
	}
	var fs, fh bool
	for e := 0; e < m.lv[1].size && !(fs && fh); e++ {
		nd, ok := m.groupNode(&m.lv[1], e, keys[2*e:2*e+2])
		if !ok || nd.cw == 0 {
			continue
		}
		if nd.hi > countSumMin && !fs {
			withSum, fs = nd, true
		}
		if nd.hi <= countSumMin && nd.hi > 1 && !fh {
			short, fh = nd, true
		}
	}
	if !fs || !fh {
		t.Fatalf("the Opticks model lacks a counted group with a stored sum (%v) or a short one (%v)", fs, fh)
	}
	return withSum, short
}

// TestCheckFindsCountDamage damages the fields version 6 adds, one at a
// time: the count width (its unary code), a count and the stored sum of a
// long group, the width of a short one, and the discounts. Loading or
// Check must report each as ErrCorrupt, and queries must not panic.
func TestCheckFindsCountDamage(t *testing.T) {
	x := buildText(t, readFile(t, filepath.Join("testdata", "opticks-train.txt")), 3, ScanOptions{Pretokenized: true}, 8)
	m, base := layoutV(t, x.b, 8, 6)
	long, short := countedSpots(t, m)
	d := directory(t, base)[tag(tagRecords, 3)]
	flip := bitFlipper(d)
	// The stored sum sits just before the counts and is r + k bits wide.
	sumAt := long.cbase - uint64(long.rw+long.cw)
	// The unary width ends with a zero bit right before the ranks (form
	// 0) or their count (form 1).
	widthEnd := func(nd node) uint64 {
		if nd.efRanks {
			return nd.base - uint64(nd.rw) - 1
		}
		return nd.base - 1
	}
	setDisc := func(i int, v float64) func([]byte) {
		return func(s []byte) { setVal(t, s, tag(tagDiscounts, 3), i, math.Float64bits(v)) }
	}
	cases := []spoiler{
		{"long group: width code end", flip(widthEnd(long))},
		{"long group: first width bit", flip(widthEnd(long) - uint64(long.cw))},
		{"long group: a count", flip(long.cbase + uint64(long.cw)*3)},
		{"long group: stored sum", flip(sumAt)},
		{"short group: width code end", flip(widthEnd(short))},
		{"discount D1 NaN", setDisc(0, math.NaN())},
		{"discount D2 negative", setDisc(1, -0.5)},
		{"discount D3+ above 3", setDisc(2, 3.5)},
	}
	expectCorrupt(t, base, cases)
}

// TestCountedDamageNoPanic flips one bit of every byte of the counted
// records of a small version-6 section, lossless and at 8 bits: loading,
// every query and Check must not panic, and a refusal must be ErrCorrupt.
func TestCountedDamageNoPanic(t *testing.T) {
	for _, c := range []struct {
		name string
		text string
		q    int
	}{{"small/q0", smallText(t), 0}, {"small/q8", smallText(t), 8}, {"long group/q8", longGroupText(), 8}} {
		t.Run(c.name, func(t *testing.T) {
			x := buildText(t, c.text, 3, ScanOptions{Pretokenized: true}, 0)
			m, sec := layoutV(t, x.b, c.q, 6)
			if v := sectionVersionOf(sec); v != 6 {
				t.Fatalf("version %d written", v)
			}
			keys, ok := m.levelKeys(2)
			if !ok {
				t.Fatal("levelKeys(2) fails on a valid section")
			}
			sums := 0
			for e := range m.lv[1].size {
				if nd, ok := m.groupNode(&m.lv[1], e, keys[2*e:2*e+2]); ok && nd.cw > 0 && nd.hi > countSumMin {
					sums++
				}
			}
			t.Logf("%d groups with a stored count sum", sums)
			if c.name == "long group/q8" && sums == 0 {
				t.Fatal("the long-group text stores no count sum")
			}
			d := directory(t, sec)[tag(tagRecords, 3)]
			buf := make([]byte, len(sec))
			caught := 0
			for i := d.off; i < d.off+8*d.words; i++ {
				copy(buf, sec)
				buf[i] ^= 1 << (i % 8)
				m, err := LoadSection(buf)
				if err != nil {
					if !errors.Is(err, ErrCorrupt) {
						t.Fatalf("byte %d: LoadSection error %v is not ErrCorrupt", i, err)
					}
					continue
				}
				if err := exercise(t, m); err != nil {
					if !errors.Is(err, ErrCorrupt) {
						t.Fatalf("byte %d: Check error %v is not ErrCorrupt", i, err)
					}
					caught++
				}
			}
			t.Logf("%d record bytes flipped, %d caught by Check", 8*d.words, caught)
		})
	}
}

// TestCountedTopMatchesScan checks the scan of a counted group that ranks
// records by probability (countedTop) against the plain definition: rank
// every record by probAt (ln p), ties by position, and keep the best k + 3.
// Every group of the 8-bit Opticks order-3 model, several k.
func TestCountedTopMatchesScan(t *testing.T) {
	x := buildText(t, readFile(t, filepath.Join("testdata", "opticks-train.txt")), 3, ScanOptions{Pretokenized: true}, 8)
	m, _ := layoutV(t, x.b, 8, 6)
	keys, ok := m.levelKeys(2)
	if !ok {
		t.Fatal("levelKeys(2) fails on a valid section")
	}
	groups := 0
	for e := range m.lv[1].size {
		nd, ok := m.groupNode(&m.lv[1], e, keys[2*e:2*e+2])
		if !ok {
			continue
		}
		groups++
		for _, k := range []int{1, 3, 8, MaxK} {
			var got []uint32
			m.countedTop(&nd, nd.lo, nd.hi, k, func(id uint32) bool { got = append(got, id); return true })
			var ref topBuf
			ref.k = k + 3
			for p := nd.lo; p < nd.hi; p++ {
				ref.push(Scored{ID: uint32(p), LogP: m.probAt(&nd, p)})
			}
			var want []uint32
			for _, s := range ref.buf[:ref.n] {
				want = append(want, uint32(m.wordAt(&nd, int(s.ID))))
			}
			slices.Sort(got)
			slices.Sort(want)
			if !slices.Equal(got, want) {
				t.Fatalf("context %v, k=%d: countedTop %v, ranking by ln p %v", keys[2*e:2*e+2], k, got, want)
			}
		}
	}
	if groups == 0 {
		t.Fatal("no groups")
	}
}
