package correct

import (
	"math"
	"strings"
	"unicode/utf8"
)

// Merge decides whether the previous token and the typed one are one word
// split by a stray space ("ab out" → "about"). context holds the IDs of the
// words before prev. It returns a KindMerge candidate (Word keeps prev's
// leading punctuation and casing and typed's trailing punctuation) and
// whether to apply it on space, or ok false when the joined text is no
// lexicon word. Known words (lexicon or Options.Known) on both sides need
// the merged reading to win by Options.KnownMargin. Cost: a few lexicon
// look-ups and three Scorer calls.
func (c *Corrector) Merge(prev, typed string, context []uint32) (cand Candidate, dec Decision, ok bool) {
	if !utf8.ValidString(prev) || !utf8.ValidString(typed) {
		return Candidate{}, Decision{}, false
	}
	pt, tt := splitToken(prev), splitToken(typed)
	if pt.core == "" || tt.core == "" || pt.trail != "" || tt.lead != "" || len(pt.core)+len(tt.core) > maxTyped {
		return Candidate{}, Decision{}, false
	}
	a, b := strings.ToLower(pt.core), strings.ToLower(tt.core)
	joined := a + b
	id, found := c.lex.ID(joined)
	if !found || (c.opts.Rejected != nil && c.opts.Rejected(a+" "+b, joined)) {
		return Candidate{}, Decision{}, false
	}
	o := &c.opts
	sc := c.pool.Get().(*scratch)
	defer c.pool.Put(sc)
	// Score of the two tokens as typed.
	known := func(w string) (uint32, bool, bool) {
		wid, in := c.lex.ID(w)
		return wid, in, in || (o.Known != nil && o.Known(w))
	}
	aid, aIn, aKnown := known(a)
	bid, bIn, bKnown := known(b)
	apart := o.UnknownLogProb * 2
	if aIn {
		apart = c.lm(context, aid)
		if bIn {
			sc.ctx = append(append(sc.ctx[:0], context...), aid)
			apart += c.lm(sc.ctx, bid)
		} else {
			apart += o.UnknownLogProb
		}
	} else if bIn {
		apart = o.UnknownLogProb + c.lm(nil, bid)
	}
	apart *= o.LMWeight
	score := -o.SpaceCost + o.LMWeight*c.lm(context, id)
	sc.buf = c.lex.AppendWord(sc.buf[:0], id)
	sc.lower = append(sc.lower[:0], pt.lead...)
	sc.lower = appendCased(sc.lower, sc.buf, pt.pattern)
	sc.lower = append(sc.lower, tt.trail...)
	cand = Candidate{Word: string(sc.lower), ID: id, Kind: KindMerge, Cost: o.SpaceCost, Score: score}
	conf := 1 / (1 + math.Exp(apart-score))
	apply := conf >= o.ApplyThreshold
	if aKnown && bKnown && score-apart < o.KnownMargin {
		apply = false
	}
	return cand, Decision{Apply: apply, Confidence: conf}, true
}
