package lm

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// quantRun is the cost of one code width on the Opticks split.
type quantRun struct {
	qbits        int
	version      int // as written
	perplexity   float64
	bytes        int
	bytesPerGram float64
}

// quantCost lays b out at each width, in layout version 5 when v5 is set
// (else the newest the model allows), and measures test perplexity and size.
func quantCost(t testing.TB, b *Backoff, test string, widths []int, v5 bool) []quantRun {
	t.Helper()
	bos, eos, unk := b.specials()
	lookup := func(w []byte) (uint32, bool) { return b.ID(string(w)) }
	grams := 0
	for _, n := range b.NGrams() {
		grams += n
	}
	var out []quantRun
	for _, q := range widths {
		opts := LayoutOptions{QuantBits: q}
		if v5 {
			opts.Version = 5
		}
		sec, err := AppendSection(nil, b, opts)
		if err != nil {
			t.Fatal(err)
		}
		m, err := LoadSection(sec)
		if err != nil {
			t.Fatal(err)
		}
		res, err := Perplexity(context.Background(), m, lookup, bos, eos, unk, strings.NewReader(test), ScanOptions{Pretokenized: true})
		if err != nil {
			t.Fatal(err)
		}
		out = append(out, quantRun{q, sectionVersionOf(sec), res.Perplexity, len(sec), float64(len(sec)) / float64(grams)})
	}
	return out
}

// TestQuantizationCost measures what quantization costs on the Opticks split
// (order 3): test perplexity and section bytes per n-gram at each width.
// Lossless storage must reproduce the independent reference's perplexity
// (testdata/reference/opticks-order3.json, from mkn.py). 8-bit codes must
// stay within 2 % of lossless perplexity: a common-practice tolerance for
// 8-bit quantized n-gram models, no source.
func TestQuantizationCost(t *testing.T) {
	ref := loadReference(t, "opticks-order3.json")
	x := buildText(t, readFile(t, filepath.Join("testdata", "opticks-train.txt")), 3, ScanOptions{Pretokenized: true}, 0)
	test := readFile(t, filepath.Join("testdata", "opticks-test.txt"))
	widths := []int{0, 16, 12, 8, 6, 4}
	runs6 := quantCost(t, x.b, test, widths, false)
	runs5 := quantCost(t, x.b, test, widths, true)
	t.Logf("n-grams per order %v", x.b.NGrams())
	t.Logf("%7s %5s %12s %10s %10s %12s", "version", "qbits", "perplexity", "vs 0 bits", "bytes", "bytes/ngram")
	for _, runs := range [][]quantRun{runs5, runs6} {
		for _, r := range runs {
			t.Logf("%7d %5d %12.4f %+9.3f%% %10d %12.3f", r.version, r.qbits, r.perplexity, 100*(r.perplexity/runs[0].perplexity-1), r.bytes, r.bytesPerGram)
		}
	}
	for i, r := range runs6 {
		if r.version != 6 || runs5[i].version != 5 {
			t.Fatalf("q%d: versions %d and %d written, want 6 and 5", r.qbits, r.version, runs5[i].version)
		}
	}
	for _, runs := range [][]quantRun{runs5, runs6} {
		if !near(runs[0].perplexity, ref.Perplexity, 1e-9) {
			t.Errorf("version %d: lossless perplexity %.10f, reference %.10f", runs[0].version, runs[0].perplexity, ref.Perplexity)
		}
		for _, r := range runs {
			if r.qbits == 8 && math.Abs(r.perplexity/runs[0].perplexity-1) > 0.02 {
				t.Errorf("version %d: 8-bit perplexity %.4f is more than 2%% from lossless %.4f", r.version, r.perplexity, runs[0].perplexity)
			}
		}
	}
	// Version 6 computes the highest order's first term exactly, so at 8
	// bits its perplexity must be no worse than version 5's.
	if p5, p6 := runs5[3].perplexity, runs6[3].perplexity; p6 > p5 {
		t.Errorf("8-bit perplexity: version 6 %.4f, worse than version 5 %.4f", p6, p5)
	}
}

// TestCodebooks checks the codebooks of a built model at every width: at
// most 2^q centroids, sorted (codes compare like values), every value coded
// to its nearest centroid (checked by brute force over the codebook), every
// centroid's value coded back to its own code, and coding monotone.
func TestCodebooks(t *testing.T) {
	x := buildText(t, readFile(t, filepath.Join("testdata", "opticks-train.txt")), 3, ScanOptions{Pretokenized: true}, 0)
	for _, q := range []int{4, 6, 8} {
		t.Run(fmt.Sprintf("q%d", q), func(t *testing.T) {
			m := layout(t, x.b, q)
			for n := 1; n <= 3; n++ {
				l := &m.lv[n-1]
				lv := &x.b.Levels[n-1]
				for _, c := range []struct {
					name string
					cb   codebook
					vals []float64
				}{{"probability", l.probBook, lv.LogP}, {"back-off", l.bowBook, lv.Bow}} {
					if n == 3 && c.name == "back-off" {
						continue // the highest order has no weights
					}
					if n == 3 && l.counted {
						continue // version 6 stores counts there, no probability codes
					}
					checkCodebook(t, fmt.Sprintf("order %d %s", n, c.name), c.cb, q, c.vals)
				}
			}
		})
	}
}

func checkCodebook(t *testing.T, name string, cb codebook, q int, vals []float64) {
	t.Helper()
	if len(cb) == 0 || len(cb) > 1<<q {
		t.Fatalf("%s: %d centroids for %d bits", name, len(cb), q)
	}
	if !slices.IsSorted(cb) {
		t.Fatalf("%s: codebook not sorted", name)
	}
	for c := range cb {
		if got := cb.encode(cb[c]); cb[got] != cb[c] {
			t.Fatalf("%s: centroid %d (%v) codes to %d (%v)", name, c, cb[c], got, cb[got])
		}
	}
	prev := -1
	sorted := slices.Clone(vals)
	slices.Sort(sorted)
	for _, v := range sorted {
		code := int(cb.encode(v))
		if math.IsInf(v, -1) {
			if code != 0 {
				t.Fatalf("%s: -Inf codes to %d, want 0", name, code)
			}
			continue
		}
		best := math.Inf(1)
		for _, c := range cb {
			best = min(best, math.Abs(v-c))
		}
		if d := math.Abs(v - cb[code]); d != best {
			t.Fatalf("%s: %v codes to %v (distance %v), nearest centroid is %v away", name, v, cb[code], d, best)
		}
		if code < prev {
			t.Fatalf("%s: coding not monotone at %v", name, v)
		}
		prev = code
	}
}

// TestTrainCodebookSmall checks trainCodebook on inputs whose answer is
// known without running it: few distinct values are kept exactly (no
// rounding is needed when every value can have its own code), infinities
// are left out, and an empty input still gives a usable codebook.
func TestTrainCodebookSmall(t *testing.T) {
	cases := []struct {
		name string
		vals []float64
		q    int
		want codebook
	}{
		{"distinct fit", []float64{-3, -1, -2, -1}, 4, codebook{-3, -2, -1}},
		{"infinities left out", []float64{math.Inf(-1), -0.5, math.NaN(), -0.25}, 4, codebook{-0.5, -0.25}},
		{"empty", nil, 8, codebook{0}},
		{"exactly 2^q", []float64{1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16}, 4,
			codebook{1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := trainCodebook(c.vals, c.q); !slices.Equal(got, c.want) {
				t.Errorf("trainCodebook(%v, %d) = %v, want %v", c.vals, c.q, got, c.want)
			}
		})
	}
	// Two well separated clusters and one code per cluster: the centroids are
	// the cluster means (the fixed point of Lloyd's algorithm, Lloyd 1982).
	rng := rand.New(rand.NewPCG(3, 4))
	var vals []float64
	var s0, s1 float64
	for range 500 {
		a, b := -10+rng.Float64(), -1+rng.Float64()
		vals = append(vals, a, b)
		s0 += a
		s1 += b
	}
	cb := trainCodebook(vals, 1)
	if len(cb) != 2 || math.Abs(cb[0]-s0/500) > 1e-9 || math.Abs(cb[1]-s1/500) > 1e-9 {
		t.Errorf("two clusters: centroids %v, want means %v, %v", cb, s0/500, s1/500)
	}
}

// BenchmarkQuantBits lays the Opticks order-3 model out at each code width
// and reports section bytes per n-gram and test perplexity.
func BenchmarkQuantBits(b *testing.B) {
	x := buildText(b, readFile(b, filepath.Join("testdata", "opticks-train.txt")), 3, ScanOptions{Pretokenized: true}, 0)
	test := readFile(b, filepath.Join("testdata", "opticks-test.txt"))
	for _, q := range []int{0, 16, 12, 8, 6, 4} {
		b.Run(fmt.Sprintf("qbits=%d", q), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := AppendSection(nil, x.b, LayoutOptions{QuantBits: q}); err != nil {
					b.Fatal(err)
				}
			}
			r := quantCost(b, x.b, test, []int{q}, false)[0]
			b.ReportMetric(r.bytesPerGram, "bytes/ngram")
			b.ReportMetric(r.perplexity, "ppl")
		})
	}
}
