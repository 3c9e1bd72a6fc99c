package lm

import (
	"context"
	"fmt"
)

// EstimateCutoff estimates a model from c as Estimate does and then applies
// count cut-offs: an n-gram of order n ≥ 2 whose raw count is below
// minCount[n-1] is removed, unless it is the context or the suffix of a
// kept longer n-gram, and the back-off weights are recomputed so every
// context still sums to one.
// minCount[0] is ignored (all unigrams are kept) and orders past the end of
// minCount have cut-off 1.
//
// The kept n-grams keep the probabilities of the full estimate (discounts
// and continuation counts come from all the counts); the mass of the removed
// ones goes to back-off, as with Prune, so the two differ only in which
// n-grams they choose. With every cut-off at most 1 the result is exactly
// Estimate's.
func EstimateCutoff(ctx context.Context, c *Counter, minCount []int, opts EstimateOptions) (*Backoff, error) {
	if c.tokens == 0 && c.list == nil {
		return nil, ErrEmptyCorpus
	}
	if err := checkCutoffs(minCount, c.order); err != nil {
		return nil, err
	}
	return EstimateCountsCutoff(ctx, c.counts(), minCount, opts)
}

// EstimateCountsCutoff is EstimateCutoff over counts produced by any path.
func EstimateCountsCutoff(ctx context.Context, cs *Counts, minCount []int, opts EstimateOptions) (*Backoff, error) {
	if err := checkCutoffs(minCount, cs.order); err != nil {
		return nil, err
	}
	b, err := EstimateCounts(ctx, cs, opts)
	if err != nil {
		return nil, err
	}
	cut := false
	for n := 2; n <= len(minCount); n++ {
		cut = cut || minCount[n-1] > 1
	}
	if !cut {
		return b, nil
	}
	keep := make([][]bool, b.Order())
	for n := 2; n <= b.Order(); n++ {
		t := &cs.tabs[n-1]
		if t.len() != b.Levels[n-1].Len() {
			return nil, fmt.Errorf("lm: internal error: %d-gram counts and model disagree", n)
		}
		m := uint64(1)
		if n <= len(minCount) {
			m = uint64(max(minCount[n-1], 1))
		}
		k := make([]bool, t.len())
		for i, v := range t.cnt {
			k[i] = v >= m
		}
		keep[n-1] = k
	}
	first, err := childIndex(ctx, b)
	if err != nil {
		return nil, err
	}
	return subset(ctx, b, first, keep)
}

func checkCutoffs(minCount []int, order int) error {
	if len(minCount) > order {
		return fmt.Errorf("%w: %d cut-offs for order %d", ErrCutoff, len(minCount), order)
	}
	for n, m := range minCount {
		if m < 0 {
			return fmt.Errorf("%w: %d for order %d", ErrCutoff, m, n+1)
		}
	}
	return nil
}
