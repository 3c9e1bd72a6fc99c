package correct

import (
	"bytes"
	"slices"
)

// soundBonus (nats) is added to the score of a candidate that sounds like
// the typed word (the same soundKey) when the lexicon does not know the
// typed word: a pronunciation feature beside the letter-based channel, as
// Toutanova and Moore (2002) combine a pronunciation model with the letter
// model of Brill and Moore (from memory). It is a generic knob set by
// 5-fold cross-validation on corpora/misspellings-dev.tsv (error model
// trained on four folds, scored on the fifth) against the held-out typist
// of the root package: without word families, bonuses of 1 to 3 nats
// raised CV top-1 from 92.7 % to 93.4–93.6 % and top-3 by at most 0.1
// point, but each nat also cost the typist about 0.2 point of repaired
// slips (a bonus rewards vowel changes, which keyboard slips rarely are),
// and 2.5 took it below its 85 % goal; 1 keeps most of the gain
// (measured, this project; see BENCHMARKS.md).
const soundBonus = 1

// ranker keeps the best-scoring candidates one Correct call has found,
// scoring each word as the search reaches it.
type ranker struct {
	c       *Corrector
	context []uint32
	skip    uint32 // the typed word's ID, when skipOK
	skipOK  bool
	keep    int // candidates kept
	top     []Candidate
	// scratch of addSound and addFamily
	typedKey, word, key []byte
	fam                 []famFrame
	edges               []Edge
}

// start prepares the ranker for one typed word, keeping the best keep
// candidates in top[:0].
func (r *ranker) start(c *Corrector, context []uint32, skip uint32, skipOK bool, keep int, top []Candidate) {
	*r = ranker{c: c, context: context, skip: skip, skipOK: skipOK, keep: keep, top: top[:0],
		typedKey: r.typedKey[:0], word: r.word[:0], key: r.key[:0], fam: r.fam[:0], edges: r.edges[:0]}
}

// add scores word id found at channel cost and keeps it if it ranks.
func (r *ranker) add(id uint32, cost float32) {
	if r.skipOK && id == r.skip || hasWord(r.top, id) {
		return // a wider pass finds the narrower pass's words again
	}
	score := -float64(cost) + r.c.opts.LMWeight*r.c.lm(r.context, id)
	r.top = insertTop(r.top, Candidate{ID: id, Kind: KindWord, Cost: float64(cost), Score: score}, r.keep)
}

// addMin is add for a word that another route may already have found: a
// kept candidate found at a higher cost is scored again at this one.
func (r *ranker) addMin(id uint32, cost float32) {
	for i := range r.top {
		old := &r.top[i]
		if old.Kind != KindWord || old.ID != id {
			continue
		}
		if float64(cost) < old.Cost {
			cand := *old
			cand.Score += cand.Cost - float64(cost)
			cand.Cost = float64(cost)
			r.top = append(r.top[:i], r.top[i+1:]...)
			r.top = insertTop(r.top, cand, r.keep)
		}
		return
	}
	r.add(id, cost)
}

// addSound applies the sound feature once the search is over: when the
// lexicon does not know the typed word (lower-cased), the kept candidates
// that sound like it gain soundBonus and the list is ranked again. Doing
// it after the search leaves the search's stopping rule, which looks at
// the best score, as it was. Cost: one word look-up and soundKey per kept
// candidate.
func (r *ranker) addSound(lower string) {
	if r.skipOK || len(r.top) == 0 {
		return
	}
	r.word = append(r.word[:0], lower...)
	r.typedKey = soundKey(r.typedKey[:0], r.word)
	moved := false
	for i := range r.top {
		cand := &r.top[i]
		if cand.Kind != KindWord {
			continue
		}
		r.word = r.c.lex.AppendWord(r.word[:0], cand.ID)
		r.key = soundKey(r.key[:0], r.word)
		if bytes.Equal(r.key, r.typedKey) {
			cand.Score += soundBonus
			moved = true
		}
	}
	if moved {
		slices.SortStableFunc(r.top, func(a, b Candidate) int {
			switch {
			case ranksBefore(a, b):
				return -1
			case ranksBefore(b, a):
				return 1
			}
			return 0
		})
	}
}
