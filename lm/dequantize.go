package lm

import (
	"math"
	"slices"
)

// Backoff returns the model's n-grams as an exact-form Backoff, with every
// stored value decoded through its codebook, so that a built model can be
// exported (WriteARPA) or laid out again. vocab must hold the VocabSize()
// words in ID order (a lexicon's words); Backoff returns nil when its length
// differs. Surface is all "", Discounts and Tokens are empty, and <s> gets
// probability zero (-Inf), as Estimate gives it: a quantized model stores it
// as its lowest code.
//
// Back-off weights are kept for n-grams that have successors (the others are
// 0, as the layout stores no weight for them). On a model that fails Check
// the result is undefined, but Backoff does not panic. Cost: O(n-grams).
func (m *Model) Backoff(vocab []string) *Backoff {
	V := m.vocab
	if len(vocab) != V {
		return nil
	}
	b := &Backoff{Vocab: slices.Clone(vocab), Surface: make([]string, V), Levels: make([]Level, m.order)}
	u := &m.lv[0]
	l0 := Level{N: 1, IDs: make([]uint32, V), LogP: make([]float64, V), Bow: make([]float64, V)}
	for i := range V {
		l0.IDs[i] = uint32(i)
		l0.LogP[i] = u.prob(i)
	}
	if int(m.bos) < V {
		l0.LogP[m.bos] = math.Inf(-1)
	}
	b.Levels[0] = l0
	for n := 1; n < m.order; n++ {
		l, next, cur := &m.lv[n-1], &m.lv[n], &b.Levels[n-1]
		nl := Level{N: n + 1, IDs: make([]uint32, 0, next.size*(n+1)), LogP: make([]float64, 0, next.size)}
		for e := range min(l.size, cur.Len()) {
			nd, ok := m.groupNode(l, e, cur.Key(e))
			if !ok || (!nd.ranked && nd.lo != len(nl.LogP)) {
				continue // a valid model's groups tile the next level in order
			}
			cur.Bow[e] = nd.bow
			for p := nd.lo; p < nd.hi; p++ {
				nl.IDs = append(append(nl.IDs, cur.Key(e)...), uint32(m.wordAt(&nd, p)))
				nl.LogP = append(nl.LogP, m.probAt(&nd, p))
			}
		}
		nl.Bow = make([]float64, len(nl.LogP))
		b.Levels[n] = nl
	}
	return b
}
