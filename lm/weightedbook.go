package lm

import (
	"cmp"
	"math"
	"slices"
)

// trainWeightedCodebook is trainCodebook for values that do not matter
// equally: value i counts weights[i] times (weights > 0). It starts from
// trainCodebook's bins and refines them by weighted Lloyd rounds
// (one-dimensional k-means), so that each centroid is the weighted mean of
// the values coded to it and the weighted coding error has no bias. Version 6
// trains the back-off codebook of the order below the highest so, weighting
// each context by what its weight carries (counted.go).
func trainWeightedCodebook(vals, weights []float64, qbits int) codebook {
	type vw struct{ v, w float64 }
	v := make([]vw, 0, len(vals))
	for i, x := range vals {
		if !math.IsInf(x, 0) && !math.IsNaN(x) && weights[i] > 0 {
			v = append(v, vw{x, weights[i]})
		}
	}
	slices.SortFunc(v, func(a, b vw) int { return cmp.Compare(a.v, b.v) })
	// Merge equal values.
	out := v[:0]
	for _, x := range v {
		if len(out) > 0 && out[len(out)-1].v == x.v {
			out[len(out)-1].w += x.w
			continue
		}
		out = append(out, x)
	}
	v = out
	k := 1 << qbits
	if len(v) == 0 {
		return codebook{0}
	}
	if len(v) <= k {
		cb := make(codebook, len(v))
		for i, x := range v {
			cb[i] = x.v
		}
		return cb
	}
	// Start as trainCodebook does, from bins of equal numbers of distinct
	// values (each centroid the weighted mean of its bin): bins of equal
	// weight would leave few centroids where the weights are light, and
	// Lloyd rounds do not move them back.
	cb := make(codebook, k)
	for b := range k {
		lo, hi := b*len(v)/k, (b+1)*len(v)/k
		var s, sw float64
		for _, x := range v[lo:hi] {
			s += x.v * x.w
			sw += x.w
		}
		cb[b] = s / sw
	}
	slices.Sort(cb)
	cb = slices.Compact(cb)
	for range 12 {
		sum := make([]float64, len(cb))
		wt := make([]float64, len(cb))
		// Values and centroids are both sorted: the nearest centroid
		// only moves up, past each midpoint between two centroids.
		c := 0
		for _, x := range v {
			for c+1 < len(cb) && x.v-cb[c] > cb[c+1]-x.v {
				c++
			}
			sum[c] += x.v * x.w
			wt[c] += x.w
		}
		for c := range cb {
			if wt[c] > 0 {
				cb[c] = sum[c] / wt[c]
			}
		}
		slices.Sort(cb)
	}
	return cb
}
