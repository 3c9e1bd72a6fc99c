package lm

import (
	"math"
	"slices"
	"sort"
)

// codebook maps quantized codes to values. Codes are ordered like the values
// they stand for, so comparing codes compares values. A nil codebook means
// lossless storage: the code is the float64 bit pattern itself.
type codebook []float64

// value returns the value of a code.
func (cb codebook) value(code uint64) float64 {
	if cb == nil {
		return math.Float64frombits(code)
	}
	if code >= uint64(len(cb)) { // only a corrupt file holds such a code
		return cb[len(cb)-1]
	}
	return cb[code]
}

// trainCodebook returns at most 2^bits centroids for vals: the sorted values
// are cut into bins of equal population, each bin's mean is its centroid,
// and a few rounds of one-dimensional k-means (Lloyd) refine them.
// Infinite values are left out; they encode to the lowest code.
func trainCodebook(vals []float64, qbits int) codebook {
	v := make([]float64, 0, len(vals))
	for _, x := range vals {
		if !math.IsInf(x, 0) && !math.IsNaN(x) {
			v = append(v, x)
		}
	}
	slices.Sort(v)
	v = slices.Compact(v) // distinct values: a value shared by many entries still gets one code
	k := 1 << qbits
	if len(v) == 0 {
		return codebook{0}
	}
	if len(v) <= k {
		return codebook(v)
	}
	cb := make(codebook, k)
	for b := range k {
		lo, hi := b*len(v)/k, (b+1)*len(v)/k
		s := 0.0
		for _, x := range v[lo:hi] {
			s += x
		}
		cb[b] = s / float64(hi-lo)
	}
	for range 4 {
		sum := make([]float64, k)
		cnt := make([]int, k)
		for _, x := range v {
			c := cb.nearest(x)
			sum[c] += x
			cnt[c]++
		}
		for c := range k {
			if cnt[c] > 0 {
				cb[c] = sum[c] / float64(cnt[c])
			}
		}
		slices.Sort(cb)
	}
	return cb
}

// nearest returns the code whose centroid is closest to x.
func (cb codebook) nearest(x float64) int {
	if math.IsInf(x, -1) || math.IsNaN(x) {
		return 0
	}
	i := sort.SearchFloat64s(cb, x)
	switch {
	case i == 0:
		return 0
	case i == len(cb):
		return len(cb) - 1
	case x-cb[i-1] <= cb[i]-x:
		return i - 1
	}
	return i
}

// encode returns the code of x.
func (cb codebook) encode(x float64) uint64 {
	if cb == nil {
		return math.Float64bits(x)
	}
	return uint64(cb.nearest(x))
}

// width returns the code width in bits.
func (cb codebook) width() uint {
	if cb == nil {
		return 64
	}
	return bitsFor(uint64(len(cb) - 1))
}
