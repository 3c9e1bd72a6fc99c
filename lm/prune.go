package lm

import (
	"context"
	"fmt"
	"math"
	"slices"
)

// Scores holds, for every n-gram of order 2 and up of a model, the increase
// in training-set relative entropy that removing that n-gram alone would
// cause: the pruning criterion of Stolcke (1998), "Entropy-based pruning of
// backoff language models", with the history weights and, given counts, the
// leave-one-out weighting that ScoreOptions choose. Score computes it; Prune
// and PruneScored use it.
type Scores struct {
	// Delta[n-1][i] is the criterion D of n-gram i of order n (in nats).
	// Delta[0] is nil: unigrams are never pruned. +Inf marks an n-gram whose
	// removal cannot be renormalized (see Score).
	Delta [][]float64

	first [][]int // successor index of the scored model (see childIndex)
}

// ScoreOptions controls Score.
type ScoreOptions struct {
	// Progress, if not nil, is called now and then with the n-grams scored
	// and their total.
	Progress func(done, total int)
	// Counts, if not nil, are the counts the model was estimated from (or a
	// superset of its n-grams over the same vocabulary). The history weights
	// p(h) are then relative frequencies, and the criteria of the top order
	// get leave-one-out weighting (see Score). ChainHistory is ignored.
	Counts *Counts
	// ChainHistory selects the history weights of Stolcke (1998) as
	// published, the chain rule over the model's own probabilities, instead
	// of the model's marginal word distribution (see Score). Used only
	// without Counts.
	ChainHistory bool
}

// Score computes Stolcke's criterion for every n-gram (h,w) of order ≥ 2 of
// b, each judged alone against the unpruned model:
//
//	α'(h) = (1 − Σ_{v∈S(h),v≠w} p(v|h)) / (1 − Σ_{v∈S(h),v≠w} p(v|h′))
//	D     = −p(h)·{ p(w|h)·[ln p(w|h′) + ln α'(h) − ln p(w|h)] + [ln α'(h) − ln α(h)]·(1 − Σ_{v∈S(h)} p(v|h)) }
//
// where S(h) are the explicit successors of h, h′ is h without its first word
// and α(h) is h's back-off weight. D is the Kullback-Leibler divergence of
// the model's distribution after the removal from the one before, over
// histories of h's length weighted by p(h). The history weight p(h) is, by
// the options:
//
//   - by default, π(h₁)·Π p(hᵢ | h₁…hᵢ₋₁), where π is the stationary word
//     distribution of the model read as a Markov chain over words (</s> is
//     followed by <s>): how often the model itself expects h₁ to occur.
//     Stolcke uses the model's unigram p(h₁) instead; a Kneser-Ney model's
//     unigrams are continuation probabilities, which misjudge how often a
//     history occurs (see Chelba et al. 2010 in prune_history.go).
//   - with ChainHistory, Stolcke's p(h₁)·Π p(hᵢ | h₁…hᵢ₋₁) with the model's
//     unigram p(h₁), a leading <s> counted as certain.
//   - with Counts, the relative frequency c(h)/Σ_g c(g) over the counted
//     n-grams g of h's length.
//
// With Counts, D of a top-order n-gram seen c times is also multiplied by
// (c − 1 + 0.001)/c: leave-one-out weighting, the share of its occurrences
// that a model estimated without that very occurrence would still have
// seen. The training-set criterion rewards an n-gram seen once for
// predicting the one occurrence it was estimated from; on new text such an
// n-gram rarely helps, so under this weighting n-grams seen once go first
// (in the order of their D) and the others follow by D·(c−1)/c. Lower
// orders are estimated from continuation counts, not occurrences, and keep
// D as it is.
//
// When a sum reaches 1 so that α'(h) is undefined (only possible for a model
// read back from a quantized file, or one whose explicit successors of h
// cover the whole vocabulary), D is +Inf and the n-gram is never pruned.
// Cost: O(n-grams · log successors) time, plus O(vocabulary + bigrams) per
// step of the marginal's power iteration (at most 200 steps; 24 to 26 on
// the project's texts), or O(n-grams) to match Counts; 16 bytes per n-gram (the criterion
// and an index of successor groups that PruneScored reuses).
func Score(ctx context.Context, b *Backoff, opts ScoreOptions) (*Scores, error) {
	if err := checkShape(b); err != nil {
		return nil, err
	}
	N := b.Order()
	total := 0
	for n := 2; n <= N; n++ {
		total += b.Levels[n-1].Len()
	}
	first, err := childIndex(ctx, b)
	if err != nil {
		return nil, err
	}
	var hist [][]float64
	var loo []float64
	switch {
	case opts.Counts != nil:
		hist, loo, err = countHistory(ctx, b, opts.Counts)
	case opts.ChainHistory:
		hist, err = historyLogProbs(ctx, b, first)
	default:
		hist, err = marginalHistory(ctx, b, first)
	}
	if err != nil {
		return nil, err
	}
	sc, err := scoreWith(ctx, b, first, hist, loo, opts, total)
	if err != nil {
		return nil, err
	}
	sc.first = first
	return sc, nil
}

// scoreWith computes the criteria with the history weights hist (ln p(h)
// per n-gram of orders 1..N−1) and, if loo is not nil, multiplies those of
// the top order by loo.
func scoreWith(ctx context.Context, b *Backoff, first [][]int, hist [][]float64, loo []float64, opts ScoreOptions, total int) (*Scores, error) {
	N := b.Order()
	s := &Scores{Delta: make([][]float64, N)}
	key := make([]uint32, 0, N)
	var lower []float64
	done := 0
	for n := 2; n <= N; n++ {
		lv, parent, fs := &b.Levels[n-1], &b.Levels[n-2], first[n-2]
		d := make([]float64, lv.Len())
		for j := range parent.Len() {
			g, e := fs[j], fs[j+1]
			if g == e {
				continue
			}
			lnAlpha := parent.Bow[j]
			ph := math.Exp(hist[n-2][j])
			if ph == 0 { // a history the weights never reach: nothing changes
				done += e - g
				continue
			}
			lower = b.lowerLogProbs(first, n, g, e, key, lower[:0])
			var sumP, sumQ float64
			for i := g; i < e; i++ {
				sumP += math.Exp(lv.LogP[i])
				sumQ += math.Exp(lower[i-g])
			}
			restP, restQ := 1-sumP, 1-sumQ
			for i := g; i < e; i++ {
				lp, lq := lv.LogP[i], lower[i-g]
				p, q := math.Exp(lp), math.Exp(lq)
				num, den := restP+p, restQ+q
				if !(num > 0 && den > 0) {
					d[i] = math.Inf(1)
					continue
				}
				lnAlpha2 := math.Log(num) - math.Log(den)
				t := (lnAlpha2 - lnAlpha) * restP
				if p > 0 {
					t += p * (lq + lnAlpha2 - lp)
				}
				d[i] = -ph * t
				if n == N && loo != nil {
					d[i] *= loo[i]
				}
			}
			done += e - g
			if j&4095 == 4095 {
				if err := ctx.Err(); err != nil {
					return nil, err
				}
				if opts.Progress != nil {
					opts.Progress(done, total)
				}
			}
		}
		s.Delta[n-1] = d
	}
	if opts.Progress != nil {
		opts.Progress(total, total)
	}
	return s, nil
}

// PruneOptions controls Prune.
type PruneOptions struct {
	// Threshold is θ: n-grams whose criterion D (see Score) is below it are
	// removed. Zero removes only n-grams whose removal changes nothing.
	Threshold float64
	// Progress, if not nil, is called while scoring (see ScoreOptions).
	Progress func(done, total int)
	// Counts and ChainHistory choose the history weights and leave-one-out
	// weighting of the criterion, as in ScoreOptions.
	Counts       *Counts
	ChainHistory bool
}

// Prune removes from b every n-gram of order ≥ 2 whose relative-entropy
// criterion (Score) is below opts.Threshold, as Stolcke (1998) does: every
// candidate is judged against the original model, then the back-off weights
// are recomputed so that every context still sums to one. An n-gram that is
// the context or the suffix of a kept longer n-gram is kept (so the result
// stays suffix-closed), and so are all unigrams. b is
// not changed; the result shares no storage with it.
//
// The criterion weighs each context by how often it occurs. By default that
// weight comes from the model alone (its marginal word distribution; see
// Score), which suits Kneser-Ney models better than Stolcke's chain rule
// (ChainHistory). Given the counts b was estimated from (Counts), the
// weights are relative frequencies and n-grams of the top order seen once go
// before any seen more often: on held-out text this beats count cut-offs of
// equal size, which the other two do not reliably do (see BENCHMARKS.md).
func Prune(ctx context.Context, b *Backoff, opts PruneOptions) (*Backoff, error) {
	s, err := Score(ctx, b, ScoreOptions{Progress: opts.Progress, Counts: opts.Counts, ChainHistory: opts.ChainHistory})
	if err != nil {
		return nil, err
	}
	return PruneScored(ctx, b, s, opts.Threshold)
}

// PruneScored is Prune with the scores already computed by Score(b), so that
// one model can be pruned at many thresholds (a search for a size) at the
// cost of Score once. Use math.Inf(1) to keep the unigrams alone.
// Cost: O(n-grams) plus one binary search per kept context.
func PruneScored(ctx context.Context, b *Backoff, s *Scores, threshold float64) (*Backoff, error) {
	if err := checkShape(b); err != nil {
		return nil, err
	}
	if len(s.Delta) != b.Order() {
		return nil, fmt.Errorf("%w: scores of an order-%d model for an order-%d one", ErrModel, len(s.Delta), b.Order())
	}
	keep := make([][]bool, b.Order())
	for n := 2; n <= b.Order(); n++ {
		d := s.Delta[n-1]
		if len(d) != b.Levels[n-1].Len() {
			return nil, fmt.Errorf("%w: scores do not match the model's %d-grams", ErrModel, n)
		}
		k := make([]bool, len(d))
		for i, x := range d {
			k[i] = x >= threshold
		}
		keep[n-1] = k
	}
	first := s.first
	if !indexFits(first, b) {
		var err error
		if first, err = childIndex(ctx, b); err != nil {
			return nil, err
		}
	}
	return subset(ctx, b, first, keep)
}

// KeptAt returns how many n-grams of each order (unigrams first) PruneScored
// would keep at threshold θ, before adding the contexts of kept n-grams: a
// cheap lower bound used to steer a search. Cost: O(n-grams).
func (s *Scores) KeptAt(threshold float64) []int {
	out := make([]int, len(s.Delta))
	for n, d := range s.Delta {
		for _, x := range d {
			if x >= threshold {
				out[n]++
			}
		}
	}
	return out
}

// PruneVocab returns a copy of b whose vocabulary keeps only the size words
// of highest unigram probability (ties: smaller ID first), plus <s>, </s>,
// <unk> and every word of mustKeep found in the vocabulary (mustKeep words
// must be folded, as the vocabulary is; unknown ones are ignored), so the
// result may hold more than size words.
//
// Every n-gram that contains a dropped word, in its context or as its last
// word, is removed. The unigram probabilities of the dropped words are added
// to <unk>'s, so a dropped word typed later is scored as <unk> with at least
// the mass it had; the mass of the removed longer n-grams goes to back-off,
// whose weights are recomputed so every context still sums to one. Word IDs
// stay lexicographic ranks of the smaller vocabulary. A size at or above the
// vocabulary size returns b itself.
func PruneVocab(ctx context.Context, b *Backoff, size int, mustKeep []string) (*Backoff, error) {
	if err := checkShape(b); err != nil {
		return nil, err
	}
	V := len(b.Vocab)
	if size >= V {
		return b, nil
	}
	unk, ok := b.ID(UNK)
	if !ok {
		return nil, ErrNoUnknown
	}
	uni := &b.Levels[0]
	kept := make([]bool, V)
	nkept := 0
	mark := func(id uint32) {
		if int(id) < V && !kept[id] {
			kept[id] = true
			nkept++
		}
	}
	for _, w := range []string{BOS, EOS, UNK} {
		if id, ok := b.ID(w); ok {
			mark(id)
		}
	}
	for _, w := range mustKeep {
		if id, ok := b.ID(w); ok {
			mark(id)
		}
	}
	byProb := make([]uint32, V)
	for i := range byProb {
		byProb[i] = uint32(i)
	}
	slices.SortFunc(byProb, func(x, y uint32) int {
		px, py := uni.LogP[x], uni.LogP[y]
		switch {
		case px > py:
			return -1
		case px < py:
			return 1
		}
		return cmpU64(uint64(x), uint64(y))
	})
	for _, id := range byProb {
		if nkept >= size {
			break
		}
		mark(id)
	}
	// New IDs: ranks among the kept words, so the order is preserved.
	remap := make([]uint32, V)
	nv := &Backoff{Discounts: b.Discounts, Tokens: b.Tokens, Levels: make([]Level, b.Order())}
	dropped := 0.0
	for id := range V {
		if !kept[id] {
			if p := uni.LogP[id]; !math.IsInf(p, -1) {
				dropped += math.Exp(p)
			}
			continue
		}
		remap[id] = uint32(len(nv.Vocab))
		nv.Vocab = append(nv.Vocab, b.Vocab[id])
		if id < len(b.Surface) {
			nv.Surface = append(nv.Surface, b.Surface[id])
		} else {
			nv.Surface = append(nv.Surface, "")
		}
	}
	nu := Level{N: 1, IDs: make([]uint32, len(nv.Vocab)), LogP: make([]float64, len(nv.Vocab)), Bow: make([]float64, len(nv.Vocab))}
	for id := range V {
		if kept[id] {
			r := remap[id]
			nu.IDs[r] = r
			nu.LogP[r] = uni.LogP[id]
		}
	}
	nu.LogP[remap[unk]] = math.Log(math.Exp(uni.LogP[unk]) + dropped)
	nv.Levels[0] = nu
	for n := 2; n <= b.Order(); n++ {
		lv := &b.Levels[n-1]
		nl := Level{N: n}
	entries:
		for i := range lv.Len() {
			k := lv.Key(i)
			for _, id := range k {
				if int(id) >= V || !kept[id] {
					continue entries
				}
			}
			for _, id := range k {
				nl.IDs = append(nl.IDs, remap[id])
			}
			nl.LogP = append(nl.LogP, lv.LogP[i])
		}
		nl.Bow = make([]float64, len(nl.LogP))
		nv.Levels[n-1] = nl
		if err := ctx.Err(); err != nil {
			return nil, err
		}
	}
	if err := renormalize(ctx, nv); err != nil {
		return nil, err
	}
	return nv, nil
}

// subset returns the model made of b's unigrams, the n-grams marked in keep
// (keep[n-1][i] for n-gram i of order n; keep[0] is ignored) and every n-gram
// that is the context or the suffix of a kept one, with the back-off
// weights recomputed.
func subset(ctx context.Context, b *Backoff, first [][]int, keep [][]bool) (*Backoff, error) {
	N := b.Order()
	// Close under prefixes and suffixes, longest order first: the context of
	// a kept n-gram is kept (the back-off structure needs it), and so is its
	// suffix (the n-gram without its oldest word), so that the result stays
	// suffix-closed as every estimated model is — the compact layout of the
	// highest order relies on that (see ranked.go), and a pruned model
	// keeps the property that a word seen after a long context is also
	// explicit after the shorter one.
	for n := N; n >= 3; n-- {
		k, pk, fs := keep[n-1], keep[n-2], first[n-2]
		for j := range pk {
			if !pk[j] && slices.Contains(k[fs[j]:fs[j+1]], true) {
				pk[j] = true
			}
		}
		lv, lower := &b.Levels[n-1], &b.Levels[n-2]
		for i, x := range k {
			if !x {
				continue
			}
			if j := lower.Find(lv.Key(i)[1:]); j >= 0 {
				pk[j] = true
			}
		}
		if err := ctx.Err(); err != nil {
			return nil, err
		}
	}
	nb := &Backoff{Vocab: b.Vocab, Surface: b.Surface, Discounts: b.Discounts, Tokens: b.Tokens, Levels: make([]Level, N)}
	u := &b.Levels[0]
	nb.Levels[0] = Level{N: 1, IDs: slices.Clone(u.IDs), LogP: slices.Clone(u.LogP), Bow: make([]float64, u.Len())}
	for n := 2; n <= N; n++ {
		lv, k := &b.Levels[n-1], keep[n-1]
		cnt := 0
		for _, x := range k {
			if x {
				cnt++
			}
		}
		nl := Level{N: n, IDs: make([]uint32, 0, cnt*n), LogP: make([]float64, 0, cnt), Bow: make([]float64, cnt)}
		for i, x := range k {
			if x {
				nl.IDs = append(nl.IDs, lv.Key(i)...)
				nl.LogP = append(nl.LogP, lv.LogP[i])
			}
		}
		nb.Levels[n-1] = nl
	}
	if err := renormalize(ctx, nb); err != nil {
		return nil, err
	}
	return nb, nil
}

// renormalize recomputes every back-off weight of b in place, lowest order
// first, so that each context's distribution sums to one:
//
//	α(h) = (1 − Σ_{v∈S(h)} p(v|h)) / (1 − Σ_{v∈S(h)} p(v|h′))
//
// A context without successors gets weight 1 (ln 0). If the explicit
// successors take all the mass (a model decoded from a quantized file can
// get there), the numerator is floored at 1e-12; if the lower-order
// successors do, the weight is 1, as no word is left to back off to.
func renormalize(ctx context.Context, b *Backoff) error {
	N := b.Order()
	for n := 1; n < N; n++ {
		clear(b.Levels[n-1].Bow)
	}
	first, err := childIndex(ctx, b)
	if err != nil {
		return err
	}
	key := make([]uint32, 0, N)
	var lower []float64
	for n := 2; n <= N; n++ {
		lv, parent, fs := &b.Levels[n-1], &b.Levels[n-2], first[n-2]
		for j := range parent.Len() {
			g, e := fs[j], fs[j+1]
			if g == e {
				continue
			}
			lower = b.lowerLogProbs(first, n, g, e, key, lower[:0])
			var sumP, sumQ float64
			for i := g; i < e; i++ {
				sumP += math.Exp(lv.LogP[i])
				sumQ += math.Exp(lower[i-g])
			}
			if num, den := 1-sumP, 1-sumQ; den > 0 {
				parent.Bow[j] = math.Log(max(num, 1e-12)) - math.Log(den)
			}
			if j&8191 == 8191 {
				if err := ctx.Err(); err != nil {
					return err
				}
			}
		}
	}
	return nil
}

// childIndex returns, for every level but the last, where each n-gram's
// successors start in the next level: successors of n-gram j of order L+1
// are [first[L][j], first[L][j+1]) of order L+2. One merge pass per level;
// ErrModel if some n-gram's context is missing or a level is unsorted.
func childIndex(ctx context.Context, b *Backoff) ([][]int, error) {
	N := b.Order()
	out := make([][]int, max(N-1, 0))
	for L := 0; L < N-1; L++ {
		par, lv := &b.Levels[L], &b.Levels[L+1]
		first := make([]int, par.Len()+1)
		p := 0
		for j := range par.Len() {
			first[j] = p
			h := par.Key(j)
			for p < lv.Len() && equalIDs(lv.Key(p)[:L+1], h) {
				p++
			}
		}
		first[par.Len()] = p
		if p != lv.Len() {
			return nil, fmt.Errorf("%w: %d-gram %v has successors but is not in the model (or the %d-grams are unsorted)", ErrModel, L+1, lv.Key(p)[:L+1], L+2)
		}
		out[L] = first
		if err := ctx.Err(); err != nil {
			return nil, err
		}
	}
	return out, nil
}

// indexFits reports whether first has the lengths of b's child index.
func indexFits(first [][]int, b *Backoff) bool {
	if len(first) != max(b.Order()-1, 0) {
		return false
	}
	for L, f := range first {
		if len(f) != b.Levels[L].Len()+1 || f[len(f)-1] != b.Levels[L+1].Len() {
			return false
		}
	}
	return true
}

// lowerLogProbs appends to dst ln p(w | h′) for the n-grams g..e−1 of order n,
// which share the context h; h′ is h without its first word. The n-grams
// (h′,w) are found by binary searches moving forward through h′'s successors.
func (b *Backoff) lowerLogProbs(first [][]int, n, g, e int, key []uint32, dst []float64) []float64 {
	lv := &b.Levels[n-1]
	if n == 2 {
		u := &b.Levels[0]
		for i := g; i < e; i++ {
			w := lv.Key(i)[1]
			if int(w) < u.Len() {
				dst = append(dst, u.LogP[w])
			} else {
				dst = append(dst, math.Inf(-1))
			}
		}
		return dst
	}
	hp := lv.Key(g)[1 : n-1] // h′, n−2 words
	jp := -1
	if n == 3 {
		if int(hp[0]) < b.Levels[0].Len() {
			jp = int(hp[0])
		}
	} else {
		jp = b.Levels[n-3].Find(hp)
	}
	if jp < 0 { // h′ is not an n-gram, so it has no successors and weight 1
		for i := g; i < e; i++ {
			dst = append(dst, b.logProbInto(key, hp[1:], lv.Key(i)[n-1]))
		}
		return dst
	}
	low := &b.Levels[n-2]
	p, hi := first[n-3][jp], first[n-3][jp+1]
	bow := b.Levels[n-3].Bow[jp]
	for i := g; i < e; i++ {
		w := lv.Key(i)[n-1]
		lo, top := p, hi
		for lo < top {
			mid := int(uint(lo+top) >> 1)
			if low.IDs[mid*(n-1)+n-2] < w {
				lo = mid + 1
			} else {
				top = mid
			}
		}
		p = lo
		if p < hi && low.IDs[p*(n-1)+n-2] == w {
			dst = append(dst, low.LogP[p])
			continue
		}
		dst = append(dst, bow+b.logProbInto(key, hp[1:], w))
	}
	return dst
}

// logProbInto is LogProb without allocating: key is scratch space.
func (b *Backoff) logProbInto(key, h []uint32, w uint32) float64 {
	acc := 0.0
	for s := 0; s <= len(h); s++ {
		g := h[s:]
		key = append(append(key[:0], g...), w)
		lv := &b.Levels[len(g)]
		if i := lv.Find(key); i >= 0 {
			return acc + lv.LogP[i]
		}
		if len(g) > 0 {
			if j := b.Levels[len(g)-1].Find(g); j >= 0 {
				acc += b.Levels[len(g)-1].Bow[j]
			}
		}
	}
	return math.Inf(-1)
}

// checkShape checks the lengths of b's levels (not their order or content).
func checkShape(b *Backoff) error {
	N := b.Order()
	if N < 1 || N > MaxOrder {
		return fmt.Errorf("%w: %d", ErrOrder, N)
	}
	if b.Levels[0].Len() != len(b.Vocab) {
		return fmt.Errorf("%w: %d unigrams for %d words", ErrModel, b.Levels[0].Len(), len(b.Vocab))
	}
	for n := 1; n <= N; n++ {
		lv := &b.Levels[n-1]
		if lv.N != n || len(lv.IDs) != n*lv.Len() || len(lv.Bow) != lv.Len() {
			return fmt.Errorf("%w: level %d has the wrong shape", ErrModel, n)
		}
	}
	return nil
}
