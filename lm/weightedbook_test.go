package lm

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestWeightedCodebookKnown checks cases worked by hand: one centroid is
// the weighted mean of the values (definition of the least-squares point,
// Lloyd 1982, "Least squares quantization in PCM"); as many centroids as
// distinct values keep the values themselves; infinite values and zero
// weights are left out.
func TestWeightedCodebookKnown(t *testing.T) {
	cases := []struct {
		name    string
		vals    []float64
		weights []float64
		qbits   int
		want    codebook
	}{
		{"one centroid", []float64{0, 1}, []float64{1, 3}, 0, codebook{0.75}},
		{"one centroid, equal values merged", []float64{2, 2, -2}, []float64{1, 1, 2}, 0, codebook{0}},
		{"room for every value", []float64{3, -1, 3, 0.5}, []float64{1, 1, 5, 2}, 2, codebook{-1, 0.5, 3}},
		{"infinite and unweighted values left out", []float64{math.Inf(-1), 1, 7}, []float64{4, 2, 0}, 0, codebook{1}},
		{"nothing left", []float64{math.Inf(-1)}, []float64{1}, 4, codebook{0}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := trainWeightedCodebook(c.vals, c.weights, c.qbits); !slices.Equal(got, c.want) {
				t.Errorf("codebook %v, want %v", got, c.want)
			}
		})
	}
}

// TestWeightedCodebookBias trains 8-bit codebooks on skewed, heavily
// weighted values (fixed seed) and checks the properties version 6 relies
// on: at most 2^q sorted centroids; each centroid near the weighted mean of
// the values it codes (Lloyd's centroid condition, Lloyd 1982, "Least
// squares quantization in PCM", to within what 12 rounds leave: the
// weighted signed error below 5 % of the weighted mean absolute error, a
// tolerance chosen for this data, no source); and a weighted squared error
// no larger than that of the unweighted codebook on the same data (Lloyd
// rounds minimize exactly that quantity).
func TestWeightedCodebookBias(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 9))
	n := 20000
	vals, weights := make([]float64, n), make([]float64, n)
	for i := range n {
		// Back-off-like values in (-6, 0], the heavy weights near 0.
		vals[i] = -6 * math.Pow(rng.Float64(), 2)
		weights[i] = 1
		if vals[i] > -0.5 {
			weights[i] = 1 + float64(rng.IntN(200))
		}
	}
	const q = 8
	cb := trainWeightedCodebook(vals, weights, q)
	if len(cb) == 0 || len(cb) > 1<<q || !slices.IsSorted(cb) {
		t.Fatalf("%d centroids, sorted %v", len(cb), slices.IsSorted(cb))
	}
	errs := func(cb codebook) (signed, abs, sq float64) {
		var sw float64
		for i, x := range vals {
			d := cb.value(cb.encode(x)) - x
			signed += weights[i] * d
			abs += weights[i] * math.Abs(d)
			sq += weights[i] * d * d
			sw += weights[i]
		}
		return signed / sw, abs / sw, sq / sw
	}
	ws, wa, wq := errs(cb)
	us, ua, uq := errs(trainCodebook(vals, q))
	t.Logf("weighted errors (signed, absolute, squared): weighted codebook %.3g, %.3g, %.3g; unweighted %.3g, %.3g, %.3g", ws, wa, wq, us, ua, uq)
	if math.Abs(ws) > 0.05*wa {
		t.Errorf("weighted signed error %.3g is not small next to the mean absolute error %.3g", ws, wa)
	}
	if wq > uq {
		t.Errorf("weighted squared error %.3g exceeds the unweighted codebook's %.3g", wq, uq)
	}
}
