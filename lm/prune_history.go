package lm

import (
	"context"
	"fmt"
	"math"
	"slices"
)

// The history weights p(h) of the pruning criterion (see Score). Stolcke
// (1998) takes p(h) from the model being pruned by the chain rule. For a
// Kneser-Ney model that is a poor estimate: its unigrams are continuation
// probabilities (how many different words precede a word), not how often
// the word occurs, and Chelba, Brants, Neveitt & Xu (2010, "Study on
// interaction between entropy pruning and Kneser-Ney smoothing",
// Interspeech) trace the poor results of entropy pruning on such models to
// this (from memory). Two better-founded weights are offered here: the
// model's own marginal and, where the counts are at hand, relative
// frequencies.

// marginalIterations bounds the power iteration of marginalHistory; the
// iteration stops earlier once the distribution moves by less than
// marginalTolerance (L1).
const (
	marginalIterations = 200
	marginalTolerance  = 1e-13
)

// looShare is the share of a top-order n-gram seen once that its criterion
// keeps under leave-one-out weighting (see Score): small enough that every
// n-gram seen once goes before any seen twice in practice, and above zero so
// that those seen once still go in the order of their criterion.
const looShare = 1e-3

// historyLogProbs returns, for the n-grams of orders 1..N−1 seen as
// histories, ln p(h) by the chain rule (a leading <s> counts as certain),
// as Stolcke (1998) computes it. The model is prefix-closed, so every factor
// is an explicit n-gram.
func historyLogProbs(ctx context.Context, b *Backoff, first [][]int) ([][]float64, error) {
	N := b.Order()
	out := make([][]float64, max(N-1, 0))
	if N < 2 {
		return out, nil
	}
	u := slices.Clone(b.Levels[0].LogP)
	if bos, ok := b.ID(BOS); ok {
		u[bos] = 0
	}
	out[0] = u
	return out, chainHistories(ctx, b, first, out)
}

// chainHistories fills out[1..N−2] from out[0] by the chain rule:
// ln p(h₁…hₖ) = ln p(h₁…hₖ₋₁) + ln p(hₖ | h₁…hₖ₋₁).
func chainHistories(ctx context.Context, b *Backoff, first [][]int, out [][]float64) error {
	for n := 2; n < b.Order(); n++ {
		lv, fs := &b.Levels[n-1], first[n-2]
		h := make([]float64, lv.Len())
		for j := range b.Levels[n-2].Len() {
			for i := fs[j]; i < fs[j+1]; i++ {
				h[i] = out[n-2][j] + lv.LogP[i]
			}
		}
		out[n-1] = h
		if err := ctx.Err(); err != nil {
			return err
		}
	}
	return nil
}

// marginalHistory returns ln p(h) for every history where the first word's
// probability is the stationary distribution π of the model read as a
// Markov chain over words, π(w) = Σ_v π(v)·p(w | v), with </s> followed by
// <s> (text is a sequence of sentences), and the later words follow by the
// chain rule. π is how often the model itself expects each word to occur,
// which for a Kneser-Ney model is far closer to the word's frequency than
// its unigram probability is. It is found by power iteration from the
// unigram distribution: each step costs O(vocabulary + bigrams), since
// p(w | v) = α(v)·p(w) except at v's explicit successors.
func marginalHistory(ctx context.Context, b *Backoff, first [][]int) ([][]float64, error) {
	N := b.Order()
	out := make([][]float64, max(N-1, 0))
	if N < 2 {
		return out, nil
	}
	V := len(b.Vocab)
	u, bi := &b.Levels[0], &b.Levels[1]
	bos, hasBOS := b.ID(BOS)
	eos, hasEOS := b.ID(EOS)
	pu := make([]float64, V)
	for i, x := range u.LogP {
		pu[i] = math.Exp(x)
	}
	// Per word: its back-off weight α(v); per bigram (v,w): the mass it adds
	// to w beyond α(v)·p(w), p(w|v) − α(v)·p(w).
	alpha := make([]float64, V)
	excess := make([]float64, bi.Len())
	for v := range V {
		alpha[v] = math.Exp(u.Bow[v])
		for i := first[0][v]; i < first[0][v+1]; i++ {
			excess[i] = math.Exp(bi.LogP[i]) - alpha[v]*pu[bi.Key(i)[1]]
		}
	}
	if hasEOS && hasBOS {
		alpha[eos] = 0 // </s> goes to <s> alone
	}
	pi := slices.Clone(pu)
	next := make([]float64, V)
	for range marginalIterations {
		clear(next)
		rest := 0.0 // Σ_v π(v)·α(v): mass spread as the unigram distribution
		for v, m := range pi {
			if m == 0 {
				continue
			}
			rest += m * alpha[v]
			for i := first[0][v]; i < first[0][v+1]; i++ {
				next[bi.IDs[2*i+1]] += m * excess[i]
			}
		}
		if hasEOS && hasBOS {
			next[bos] += pi[eos]
		}
		sum := 0.0
		for w := range next {
			next[w] = max(next[w]+rest*pu[w], 0)
			sum += next[w]
		}
		if !(sum > 0) {
			return nil, fmt.Errorf("%w: the model's word chain has no mass", ErrModel)
		}
		moved := 0.0
		for w := range next {
			x := next[w] / sum
			moved += math.Abs(x - pi[w])
			pi[w] = x
		}
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		if moved < marginalTolerance {
			break
		}
	}
	h := make([]float64, V)
	for i, x := range pi {
		h[i] = math.Log(x)
	}
	out[0] = h
	return out, chainHistories(ctx, b, first, out)
}

// countIndex returns, for every n-gram of b of order n ≤ limit, its index
// in cs's table of that order (index n−1 of the result). It fails with
// ErrModel when the vocabularies differ or an n-gram of b was not counted.
// Tables that list exactly b's n-grams (b estimated from cs) are matched in
// one pass; others through a binary search per n-gram.
func countIndex(ctx context.Context, b *Backoff, cs *Counts, limit int) ([][]int, error) {
	if cs.order < limit || !slices.Equal(cs.vocab, b.Vocab) {
		return nil, fmt.Errorf("%w: the counts are not those of the model (order %d, %d words; model order %d, %d words)", ErrModel, cs.order, len(cs.vocab), b.Order(), len(b.Vocab))
	}
	out := make([][]int, limit)
	for n := 1; n <= limit; n++ {
		lv, t := &b.Levels[n-1], &cs.tabs[n-1]
		idx := make([]int, lv.Len())
		for i := range idx {
			k := lv.Key(i)
			j := i
			if j >= t.len() || !equalIDs(t.key(j), k) {
				if j = t.find(k); j < 0 {
					return nil, fmt.Errorf("%w: %d-gram %v of the model was not counted", ErrModel, n, k)
				}
			}
			idx[i] = j
			if i&8191 == 8191 {
				if err := ctx.Err(); err != nil {
					return nil, err
				}
			}
		}
		out[n-1] = idx
	}
	return out, nil
}

// countHistory returns ln p(h) for every history as its relative frequency
// among the counted n-grams of its length, c(h) / Σ_g c(g), and the
// leave-one-out share of every top-order n-gram (see Score).
func countHistory(ctx context.Context, b *Backoff, cs *Counts) (hist [][]float64, loo []float64, err error) {
	N := b.Order()
	idx, err := countIndex(ctx, b, cs, N)
	if err != nil {
		return nil, nil, err
	}
	hist = make([][]float64, N-1)
	for n := 1; n < N; n++ {
		t := &cs.tabs[n-1]
		total := 0.0
		for _, c := range t.cnt {
			total += float64(c)
		}
		h := make([]float64, len(idx[n-1]))
		for i, j := range idx[n-1] {
			h[i] = math.Log(float64(t.cnt[j]) / total)
		}
		hist[n-1] = h
	}
	if N >= 2 {
		t := &cs.tabs[N-1]
		loo = make([]float64, len(idx[N-1]))
		for i, j := range idx[N-1] {
			c := float64(t.cnt[j])
			if c < 1 {
				return nil, nil, fmt.Errorf("%w: %d-gram %v has count 0", ErrModel, N, b.Levels[N-1].Key(i))
			}
			loo[i] = (c - 1 + looShare) / c
		}
	}
	return hist, loo, nil
}
