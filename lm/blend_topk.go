package lm

import (
	"math"
	"strings"
)

// The exact blended top-k search, for words with a typed part (the next
// word ranks a candidate set instead: blend_next.go).
//
// For a prepared history the blend of a word w is, up to rounding, linear
// in what is known about w (see blendProb):
//
//	p(w) = α·p_base(w) + γ₁·c₁(w) + γ₂·c₂(w) + γ₃·c₃(w) + γᵤ·cᵤ(w) + γ_b·c_b(w)
//
// with c₁, c₂, c₃ the user's counts of w as a unigram, after the last word
// and after the last two words, cᵤ and c_b the recency cache's weights of w
// as a unigram and after the last word, and α, γ non-negative weights of
// the history (see coefficients). A word with no user or cache evidence
// scores α·p_base(w), so among such words the blend ranks as the base
// model does. The search is the threshold algorithm of Fagin, Lotem & Naor
// (2003) over six lists sorted by value: the base model's top list and the
// five evidence sources, each read best first. Every word met is either
// scored exactly or dropped because an upper bound of its blend (its value
// in the list it was met in, the next unread value of every other list) is
// below the k-th score found; the search stops once the bound of every
// unread word, α·(next base probability) + Σ γ·(next value of each list),
// is below the k-th score. A word met in one list is not looked up in a
// list already read to the end, where it has no entry. Bounds carry a
// relative margin of 1e-9 over the rounding of the exact computation (at
// most a few ulps, ~1e-15).
//
// Words with no evidence that the base list did not reach all score at most
// as its last word b does, with ties only possible at b's own base
// probability, so the k-th result is checked against b strictly. With a
// base list one longer than k the check fails only on true ties at the
// boundary; with a list of exactly k words (cheaper for the base model) it
// also fails whenever the k-th result is b itself with no evidence, which
// is common while the user's evidence is thin and rare once it is rich.
// The length is chosen per view by a counter kept in the view's memo (see
// noteShort). When a check fails (ties at the boundary, or an evidence list
// that keeps too few entries in order), the base list is read deeper, and
// as a last resort every word in the range is scored (topKExhaustive). The
// result is then the same as scoring every word: same words, same order,
// same scores, whatever the list length tried first.

// boundMargin is the relative margin of the linear upper bounds over the
// rounding of blendProb (a few ulps; 1e-9 leaves six orders of magnitude).
const boundMargin = 1 + 1e-9

// coef holds the linear weights of the blend for one prepared history.
type coef struct {
	alpha float64
	gamma [nStreams]float64 // by stream: user uni, user bi, user tri, cache uni, cache bi
}

const (
	stUni = iota
	stBi
	stTri
	stCacheUni
	stCacheBi
	nStreams
)

// coefficients expands the nested Witten-Bell formula of blendProb into
// its linear weights.
func (v *OverlayView) coefficients(q *query) coef {
	var a, b [3]float64 // p_k = a_k·c_k + b_k·p_{k−1}
	for i := range 3 {
		a[i], b[i] = 0, 1
		if q.on[i] {
			a[i], b[i] = q.invGrow/q.den[i], q.bn[i]/q.den[i]
		}
	}
	var c coef
	c.alpha = q.wBase + q.wUser*b[2]*b[1]*b[0]
	c.gamma[stUni] = q.wUser * b[2] * b[1] * a[0]
	c.gamma[stBi] = q.wUser * b[2] * a[1]
	c.gamma[stTri] = q.wUser * a[2]
	if q.wCache > 0 {
		if q.cBiTot > 0 {
			d := q.cBiTot*q.invC + v.cfg.kappa
			c.gamma[stCacheBi] = q.wCache * q.invC / d
			c.gamma[stCacheUni] = q.wCache * v.cfg.kappa / (v.cache.sum * d)
		} else {
			c.gamma[stCacheUni] = q.wCache / v.cache.sum
		}
	}
	return c
}

// bound returns the linear form of the blend for base probability pb and evidence ev.
func (c *coef) bound(pb float64, ev *evidence) float64 {
	return c.alpha*pb + c.gamma[stUni]*ev.c[0] + c.gamma[stBi]*ev.c[1] + c.gamma[stTri]*ev.c[2] +
		c.gamma[stCacheUni]*ev.cu + c.gamma[stCacheBi]*ev.cb
}

// stream is one evidence source. It starts as a bound of its largest value
// (stage 0); then its entries in the range from the source's list of best
// entries are read in order (stage 1); then the best MaxK of its entries in
// the range, found by a scan (stage 2); and when even that is not enough,
// every entry of the source in the range is met once, in any order (stage 3).
// A list the view's memo holds complete for the range is read from stage 0
// straight through, best first (stage 4: every entry of the range, in
// order of value). Under the memo, with a typed prefix, the scan of stage
// 2 keeps every entry it meets in the memo (for the next keystrokes), and
// when they are few (at most insertionMax) the stream reads all of them
// sorted as stage 4 instead of picking the best MaxK into its buffer.
type stream struct {
	buf   topBuf // stage 1: LogP holds the value
	pos   int
	tail  float64 // bound of the values of the range's entries not in buf
	max   float64 // bound of every value (stage 0)
	all   []memoEnt
	stage int8
}

// keep offers an entry met by a scan to the stream's buffer of best
// entries. An entry below the buffer's last, once the buffer is full, is
// dropped without a call (most entries of a long scan are).
func (s *stream) keep(tok uint32, val float64) {
	if b := &s.buf; b.n == b.k && val < b.buf[b.n-1].LogP {
		return
	}
	s.buf.push(Scored{ID: tok, LogP: val})
}

// frontier returns an upper bound of the value of any entry not yet met.
func (s *stream) frontier() float64 {
	switch {
	case s.stage == 0:
		return s.max
	case s.stage == 3:
		return 0
	case s.stage == 4:
		if s.pos < len(s.all) {
			return s.all[s.pos].val
		}
		return 0
	case s.pos < s.buf.n:
		return s.buf.buf[s.pos].LogP
	}
	return s.tail
}

// inRange reports whether tok may be a result of the query range.
func (v *OverlayView) inRange(tok uint32, r *rangeQ) bool {
	if tok < v.V {
		return tok >= r.lo && tok < r.hi && tok != v.bos && tok != v.eos && tok != v.unk
	}
	return v.hasPrefix(tok, r.prefix)
}

// bestList fills s (stage 1) from a list of best entries, best first, of
// which the source has more when full is set. It reports whether s holds
// every entry of toks in the range.
func (v *OverlayView) bestList(s *stream, r *rangeQ, toks []topEntry, more bool) bool {
	s.buf.k = MaxK
	s.tail = 0
	s.stage = 1
	if r.whole { // already in order: copy the first MaxK
		n := min(len(toks), MaxK)
		for i, e := range toks[:n] {
			s.buf.buf[i] = Scored{ID: e.tok, LogP: e.cnt}
		}
		s.buf.n = n
		if n < len(toks) {
			s.tail = toks[n].cnt
		} else if more && n > 0 {
			s.tail = toks[n-1].cnt
		}
		return n == len(toks)
	}
	n := 0
	for _, e := range toks {
		if v.inRange(e.tok, r) {
			s.buf.push(Scored{ID: e.tok, LogP: e.cnt})
			n++
		}
	}
	if more && len(toks) > 0 {
		s.tail = toks[len(toks)-1].cnt
	}
	if n > s.buf.n {
		// The buffer dropped entries of the range (v.top lists more
		// words than it holds): none is above its last.
		s.tail = max(s.tail, s.buf.buf[s.buf.n-1].LogP)
		return false
	}
	return true
}

// nodeRange calls f for each entry of nd with lo ≤ tok < hi.
func (v *OverlayView) nodeRange(nd nref, lo, hi uint32, f func(uint32, float64)) {
	if nd.p != nil {
		nd.each(lo, hi, f)
		return
	}
	c, i := nd.nd.span(lo)
	for ; c < len(nd.nd.parts); c, i = c+1, 0 {
		p := nd.nd.parts[c]
		for ; i < len(p); i++ {
			if p[i].tok >= hi {
				return
			}
			f(p[i].tok, p[i].cnt)
		}
	}
}

// scanNode calls f for each entry of nd in the query range.
func (v *OverlayView) scanNode(nd nref, r *rangeQ, f func(uint32, float64)) {
	if nd.size() == 0 {
		return
	}
	if r.lo < r.hi {
		v.nodeRange(nd, r.lo, r.hi, f)
	}
	v.nodeRange(nd, v.V, math.MaxUint32, func(tok uint32, val float64) {
		if v.hasPrefix(tok, r.prefix) {
			f(tok, val)
		}
	})
}

// scanCache calls f for each cache entry (one prev; a main and a recent
// list, sorted by tok) in the query range.
func (v *OverlayView) scanCache(main, recent []cacheEnt, r *rangeQ, f func(uint32, float64)) {
	floor := v.cache.floor
	if len(recent) == 0 { // main alone
		a := cacheLower(main, r.lo)
		for _, e := range main[a:] {
			if e.tok >= r.hi {
				break
			}
			if e.w >= floor {
				f(e.tok, e.w)
			}
		}
		for _, e := range main[a+cacheLower(main[a:], v.V):] {
			if e.w >= floor && v.hasPrefix(e.tok, r.prefix) {
				f(e.tok, e.w)
			}
		}
		return
	}
	a, ra := cacheLower(main, r.lo), cacheLower(recent, r.lo)
	b, rb := a+cacheLower(main[a:], r.hi), ra+cacheLower(recent[ra:], r.hi)
	if r.lo < r.hi {
		it := cacheIter{main[a:b], recent[ra:rb], floor}
		for e, ok := it.next(); ok; e, ok = it.next() {
			f(e.tok, e.w)
		}
	}
	a, ra = b+cacheLower(main[b:], v.V), rb+cacheLower(recent[rb:], v.V)
	it := cacheIter{main[a:], recent[ra:], floor}
	for e, ok := it.next(); ok; e, ok = it.next() {
		if v.hasPrefix(e.tok, r.prefix) {
			f(e.tok, e.w)
		}
	}
}

// scanUni calls f for each user unigram count in the query range.
func (v *OverlayView) scanUni(r *rangeQ, m *topKMemo, f func(uint32, float64)) {
	if r.lo < r.hi {
		for bkt := r.lo >> ovBucketShift; bkt <= (r.hi-1)>>ovBucketShift; bkt++ {
			if nd := v.ref(tagUni<<62 | uint64(bkt)); nd.size() > 0 {
				v.nodeRange(nd, r.lo, r.hi, f)
			}
		}
	}
	// User words with the prefix: a run of byStr.
	p, _ := v.findUser(r.prefix)
	for ; p < len(v.byStr) && strings.HasPrefix(v.words[v.byStr[p]], r.prefix); p++ {
		var ev evidence
		tok := v.V + v.byStr[p]
		if v.uniOf(m, tok, &ev); ev.uni {
			f(tok, ev.c[0])
		}
	}
}

// rangeQ is the word range of a query.
type rangeQ struct {
	prefix string
	lo, hi uint32 // base IDs
	whole  bool   // every word (next-word prediction)
}

// idSet is a small set of word IDs.
type idSet struct {
	n   int
	ids [8 * MaxK]uint32
}

func (s *idSet) has(id uint32) bool {
	for _, x := range s.ids[:s.n] {
		if x == id {
			return true
		}
	}
	return false
}

// add records id; it reports false when the set is full.
func (s *idSet) add(id uint32) bool {
	if s.n == len(s.ids) {
		return false
	}
	s.ids[s.n] = id
	s.n++
	return true
}

// TopK appends to dst the k most probable next words under the blend after
// ctx (extended IDs, oldest first) that complete the typed prefix, best
// first (ties: lower ID first). prefix is the folded typed part of the word
// ("" for next-word prediction); [lo, hi) is the base vocabulary's ID range
// of the words that start with it (0, VocabSize of the base model when
// prefix is ""), as the lexicon gives it. Words only the user has typed are
// matched against prefix by the view itself and are offered once typed
// MinTyped times. Results carry extended IDs; the special tokens are never
// returned; k is capped at MaxK.
//
// With a typed part (prefix not "", or a narrower range) the result is
// exact: the same words, order and scores as ranking every word in range by
// LogProb (see the comment at the top of blend_topk.go for the search).
// For the next word (prefix "", the whole range) it is exact over a
// candidate set: the base model's k best next words and the best few words
// the user has typed after the last word and after the last two (see
// blend_next.go), each scored as LogProb scores it. It costs the base
// model's TopK for k or k+1 words plus a few exact scorings; it does not
// allocate when dst has room for k results.
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
	r := rangeQ{prefix: prefix, lo: lo, hi: hi, whole: prefix == "" && lo == 0 && hi == v.V}
	var m *topKMemo
	if v.memo != nil {
		m = v.memo.get()
	}
	if m == nil || !m.mu.TryLock() {
		return v.topKOwn(ctx, &r, k, dst)
	}
	defer m.mu.Unlock()
	if n := v.base.order - 1; len(ctx) > n {
		ctx = ctx[len(ctx)-n:]
	}
	q := m.begin(v, ctx, &r)
	short := k < MaxK && v.memo.short.Load() >= 0 // see noteShort
	first := min(k+1, MaxK)
	if short {
		first = k
	}
	return v.topKSearch(q, &r, k, first, short, m, &m.bufs, dst)
}

// topKOwn is TopK without the memo (another call holds it, or the view
// has none), with its own prepared history and buffers.
func (v *OverlayView) topKOwn(ctx []uint32, r *rangeQ, k int, dst []Scored) []Scored {
	var q query
	v.prepare(ctx, &q)
	var bufs searchBufs
	return v.topKSearch(&q, r, k, min(k+1, MaxK), false, nil, &bufs, dst)
}

// topKSearch runs the searches of TopK with the given buffers.
func (v *OverlayView) topKSearch(q *query, r *rangeQ, k, first int, short bool, m *topKMemo, bufs *searchBufs, dst []Scored) []Scored {
	res := &bufs.res
	res.k, res.n = k, 0
	bufs.reset()
	t := thresholdSearch{searchBufs: bufs, v: v, q: q, r: r, k: k, res: res, c: v.coefficients(q), memo: m}
	if r.whole {
		t.runNext() // next word: a candidate set (blend_next.go)
		return append(dst, res.buf[:res.n]...)
	}
	ok := t.run(first)
	if m != nil && k < MaxK {
		v.memo.noteShort(short, ok, t.shortOK)
	}
	if !ok && short {
		ok = v.thresholdBufs(q, r, k, k+1, res, m, bufs)
	}
	if ok || v.thresholdBufs(q, r, k, MaxK, res, m, bufs) {
		return append(dst, res.buf[:res.n]...)
	}
	return v.topKExhaustive(q, r, k, dst)
}

// Choosing the base list's length.
//
// A search over a base list of exactly k words costs the base model less
// than one over k+1 words but must be run again with k+1 when its final
// check fails (see the comment at the top of this file). Which one is
// cheaper depends on how often that happens, which depends on the user's
// evidence, so a view's memo slot keeps a counter (short): a search with k
// words that succeeds adds one, one that fails takes shortFail away; a
// search with k+1 words also tells whether k would have been enough (its
// result's k-th score above the no-evidence blend of its k-th base word:
// then, and only then, a search with k words gives the same result and
// passes its check) and counts the same way. Searches use k words while
// the counter is not negative, so they do when fewer than about one in
// shortFail+1 would fail. Both lengths give the same, exact result; the
// counter only picks the cheaper one. A new view starts from its
// predecessor's counter (see publish).
//
// shortFail and shortCap are project choices, no source: a failed short
// search costs about a second search (somewhat less, as the memo keeps the
// words' evidence), while a successful one saves the base model up to a
// tenth of its work (its top list of k+1 words cost 5–13 % more than one
// of k in a throw-away probe over the root benchmark's keystrokes), so k
// words pay off below a failure rate of about one in ten. The counter asks
// for fewer than one in seventeen: with shortFail 8 an overlay that had
// learned 2 % of the demo corpus (about 17 % of its searches would fail
// short) ran 2–4 % slower than with k+1 words always; with 16, within
// noise (BENCHMARKS.md, sixth round).
const (
	shortFail = 16 // counter steps taken away by a failure
	shortCap  = 16 // counter bound either way
)

// noteShort updates the counter after a search with a base list of k
// words (short) or of k+1 words; ok tells whether the search passed its
// check, kEnough (for a search of k+1 words) whether k would have passed.
func (s *memoSlot) noteShort(short, ok, kEnough bool) {
	good := ok
	if !short {
		good = ok && kEnough
	}
	c := s.short.Load()
	if good {
		c = min(c+1, shortCap)
	} else {
		c = max(c-shortFail, -shortCap)
	}
	s.short.Store(c)
}

// threshold runs the threshold search with a base list of m words. It
// fills res and reports whether the result is proven exact.
//
// The list read next is always the one whose bound weighs most; a list
// moves to its next stage (see stream) when its bound keeps the search
// from stopping and it has nothing left to read in order.
func (v *OverlayView) threshold(q *query, r *rangeQ, k, m int, res *topBuf) bool {
	var bufs searchBufs
	return v.thresholdBufs(q, r, k, m, res, nil, &bufs)
}

// thresholdBufs is threshold with the view's memo (nil: none), which the
// caller holds locked, and the given buffers.
func (v *OverlayView) thresholdBufs(q *query, r *rangeQ, k, m int, res *topBuf, memo *topKMemo, bufs *searchBufs) bool {
	bufs.reset()
	t := thresholdSearch{searchBufs: bufs, v: v, q: q, r: r, k: k, res: res, c: v.coefficients(q), memo: memo}
	return t.run(m)
}

// scan calls f for every entry of list si in the range, through the memo when there is one.
func (t *thresholdSearch) scan(si int, f func(uint32, float64)) {
	if t.memo != nil {
		t.memo.scan(t.v, si, t.q, t.r, f)
		return
	}
	t.v.scan(si, t.q, t.r, nil, f)
}

// thresholdSearch is the state of one threshold search.
type thresholdSearch struct {
	*searchBufs
	v       *OverlayView
	q       *query
	r       *rangeQ
	k       int
	res     *topBuf
	c       coef
	full    bool // seen overflowed: bounds no longer use the lists' frontiers
	pbBound float64
	kth     float64 // probability of the k-th result (0 until there are k)
	failed  bool
	shortOK bool      // after a search of k+1 base words: one of k would have passed its check
	memo    *topKMemo // nil: scan the lists themselves
	// γ·(largest value) and γ·(frontier) of each list, the latter as the
	// search loop last computed it: a word is met while only the list it
	// is met in has moved since.
	wMax, wFront [nStreams]float64
}

// searchBufs holds the larger parts of a search's state. A view's memo
// keeps one, so that a search under the memo does not clear some 6 KB on
// every call; only the counts are reset (see reset), and every buffer is
// read only up to its count.
type searchBufs struct {
	st     [nStreams]stream
	seen   idSet     // words met: scored, or dropped by a bound
	scored idSet     // words scored (a subset of seen while seen has room)
	cands  baseCands // the base candidates scored for the top list, when it was not reused
	res    topBuf    // TopK's results (a search given its own res leaves this alone)
	base   [MaxK]Scored
}

// reset empties b for a new search.
func (b *searchBufs) reset() {
	for si := range b.st {
		s := &b.st[si]
		s.buf.k, s.buf.n = 0, 0
		s.pos, s.tail, s.max, s.all, s.stage = 0, 0, 0, nil, 0
	}
	b.seen.n, b.scored.n, b.cands.n = 0, 0, 0
}

// wordEvidence returns the user's evidence for word id after t.q's
// history: from the memo when it holds it, else looked up and then kept
// in the memo for the next keystrokes.
func (t *thresholdSearch) wordEvidence(id uint32) evidence {
	if w := t.memo.word(id); w != nil && w.hasEv {
		return w.ev
	}
	ev := t.v.evidenceMemo(t.q, id, t.memo)
	if w := t.memo.add(id); w != nil {
		w.ev, w.hasEv = ev, true
	}
	return ev
}

// baseList returns the base model's m best words in t.r after t.q's
// history: from the memo when it holds them, else from the model, and
// then kept in the memo for the next keystrokes.
func (t *thresholdSearch) baseList(m int) []Scored {
	r := t.r
	if r.lo >= r.hi {
		return nil
	}
	if t.memo != nil {
		if base, ok := t.memo.baseTop(r, m, t.base[:0]); ok {
			return base
		}
	}
	base := t.v.base.topKNodes(t.q.nb[:t.q.nn], r.lo, r.hi, m, t.base[:0], &t.cands)
	if t.memo != nil {
		t.memo.setBase(base, m)
	}
	return base
}

// run is the threshold search with a base list of m words (see
// threshold). While it runs, res holds blended probabilities, and t.kth
// is the k-th of them; they become logarithms once, at the end, and only
// for a result the final check proves exact (a result that fails it is
// thrown away): one logarithm per result instead of one per word scored,
// and no exponential of the k-th score after each push. The same words
// come out with the same scores. (Two probabilities a rounding apart can
// share a logarithm; the pushes order them by probability, toLogs puts
// such ties back in ID order. Were such a pair split by the k-th place,
// the buffer would keep the likelier one where ranking by logarithms
// keeps the lower ID; over the root benchmark's keystrokes every Suggest
// result was the same as with logarithms throughout.)
func (t *thresholdSearch) run(m int) bool {
	v, q, r, k, res := t.v, t.q, t.r, t.k, t.res
	res.n = 0
	base := t.baseList(m)
	baseDone := len(base) < m // every base word of the range is in base
	for i, s := range base {
		pb := math.Exp(s.LogP)
		if i == len(base)-1 && !baseDone {
			t.pbBound = pb // every base word outside the list scores at most as its last
		}
		t.seen.add(s.ID)
		t.scored.add(s.ID)
		ev := t.wordEvidence(s.ID)
		res.push(Scored{ID: s.ID, LogP: v.blendProb(q, pb, &ev)})
	}
	if res.n == k {
		t.kth = res.buf[k-1].LogP
	}
	for si := range t.st {
		t.st[si].max = v.streamBound(si, q)
		t.wMax[si] = t.c.gamma[si] * t.st[si].max
		if t.st[si].max == 0 {
			t.st[si].stage = 3
		}
	}
	for si := range t.st {
		t.wFront[si] = t.c.gamma[si] * t.st[si].frontier()
	}
	for moved := -1; !t.failed; {
		// Bound of every word not met yet that has some evidence. Only
		// the list read last has moved since the previous round.
		if moved >= 0 {
			t.wFront[moved] = t.c.gamma[moved] * t.st[moved].frontier()
		}
		bound := t.c.alpha * t.pbBound
		pick, heaviest := -1, 0.0
		for si, w := range t.wFront {
			bound += w
			if w > heaviest {
				pick, heaviest = si, w
			}
		}
		moved = pick
		if res.n == k && bound*boundMargin < t.kth || pick < 0 {
			break
		}
		s := &t.st[pick]
		switch {
		case s.stage == 0 && t.memo != nil && t.memo.has(pick):
			s.stage, s.pos, s.all = 4, 0, t.memo.sorted(v, pick, r)
		case s.stage == 4:
			e := s.all[s.pos]
			s.pos++
			t.consider(pick, e.tok, e.val)
		case s.stage == 0 && pick != stCacheBi:
			t.firstStage(pick, s)
		case (s.stage == 1 || s.stage == 2) && s.pos < s.buf.n:
			e := s.buf.buf[s.pos]
			s.pos++
			t.consider(pick, e.ID, e.LogP)
		case s.stage <= 1 && t.memo != nil && r.prefix != "":
			// Every entry of the range, kept in the memo for the next
			// keystrokes; a short list is read whole in order of value
			// (as stage 4), a long one through its best MaxK.
			all := t.memo.collect(v, pick, q, r)
			if len(all) <= insertionMax {
				t.memo.sortList(pick)
				s.stage, s.pos, s.all = 4, 0, all
				break
			}
			s.stage, s.pos, s.buf.n, s.buf.k = 2, 0, 0, MaxK
			for _, e := range all {
				s.keep(e.tok, e.val)
			}
			s.tail = s.buf.buf[s.buf.n-1].LogP
		case s.stage <= 1:
			// The best MaxK entries in the range, in order.
			s.stage, s.pos, s.buf.n, s.buf.k = 2, 0, 0, MaxK
			n := 0
			t.scan(pick, func(tok uint32, val float64) {
				n++
				s.keep(tok, val)
			})
			s.tail = 0
			if n > s.buf.k {
				s.tail = s.buf.buf[s.buf.n-1].LogP
			}
		default:
			s.stage = 3
			t.scan(pick, func(tok uint32, val float64) { t.consider(pick, tok, val) })
		}
	}
	if t.failed {
		return false
	}
	var none evidence
	if m == k+1 && t.memo != nil {
		// Would a base list of k words have been enough? Only a guide for
		// the choice of length, so compared as probabilities.
		t.shortOK = len(base) < k || res.n == k && t.kth > v.blendProb(q, math.Exp(base[k-1].LogP), &none)
	}
	// Words with no evidence beyond the base list score at most the blend
	// of the base bound with no evidence; the k-th result must beat it.
	ok := baseDone
	if !ok && res.n == k {
		ok = logAbove(res.buf[k-1].LogP, v.blendProb(q, t.pbBound, &none))
	}
	if ok {
		res.toLogs()
	}
	return ok
}

// logMargin is a relative gap between two probabilities past which their
// logarithms are ordered as they are: math.Log is within one ulp of the
// true value (a relative error of about 1e-16 on logarithms under 40 in
// size), so a ratio of 1 + 1e-12 between the probabilities, a difference
// of about 1e-12 between their logarithms, cannot be undone by rounding.
const logMargin = 1 + 1e-12

// logAbove reports whether ln p > ln last as math.Log computes them (p and
// last positive), taking the logarithms only when the probabilities are
// too close to tell.
func logAbove(p, last float64) bool {
	switch {
	case p > last*logMargin:
		return true
	case p*logMargin < last:
		return false
	}
	return math.Log(p) > math.Log(last)
}

// consider meets word tok with value val in list si: it is dropped when a
// bound shows it cannot reach the k-th score, else scored.
func (t *thresholdSearch) consider(si int, tok uint32, val float64) {
	v, q, c := t.v, t.q, &t.c
	if t.failed || !t.r.whole && !v.inRange(tok, t.r) || tok == v.bos || tok == v.eos || tok == v.unk {
		return
	}
	if t.seen.has(tok) || t.full && t.scored.has(tok) {
		return
	}
	if !t.full && !t.seen.add(tok) {
		t.full = true // from now on a word may have been met before without a record
	}
	pbUB, pbKnown := 0.0, false
	if tok < v.V {
		pbUB = t.pbBound
		if lp, ok := t.cands.logP(tok); ok {
			pbUB, pbKnown = math.Exp(lp), true
		}
	}
	// Bounds: the word's value in this list, and in every other list its
	// frontier (for a word not met before) or its largest value.
	own := c.alpha*pbUB + c.gamma[si]*val
	// Look the word up list by list, heaviest bound first, replacing each
	// bound by the exact value, and drop it as soon as the bound falls
	// below the k-th score.
	var ev evidence
	var bnd [nStreams]float64
	ub := own
	w := &t.wFront
	if t.full {
		w = &t.wMax
	}
	done := uint8(1) << si
	for sj := range t.st {
		if sj != si {
			bnd[sj] = w[sj]
			ub += bnd[sj]
			if bnd[sj] == 0 && !t.full && t.st[sj].stage != 0 && (sj != stUni || tok < v.V) && t.st[sj].frontier() == 0 {
				// The list is read to the end (or empty), so the word,
				// not met in it, has no entry there: no look-up. Not so
				// for a user word's unigram entry: the list of best
				// unigrams leaves out the words not yet suggestible,
				// whose counts still enter their probability.
				done |= 1 << sj
			}
		}
	}
	known := t.memo.word(tok)
	if known != nil && known.hasEv {
		ev = known.ev
	} else {
		ev.set(si, val)
		for done != 1<<nStreams-1 {
			if t.res.n == t.k && ub*boundMargin < t.kth {
				return
			}
			pick := -1
			for sj := range t.st {
				if done&(1<<sj) == 0 && (pick < 0 || bnd[sj] > bnd[pick]) {
					pick = sj
				}
			}
			done |= 1 << pick
			x := v.evidenceIn(q, pick, tok, &ev, t.memo)
			ub += c.gamma[pick]*x - bnd[pick]
		}
		if si == stUni && tok >= v.V {
			v.evidenceIn(q, stUni, tok, &ev, t.memo) // for the typed count
		}
		if known = t.memo.add(tok); known != nil {
			known.ev, known.hasEv = ev, true
		}
	}
	if tok >= v.V && !(ev.uni && v.suggestible(tok, ev.typed)) {
		return
	}
	if t.res.n == t.k && c.bound(pbUB, &ev)*boundMargin < t.kth {
		return // the exact evidence with the base bound cannot reach the k-th
	}
	if t.full && !t.scored.add(tok) {
		t.failed = true
		return
	} else if !t.full {
		t.scored.add(tok)
	}
	pb := 0.0
	switch {
	case tok >= v.V:
	case pbKnown:
		pb = pbUB
	case known != nil && known.hasPB:
		pb = known.pb
	default:
		pb = math.Exp(v.base.score(q.nb[:q.nn], tok))
		if known != nil {
			known.pb, known.hasPB = pb, true
		}
	}
	t.res.push(Scored{ID: tok, LogP: v.blendProb(q, pb, &ev)})
	if t.res.n == t.k {
		t.kth = t.res.buf[t.k-1].LogP
	}
}

// set records the value of w in list si.
func (ev *evidence) set(si int, x float64) {
	switch si {
	case stUni, stBi, stTri:
		ev.c[si-stUni] = x
	case stCacheUni:
		ev.cu = x
	case stCacheBi:
		ev.cb = x
	}
}

// evidenceIn looks up w's value in list si, records it in ev and returns
// it, through the memo m (nil: none), which the caller holds locked.
func (v *OverlayView) evidenceIn(q *query, si int, w uint32, ev *evidence, m *topKMemo) float64 {
	x := 0.0
	switch si {
	case stUni:
		return v.uniOf(m, w, ev)
	case stBi:
		if e := q.n2.find(w); e != nil {
			x = e.cnt
		}
	case stTri:
		if e := q.n3.find(w); e != nil {
			x = e.cnt
		}
	case stCacheUni:
		if q.wCache > 0 {
			x = v.cacheUniOf(m, w)
		}
	case stCacheBi:
		if q.wCache > 0 && q.cBiTot > 0 && q.hasB {
			x = v.cache.find(q.cMain, q.cRec, q.b, w)
		}
	}
	ev.set(si, x)
	return x
}

// streamBound returns a cheap upper bound of the values of evidence list
// si over every word (0 when the list is empty or has no weight).
func (v *OverlayView) streamBound(si int, q *query) float64 {
	switch si {
	case stUni:
		if v.nTop > 0 { // the most counted suggestible word
			return v.top[0].cnt
		}
	case stBi, stTri:
		nd := q.n2
		if si == stTri {
			nd = q.n3
		}
		return nd.maxCnt()
	case stCacheUni:
		if q.wCache > 0 && v.cache.nbest > 0 {
			return v.cache.best[0].w
		}
	case stCacheBi:
		if q.wCache > 0 && q.cBiTot > 0 && q.hasB {
			return q.cBiMax
		}
	}
	return 0
}

// firstStage fills s with list si's first stage, from the memo when it
// holds one for a range around the query's. A remembered first stage that
// held every entry its source offers in its range (the source's list of
// best entries, or a small node read whole) holds, filtered, every entry
// the source offers in the narrower range, best first, and the bound of
// the others is the same: the stage is the one stage1 would build. The
// unigram and cache-unigram stages depend on the view alone, the others on
// the history too (see topKMemo.begin).
func (t *thresholdSearch) firstStage(si int, s *stream) {
	v, r, m := t.v, t.r, t.memo
	if m == nil {
		v.stage1(si, s, t.q, r)
		return
	}
	f := &m.first[si]
	if f.covers(r) {
		s.stage, s.tail, s.buf.k, s.buf.n = f.stage, f.tail, MaxK, 0
		for _, e := range f.buf[:f.n] {
			if r.whole || v.inRange(e.ID, r) {
				s.buf.buf[s.buf.n] = e
				s.buf.n++
			}
		}
		return
	}
	if v.stage1(si, s, t.q, r) {
		f.set(s, r)
	}
}

// set remembers s, a first stage that holds every entry its source offers
// in range r.
func (f *firstMemo) set(s *stream, r *rangeQ) {
	f.ok, f.stage, f.whole, f.prefix, f.lo, f.hi, f.tail = true, s.stage, r.whole, r.prefix, r.lo, r.hi, s.tail
	f.n = copy(f.buf[:], s.buf.buf[:s.buf.n])
}

// stage1 reads list si's best entries in the range into s. It reports
// whether s holds every entry in the range that the list's source offers
// (see firstStage).
func (v *OverlayView) stage1(si int, s *stream, q *query, r *rangeQ) bool {
	switch si {
	case stUni:
		// v.top lists the most counted suggestible words; the others are
		// never returned, so their counts need no bound.
		return v.bestList(s, r, v.top[:v.nTop], v.nTop == uniTopLen)
	case stBi, stTri:
		nd := q.n2
		if si == stTri {
			nd = q.n3
		}
		top := nd.best()
		if top == nil { // a small node: read it whole in order
			s.stage, s.buf.k = 2, MaxK
			n := 0
			v.scanNode(nd, r, func(tok uint32, val float64) {
				n++
				s.keep(tok, val)
			})
			return n <= s.buf.n
		}
		return v.bestList(s, r, top.e[:top.n], nd.size() > top.n)
	case stCacheUni:
		var top [cacheBest]topEntry
		for i, e := range v.cache.best[:v.cache.nbest] {
			top[i] = topEntry{tok: e.tok, cnt: e.w}
		}
		return v.bestList(s, r, top[:v.cache.nbest], v.cache.nUni > v.cache.nbest)
	}
	return false
}

// scan calls f for every entry of list si in the range.
func (v *OverlayView) scan(si int, q *query, r *rangeQ, m *topKMemo, f func(uint32, float64)) {
	switch si {
	case stUni:
		v.scanUni(r, m, f)
	case stBi:
		v.scanNode(q.n2, r, f)
	case stTri:
		v.scanNode(q.n3, r, f)
	case stCacheUni:
		v.scanCache(v.cache.uni, v.cache.rUni, r, f)
	case stCacheBi:
		v.scanCache(q.cMain, q.cRec, r, f)
	}
}

// topKExhaustive scores every word in the range (the base IDs [lo, hi) and
// the user words with the prefix) and appends the best k to dst. It is the
// last resort of TopK and the definition TopK's result must equal.
func (v *OverlayView) topKExhaustive(q *query, r *rangeQ, k int, dst []Scored) []Scored {
	var res topBuf
	res.k = k
	for w := r.lo; w < r.hi; w++ {
		if !v.suggestible(w, 0) {
			continue
		}
		ev := v.evidenceOf(q, w)
		pb := math.Exp(v.base.score(q.nb[:q.nn], w))
		res.push(Scored{ID: w, LogP: math.Log(v.blendProb(q, pb, &ev))})
	}
	p, _ := v.findUser(r.prefix)
	for ; p < len(v.byStr) && strings.HasPrefix(v.words[v.byStr[p]], r.prefix); p++ {
		w := v.V + v.byStr[p]
		ev := v.evidenceOf(q, w)
		if !ev.uni || !v.suggestible(w, ev.typed) {
			continue
		}
		res.push(Scored{ID: w, LogP: math.Log(v.blendProb(q, 0, &ev))})
	}
	return append(dst, res.buf[:res.n]...)
}
