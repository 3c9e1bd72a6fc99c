package correct

// The weighted walk along the keys' trie (keysPass, walkKeys; keywalk.go)
// with the trie's own letters-below sets. The bounds of below.go and
// parentbound.go price a prefix by the byte classes on the paths below
// its state: over the whole table those are the letters of every word
// below, while the walk along the trie wants only the words the keys
// kept, whose letters are often far fewer. Priced with the classes on
// the trie's paths (prepareKeySets), a bound still never exceeds the
// cost of a word the trie holds, so the walk finds the same words at the
// same costs in the same order, and prunes more: on the 8-letter
// misspellings of BenchmarkCorrect8 it took about 40 % less time on the
// slowest 16 words, and over all 2,173 development misspellings with the
// engine's cap it entered 10 % fewer states (no word more) and computed
// 6 % fewer rows, with the same candidates (measured, this project;
// BENCHMARKS.md, round 17). The rows and states counted (and so the cap,
// Options.MaxStates) see that smaller walk: a word whose walk the cap
// cut short before could now find more, which none of the development
// words did.

// prepareKeySets fills s.ktSets and s.ktEbp for the keys' trie s.kt,
// whose nodes come after their parents (keyWalk appends a node before
// walking below it): filled from the last node back, each node's sets
// are those of its trie edges and children, as fillSets and
// fillParentSets compute them for the whole table.
func (s *search) prepareKeySets() {
	t, g := s.kt, s.below
	s.ktSets = grow(s.ktSets, len(t.nodes))
	s.ktEbp = grow(s.ktEbp, len(t.edges))
	for i := len(t.nodes) - 1; i >= 0; i-- {
		kn := &t.nodes[i]
		var below, next uint32
		for x := kn.lo; x < kn.hi; x++ {
			e := t.edges[x]
			b := belowBit(g.eb[e.k])
			cb := s.ktSets[e.child].below()
			next |= b
			below |= cb
			s.ktEbp[x] = cb | b
		}
		below |= next
		s.ktSets[i] = belowSets(below) | belowSets(next)<<32
	}
}

// extendKeys is extendBelow for visitKeys, which computes no rule-start
// set: it extends the partial rule matches of depth d by byte c into
// depth d+1, for a child whose state has the given sets (the keys'
// trie's), with pn the parent's partialNext set (nil when it has none),
// lists the rules c completes in s.done, and returns where depth d+1's
// partials start. It gives the partials advance gives with setChild and
// s.pnext set and s.rnext nil, in the same order (the rule-start set only
// skips rules that extend turns down). A rule of more than one intended
// byte that no word below can finish (canStart) is not started, whatever
// its start entries; along the keys' trie, whose sets are narrow, that
// test comes first and skips reading them: about 5 % of the walk along
// the trie for the slowest 16 8-letter misspellings of BenchmarkCorrect8
// (measured, this project; BENCHMARKS.md, round 17).
func (s *search) extendKeys(d int, c byte, sets belowSets, pn *[4]uint64) int {
	lo, hi := s.actStart[d], s.actEnd[d]
	base := len(s.act)
	s.done = s.done[:0]
	if pn != nil && pn[c>>6]&(1<<(c&63)) == 0 {
		hi = lo // no partial match waits for c
	}
	next, below := sets.next(), sets.below()
	s.extendParts(lo, hi, c, next, below)
	m, budget := s.mins[d], s.budget
	row := s.rows[d*s.w : (d+1)*s.w]
	for _, f := range s.first[c] {
		if m+f.cost > budget {
			break // first[c] is sorted by cost
		}
		r := &s.rules[f.rule]
		if r.la > 1 && (r.next1&next == 0 || r.rest2&^below != 0) {
			continue // canStart fails
		}
		// As in extend: the least start entry among the rule's start
		// positions.
		v := inf
		for st := f.starts; st != 0; st &= st - 1 {
			v = min(v, row[bitIndex64(st)])
		}
		if v+f.cost > budget {
			continue
		}
		p := partial{rule: f.rule, k: 1, from: int32(d)}
		if r.la == 1 {
			s.done = append(s.done, p)
		} else {
			p.next = r.alpha[1]
			s.act = append(s.act, p)
		}
	}
	s.actStart[d+1], s.actEnd[d+1] = base, len(s.act)
	return base
}

// visitKeys is visit's loop over the children of state, reached at
// depth d with output sum acc, along the keys' trie (at node s.ktAt[d]):
// the trie node's edges, which are edges of state in the table's order;
// prev, last and parts are the prefix's parent row, last byte and
// partial rule matches. It does what visit's general loop does for those
// edges, in the same order, but prices each child with the trie's sets
// (ktSets, ktEbp) instead of the table's, reads the edge's target and
// output only for the children parentBound keeps, extends the rules with
// extendKeys, and computes no byte set of the children worth trying
// (allowed, with its rule-start set) for the letters, where visit does
// for a state of setMinEdges edges or more in the table: a byte outside
// the alphabet is tried only where allowedDepth holds it, as visit does
// without a set. The set only saves work: a child outside it has its row
// out of budget and no rule under way or starting with its byte, and is
// not kept (rulestart.go), so the words found, their costs and order
// are the same; such a child's row is now computed, or counted when
// parentBound prunes it. Along the trie most states that had a set
// have one or two trie children: on the 8-letter misspellings of
// BenchmarkCorrect8, without the sets the walk along the trie took about
// 17 % less time for the slowest 16 words, and counted 1.1 % more
// children (examined) over the 300 unknown ones (measured, this project;
// BENCHMARKS.md, round 17).
func (s *search) visitKeys(d int, acc uint64, prev []float32, last byte, parts []partial) {
	kn := s.kt.nodes[s.ktAt[d]]
	if kn.hi == kn.lo {
		return
	}
	pn := s.partialNext(&s.pnDepth[d], parts)
	var set [4]uint64
	haveSet := false
	g, w, budget := s.below, s.w, s.budget
	row := s.rows[d*w : (d+1)*w]
	for x := kn.lo; x < kn.hi; x++ {
		e := s.kt.edges[x]
		k := int(e.k)
		c := g.eb[k]
		if haveSet || plainByte[c>>6]&(1<<(c&63)) == 0 {
			// As in visit: a byte outside the alphabet only where the
			// byte set holds it.
			if !haveSet {
				set, haveSet = s.allowedDepth(d), true
			}
			if set[c>>6]&(1<<(c&63)) == 0 {
				continue
			}
		}
		s.path[d] = c
		if !s.noParent && s.parentBound(row, prev, c, last, parts, s.ktEbp[x]) > budget {
			s.examined++ // counted for the cap as when its row was computed (parentbound.go)
			continue
		}
		next := int(g.en[k])
		sets := s.ktSets[e.child]
		base := s.extendKeys(d, c, sets, pn)
		m := s.computeRowDepth(d + 1)
		if (m <= budget || s.actEnd[d+1] > base) &&
			s.childBound(s.rows[(d+1)*w:(d+2)*w], row, m, c, s.act[base:s.actEnd[d+1]], sets) <= budget {
			s.ktAt[d+1] = e.child
			s.visit(d+1, next, acc+uint64(g.eo[k]))
		}
		s.act = s.act[:base]
	}
}
