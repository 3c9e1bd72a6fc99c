package lm

import (
	"cmp"
	"slices"
	"strings"
	"sync"
	"sync/atomic"
)

// Reusing work between the keystrokes of one word.
//
// An engine asks for the blended top-k on every keystroke, and while a word
// is being typed the history stays the same and the prefix only grows. A
// view therefore keeps a memo of its last TopK call: the prepared history
// (base contexts, user context nodes, cache range, weights); the words met
// with their complete evidence and base probability, which depend on the
// history alone; the base model's top list for the range; and for each
// evidence list the search had to scan in full, every entry of that list in
// the query's range, in scan order. When the next call has the same history
// and a prefix that extends the memo's (so that its base ID range lies
// inside the memo's), a scan of that list only filters the remembered
// entries instead of walking the user's successor lists again, and the
// threshold search reads the filtered list best first (sorted once); the
// filtered entries are exactly those the full scan would meet, so the
// result is unchanged. The base top list is reused when, filtered to the
// new range, it still holds as many words as asked for, or held every word
// of its range.
//
// What does not depend on the history, a word's user unigram entry and its
// recency-cache weight as a unigram, stays in the memo across histories
// (the facts table), so that the frequent words met after every history
// are not looked up in the overlay's shards again.
//
// Views never change once published, and what a memo holds is valid for
// the view it was filled under (its view field) only. A Learn, Forget or
// Wipe publishes a new view that takes over its predecessor's memo object
// (about 170 KB, made by the overlay's first TopK call), so that its tables
// need not be allocated and cleared again after every Learn; the first
// call under the new view finds the memo's view different and empties it
// (the word table and the facts table by a new generation, in O(1)).
// Concurrent callers do not wait for each other: a call that finds the
// memo in use, under its own view or another, runs without it.

// memoEnt is one remembered entry of an evidence list.
type memoEnt struct {
	tok uint32
	val float64
}

// Memo states of an evidence list.
const (
	memoNone  = iota // nothing remembered
	memoOuter        // the list's entries in the range of an earlier, shorter prefix
	memoExact        // the list's entries in the memo's own range
)

// topKMemo is the memo of a view (see above).
type topKMemo struct {
	mu     sync.Mutex
	view   *OverlayView // the view the memo's contents belong to
	ok     bool         // q holds the prepared history of ctx[:nctx]
	nctx   int
	ctx    [MaxOrder]uint32
	q      query
	prefix string
	lo, hi uint32
	state  [nStreams]uint8
	byVal  [nStreams]bool // the list is sorted best first
	lists  [nStreams][]memoEnt
	// The base model's best words in the range, best first: exactly the
	// top len(base) of the range, or every word of the range when
	// baseAll. baseState is one of the states of the lists above.
	base      [MaxK]Scored
	nBase     int
	baseAll   bool
	baseState uint8
	// Words met under the history: their evidence and base probability,
	// which depend on the history alone. A slot is in use when its gen
	// equals gen; a new history starts a new generation.
	gen   uint32
	nWord int
	words [memoWords]memoWord
	// What the view knows of words whatever the history, kept across
	// histories (direct-mapped by tok; a colliding word replaces the one
	// in its slot). A slot is in use when its gen equals factGen; a new
	// view starts a new generation.
	factGen uint32
	facts   [factSlots]wordFacts
	// The first stage of each evidence list for an earlier call's range,
	// when it held every entry of that range the list's source offers
	// (see firstStage in blend_topk.go).
	first [nStreams]firstMemo
	// The buffers of the search in progress (see searchBufs).
	bufs searchBufs
}

// firstMemo is a remembered first stage of an evidence list: its entries
// in a range, best first, and the bound of the range's other entries.
type firstMemo struct {
	ok     bool
	stage  int8
	whole  bool
	prefix string
	lo, hi uint32
	tail   float64
	n      int
	buf    [MaxK]Scored
}

// covers reports whether the remembered range holds every word of r.
func (f *firstMemo) covers(r *rangeQ) bool {
	return f.ok && (f.whole || r.prefix != "" && strings.HasPrefix(r.prefix, f.prefix) &&
		(r.lo >= r.hi || r.lo >= f.lo && r.hi <= f.hi))
}

// factSlots is the size of a memo's table of word facts (a power of two),
// factBits its base-2 logarithm. Project choice, no source: on the root
// BenchmarkSuggestOverlay 1,024 and 4,096 slots ran 2–3 % faster than 256
// (fewer words looked up again after their slot was taken); the table is
// allocated once per overlay, not per view (see publish).
const (
	factBits  = 12
	factSlots = 1 << factBits
)

// wordFacts is what a view knows of a word whatever the history: its user
// unigram entry and its recency-cache weight as a unigram, each looked up
// on first use.
type wordFacts struct {
	tok1  uint32 // tok+1; 0: an empty slot
	gen   uint32 // the slot is in use when gen is the memo's factGen
	typed uint32
	hasC  bool // uni, typed and cnt are known
	hasCU bool // cu is known
	uni   bool
	cnt   float64
	cu    float64
}

// factsOf returns tok's slot of the facts table, emptied first when it
// held another word.
func (m *topKMemo) factsOf(tok uint32) *wordFacts {
	f := &m.facts[(tok*0x9E3779B1)>>(32-factBits)]
	if f.tok1 != tok+1 || f.gen != m.factGen {
		*f = wordFacts{tok1: tok + 1, gen: m.factGen}
	}
	return f
}

// uniOf sets ev's user unigram evidence of w (count, times typed, whether
// there is an entry) and returns the count, through the memo m when it is
// not nil.
func (v *OverlayView) uniOf(m *topKMemo, w uint32, ev *evidence) float64 {
	if m == nil {
		ev.c[0], ev.typed, ev.uni = 0, 0, false
		if e := v.uniEntry(w); e != nil {
			ev.c[0], ev.typed, ev.uni = e.cnt, e.typed, true
		}
		return ev.c[0]
	}
	f := m.factsOf(w)
	if !f.hasC {
		if e := v.uniEntry(w); e != nil {
			f.cnt, f.typed, f.uni = e.cnt, e.typed, true
		}
		f.hasC = true
	}
	ev.c[0], ev.typed, ev.uni = f.cnt, f.typed, f.uni
	return f.cnt
}

// cacheUniOf returns the recency cache's unigram weight of w, through the
// memo m when it is not nil.
func (v *OverlayView) cacheUniOf(m *topKMemo, w uint32) float64 {
	if m == nil {
		return v.cache.uniW(w)
	}
	f := m.factsOf(w)
	if !f.hasCU {
		f.cu, f.hasCU = v.cache.uniW(w), true
	}
	return f.cu
}

// memoWords is the size of a memo's word table (a power of two), memoBits
// its base-2 logarithm; it takes at most three quarters of it. Project
// choice, no source: 512 slots ran 1–2 % faster than 128 on the typed-prefix
// keystrokes of the root BenchmarkSuggestOverlay (fewer words of a long
// word's keystrokes left unremembered); the table is allocated once per
// overlay (see publish).
const (
	memoBits  = 9
	memoWords = 1 << memoBits
)

// memoWord is what a memo knows of one word under its history.
type memoWord struct {
	gen   uint32
	tok   uint32
	hasEv bool
	hasPB bool
	ev    evidence // complete: every list looked up
	pb    float64  // p_base(w | h)
}

// slotOf returns the table index where tok is or would go.
func (m *topKMemo) slotOf(tok uint32) int {
	i := int((tok * 0x9E3779B1) >> (32 - memoBits))
	for m.words[i].gen == m.gen && m.words[i].tok != tok {
		i = (i + 1) & (memoWords - 1)
	}
	return i
}

// word returns what the memo knows of tok, or nil (also for a nil memo).
func (m *topKMemo) word(tok uint32) *memoWord {
	if m == nil {
		return nil
	}
	if w := &m.words[m.slotOf(tok)]; w.gen == m.gen {
		return w
	}
	return nil
}

// add returns tok's entry, making an empty one if needed; nil for a nil
// memo or a full table.
func (m *topKMemo) add(tok uint32) *memoWord {
	if m == nil {
		return nil
	}
	w := &m.words[m.slotOf(tok)]
	if w.gen != m.gen {
		if m.nWord >= memoWords*3/4 {
			return nil
		}
		m.nWord++
		*w = memoWord{gen: m.gen, tok: tok}
	}
	return w
}

// memoSlot holds a view's memo, taken over from the view before it or
// else made by the view's first TopK call, and the view's counter that
// picks the length of the base list (see noteShort in blend_topk.go),
// updated by TopK calls that hold the memo.
type memoSlot struct {
	p     atomic.Pointer[topKMemo]
	short atomic.Int32
}

// get returns the memo, making it if needed.
func (s *memoSlot) get() *topKMemo {
	if m := s.p.Load(); m != nil {
		return m
	}
	s.p.CompareAndSwap(nil, new(topKMemo))
	return s.p.Load()
}

// publish makes v the overlay's current view, with the previous view's
// memo object (emptied by the first call under v, see reset) and
// base-list counter.
func (o *Overlay) publish(v *OverlayView) {
	s := new(memoSlot)
	if old := o.cur.Load(); old != nil && old.memo != nil {
		s.short.Store(old.memo.short.Load())
		if m := old.memo.p.Load(); m != nil {
			m.release()
			s.p.Store(m)
		}
	}
	v.memo = s
	o.cur.Store(v)
}

// reset empties the memo for view v, whose memo it becomes: nothing filled
// under another view is used again. The caller holds the memo locked.
func (m *topKMemo) reset(v *OverlayView) {
	m.view = v
	m.ok = false
	for si := range m.first {
		m.first[si].ok = false
	}
	m.state = [nStreams]uint8{}
	m.baseState = memoNone
	m.prefix = ""
	m.factGen++
	if m.factGen == 0 { // after 2³² resets: clear the table once
		m.facts = [factSlots]wordFacts{}
		m.factGen = 1
	}
}

// release drops the memo's references into the view it was filled under,
// so that the memo does not keep a superseded view (one a Forget or Wipe
// replaced, say) reachable. It does nothing while a caller holds the memo;
// that caller's view is reachable anyway, and the next call under another
// view empties the memo.
func (m *topKMemo) release() {
	if !m.mu.TryLock() {
		return
	}
	m.reset(nil)
	m.q = query{}
	m.mu.Unlock()
}

// holds reports whether the memo, which the caller holds locked, holds the
// prepared history ctx (already cut to the base model's order) of view v.
func (m *topKMemo) holds(v *OverlayView, ctx []uint32) bool {
	return m.view == v && m.ok && m.nctx == len(ctx) && m.ctx == m.key(ctx)
}

// begin prepares the memo for a TopK call with history ctx (already cut to
// the base model's order) and range r, and returns the prepared history.
func (m *topKMemo) begin(v *OverlayView, ctx []uint32, r *rangeQ) *query {
	if m.view != v {
		m.reset(v)
	}
	if key := m.key(ctx); !m.ok || m.nctx != len(ctx) || m.ctx != key {
		v.prepare(ctx, &m.q)
		m.ok, m.nctx, m.ctx = true, len(ctx), key
		m.state = [nStreams]uint8{}
		m.baseState = memoNone
		m.prefix = ""
		m.first[stBi].ok, m.first[stTri].ok, m.first[stCacheBi].ok = false, false, false
		m.gen++
		m.nWord = 0
		if m.gen == 0 { // after 2³² histories: clear the table once
			m.words = [memoWords]memoWord{}
			m.gen = 1
		}
	}
	narrow := r.prefix != "" && m.prefix != "" && strings.HasPrefix(r.prefix, m.prefix) &&
		(r.lo >= r.hi || r.lo >= m.lo && r.hi <= m.hi)
	for si := range m.state {
		m.state[si] = outer(m.state[si], narrow)
	}
	m.baseState = outer(m.baseState, narrow)
	m.prefix, m.lo, m.hi = r.prefix, r.lo, r.hi
	return &m.q
}

// outer returns the state of a remembered list when the next call's range
// lies inside the memo's (narrow) or not.
func outer(state uint8, narrow bool) uint8 {
	switch {
	case !narrow:
		return memoNone
	case state == memoExact:
		return memoOuter
	}
	return state
}

// baseTop returns the base model's m best words in the range, best first,
// from the memo, or false when the memo cannot tell them. A list for an
// enclosing range tells them when it holds m words of the range or every
// word of its own range: the words of the inner range rank among
// themselves as they do in the outer list, and every word the list lacks
// ranks after its last.
func (m *topKMemo) baseTop(r *rangeQ, want int, dst []Scored) ([]Scored, bool) {
	if m.baseState == memoOuter {
		keep := m.base[:0]
		for _, s := range m.base[:m.nBase] {
			if s.ID >= r.lo && s.ID < r.hi {
				keep = append(keep, s)
			}
		}
		m.nBase = len(keep)
		m.baseState = memoExact
	}
	if m.baseState != memoExact || !m.baseAll && m.nBase < want {
		return dst, false
	}
	return append(dst, m.base[:min(want, m.nBase)]...), true
}

// setBase remembers the base model's answer for m words in the current range.
func (m *topKMemo) setBase(list []Scored, want int) {
	m.nBase = copy(m.base[:], list)
	m.baseAll = len(list) < want
	m.baseState = memoExact
}

// key returns ctx padded to MaxOrder words.
func (m *topKMemo) key(ctx []uint32) [MaxOrder]uint32 {
	var k [MaxOrder]uint32
	copy(k[:], ctx)
	return k
}

// scan calls f for every entry of list si in the range, as v.scan does,
// using and filling the memo.
func (m *topKMemo) scan(v *OverlayView, si int, q *query, r *rangeQ, f func(uint32, float64)) {
	switch m.state[si] {
	case memoExact:
		for _, e := range m.lists[si] {
			f(e.tok, e.val)
		}
		return
	case memoOuter:
		for _, e := range m.narrow(v, si, r) {
			f(e.tok, e.val)
		}
		return
	}
	m.byVal[si] = false
	if r.prefix == "" { // the whole list: walking it is as cheap as copying it
		v.scan(si, q, r, m, f)
		return
	}
	list := m.lists[si][:0]
	v.scan(si, q, r, m, func(tok uint32, val float64) {
		list = append(list, memoEnt{tok, val})
		f(tok, val)
	})
	m.lists[si] = list
	m.state[si] = memoExact
}

// collect fills the memo with every entry of list si in range r and
// returns them, in scan order. The range must have a prefix and the memo
// must not hold the list yet (a search reaches its stage 2 only for a list
// the memo did not hold at its stage 0; see has).
func (m *topKMemo) collect(v *OverlayView, si int, q *query, r *rangeQ) []memoEnt {
	m.byVal[si] = false
	list := m.lists[si][:0]
	v.scan(si, q, r, m, func(tok uint32, val float64) {
		list = append(list, memoEnt{tok, val})
	})
	m.lists[si] = list
	m.state[si] = memoExact
	return list
}

// sortList sorts the memo's list si best first (ties: lower ID first).
func (m *topKMemo) sortList(si int) {
	if !m.byVal[si] {
		sortByValue(m.lists[si])
		m.byVal[si] = true
	}
}

// has reports whether the memo holds list si complete for the range of
// the current call.
func (m *topKMemo) has(si int) bool { return m.state[si] != memoNone && m.prefix != "" }

// sorted returns list si's entries in the current call's range, best
// first (ties: lower ID first); has(si) must hold. The list stays in the
// memo sorted, so that later keystrokes only filter it.
func (m *topKMemo) sorted(v *OverlayView, si int, r *rangeQ) []memoEnt {
	if m.state[si] == memoOuter {
		m.narrow(v, si, r)
	}
	m.sortList(si)
	return m.lists[si]
}

// narrow filters the memo's list si, which holds the entries of an
// enclosing range, to range r, keeping their order, and returns it.
func (m *topKMemo) narrow(v *OverlayView, si int, r *rangeQ) []memoEnt {
	keep := m.lists[si][:0]
	for _, e := range m.lists[si] {
		if e.tok < v.V && e.tok >= r.lo && e.tok < r.hi || e.tok >= v.V && v.hasPrefix(e.tok, r.prefix) {
			keep = append(keep, e)
		}
	}
	m.lists[si] = keep
	m.state[si] = memoExact
	return keep
}

// sortByValue sorts s best first, ties by lower ID first. The entries of
// one list have distinct IDs, so the order is unique. A short list (the
// usual case: a list filtered to a longer prefix) is sorted by insertion
// with the comparison written out, which costs less than a sort through a
// comparison function; a long one by slices.SortFunc.
func sortByValue(s []memoEnt) {
	if len(s) > insertionMax {
		slices.SortFunc(s, func(a, b memoEnt) int {
			if c := cmp.Compare(b.val, a.val); c != 0 {
				return c
			}
			return cmp.Compare(a.tok, b.tok)
		})
		return
	}
	for i := 1; i < len(s); i++ {
		e := s[i]
		j := i
		for ; j > 0 && (e.val > s[j-1].val || e.val == s[j-1].val && e.tok < s[j-1].tok); j-- {
			s[j] = s[j-1]
		}
		s[j] = e
	}
}

// insertionMax is the longest list sortByValue sorts by insertion: below a
// few dozen entries insertion sort's quadratic cost stays under a general
// sort's overhead (common practice, no source; 48 not tuned).
const insertionMax = 48
