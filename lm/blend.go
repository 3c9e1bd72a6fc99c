package lm

import (
	"math"
	"strings"
)

// Blending the base model with what the user has typed.
//
// A view scores a word w after a history h (extended IDs, oldest first) as
//
//	p(w | h) = (1 − λ − μ)·p_base(w | h) + λ·p_user(w | h) + μ·p_cache(w | h)
//
// with fixed weights λ (UserWeight) and μ (CacheWeight); since each of the
// three parts is a distribution over the words, so is p.
//
//   - p_base is the base model's back-off probability (0 for a word only the
//     user has typed; user words in h are read as <unk>).
//   - p_user is an interpolated Witten-Bell model (Witten & Bell 1991; see
//     Chen & Goodman 1998, §2.4) over the user's decayed counts c: for a
//     context u seen T(u) times with N(u) distinct successors,
//     p_k(w | u) = (c(u w) + β·N(u)·p_{k−1}(w | u′)) / (T(u) + β·N(u)),
//     from the trigram context to the bigram context to the user unigram, and
//     the user unigram interpolates with p_base(w | h) itself. So p_user
//     never returns zero for a base word, it trusts a user context in
//     proportion to how often it was seen (T against βN), and it stays
//     normalized when decay shrinks the counts: a context seen long ago
//     hands more of its mass to the lower orders. Witten-Bell rather than
//     absolute discounting because a decayed count has no fixed discount
//     that keeps the model normalized without rescanning every context.
//   - p_cache is the recency cache: unigram and bigram counts of the last
//     few hundred tokens, each weighted exp(−age/τ):
//     p_cache(w | b) = (c′(b w) + κ·c′(w)/Σc′) / (c′(b •) + κ). While the
//     cache is empty its weight goes to p_base.
//
// λ is a constant rather than a function of c(h): in measurements a weight
// that grows with the user's count of the context hands common contexts to
// a small model, which loses to a constant weight; the user model's own
// Witten-Bell weights already make it lean on p_base where the user's
// counts are thin.

// ID returns the extended ID of a folded word: its base ID, or the ID of a
// word the overlay holds. It does not allocate.
func (v *OverlayView) ID(word string) (uint32, bool) {
	if id, ok := v.vocab.ID(word); ok && id < v.V {
		return id, true
	}
	if pos, ok := v.findUser(word); ok {
		return v.V + v.byStr[pos], true
	}
	return 0, false
}

// Word returns the folded word of an extended ID ("" when unknown).
func (v *OverlayView) Word(id uint32) string {
	if id < v.V {
		return v.vocab.Word(id)
	}
	if i := int(id - v.V); i < len(v.words) {
		return v.words[i]
	}
	return ""
}

// Surface returns how the user types a word the overlay holds ("" when it
// is typed as folded, or for base words, whose casing the lexicon knows).
func (v *OverlayView) Surface(id uint32) string {
	if id >= v.V {
		if i := int(id - v.V); i < len(v.surf) {
			return v.surf[i]
		}
	}
	return ""
}

// VocabSize returns one past the largest extended ID.
func (v *OverlayView) VocabSize() int { return int(v.V) + len(v.words) }

// Base returns the base model.
func (v *OverlayView) Base() *Model { return v.base }

// query holds what scoring needs about one history.
type query struct {
	base    [MaxOrder]uint32
	nctx    int // history length used by the base model
	nn      int // base contexts found: nb[:nn]
	nb      [MaxOrder]node
	n3, n2  *ovNode
	b       uint32
	hasB    bool
	cLo     int // cache bigram entries with prev = b: [cLo, cHi)
	cHi     int
	cBiTot  float64
	wBase   float64 // weights after moving the empty cache's share to the base
	wUser   float64
	wCache  float64
	invGrow float64
	invC    float64
}

func (v *OverlayView) prepare(ctx []uint32, q *query) {
	if k := v.base.order - 1; len(ctx) > k {
		ctx = ctx[len(ctx)-k:]
	}
	q.nctx = len(ctx)
	bc := q.base[:len(ctx)]
	for i, t := range ctx {
		if t >= v.V {
			t = v.unk
		}
		bc[i] = t
	}
	q.nn = len(v.base.contexts(bc, &q.nb))
	q.n3, q.n2, q.hasB = nil, nil, false
	if n := len(ctx); n >= 1 {
		q.b, q.hasB = ctx[n-1], true
		q.n2 = v.lookup(biKey(q.b))
		if n >= 2 {
			q.n3 = v.lookup(triKey(ctx[n-2], q.b))
		}
	}
	cfg := v.cfg
	q.wUser, q.wCache = cfg.lambda, cfg.mu
	q.invGrow = 1 / v.grow
	q.invC = 1 / v.cache.grow
	q.cLo, q.cHi, q.cBiTot = 0, 0, 0
	if v.cache.sum <= 0 {
		q.wCache = 0
	} else if q.hasB {
		q.cLo, q.cHi = cacheRange(v.cache.bi, q.b, 0, math.MaxUint32)
		for _, e := range v.cache.bi[q.cLo:q.cHi] {
			q.cBiTot += e.w
		}
	}
	q.wBase = 1 - q.wUser - q.wCache
}

// prob returns the blended probability of w given the prepared history and
// p_base(w | h).
func (v *OverlayView) prob(q *query, w uint32, pb float64) float64 {
	beta := v.cfg.beta
	// User model: unigram, then bigram, then trigram context.
	pu := pb
	if v.uniTypes > 0 {
		c := 0.0
		if e := v.uniEntry(w); e != nil {
			c = e.cnt
		}
		bn := beta * float64(v.uniTypes)
		pu = (c*q.invGrow + bn*pu) / (v.uniTotal*q.invGrow + bn)
	}
	for _, nd := range [2]*ovNode{q.n2, q.n3} {
		if nd == nil || len(nd.list) == 0 {
			continue
		}
		c := 0.0
		if i := nd.find(w); i >= 0 {
			c = nd.list[i].cnt
		}
		bn := beta * float64(len(nd.list))
		pu = (c*q.invGrow + bn*pu) / (nd.total*q.invGrow + bn)
	}
	p := q.wBase*pb + q.wUser*pu
	if q.wCache > 0 {
		cs := v.cache.sum
		pc1 := cacheFind(v.cache.uni, noPrev, w) / cs
		pc := pc1
		if q.cBiTot > 0 {
			cb := 0.0
			if q.hasB {
				cb = cacheFind(v.cache.bi[q.cLo:q.cHi], q.b, w)
			}
			k := v.cfg.kappa
			pc = (cb*q.invC + k*pc1) / (q.cBiTot*q.invC + k)
		}
		p += q.wCache * pc
	}
	return p
}

// LogProb returns ln p(w | ctx) under the blend (see the comment at the top
// of blend.go), with ctx and w extended IDs, ctx oldest first. It returns
// −Inf for an ID the view does not know. It does not allocate; cost: the
// base model's LogProb plus a few hash and binary-search lookups.
func (v *OverlayView) LogProb(ctx []uint32, w uint32) float64 {
	if w >= uint32(v.VocabSize()) {
		return math.Inf(-1)
	}
	var q query
	v.prepare(ctx, &q)
	pb := 0.0
	if w < v.V {
		pb = math.Exp(v.base.score(q.nb[:q.nn], w))
	}
	return math.Log(v.prob(&q, w, pb))
}

// candSet collects distinct candidate IDs, remembering base log-probabilities when known.
type candSet struct {
	n   int
	ids [8 * MaxK]uint32
	lp  [8 * MaxK]float64 // NaN: not computed
}

func (c *candSet) add(id uint32, lp float64) {
	for i := range c.n {
		if c.ids[i] == id {
			return
		}
	}
	if c.n < len(c.ids) {
		c.ids[c.n], c.lp[c.n] = id, lp
		c.n++
	}
}

// TopK appends to dst the k most probable next words under the blend after
// ctx (extended IDs, oldest first) that complete the typed prefix, best
// first. prefix is the folded typed part of the word ("" for next-word
// prediction); [lo, hi) is the base vocabulary's ID range of the words that
// start with it (0, VocabSize of the base model when prefix is ""), as the
// lexicon gives it. Words only the user has typed are matched against
// prefix by the view itself and are offered once typed MinTyped times.
// Results carry extended IDs; the special tokens are never returned; k is
// capped at MaxK.
//
// Candidates are the base model's best k in the range, and the best k+2 of
// each user-side source: the user's successors of the last two words and of
// the last word, the user's most counted words in the range, and the
// recency cache's bigram successors and unigrams; each is scored exactly
// under the blend. A word with no user or cache evidence ranks under the
// blend as under the base model, so only words with weak evidence in
// several sources at once can be missed: the result matched scoring every
// word on 145 of 147 test queries (TestOverlayTopKMatchesBruteForce). It
// does not allocate when dst has room for k results.
func (v *OverlayView) TopK(ctx []uint32, prefix string, lo, hi uint32, k int, dst []Scored) []Scored {
	if k > MaxK {
		k = MaxK
	}
	if hi > v.V {
		hi = v.V
	}
	if k <= 0 {
		return dst
	}
	var q query
	v.prepare(ctx, &q)
	// Each user-side source offers more than k words, since a word with
	// evidence from several sources can outrank words stronger in each one.
	wide := min(k+2, MaxK)
	var cs candSet
	var bt [MaxK]Scored
	if lo < hi {
		for _, s := range v.base.TopK(q.base[:q.nctx], lo, hi, k, bt[:0]) {
			cs.add(s.ID, s.LogP)
		}
	}
	nan := math.NaN()
	whole := prefix == ""
	// The user's successors of the history.
	for _, nd := range [2]*ovNode{q.n3, q.n2} {
		if nd == nil {
			continue
		}
		if whole && wide <= nd.nbest {
			for _, i := range nd.best[:wide] {
				cs.add(nd.list[i].tok, nan)
			}
			continue
		}
		var tb topBuf
		tb.k = wide
		v.rangeTop(&tb, nd.list, prefix, lo, hi)
		for _, s := range tb.buf[:tb.n] {
			cs.add(s.ID, nan)
		}
	}
	// The user's most counted words in the range.
	{
		var tb topBuf
		tb.k = wide
		if whole {
			for _, s := range v.top[:v.nTop] {
				tb.push(Scored{ID: s.tok, LogP: s.cnt})
			}
		} else {
			if lo < hi {
				for bkt := lo >> ovBucketShift; bkt <= (hi-1)>>ovBucketShift; bkt++ {
					if nd := v.lookup(tagUni<<62 | uint64(bkt)); nd != nil {
						v.rangeTop(&tb, nd.list, prefix, lo, hi)
					}
				}
			}
			// User words with the prefix: a run of byStr.
			p, _ := v.findUser(prefix)
			for ; p < len(v.byStr) && strings.HasPrefix(v.words[v.byStr[p]], prefix); p++ {
				if e := v.uniEntry(v.V + v.byStr[p]); e != nil {
					tb.push(Scored{ID: e.tok, LogP: e.cnt})
				}
			}
		}
		for _, s := range tb.buf[:tb.n] {
			cs.add(s.ID, nan)
		}
	}
	// The recency cache.
	if q.wCache > 0 {
		var tb topBuf
		tb.k = wide
		if q.hasB {
			v.cacheTop(&tb, v.cache.bi[q.cLo:q.cHi], prefix, lo, hi)
		}
		for _, s := range tb.buf[:tb.n] {
			cs.add(s.ID, nan)
		}
		tb.n = 0
		if whole && wide <= v.cache.nbest {
			for _, e := range v.cache.best[:wide] {
				cs.add(e.tok, nan)
			}
		} else {
			v.cacheTop(&tb, v.cache.uni, prefix, lo, hi)
			for _, s := range tb.buf[:tb.n] {
				cs.add(s.ID, nan)
			}
		}
	}
	var res topBuf
	res.k = k
	for i := range cs.n {
		id := cs.ids[i]
		if id >= v.V {
			e := v.uniEntry(id)
			if e == nil || !v.suggestible(id, e.typed) {
				continue
			}
		} else if !v.suggestible(id, 0) || id < lo || id >= hi {
			continue
		}
		pb := 0.0
		if id < v.V {
			lp := cs.lp[i]
			if lp != lp { // NaN: not from the base TopK
				lp = v.base.score(q.nb[:q.nn], id)
			}
			pb = math.Exp(lp)
		}
		res.push(Scored{ID: id, LogP: math.Log(v.prob(&q, id, pb))})
	}
	return append(dst, res.buf[:res.n]...)
}

// rangeTop pushes the entries of a token-sorted list that lie in the base
// range [lo, hi) or are user words starting with prefix, scored by count.
func (v *OverlayView) rangeTop(tb *topBuf, list []ovEntry, prefix string, lo, hi uint32) {
	if prefix == "" {
		for _, e := range list {
			tb.push(Scored{ID: e.tok, LogP: e.cnt})
		}
		return
	}
	a := entryLower(list, lo)
	b := a + entryLower(list[a:], hi)
	for _, e := range list[a:b] {
		tb.push(Scored{ID: e.tok, LogP: e.cnt})
	}
	for _, e := range list[a+entryLower(list[a:], v.V):] { // user words sort last
		if v.hasPrefix(e.tok, prefix) {
			tb.push(Scored{ID: e.tok, LogP: e.cnt})
		}
	}
}

// cacheTop is rangeTop for cache entries with one prev, sorted by tok.
func (v *OverlayView) cacheTop(tb *topBuf, list []cacheEnt, prefix string, lo, hi uint32) {
	if prefix == "" {
		for _, e := range list {
			tb.push(Scored{ID: e.tok, LogP: e.w})
		}
		return
	}
	a := cacheLower(list, lo)
	for _, e := range list[a:] {
		if e.tok >= hi {
			break
		}
		tb.push(Scored{ID: e.tok, LogP: e.w})
	}
	for _, e := range list[a+cacheLower(list[a:], v.V):] {
		if v.hasPrefix(e.tok, prefix) {
			tb.push(Scored{ID: e.tok, LogP: e.w})
		}
	}
}

func (v *OverlayView) hasPrefix(tok uint32, prefix string) bool {
	i := int(tok - v.V)
	return tok >= v.V && i < len(v.words) && strings.HasPrefix(v.words[i], prefix)
}

func entryLower(s []ovEntry, tok uint32) int {
	lo, hi := 0, len(s)
	for lo < hi {
		m := int(uint(lo+hi) >> 1)
		if s[m].tok < tok {
			lo = m + 1
		} else {
			hi = m
		}
	}
	return lo
}

func cacheLower(s []cacheEnt, tok uint32) int {
	lo, hi := 0, len(s)
	for lo < hi {
		m := int(uint(lo+hi) >> 1)
		if s[m].tok < tok {
			lo = m + 1
		} else {
			hi = m
		}
	}
	return lo
}

// Empty reports whether the view holds nothing learned (no n-grams and an
// empty recency cache), so that it scores exactly as the base model and
// callers may query the base model directly.
func (v *OverlayView) Empty() bool { return v.entries == 0 && len(v.cache.uni) == 0 }
