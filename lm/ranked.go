package lm

import (
	"slices"
	"sort"
)

// Ranked records: the highest order of a version-3 section.
//
// In a suffix-closed model every n-gram (h, w) of the highest order N has its
// suffix (h′, w) at order N − 1, where h′ is h without its oldest word. So w
// is one of the successors of h′, and it can be stored as its rank among them
// — a number below F(h′), the size of h′'s successor group — instead of as a
// word ID below the vocabulary size. Most contexts of a large model end in
// words with few successors, so the ranks are much narrower than IDs (the
// context-based remapping of Pibiri & Venturini 2017, "Efficient data
// structures for massive n-gram datasets", SIGIR).
//
// Each successor group of order N is a run of records of w + c bits, w =
// bitsFor(F(h′) − 1) and c the probability code width: the rank (w bits)
// then the probability code (c bits). Groups follow each other in context
// order, and the parent level's successor starts hold the bit offset of
// each group instead of its first entry, so a group's record count is its
// bit length over w + c. Ranks rise strictly inside a group because suffix
// groups are sorted by word.

// Version 5 lets each group choose the cheaper of two forms, named by the
// group's first bit: 0, the records above; 1, the rank count n − 1 in w
// bits, then the ranks as one Elias-Fano code over [0, F(h′)) (efgroup.go),
// then the n probability codes of c bits. Long groups of ranks rising
// densely through their suffix's successors take a few bits per rank
// instead of w.

// rankRecords lays out the highest order of b as ranked records in the
// layout of the given version: 3 and 4, records of rank and probability
// code (codes, of width cw); 5, each group in the cheaper of the two forms
// of version 5; 6, counted groups (counted.go), which needs b's top-order
// counts; it then also fills bowW, indexed by the entries of order N − 1,
// with the weights countedBowWeight gives the contexts. It returns the
// stream and the bit offset of each successor group (plus the total), or
// ok = false when b is not suffix-closed, its order is below 3, or
// (version 6) its counts do not give its probabilities.
func rankRecords(b *Backoff, codes []uint64, cw uint, version int, bowW []float64) (recs bitStream, starts []uint64, ok bool) {
	N := b.Order()
	if N < 3 || (version >= 6 && !countsUsable(b)) {
		return bitStream{}, nil, false
	}
	top, mid := &b.Levels[N-1], &b.Levels[N-2]
	var sfx []int
	jp := 0 // version 6: the entry of the current context at order N − 1
	for g := 0; g < top.Len(); {
		h := top.Key(g)[:N-1]
		e := g
		for e < top.Len() && equalIDs(top.Key(e)[:N-1], h) {
			e++
		}
		slo, shi := keyPrefixRange(mid, h[1:])
		if slo == shi {
			return bitStream{}, nil, false
		}
		F := shi - slo
		w := bitsFor(uint64(F - 1))
		starts = append(starts, recs.n)
		ranks := make([]uint64, e-g)
		sfx = sfx[:0]
		for i := g; i < e; i++ {
			s := findLast(mid, slo, shi, top.Key(i)[N-1])
			if s < 0 {
				return bitStream{}, nil, false
			}
			ranks[i-g] = uint64(s - slo)
			sfx = append(sfx, s)
		}
		n := uint64(len(ranks))
		if version >= 6 {
			// Contexts come in order: walk to h's entry instead of searching.
			for jp < mid.Len() && slices.Compare(mid.Key(jp), h) < 0 {
				jp++
			}
			j := jp
			if j == mid.Len() || !equalIDs(mid.Key(j), h) || !countsAgree(b, g, e, j, sfx) {
				return bitStream{}, nil, false
			}
			bowW[j] = countedBowWeight(b, g, e, j, sfx)
			putCountedGroup(&recs, ranks, b.TopCounts[g:e], F)
			g = e
			continue
		}
		if version == 5 {
			coded := F >= 3 && uint64(w)+groupShape(len(ranks), F).size < n*uint64(w)
			if !coded {
				recs.put(0, 1)
			} else {
				recs.put(1, 1)
				recs.put(n-1, w)
				putGroup(&recs, ranks, F)
				for i := g; i < e; i++ {
					recs.put(codes[i], cw)
				}
				g = e
				continue
			}
		}
		for i := g; i < e; i++ {
			recs.put(ranks[i-g], w)
			recs.put(codes[i], cw)
		}
		g = e
	}
	return recs, append(starts, recs.n), true
}

// findLast returns the entry in [lo, hi) of l (entries sharing all but
// their last ID) whose last ID is w, or -1.
func findLast(l *Level, lo, hi int, w uint32) int {
	last := l.N - 1
	i := lo + sort.Search(hi-lo, func(i int) bool { return l.Key(lo + i)[last] >= w })
	if i < hi && l.Key(i)[last] == w {
		return i
	}
	return -1
}

// prefixRange returns the entries [lo, hi) of l whose keys begin with p.
func keyPrefixRange(l *Level, p []uint32) (lo, hi int) {
	n := len(p)
	lo = searchKeys(l, func(k []uint32) bool { return slices.Compare(k[:n], p) >= 0 })
	hi = searchKeys(l, func(k []uint32) bool { return slices.Compare(k[:n], p) > 0 })
	return lo, hi
}

// searchKeys returns the first entry of l whose key satisfies f (f is
// monotone over the sorted keys), or l.Len().
func searchKeys(l *Level, f func([]uint32) bool) int {
	lo, hi := 0, l.Len()
	for lo < hi {
		mid := int(uint(lo+hi) >> 1)
		if f(l.Key(mid)) {
			hi = mid
		} else {
			lo = mid + 1
		}
	}
	return lo
}

// rankedGroup completes a context node whose successors are ranked records:
// sfx is the node of the context's suffix, whose group (one level down)
// holds the words the ranks point to. It returns false when the group's bit
// range does not divide into records, or does not hold the coded ranks it
// announces (only a damaged section does that).
func (m *Model) rankedGroup(nd *node, sfx *node) bool {
	l := &m.lv[nd.lvl]
	F := sfx.hi - sfx.lo
	if F <= 0 {
		return false
	}
	w := bitsFor(uint64(F - 1))
	rec := uint64(w + l.recCode)
	base := uint64(nd.lo)
	bitsLen := uint64(nd.hi - nd.lo)
	nd.efRanks = false
	if l.counted {
		nd.slo, nd.sn = sfx.lo, F
		nd.eg = sfx.eg
		return m.countedGroup(nd, base, bitsLen, F, w)
	}
	if l.choose {
		if bitsLen == 0 {
			return false
		}
		coded := bitsAt(l.recs, base, 1) == 1
		base++
		bitsLen--
		if coded {
			if F < 3 || bitsLen < uint64(w) {
				return false
			}
			n := bitsAt(l.recs, base, w) + 1
			if n > uint64(F) {
				return false
			}
			size := groupShape(int(n), F).size
			if uint64(w)+size+n*uint64(l.recCode) != bitsLen {
				return false
			}
			nd.efRanks = true
			nd.cbase = base + uint64(w) + size
			base += uint64(w) // the ranks' group
			bitsLen = n * rec // so that the count below reads n
		}
	}
	if bitsLen%rec != 0 {
		return false
	}
	nd.ranked = true
	nd.base = base
	nd.rw, nd.rec = w, rec
	nd.slo, nd.sn = sfx.lo, F
	nd.eg = sfx.eg
	nd.lo, nd.hi = 0, int(bitsLen/rec)
	return true
}

// rankAt returns the rank stored in record p of a ranked node (≥ the
// suffix group's size when the group is damaged).
func (l *level) rankAt(nd *node, p int) uint64 {
	if nd.efRanks {
		if nd.counted {
			return nd.rg.at(p)
		}
		var g efGroup
		if !l.ranksOf(nd, &g) {
			return ^uint64(0)
		}
		return g.at(p)
	}
	return bitsAt(l.recs, nd.base+uint64(p)*nd.rec, nd.rw)
}

// codeAt returns the probability code of record p of a ranked node.
func (l *level) codeAt(nd *node, p int) uint64 {
	if nd.efRanks {
		return bitsAt(l.recs, nd.cbase+uint64(p)*uint64(l.recCode), l.recCode)
	}
	return bitsAt(l.recs, nd.base+uint64(p)*nd.rec+uint64(nd.rw), l.recCode)
}

// wordAt returns the word ID of entry p (a position in [nd.lo, nd.hi)) of
// a node's successor group. A damaged rank gives an ID ≥ the vocabulary
// size, which every caller rejects.
func (m *Model) wordAt(nd *node, p int) uint64 {
	l := &m.lv[nd.lvl]
	if !nd.ranked {
		if l.ef {
			g := &nd.eg
			return min(g.at(p-nd.lo), uint64(m.vocab))
		}
		return l.words.at(p)
	}
	r := l.rankAt(nd, p)
	if r >= uint64(nd.sn) {
		return uint64(m.vocab)
	}
	if m.lv[nd.lvl-1].ef {
		g := &nd.eg
		return min(g.at(int(r)), uint64(m.vocab))
	}
	return m.lv[nd.lvl-1].words.at(nd.slo + int(r))
}

// probAt returns ln p of entry p of a node's successor group. Every read
// of a stored probability goes through it (or through recordProb, which
// gives the same value).
func (m *Model) probAt(nd *node, p int) float64 {
	l := &m.lv[nd.lvl]
	if !nd.ranked {
		return l.prob(p)
	}
	if nd.counted {
		return m.countedProb(nd, p, l.rankAt(nd, p))
	}
	return l.probBook.value(l.codeAt(nd, p))
}

// recordProb is probAt for record p of a ranked node whose word is entry s
// of the suffix group (as rankedFind returns them), without reading the
// rank again.
func (m *Model) recordProb(nd *node, p, s int) float64 {
	if nd.counted {
		return m.countedProb(nd, p, uint64(s-nd.slo))
	}
	return m.probAt(nd, p)
}

// lowerIn returns the first position in [lo, hi) of a node's group whose
// word is ≥ w.
func (m *Model) lowerIn(nd *node, lo, hi int, w uint32) int {
	l := &m.lv[nd.lvl]
	if !nd.ranked {
		if l.ef {
			g := &nd.eg
			i, _ := g.lower(uint64(w))
			return min(max(nd.lo+i, lo), hi)
		}
		return l.lowerBound(lo, hi, w)
	}
	// The first suffix successor ≥ w, as a rank; ranks ascend with words.
	var r uint64
	if m.lv[nd.lvl-1].ef {
		g := &nd.eg
		i, _ := g.lower(uint64(w))
		r = uint64(i)
	} else {
		r = uint64(m.lv[nd.lvl-1].lowerBound(nd.slo, nd.slo+nd.sn, w) - nd.slo)
	}
	return l.rankLower(nd, lo, hi, r)
}

// rankLower returns the first record in [lo, hi) of a ranked node whose
// rank is ≥ r.
func (l *level) rankLower(nd *node, lo, hi int, r uint64) int {
	if nd.efRanks {
		var g efGroup
		if !l.ranksOf(nd, &g) {
			return hi
		}
		i, _ := g.lower(r)
		return min(max(i, lo), hi)
	}
	for lo < hi {
		mid := int(uint(lo+hi) >> 1)
		if l.rankAt(nd, mid) < r {
			lo = mid + 1
		} else {
			hi = mid
		}
	}
	return lo
}

// rankedFind returns the record of word w in a ranked node's group (or
// -1) and w's entry in the suffix group one level down (or -1, in which
// case w is not in the suffix group either).
func (m *Model) rankedFind(nd *node, w uint32) (p, s int) {
	if m.lv[nd.lvl-1].ef {
		g := &nd.eg
		i, ok := g.lower(uint64(w))
		if !ok {
			return -1, -1
		}
		s = nd.slo + i
	} else if s = m.lv[nd.lvl-1].search(nd.slo, nd.slo+nd.sn, w); s < 0 {
		return -1, -1
	}
	r := uint64(s - nd.slo)
	l := &m.lv[nd.lvl]
	if nd.efRanks {
		var g efGroup
		if !l.ranksOf(nd, &g) {
			return -1, s
		}
		if i, found := g.lower(r); found {
			return i, s
		}
		return -1, s
	}
	lo := l.rankLower(nd, nd.lo, nd.hi, r)
	if lo < nd.hi && l.rankAt(nd, lo) == r {
		return lo, s
	}
	return -1, s
}

// entryOf returns the entry of the n-gram h (n = len(h) ≥ 1) at its level.
func (m *Model) entryOf(h []uint32) (int, bool) {
	if len(h) == 0 || len(h) > m.order || h[0] >= uint32(m.vocab) {
		return 0, false
	}
	e := int(h[0])
	for j := 1; j < len(h); j++ {
		l := &m.lv[j-1]
		lo, hi, c, ok := m.children(l, e)
		if !ok || m.lv[j].ranked {
			return 0, false
		}
		if m.lv[j].ef {
			base, ok := m.groupBase(l, c)
			var g efGroup
			if !ok || !g.open(m.lv[j].efw, base, hi-lo, m.vocab, m.lv[j].efBits) {
				return 0, false
			}
			i, found := g.lower(uint64(h[j]))
			if !found {
				return 0, false
			}
			e = lo + i
		} else if e = m.lv[j].search(lo, hi, h[j]); e < 0 {
			return 0, false
		}
	}
	return e, true
}

// groupNode returns the successor group of entry e of level l as a node.
// key is the entry's n-gram, needed only when the next level holds ranked
// records (to find the suffix group).
func (m *Model) groupNode(l *level, e int, key []uint32) (node, bool) {
	var nd node
	if !m.contextNode(l, e, &nd) {
		return node{}, false
	}
	if !m.lv[l.n].ranked {
		return nd, true
	}
	if len(key) != l.n || l.n < 2 {
		return node{}, false
	}
	se, ok := m.entryOf(key[1:])
	if !ok {
		return node{}, false
	}
	var sfx node
	if !m.contextNode(&m.lv[l.n-2], se, &sfx) {
		return node{}, false
	}
	if !m.rankedGroup(&nd, &sfx) {
		return node{}, false
	}
	return nd, true
}

// levelKeys returns the n-grams of order n (< the ranked order), n IDs
// each, flattened, by walking the successor groups from the unigrams. ok is
// false when the groups do not tile the levels (a damaged section).
func (m *Model) levelKeys(n int) (keys []uint32, ok bool) {
	keys = make([]uint32, m.vocab)
	for i := range keys {
		keys[i] = uint32(i)
	}
	for j := 1; j < n; j++ {
		l, next := &m.lv[j-1], &m.lv[j]
		if next.ranked {
			return nil, false
		}
		nk := make([]uint32, 0, next.size*(j+1))
		for e := range l.size {
			var nd node
			if !m.contextNode(l, e, &nd) {
				continue
			}
			if nd.lo != len(nk)/(j+1) {
				return nil, false
			}
			for p := nd.lo; p < nd.hi; p++ {
				nk = append(append(nk, keys[e*j:(e+1)*j]...), uint32(m.wordAt(&nd, p)))
			}
		}
		if len(nk) != next.size*(j+1) {
			return nil, false
		}
		keys = nk
	}
	return keys, true
}
