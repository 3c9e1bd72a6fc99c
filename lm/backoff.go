package lm

import (
	"math"
	"slices"
)

// Backoff is a back-off n-gram model held exactly, in float64, before it is
// quantized and laid out for lookup. Estimate, ReadARPA and Prune produce one;
// AppendSection lays it out as an n-gram section.
//
// Word IDs are indexes into Vocab, which is sorted in byte order, so IDs are
// lexicographic ranks. Level n-1 holds the n-grams of order n sorted by their
// IDs; LogP is the natural-log probability of the last word given the others;
// Bow is the natural-log back-off weight of the n-gram used as a context (0 when
// it has no successors). Level 0 holds every vocabulary word, in ID order.
type Backoff struct {
	Vocab   []string
	Surface []string // usual display casing per ID; "" when it equals the folded word
	Levels  []Level

	// Discounts holds the modified Kneser-Ney discounts D1, D2, D3+ per order
	// (zero for models that were not estimated here).
	Discounts [][3]float64
	// Tokens is the number of training tokens the model was estimated from.
	Tokens int64
	// TopCounts holds the raw count c(hw) of every n-gram of the highest
	// order, parallel to its level, when the model comes straight from
	// Estimate or EstimateCounts (nil otherwise). With Discounts and the
	// back-off weights of the order below it lets AppendSection store
	// counts instead of probability codes at the highest order (version
	// 6); whoever changes the highest level or the weights must drop it.
	TopCounts []uint64
}

// Level holds the n-grams of one order.
type Level struct {
	N    int       // the order
	IDs  []uint32  // N IDs per n-gram, sorted
	LogP []float64 // ln p(w | h)
	Bow  []float64 // ln back-off weight of the n-gram as a context
}

// Len returns the number of n-grams in the level.
func (l *Level) Len() int { return len(l.LogP) }

// Key returns the IDs of n-gram i (aliases the level's storage).
func (l *Level) Key(i int) []uint32 { return l.IDs[i*l.N : (i+1)*l.N] }

// Find returns the index of the n-gram k, or -1.
func (l *Level) Find(k []uint32) int {
	if l.N == 1 {
		if int(k[0]) < l.Len() {
			return int(k[0])
		}
		return -1
	}
	lo, hi := 0, l.Len()
	for lo < hi {
		mid := int(uint(lo+hi) >> 1)
		if slices.Compare(l.Key(mid), k) < 0 {
			lo = mid + 1
		} else {
			hi = mid
		}
	}
	if lo < l.Len() && slices.Equal(l.Key(lo), k) {
		return lo
	}
	return -1
}

// Order returns the model's highest order.
func (b *Backoff) Order() int { return len(b.Levels) }

// ID returns the ID of a folded word, or false.
func (b *Backoff) ID(w string) (uint32, bool) {
	i, ok := slices.BinarySearch(b.Vocab, w)
	return uint32(i), ok
}

// LogProb returns ln p(w | ctx) by the back-off rule, using at most the last
// Order()-1 words of ctx. It is the exact reference the compact model is tested
// against; it is not fast.
func (b *Backoff) LogProb(ctx []uint32, w uint32) float64 {
	if m := b.Order() - 1; len(ctx) > m {
		ctx = ctx[len(ctx)-m:]
	}
	key := make([]uint32, 0, len(ctx)+1)
	acc := 0.0
	for s := 0; s <= len(ctx); s++ {
		h := ctx[s:]
		key = append(append(key[:0], h...), w)
		lv := &b.Levels[len(h)]
		if i := lv.Find(key); i >= 0 {
			return acc + lv.LogP[i]
		}
		if len(h) > 0 {
			if j := b.Levels[len(h)-1].Find(h); j >= 0 {
				acc += b.Levels[len(h)-1].Bow[j]
			}
		}
	}
	return math.Inf(-1)
}

// NGrams returns the number of n-grams per order, unigrams first.
func (b *Backoff) NGrams() []int {
	out := make([]int, len(b.Levels))
	for i := range b.Levels {
		out[i] = b.Levels[i].Len()
	}
	return out
}

// Special IDs of a vocabulary.
func (b *Backoff) specials() (bos, eos, unk uint32) {
	bos, _ = b.ID(BOS)
	eos, _ = b.ID(EOS)
	unk, _ = b.ID(UNK)
	return
}
