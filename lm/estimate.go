package lm

import (
	"context"
	"fmt"
	"math"
)

// DefaultListSmoothing is the add-α constant of the unigram base distribution
// when EstimateOptions.ListSmoothing is zero.
const DefaultListSmoothing = 0.5

// FallbackDiscounts are used for an order whose count-of-counts cannot give
// valid discounts (tiny corpora: some n_i is zero or a discount falls outside
// [0, i]). Common practice, no source.
var fallbackDiscounts = [3]float64{0.5, 1.0, 1.5}

// EstimateOptions controls Estimate. The zero value gives the documented defaults.
type EstimateOptions struct {
	// ListSmoothing is α of the base distribution (default DefaultListSmoothing).
	ListSmoothing float64
	// ListWeight ω in [0, 1) mixes the word-list distribution into the
	// unigram level directly: p1(w) = (1−ω)·p_KN(w) + ω·q(w). Use it when the
	// running text is small or narrow and the lists say more about general
	// word frequency (the default model does). 0 (the default) keeps the
	// plain convention; it has no effect without word lists.
	ListWeight float64
	// Progress, if not nil, is called with the number of orders done.
	Progress func(done, total int)
}

// Estimate turns counts into an interpolated modified Kneser-Ney model
// (Chen & Goodman 1998, TR-10-98 §3.4), in back-off form.
//
// Conventions (shared with the test reference):
//   - The vocabulary V is every word seen in text or word lists, plus </s> and
//     <unk>; <s> is context only and gets no probability mass.
//   - The highest order uses raw counts; lower orders use continuation counts
//     N1+(• u), except n-grams that start with <s>, which keep raw counts.
//   - Per order, with n_i the count-of-counts of those counts: Y = n1/(n1+2n2),
//     D1 = 1−2Y·n2/n1, D2 = 2−3Y·n3/n2, D3+ = 3−4Y·n4/n3.
//   - p(w|h) = max(c(hw)−D,0)/S(h) + γ(h)·p(w|h′), S(h) = Σ_w c(hw),
//     γ(h) = (D1·N1(h•)+D2·N2(h•)+D3+·N3+(h•))/S(h); an unseen context backs off fully.
//   - The unigram level interpolates with a base distribution
//     q(w) = (L(w)+α)/(Σ_v L(v) + α|V|), where L are the word-count list counts;
//     without lists q is exactly the uniform 1/|V|. With no text at all, p = q.
//
// In back-off form the weight of a context h is γ(h).
func Estimate(ctx context.Context, c *Counter, opts EstimateOptions) (*Backoff, error) {
	if c.tokens == 0 && c.list == nil {
		return nil, ErrEmptyCorpus
	}
	return EstimateCounts(ctx, c.counts(), opts)
}

// Counts is a finished set of n-gram counts with final word IDs (lexicographic
// ranks): what Estimate works from. A Counter, a Tally (bounded memory,
// parallel, count shards) and their merges all produce one; equal counts give
// an equal Counts whatever path produced them.
type Counts struct {
	order   int
	vocab   []string  // sorted in byte order
	surface []string  // display form per final ID ("" = the folded word)
	list    []float64 // word-list counts per final ID; nil without lists
	tabs    []table   // per order, sorted by final IDs
	tokens  int64
	bos     uint32
}

// Order returns the highest order counted.
func (cs *Counts) Order() int { return cs.order }

// Tokens returns the number of word tokens counted.
func (cs *Counts) Tokens() int64 { return cs.tokens }

// NGrams returns the number of distinct n-grams per order (index n-1).
func (cs *Counts) NGrams() []int {
	out := make([]int, len(cs.tabs))
	for i := range cs.tabs {
		out[i] = cs.tabs[i].len()
	}
	return out
}

// EstimateCounts is Estimate over counts produced by any path (see Counts).
func EstimateCounts(ctx context.Context, cs *Counts, opts EstimateOptions) (*Backoff, error) {
	if cs.tokens == 0 && cs.list == nil {
		return nil, ErrEmptyCorpus
	}
	alpha := opts.ListSmoothing
	if alpha <= 0 {
		alpha = DefaultListSmoothing
	}
	vocab, tabs := cs.vocab, cs.tabs
	N := cs.order
	V := len(vocab)
	bos := cs.bos

	// Adjusted counts: continuation counts for orders < N, raw counts for
	// n-grams starting with <s> and for the highest order.
	adj := make([][]uint64, N)
	adj[N-1] = tabs[N-1].cnt
	for n := N - 1; n >= 1; n-- {
		lo := &tabs[n-1]
		a := make([]uint64, lo.len())
		hi := &tabs[n]
		for i := 0; i < hi.len(); i++ {
			k := hi.key(i)
			if n == 1 {
				a[k[1]]++
				continue
			}
			if j := lo.find(k[1:]); j >= 0 {
				a[j]++
			}
		}
		for i := 0; i < lo.len(); i++ {
			if lo.key(i)[0] == bos {
				a[i] = lo.cnt[i]
			}
		}
		adj[n-1] = a
		if err := ctx.Err(); err != nil {
			return nil, err
		}
	}

	b := &Backoff{Vocab: vocab, Surface: cs.surface, Tokens: cs.tokens}
	if N >= 2 {
		b.TopCounts = adj[N-1] // raw counts: version 6 stores them (section.go)
	}
	b.Levels = make([]Level, N)
	b.Discounts = make([][3]float64, N)

	// Discounts from count-of-counts per order (<s> excluded at the unigram level).
	for n := 1; n <= N; n++ {
		var cc [5]uint64
		for i, v := range adj[n-1] {
			if n == 1 && uint32(i) == bos {
				continue
			}
			if v >= 1 && v <= 4 {
				cc[v]++
			}
		}
		b.Discounts[n-1] = discounts(cc)
	}

	// Unigrams.
	uni := Level{N: 1, IDs: make([]uint32, V), LogP: make([]float64, V), Bow: make([]float64, V)}
	var listSum float64
	for id, v := range cs.list {
		if uint32(id) != bos {
			listSum += v
		}
	}
	var S uint64
	var N123 [3]uint64
	for i, v := range adj[0] {
		if uint32(i) == bos {
			continue
		}
		S += v
		countKind(&N123, v)
	}
	D := b.Discounts[0]
	gamma := 1.0
	if S > 0 {
		gamma = (D[0]*float64(N123[0]) + D[1]*float64(N123[1]) + D[2]*float64(N123[2])) / float64(S)
	}
	for id := range V {
		uni.IDs[id] = uint32(id)
		if uint32(id) == bos {
			uni.LogP[id] = math.Inf(-1)
			continue
		}
		l := 0.0
		if cs.list != nil {
			l = cs.list[id]
		}
		q := (l + alpha) / (listSum + alpha*float64(V-1))
		p := gamma * q
		if S > 0 {
			p += math.Max(float64(adj[0][id])-disc(D, adj[0][id]), 0) / float64(S)
		}
		if cs.list != nil && opts.ListWeight > 0 && opts.ListWeight < 1 {
			p = (1-opts.ListWeight)*p + opts.ListWeight*q
		}
		uni.LogP[id] = math.Log(p)
	}
	b.Levels[0] = uni
	if opts.Progress != nil {
		opts.Progress(1, N)
	}

	// Higher orders: group by context (the first n-1 IDs, contiguous in sorted order).
	for n := 2; n <= N; n++ {
		t := &tabs[n-1]
		a := adj[n-1]
		D := b.Discounts[n-1]
		lv := Level{N: n, IDs: t.ids, LogP: make([]float64, t.len()), Bow: make([]float64, t.len())}
		parent := &b.Levels[n-2]
		for g := 0; g < t.len(); {
			h := t.key(g)[:n-1]
			e := g
			var S uint64
			var N123 [3]uint64
			for e < t.len() && equalIDs(t.key(e)[:n-1], h) {
				S += a[e]
				countKind(&N123, a[e])
				e++
			}
			gamma := (D[0]*float64(N123[0]) + D[1]*float64(N123[1]) + D[2]*float64(N123[2])) / float64(S)
			for i := g; i < e; i++ {
				k := t.key(i)
				lower := b.LogProb(k[1:n-1], k[n-1])
				p := math.Max(float64(a[i])-disc(D, a[i]), 0)/float64(S) + gamma*math.Exp(lower)
				lv.LogP[i] = math.Log(p)
			}
			if j := parent.Find(h); j >= 0 {
				parent.Bow[j] = math.Log(gamma)
			} else {
				return nil, fmt.Errorf("lm: internal error: context %v of order %d has no n-gram", h, n-1)
			}
			g = e
			if g&8191 == 0 {
				if err := ctx.Err(); err != nil {
					return nil, err
				}
			}
		}
		b.Levels[n-1] = lv
		if opts.Progress != nil {
			opts.Progress(n, N)
		}
	}
	return b, nil
}

func equalIDs(a, b []uint32) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

func countKind(n *[3]uint64, v uint64) {
	switch {
	case v == 1:
		n[0]++
	case v == 2:
		n[1]++
	case v >= 3:
		n[2]++
	}
}

func disc(D [3]float64, c uint64) float64 {
	switch {
	case c == 0:
		return 0
	case c == 1:
		return D[0]
	case c == 2:
		return D[1]
	}
	return D[2]
}

// discounts computes D1, D2, D3+ from count-of-counts cc[1..4].
func discounts(cc [5]uint64) [3]float64 {
	n1, n2, n3, n4 := float64(cc[1]), float64(cc[2]), float64(cc[3]), float64(cc[4])
	if n1 == 0 || n2 == 0 || n3 == 0 {
		return fallbackDiscounts
	}
	y := n1 / (n1 + 2*n2)
	d := [3]float64{1 - 2*y*n2/n1, 2 - 3*y*n3/n2, 3 - 4*y*n4/n3}
	for i, v := range d {
		if !(v > 0 && v <= float64(i+1)) {
			return fallbackDiscounts
		}
	}
	return d
}
