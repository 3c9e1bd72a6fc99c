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
	n3, n2  nref // user context nodes (trigram, bigram)
	b       uint32
	hasB    bool
	cMain   []cacheEnt // cache bigram entries with prev = b: main list
	cRec    []cacheEnt // and recent list (see ovCache)
	cBiTot  float64
	cBiMax  float64 // largest weight of cMain and cRec at or above the floor
	wBase   float64 // weights after moving the empty cache's share to the base
	wUser   float64
	wCache  float64
	invGrow float64
	invC    float64
	// Witten-Bell weights of the user model's levels (unigram, bigram
	// context, trigram context): β·N and the denominator T/grow + β·N;
	// on[i] is false for a level that is absent.
	bn, den [3]float64
	on      [3]bool
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
	q.n3, q.n2, q.hasB = nref{}, nref{}, false
	if n := len(ctx); n >= 1 {
		q.b, q.hasB = ctx[n-1], true
		q.n2 = v.ref(biKey(q.b))
		if n >= 2 {
			q.n3 = v.ref(triKey(ctx[n-2], q.b))
		}
	}
	cfg := v.cfg
	q.wUser, q.wCache = cfg.lambda, cfg.mu
	q.invGrow = 1 / v.grow
	q.invC = 1 / v.cache.grow
	q.cMain, q.cRec, q.cBiTot, q.cBiMax = nil, nil, 0, 0
	if v.cache.sum <= 0 {
		q.wCache = 0
	} else if q.hasB {
		q.cMain, q.cRec = v.cache.biLists(q.b)
		if len(q.cRec) == 0 {
			for _, e := range q.cMain {
				if e.w >= v.cache.floor {
					q.cBiTot += e.w
					q.cBiMax = max(q.cBiMax, e.w)
				}
			}
		} else {
			it := cacheIter{q.cMain, q.cRec, v.cache.floor}
			for e, ok := it.next(); ok; e, ok = it.next() {
				q.cBiTot += e.w
				q.cBiMax = max(q.cBiMax, e.w)
			}
		}
	}
	q.wBase = 1 - q.wUser - q.wCache
	beta := cfg.beta
	q.on = [3]bool{}
	if v.uniTypes > 0 {
		q.on[0] = true
		q.bn[0] = beta * float64(v.uniTypes)
		q.den[0] = v.uniTotal*q.invGrow + q.bn[0]
	}
	for i, nd := range [2]nref{q.n2, q.n3} {
		if n := nd.size(); n > 0 {
			q.on[i+1] = true
			q.bn[i+1] = beta * float64(n)
			q.den[i+1] = nd.total()*q.invGrow + q.bn[i+1]
		}
	}
}

// evidence is what the user side knows of one word: its counts in the user
// unigram, bigram context and trigram context (stored units) and its cache
// weights as a unigram and after the last word (cache units).
type evidence struct {
	c     [3]float64
	cu    float64
	cb    float64
	typed uint32 // times typed (from the unigram entry)
	uni   bool   // the word has a user unigram entry
}

// evidenceOf looks up the user-side evidence of w for the prepared history.
func (v *OverlayView) evidenceOf(q *query, w uint32) evidence {
	return v.evidenceMemo(q, w, nil)
}

// evidenceMemo is evidenceOf through the memo m (nil: none), which the
// caller holds locked.
func (v *OverlayView) evidenceMemo(q *query, w uint32, m *topKMemo) evidence {
	var ev evidence
	v.uniOf(m, w, &ev)
	if e := q.n2.find(w); e != nil {
		ev.c[1] = e.cnt
	}
	if e := q.n3.find(w); e != nil {
		ev.c[2] = e.cnt
	}
	if q.wCache > 0 {
		ev.cu = v.cacheUniOf(m, w)
		if q.cBiTot > 0 && q.hasB {
			ev.cb = v.cache.find(q.cMain, q.cRec, q.b, w)
		}
	}
	return ev
}

// prob returns the blended probability of w given the prepared history and
// p_base(w | h).
func (v *OverlayView) prob(q *query, w uint32, pb float64) float64 {
	ev := v.evidenceOf(q, w)
	return v.blendProb(q, pb, &ev)
}

// blendProb returns the blended probability of a word with base
// probability pb and the given evidence. It is monotone (never decreasing)
// in pb and in every count, operation by operation, which the exact top-k
// search relies on.
func (v *OverlayView) blendProb(q *query, pb float64, ev *evidence) float64 {
	// User model: unigram, then bigram, then trigram context.
	pu := pb
	for i := range 3 {
		if q.on[i] {
			pu = (ev.c[i]*q.invGrow + q.bn[i]*pu) / q.den[i]
		}
	}
	p := q.wBase*pb + q.wUser*pu
	if q.wCache > 0 {
		pc1 := ev.cu / v.cache.sum
		pc := pc1
		if q.cBiTot > 0 {
			k := v.cfg.kappa
			pc = (ev.cb*q.invC + k*pc1) / (q.cBiTot*q.invC + k)
		}
		p += q.wCache * pc
	}
	return p
}

// LogProb returns ln p(w | ctx) under the blend (see the comment at the top
// of blend.go), with ctx and w extended IDs, ctx oldest first. It returns
// −Inf for an ID the view does not know. It does not allocate; cost: the
// base model's LogProb plus a few hash and binary-search lookups.
//
// When the view's memo (see blend_memo.go) holds the same history, as it
// does while a corrector scores candidates after a TopK call, LogProb uses
// the prepared history and the words' evidence and base probability from
// it, and records those of the words it scores; the result is the same.
func (v *OverlayView) LogProb(ctx []uint32, w uint32) float64 {
	if w >= uint32(v.VocabSize()) {
		return math.Inf(-1)
	}
	if n := v.base.order - 1; len(ctx) > n {
		ctx = ctx[len(ctx)-n:]
	}
	if v.memo != nil {
		if m := v.memo.p.Load(); m != nil && m.mu.TryLock() {
			if m.holds(v, ctx) {
				lp := v.logProbMemo(&m.q, w, m)
				m.mu.Unlock()
				return lp
			}
			m.mu.Unlock()
		}
	}
	var q query
	v.prepare(ctx, &q)
	return v.logProbMemo(&q, w, nil)
}

// logProbMemo returns ln p(w | h) for the prepared history q, through the
// memo m (nil: none), which the caller holds locked and which holds q.
func (v *OverlayView) logProbMemo(q *query, w uint32, m *topKMemo) float64 {
	var own memoWord
	known := m.word(w)
	if known == nil || !known.hasEv {
		ev := v.evidenceMemo(q, w, m)
		if known = m.add(w); known == nil {
			known = &own
		}
		known.ev, known.hasEv = ev, true
	}
	pb := 0.0
	if w < v.V {
		if !known.hasPB {
			known.pb, known.hasPB = math.Exp(v.base.score(q.nb[:q.nn], w)), true
		}
		pb = known.pb
	}
	return math.Log(v.blendProb(q, pb, &known.ev))
}

func (v *OverlayView) hasPrefix(tok uint32, prefix string) bool {
	i := int(tok - v.V)
	return tok >= v.V && i < len(v.words) && strings.HasPrefix(v.words[i], prefix)
}

// entryLower returns the index of the first entry of s (sorted by tok)
// with a token ≥ tok, len(s) when there is none. The halving loop has no
// data-dependent branch, since the probes' outcomes are as good as random.
func entryLower(s []ovEntry, tok uint32) int {
	n := len(s)
	if n == 0 || tok >= 1<<ovTokenBits {
		return entryLowerWide(s, tok)
	}
	base := 0
	for n > 1 {
		half := n >> 1
		// 1 when s[base+half].tok < tok: both are below 1<<ovTokenBits
		// (stored tokens always are: keys pack them in that many bits),
		// so the sign bit of their difference is the comparison.
		lt := int((s[base+half].tok - tok) >> 31)
		base += half & -lt
		n -= half
	}
	if s[base].tok < tok {
		base++
	}
	return base
}

// entryLowerWide is entryLower for any tokens.
func entryLowerWide(s []ovEntry, tok uint32) int {
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
func (v *OverlayView) Empty() bool { return v.entries == 0 && v.cache.nUni == 0 }
