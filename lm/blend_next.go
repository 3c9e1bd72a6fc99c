package lm

import "math"

// Next-word candidates.
//
// With no typed part (every word in range) TopK does not search the whole
// vocabulary. It ranks a small candidate set by the exact blend instead:
//
//   - the base model's k best next words after the history;
//   - the nextDepth best successors of the history's last word in the
//     user's counts, and the nextDepth best of its last two words (largest
//     count first, ties: lower ID), less the special tokens and the
//     user-only words not yet typed MinTyped times.
//
// Each candidate gets the same score LogProb gives it, and the best k are
// returned (ties: lower ID). Words the base model does not rank among its
// k best and that the user has not often typed after these words are not
// offered, however the user's unigram counts or the recency cache favour
// them.
//
// Why: proving the top k over every word meant ruling out each word with
// any evidence of the user's, and cost about as much again as the base
// model's own top list at every next word. Words that follow the last word
// or two in the user's own text are what personal next-word prediction
// gains by; three of each kept the keystroke savings of the exact search
// on both texts the uplift tests type (within ±0.05 point), while the
// context-free lists and the recency cache, as candidate sources, brought
// about as many wrong next words as right ones (BENCHMARKS.md, "User
// overlay", thirteenth and fourteenth rounds). With a typed prefix the
// search stays exact (blend_topk.go).
//
// The candidates are scored best bound first, and the pass stops when no
// bound left can reach the k-th score (the bounds of blend_topk.go: a
// word's value in a list is known when it is among the list's best entries
// read, and at most the list's next value otherwise). Results hold
// probabilities until the end: one logarithm per result, not per word
// scored.

// nextDepth is the number of best successors the user's counts after the
// last word, and after the last two, each add to the next-word candidates.
// Project choice, no source: 3 kept the exact search's keystroke savings
// on the demo corpus and the 60-line eval text, 2 lost 0.2–0.9 point, and
// each more costs time (BENCHMARKS.md, thirteenth round).
const nextDepth = 3

// nextCand is a next-word candidate gathered from the user's lists.
type nextCand struct {
	tok   uint32
	known uint8 // bit j: vals[j] is the word's exact value in list j of nextLists
	vals  [len(nextLists)]float64
	ub    float64 // upper bound of its blend
}

// nextLists are the lists that depend on the history, in the order of
// nextCand.vals; nextDepths the number of candidates each adds.
var (
	nextLists  = [...]int{stBi, stTri, stCacheBi}
	nextDepths = [len(nextLists)]int{nextDepth, nextDepth, 0}
)

// runNext answers a next-word TopK into t.res (see the comment at the top
// of this file); t.r is the whole vocabulary.
func (t *thresholdSearch) runNext() {
	v, q, k, res := t.v, t.q, t.k, t.res
	res.n = 0
	base := t.baseList(k)
	if len(base) == k {
		// Every base word outside the list scores at most as its last.
		t.pbBound = math.Exp(base[k-1].LogP)
	}
	for _, s := range base {
		t.seen.add(s.ID)
		ev := t.wordEvidence(s.ID)
		res.push(Scored{ID: s.ID, LogP: v.blendProb(q, math.Exp(s.LogP), &ev)})
	}
	if res.n == k {
		t.kth = res.buf[k-1].LogP
	}
	for si := range t.st {
		t.st[si].max = v.streamBound(si, q)
		t.wMax[si] = t.c.gamma[si] * t.st[si].max
	}
	t.nextCands()
	res.toLogs()
}

// bestOf fills tb (its k set by the caller) with the best entries of list
// si, which depends on the history, and returns a bound of the values of
// the list's other entries (0 when tb holds them all).
func (t *thresholdSearch) bestOf(si int, tb *topBuf) float64 {
	v, q, r := t.v, t.q, t.r
	n := 0
	switch si {
	case stBi, stTri:
		nd := q.n2
		if si == stTri {
			nd = q.n3
		}
		if top := nd.best(); top != nil {
			m := min(tb.k, top.n)
			for _, e := range top.e[:m] {
				tb.buf[tb.n] = Scored{ID: e.tok, LogP: e.cnt}
				tb.n++
			}
			if nd.size() > m {
				return top.e[m-1].cnt
			}
			return 0
		}
		v.scanNode(nd, r, func(tok uint32, val float64) {
			n++
			tb.push(Scored{ID: tok, LogP: val})
		})
	case stCacheBi:
		v.scanCache(q.cMain, q.cRec, r, func(tok uint32, val float64) {
			n++
			tb.push(Scored{ID: tok, LogP: val})
		})
	}
	if n > tb.n {
		return tb.buf[tb.n-1].LogP
	}
	return 0
}

// nextCands scores the candidates from the user's lists into t.res, which
// holds the base words' blended probabilities.
func (t *thresholdSearch) nextCands() {
	v, q, c := t.v, t.q, &t.c
	var cs [len(nextLists) * nextDepth]nextCand
	nc := 0
	var tail [len(nextLists)]float64 // bound of a value not read
	var tb topBuf
	for j, si := range nextLists {
		d := nextDepths[j]
		if d == 0 || t.st[si].max == 0 {
			tail[j] = t.st[si].max
			continue
		}
		tb.k, tb.n = d, 0
		tail[j] = t.bestOf(si, &tb)
	next:
		for _, e := range tb.buf[:tb.n] {
			if e.ID == v.bos || e.ID == v.eos || e.ID == v.unk || t.seen.has(e.ID) {
				continue
			}
			for i := range nc {
				if cs[i].tok == e.ID {
					cs[i].known |= 1 << j
					cs[i].vals[j] = e.LogP
					continue next
				}
			}
			cs[nc] = nextCand{tok: e.ID, known: 1 << j}
			cs[nc].vals[j] = e.LogP
			nc++
		}
	}
	// Upper bounds: the exact values where known, the lists' bounds
	// elsewhere, the largest context-free values, the base bound; best
	// first.
	free := t.wMax[stUni] + t.wMax[stCacheUni]
	for i := range cs[:nc] {
		x := &cs[i]
		ub := free
		if x.tok < v.V {
			ub += c.alpha * t.pbBound
		}
		for j, si := range nextLists {
			if x.known&(1<<j) != 0 {
				ub += c.gamma[si] * x.vals[j]
			} else {
				ub += c.gamma[si] * tail[j]
			}
		}
		x.ub = ub
		for k := i; k > 0 && cs[k].ub > cs[k-1].ub; k-- {
			cs[k], cs[k-1] = cs[k-1], cs[k]
		}
	}
	for i := range cs[:nc] {
		x := &cs[i]
		if t.res.n == t.k && x.ub*boundMargin < t.kth {
			return
		}
		t.seen.add(x.tok)
		var ev evidence
		known := t.memo.word(x.tok)
		if known != nil && known.hasEv {
			ev = known.ev
		} else {
			for j, si := range nextLists {
				if x.known&(1<<j) != 0 {
					ev.set(si, x.vals[j])
				} else if tail[j] > 0 {
					v.evidenceIn(q, si, x.tok, &ev, t.memo)
				}
			}
			v.uniOf(t.memo, x.tok, &ev)
			if q.wCache > 0 {
				ev.cu = v.cacheUniOf(t.memo, x.tok)
			}
			if known = t.memo.add(x.tok); known != nil {
				known.ev, known.hasEv = ev, true
			}
		}
		if x.tok >= v.V && !(ev.uni && v.suggestible(x.tok, ev.typed)) {
			continue
		}
		pbUB, pbKnown := 0.0, false
		if x.tok < v.V {
			pbUB = t.pbBound
			if lp, ok := t.cands.logP(x.tok); ok {
				pbUB, pbKnown = math.Exp(lp), true
			}
		}
		if t.res.n == t.k && c.bound(pbUB, &ev)*boundMargin < t.kth {
			continue
		}
		pb := 0.0
		switch {
		case x.tok >= v.V:
		case pbKnown:
			pb = pbUB
		case known != nil && known.hasPB:
			pb = known.pb
		default:
			pb = math.Exp(v.base.score(q.nb[:q.nn], x.tok))
			if known != nil {
				known.pb, known.hasPB = pb, true
			}
		}
		t.res.push(Scored{ID: x.tok, LogP: v.blendProb(q, pb, &ev)})
		if t.res.n == t.k {
			t.kth = t.res.buf[t.k-1].LogP
		}
	}
}

// toLogs turns the blended probabilities a search held in b into their
// logarithms, the scores TopK returns.
func (b *topBuf) toLogs() {
	for i := range b.buf[:b.n] {
		b.buf[i].LogP = math.Log(b.buf[i].LogP)
		// Two probabilities a rounding apart can share a logarithm:
		// restore the order of ties (lower ID first).
		for j := i; j > 0 && better(b.buf[j], b.buf[j-1]); j-- {
			b.buf[j], b.buf[j-1] = b.buf[j-1], b.buf[j]
		}
	}
}
