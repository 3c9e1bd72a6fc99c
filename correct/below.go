package correct

import (
	"math/bits"
	"slices"
)

// This file holds the letters-below table and the lower bound the search
// draws from it (an admissible heuristic in the sense of A* search), for
// lexicons that list edges. For each automaton state the table keeps two
// byte sets: the bytes on some path below it, and the bytes of its own
// edges. For a prefix whose row says the typed bytes before j cost row[j]:
//
//   - a typed byte from j on that is on no path below cannot be matched by
//     any word below: it is typed extra, typed for a letter that is below,
//     or part of a rule's typed side whose intended side is below (charged
//     its share, the rule's cost over its typed length, so that the bytes
//     one rule covers never cost more together than the rule);
//   - if t[j] is below but on none of the state's edges, the first step
//     after the prefix is an edit: t[j] typed extra or for an edge letter,
//     an edge letter left out, a transposition with an edge letter, or a
//     rule starting on an edge letter (its share, or all of its cost if its
//     typed side is empty).
//
// The bound is the least over j of row[j] plus those costs, together with
// the same for rules under way and transpositions across the prefix's end
// (childBound). No alignment is charged twice for one edit, so the bound
// never exceeds the cost of a word below: pruning on it and ordering the
// best-first queue by it find exactly the words the row minimum finds
// (TestBelowBoundKeepsWords), with a third of the rows at the median of
// 8-letter words (BenchmarkCorrect8). Rules under way whose rest cannot
// follow (its next byte on no edge, or a byte on no path below) are
// dropped, as are rules that cannot end within budget where their typed
// side ends. The table also holds a copy of the automaton, which the
// search walks instead of the lexicon (belowTable). Pricing the typed
// bytes on no path below takes most of the bound's time, and most
// children it is asked about are pruned: a floor price per typed byte
// (floorBound) settles nearly all of those first, and only the rest are
// priced exactly (leftOver).

// belowBit returns the bit of byte c in a letters-below set: a–z are bits
// 0–25, the apostrophe 26, the hyphen 27 and every other byte shares bit 28.
func belowBit(c byte) uint32 {
	switch {
	case c >= 'a' && c <= 'z':
		return 1 << (c - 'a')
	case c == '\'':
		return 1 << 26
	case c == '-':
		return 1 << 27
	}
	return 1 << 28
}

// belowAll is the set holding every byte.
const belowAll = 1<<29 - 1

// belowTable is a copy of a lexicon's automaton, made once by
// newBelowTable and read-only afterwards so that searches may share it,
// with two byte sets (see belowBit) per state: the bytes on the paths
// below it, and the bytes of its own edges. The search walks the copy
// instead of the lexicon: a state is a node index, its edges lie side by
// side in three arrays and its sets beside its edge offset, so a step
// decodes nothing and looks nothing up (a state listed by the lexicon and
// looked up in a hash table cost about 115 ns a DP row, measured, this
// project). Nodes are numbered breadth-first from the start state (node
// 0), so the shallow states every search walks share a few cache lines.
type belowTable struct {
	nodes []belowNode // by index, and one more whose lo ends the last edges
	eb    []byte      // edge bytes, by node and in the lexicon's order
	en    []uint32    // edge targets (node indices)
	eo    []uint32    // edge outputs, modulo 2³² (word IDs are 32-bit)
	// ebp holds, by edge, the letters below its target together with the
	// class of its own byte: the set parentBound prices the edge's child
	// with, kept beside the edge so that a child the bound prunes is
	// priced without reading its target's node (a cache miss per child
	// that cost about 1 % of the median 8-letter misspelling, measured,
	// this project; BENCHMARKS.md, round 16).
	ebp  []uint32
	rest []restLens // by node: the lengths of the rests below (restlen.go)
	// ascending reports that every state's edges are listed by rising
	// byte, so that the edges of a state whose edges are all letters lie
	// in the order of their classes (pickLetters, search.go).
	ascending bool
}

// belowNode is one state of belowTable: its edges are eb[lo:] up to the
// next node's lo (without finalBit), and fin is its final output when lo
// has finalBit.
type belowNode struct {
	lo   uint32
	fin  uint32
	sets belowSets
}

// finalBit marks, in belowNode.lo, a state that ends a word.
const finalBit = 1 << 31

// belowSets is the entry of belowTable for a state: the bytes below it in
// the low half, the bytes of its edges in the high half.
type belowSets uint64

// below returns the bytes on the paths below the state.
func (b belowSets) below() uint32 { return uint32(b) }

// next returns the bytes of the state's own edges.
func (b belowSets) next() uint32 { return uint32(b >> 32) }

// unknownSets is the answer for states the table does not hold: every
// byte, which only weakens the bound.
const unknownSets = belowSets(belowAll | belowAll<<32)

// tableKey reports whether the letters-below walk (newBelowTable) records
// state's sets: states outside [0, 2³²-1) get unknownSets.
func tableKey(state int) bool {
	return state >= 0 && state < 1<<32-1
}

// edges returns the bounds of node i's edges in eb, en and eo.
func (t *belowTable) edges(i int) (lo, hi int) {
	return int(t.nodes[i].lo &^ finalBit), int(t.nodes[i+1].lo &^ finalBit)
}

// final reports whether node i ends a word, and its final output.
func (t *belowTable) final(i int) (bool, uint32) {
	n := &t.nodes[i]
	return n.lo&finalBit != 0, n.fin
}

// newBelowTable copies the automaton of lex, listing the edges of every
// state reachable from its start with el, and records the byte sets of
// each. It returns nil for an automaton too large to copy (2³¹ edges or
// states), and for a lexicon whose listings change between its two walks.
// It walks the automaton twice, breadth-first: the first walk numbers the
// states and counts the edges, so that the second fills arrays allocated
// once at their final size (growing them as one walk went made the build
// allocate about six times the table, 13.9 MB for the default model's
// 2.4 MB table, and raised the peak RSS of a one-shot correction by about
// 6 MB, measured, this project; BENCHMARKS.md). Cost: two edge listings
// and one Final per state; 24 bytes of table per state (8 of them the
// rest lengths and skeleton look-ahead, restlen.go) and 13 per edge (4 of them the set
// parentBound prices the edge's child with, ebp);
// while building, 4 bytes per state (8 when a state does not fit 32 bits,
// which costs a third walk) and a hash table of 4 bytes a slot, at most
// half full (for the 74k-word SUBTLEX-US lexicon, 34,656 states and
// 76,264 edges: a 1.24 MB table, 0.31 MB of ebp and 0.28 MB of rest
// lengths; before the rest lengths, 0.75 MB more while building and
// 2.9 MB allocated in all).
func newBelowTable(lex Lexicon, el EdgeLister) *belowTable {
	// The states of a lexicon are mostly offsets that fit 32 bits: a
	// list of those takes half the memory.
	if t, fits := buildBelow[uint32](lex, el); fits {
		return t
	}
	t, _ := buildBelow[int](lex, el)
	return t
}

// lexState is a type newBelowTable lists lexicon states as while it
// builds.
type lexState interface{ ~int | ~uint32 }

// buildBelow is newBelowTable with the walk's states listed as S. It
// reports false, with no table, when a state does not fit S.
func buildBelow[S lexState](lex Lexicon, el EdgeLister) (*belowTable, bool) {
	var index stateIndex[S]
	start := lex.Start()
	if int(S(start)) != start {
		return nil, false
	}
	states := []S{S(start)}
	index.put(states, 0)
	var buf []Edge
	edges := 0
	for i := 0; i < len(states); i++ {
		buf = el.AppendEdges(buf[:0], int(states[i]))
		edges += len(buf)
		if edges >= finalBit {
			return nil, true
		}
		for _, e := range buf {
			st := S(e.Next)
			if int(st) != e.Next {
				return nil, false
			}
			if _, seen := index.get(states, st); !seen {
				if len(states) >= finalBit-1 {
					return nil, true
				}
				states = append(doubled(states), st)
				index.put(states, uint32(len(states)-1))
			}
		}
	}
	t := &belowTable{
		nodes: make([]belowNode, len(states)+1),
		eb:    make([]byte, edges),
		en:    make([]uint32, edges),
		eo:    make([]uint32, edges),
	}
	k := 0
	t.ascending = true
	for i, st := range states {
		nd := &t.nodes[i]
		nd.lo = uint32(k)
		lo := k
		if ok, fo := lex.Final(int(st)); ok {
			nd.lo |= finalBit
			nd.fin = uint32(fo)
		}
		nd.sets = unknownSets
		buf = el.AppendEdges(buf[:0], int(st))
		if k+len(buf) > edges {
			return nil, true // the lexicon listed more edges than the first walk
		}
		for _, e := range buf {
			n, seen := index.get(states, S(e.Next))
			if !seen || int(S(e.Next)) != e.Next {
				return nil, true // the lexicon listed a state the first walk did not
			}
			if k > lo && t.eb[k-1] >= e.Byte {
				t.ascending = false
			}
			t.eb[k], t.en[k], t.eo[k] = e.Byte, n, uint32(e.Out)
			k++
		}
	}
	if k != edges {
		return nil, true // the lexicon listed fewer edges than the first walk
	}
	t.nodes[len(states)].lo = uint32(edges)
	fillSets(t, states)
	fillParentSets(t)
	fillRest(t)
	return t, true
}

// doubled returns s with room for one more element, doubling its
// capacity when full: append alone grows a large slice by a quarter at a
// time, which allocates about five times the final size over the growth
// instead of about twice (measured, this project).
func doubled[T any](s []T) []T {
	if len(s) == cap(s) {
		s = slices.Grow(s, max(len(s), 256))
	}
	return s
}

// stateIndex maps lexicon states to node indices while newBelowTable
// builds: an open-addressing hash table, kept at most half full, whose
// slots hold node+1 (0 for an empty slot) and find their state in the
// walk's list of states, so that a slot takes 4 bytes (a Go map made the
// build twice as slow, measured, this project).
type stateIndex[S lexState] struct {
	slots []uint32
	n     int
}

// stateHash returns the hash of a lexicon state for stateIndex.
func stateHash[S lexState](state S) int {
	return int((uint64(state) * 0x9e3779b97f4a7c15) >> 32)
}

// get returns the node of state and whether it has one; states lists the
// states by node.
func (x *stateIndex[S]) get(states []S, state S) (uint32, bool) {
	if len(x.slots) == 0 {
		return 0, false
	}
	mask := len(x.slots) - 1
	for i := stateHash(state) & mask; ; i = (i + 1) & mask {
		v := x.slots[i]
		if v == 0 {
			return 0, false
		}
		if states[v-1] == state {
			return v - 1, true
		}
	}
}

// put records node, whose state is states[node] and has no node yet.
func (x *stateIndex[S]) put(states []S, node uint32) {
	if 2*(x.n+1) > len(x.slots) {
		old := x.slots
		x.slots, x.n = make([]uint32, max(2*len(old), 1024)), 0
		for _, v := range old {
			if v != 0 {
				x.put(states, v-1)
			}
		}
	}
	mask := len(x.slots) - 1
	i := stateHash(states[node]) & mask
	for x.slots[i] != 0 {
		i = (i + 1) & mask
	}
	x.slots[i] = node + 1
	x.n++
}

// fillSets computes the sets of the nodes the walk reaches from the start
// (node 0), depth-first, each state once (the lexicon is a DAG; shared
// suffix states are walked once). Below depth 4×maxTyped, deeper than any
// search goes, and for states outside the range of tableKey, it records no
// bound (every byte).
func fillSets[S lexState](t *belowTable, states []S) {
	done := make([]bool, len(states))
	var walk func(i, depth int) uint32
	walk = func(i, depth int) uint32 {
		if !tableKey(int(states[i])) {
			return belowAll
		}
		if done[i] {
			return t.nodes[i].sets.below()
		}
		var below, next uint32
		lo, hi := t.edges(i)
		for k := lo; k < hi; k++ {
			next |= belowBit(t.eb[k])
			if depth < 4*maxTyped {
				below |= walk(int(t.en[k]), depth+1)
			} else {
				below = belowAll // deeper than any search goes: no bound
			}
		}
		below |= next
		t.nodes[i].sets = belowSets(below) | belowSets(next)<<32
		done[i] = true
		return below
	}
	walk(0, 0)
}

// fillParentSets fills t.ebp from the edges and the nodes' sets.
func fillParentSets(t *belowTable) {
	t.ebp = make([]uint32, len(t.eb))
	for k, b := range t.eb {
		t.ebp[k] = t.nodes[t.en[k]].sets.below() | belowBit(b)
	}
}

// hopt is one way of paying for a typed byte in the letters-below bound,
// with what it needs of a state. Substitution and deletion groups need one
// of the classes in any (below the state, or on its edges); rules need
// all of needNext on the state's edges and all of needBelow below it.
type hopt struct {
	cost      float32
	any       uint32
	needNext  uint32
	needBelow uint32
}

// classBits returns the classes (belowBit) of the bytes of s.
func classBits(s string) uint32 {
	var m uint32
	for i := 0; i < len(s); i++ {
		m |= belowBit(s[i])
	}
	return m
}

// groupByCost turns per-class costs into options sorted by cost, the
// classes of equal cost in one option.
func groupByCost(dst []hopt, byClass *[29]float32) []hopt {
	dst = dst[:0]
	for i, v := range byClass {
		if v >= inf {
			continue
		}
		k := 0
		for k < len(dst) && dst[k].cost != v {
			k++
		}
		if k == len(dst) {
			dst = append(dst, hopt{cost: v})
		}
		dst[k].any |= 1 << i
	}
	sortByCost(dst)
	return dst
}

// sortByCost sorts g by cost, stably; an insertion sort, fast on the
// short or nearly sorted lists it is given.
func sortByCost(g []hopt) {
	for i := 1; i < len(g); i++ {
		for j := i; j > 0 && g[j].cost < g[j-1].cost; j-- {
			g[j], g[j-1] = g[j-1], g[j]
		}
	}
}

// subGroups returns the substitutions of typed byte t by an intended
// byte, grouped by cost (see groupByCost); it caches them per channel.
func (s *search) subGroups(t byte) []hopt {
	if g := s.subG[t]; g != nil {
		return g
	}
	var byClass [29]float32
	for i := range byClass {
		byClass[i] = inf
	}
	for c := 0; c < 256; c++ {
		if c != int(t) {
			i := bitIndex(belowBit(byte(c)))
			byClass[i] = min(byClass[i], s.ch.sub[t][c])
		}
	}
	s.subG[t] = groupByCost(make([]hopt, 0, 8), &byClass)
	return s.subG[t]
}

// prepareBelow fills the typed-word tables of the letters-below bound:
// the typed positions of each byte class; for each typed position, the
// rules whose typed side covers it (ruleMiss, by share), merged with its
// substitution groups for missCost (missOpt, prepareMissOpts); and for
// each typed position and byte class, the cheapest first step that
// needs an edge letter of that class, for stepCost (stepCls: a
// substitution, a left-out letter, or a rule starting with it whose typed
// side starts there or is empty). A rule of cost c with a typed side of l
// bytes is charged c/l per byte, so that the shares of the bytes one rule
// covers never add up to more than the rule. Cost: O(typed length × (29 +
// rules)); substitution and deletion groups, and the first-step prices
// alike at every typed position (stepBase), are cached per channel.
func (s *search) prepareBelow() {
	ch, n := s.ch, s.n
	if s.subGCh != ch {
		s.subGCh = ch
		clear(s.subG[:])
		var byClass [29]float32
		for i := range byClass {
			byClass[i] = inf
		}
		for c, v := range ch.del {
			i := bitIndex(belowBit(byte(c)))
			byClass[i] = min(byClass[i], v, ch.slipDel)
		}
		s.delG = groupByCost(s.delG, &byClass)
		// stepBase: the first steps that cost the same at every typed
		// position, per class of the edge letter they need: a deletion,
		// or a rule with an empty typed side starting with it.
		for i := range s.stepBase {
			s.stepBase[i] = inf
		}
		for _, g := range s.delG {
			for a := g.any; a != 0; a &= a - 1 {
				b := bitIndex(a)
				s.stepBase[b] = min(s.stepBase[b], g.cost)
			}
		}
		for _, r := range ch.byBeta[""] {
			b := bitIndex(belowBit(ch.rules[r].alpha[0]))
			s.stepBase[b] = min(s.stepBase[b], ch.rules[r].cost)
		}
	}
	s.tbits = 0
	clear(s.posBit[:])
	for len(s.ruleMiss) < n {
		s.ruleMiss = append(s.ruleMiss, nil)
	}
	for k, tk := range s.t {
		b := belowBit(tk)
		s.tbits |= b
		s.posBit[bitIndex(b)] |= 1 << k
		s.subGroups(tk)
		s.ruleMiss[k] = s.ruleMiss[k][:0]
	}
	s.clsPos.fill(&s.posBit)
	// stepCls[k][b]: the cheapest first step at k that needs an edge
	// letter of class b: a substitution, a deletion, or a rule starting
	// with it. Each position starts from stepBase (min picks one of its
	// operands, so taking those terms first leaves every entry as it
	// was). The entries are lowered in place: lowered in a copy on the
	// stack and then appended, the append's 16-byte loads of the copy
	// waited for the single-float stores before them (a load spanning
	// narrower stores is not forwarded from the store buffer; round 18,
	// BENCHMARKS.md).
	s.stepCls = grow(s.stepCls, n)
	for k := 0; k < n; k++ {
		cls := &s.stepCls[k]
		*cls = s.stepBase
		for _, g := range s.subG[s.t[k]] {
			for a := g.any; a != 0; a &= a - 1 {
				b := bitIndex(a)
				cls[b] = min(cls[b], g.cost)
			}
		}
	}
	for i := range s.rules {
		r := &s.rules[i]
		o := hopt{cost: r.cost, needNext: belowBit(r.alpha[0]), needBelow: r.alphaBits}
		b := bitIndex(o.needNext)
		if r.lb == 0 {
			continue // in stepBase
		}
		o.cost = r.cost / float32(r.lb)
		// ruleMiss is read only for a typed byte that is not below the
		// state at all: a rule that needs it there cannot apply.
		for ends := r.ends; ends != 0; ends &= ends - 1 {
			e := bitIndex64(ends)
			k := e - r.lb
			s.stepCls[k][b] = min(s.stepCls[k][b], o.cost)
			for ; k < e; k++ {
				if o.needBelow&belowBit(s.t[k]) == 0 {
					s.ruleMiss[k] = append(s.ruleMiss[k], hopt{cost: o.cost, needBelow: o.needBelow})
				}
			}
		}
	}
	// Shares do not follow the rules' cost order: sort (the lists are
	// nearly sorted already).
	for k := 0; k < n; k++ {
		sortByCost(s.ruleMiss[k])
	}
	s.prepareMissOpts()
	// missLow[k]: the least missCost can give typed byte k, whatever is
	// below (for floorBound).
	s.missLow = grow(s.missLow, n)
	for k := 0; k < n; k++ {
		v := s.ins[k]
		if g := s.subG[s.t[k]]; len(g) > 0 {
			v = min(v, g[0].cost)
		}
		if g := s.ruleMiss[k]; len(g) > 0 {
			v = min(v, g[0].cost)
		}
		s.missLow[k] = v
	}
	// missSel: missLow with a zero before each entry, so that the floor
	// sums (floorBound, parentBound) add missSel[2k + bit k of missPos]
	// instead of testing the bit: adding zero leaves the sum as it was,
	// and the test, whose outcome follows the child's letters, was
	// mispredicted often enough to cost about 7 % of the median word
	// (measured, this project; BENCHMARKS.md, round 13).
	s.missSel = grow(s.missSel, 2*n)
	for k := 0; k < n; k++ {
		s.missSel[2*k], s.missSel[2*k+1] = 0, s.missLow[k]
	}
	s.hlow = grow(s.hlow, n+1)
	s.hsCache = grow(s.hsCache, (n+1)<<hsCacheBits)
	clear(s.hsKeys[:])
	s.hzero = grow(s.hzero, n+1)
	clear(s.hzero)
}

// missCost returns the least that typed byte k costs when no intended
// letter below the state matches it: typed extra, typed for a letter that
// is below, or its share of a rule whose intended side is below. It reads
// the typed byte's options merged by cost (prepareMissOpts): one loop and
// one test per option instead of a loop over the substitutions and then
// one over the rule shares, about 1.5 % of the median word (measured,
// this project; BENCHMARKS.md, round 15).
func (s *search) missCost(k int, below uint32) float32 {
	q := below | missRule
	for _, o := range s.missOpt[s.missOff[k]:s.missOff[k+1]] {
		if o.any&q != 0 && o.needBelow&^below == 0 {
			return o.cost
		}
	}
	return s.ins[k]
}

// missRule is the bit of hopt.any that marks a rule's share among
// missCost's options (missOpt); no class (belowBit) uses it.
const missRule = 1 << 31

// prepareMissOpts merges, for each typed byte k, its substitution groups
// (subG, usable when a class of the group is below) and its rule shares
// (ruleMiss, usable when the rule's intended classes are all below) into
// one list by cost, cut where the typed-extra price ins[k] is reached, so
// that missCost reads one list with one test per option: a share has
// any = missRule, which missCost adds to the letters below, and a group
// needBelow = 0. The first option usable in the merged list is the
// cheaper of the first usable in either list, as before.
func (s *search) prepareMissOpts() {
	n := s.n
	s.missOff = grow(s.missOff, n+1)
	s.missOpt = s.missOpt[:0]
	for k := 0; k < n; k++ {
		s.missOff[k] = int32(len(s.missOpt))
		a, b, lim := s.subG[s.t[k]], s.ruleMiss[k], s.ins[k]
		for len(a) > 0 || len(b) > 0 {
			var o hopt
			if len(a) > 0 && (len(b) == 0 || a[0].cost <= b[0].cost) {
				o = hopt{cost: a[0].cost, any: a[0].any}
				a = a[1:]
			} else {
				o = hopt{cost: b[0].cost, any: missRule, needBelow: b[0].needBelow}
				b = b[1:]
			}
			if o.cost >= lim {
				break // the rest cost as much or more: ins[k] is the answer
			}
			s.missOpt = append(s.missOpt, o)
		}
	}
	s.missOff[n] = int32(len(s.missOpt))
}

// stepCost returns the least that the first step of aligning the typed
// bytes from k on costs when no edge of the state matches t[k] (a letter
// below does): t[k] typed extra or for an edge letter, an edge letter left
// out (doubled or not; cbit is the class of the prefix's last byte), a
// transposition, or a rule whose intended side starts with an edge letter
// and whose typed side starts at k (its share) or is empty (its cost).
func (s *search) stepCost(k int, next, cbit uint32) float32 {
	v := s.ins[k]
	if s.ch.delDbl < v && cbit&next != 0 {
		v = s.ch.delDbl
	}
	if k+1 < s.n && s.ch.trans < v && belowBit(s.t[k+1])&next != 0 {
		v = s.ch.trans
	}
	cls := &s.stepCls[k]
	for ; next != 0; next &= next - 1 {
		v = min(v, cls[bitIndex(next)])
	}
	return v
}

// childBound returns a lower bound on the channel cost of any word below
// a child prefix, given its row (minimum m), its parent's row prev, its
// last byte c, its partial rule matches parts and the byte sets of its
// state: the cheapest of its row entries plus the cost of the typed bytes
// left over that no letter below can match and, where the next typed byte
// is not on one of the state's edges, the cheapest first step; a rule
// under way, completed from the row it started at; and a transposition of
// c with the next intended byte, from the parent's row; the last two plus
// the cost of the unmatched bytes after them. When the bound is above the
// budget, childBound may return any value above the budget instead (the
// callers then only prune).
func (s *search) childBound(row, prev []float32, m float32, c byte, parts []partial, sets belowSets) float32 {
	w, n := s.w, s.n
	next, below := sets.next(), sets.below()
	notNext := s.tbits &^ next
	if notNext == 0 {
		// Every typed byte is on an edge: the row minimum, rules under
		// way and transpositions, with nothing left over to charge.
		lb := m
		for _, p := range parts {
			r := &s.rules[p.rule]
			base := s.rows[int(p.from)*w : (int(p.from)+1)*w]
			for ends := r.ends; ends != 0; ends &= ends - 1 {
				e := bitIndex64(ends)
				lb = min(lb, base[e-r.lb]+r.cost)
			}
		}
		if prev != nil && s.ch.trans < inf {
			for ps := s.pos[c] &^ 1; ps != 0; ps &= ps - 1 {
				x := bitIndex64(ps)
				lb = min(lb, prev[x-1]+s.ch.trans)
			}
		}
		return lb
	}
	missPos, stepPos := s.clsPos.of(s.tbits&^below), s.clsPos.of(notNext)
	stepPos &^= missPos
	var cbit uint32
	if s.ch.delDbl < inf {
		cbit = belowBit(c)
	}
	hs := s.hzero
	if missPos != 0 {
		// Most children that reach here are pruned, and the floor prices
		// of the bytes left over (missLow) nearly always show it without
		// leftOver's exact prices (96 % of them for the 8-letter words at
		// or below the median, measured, this project).
		if lo := s.floorBound(row, prev, c, parts, missPos, stepPos, next, cbit); lo > s.budget {
			return lo
		}
		hs = s.leftOver(missPos, below)
	}
	lb := row[n]
	lb = s.partsBound(lb, prev, c, parts, hs)
	for j := 0; j < n; j++ {
		v := row[j] + hs[j]
		if v >= lb {
			continue
		}
		if stepPos&(1<<j) != 0 {
			v += s.stepCost(j, next, cbit)
		}
		lb = min(lb, v)
	}
	return lb
}

// partsBound lowers lb to the cheapest way below that ends a rule under
// way (parts) or transposes c with the next typed byte, with h[j] the
// price of the typed bytes from position j on left to pay.
func (s *search) partsBound(lb float32, prev []float32, c byte, parts []partial, h []float32) float32 {
	w := s.w
	for _, p := range parts {
		r := &s.rules[p.rule]
		base := s.rows[int(p.from)*w : (int(p.from)+1)*w]
		for ends := r.ends; ends != 0; ends &= ends - 1 {
			e := bitIndex64(ends)
			lb = min(lb, base[e-r.lb]+r.cost+h[e])
		}
	}
	if prev != nil && s.ch.trans < inf {
		for ps := s.pos[c] &^ 1; ps != 0; ps &= ps - 1 {
			x := bitIndex64(ps)
			lb = min(lb, prev[x-1]+s.ch.trans+h[x+1])
		}
	}
	return lb
}

// floorBound is childBound's bound with each typed byte left over (in
// missPos) priced at its floor, missLow, instead of by missCost: a lower
// bound on childBound's value, computed without looking at the state's
// letters below. It returns the first term it finds within budget, or,
// when there is none, a value above budget (then so is childBound's
// bound).
func (s *search) floorBound(row, prev []float32, c byte, parts []partial, missPos, stepPos uint64, next, cbit uint32) float32 {
	n, budget := s.n, s.budget
	fl := s.hlow[:n+1]
	h := float32(0)
	fl[n] = 0
	sel := s.missSel[:2*n]
	for j := n - 1; j >= 0; j-- {
		h += sel[2*j|int(missPos>>j&1)] // missLow[j], or 0 off missPos
		fl[j] = h
	}
	lb := row[n]
	if lb <= budget {
		return lb
	}
	lb = s.partsBound(lb, prev, c, parts, fl)
	if lb <= budget {
		return lb
	}
	for j := 0; j < n; j++ {
		v := row[j] + fl[j]
		if v > budget {
			continue
		}
		if stepPos&(1<<j) != 0 {
			v += s.stepCost(j, next, cbit)
		}
		if v <= budget {
			return v
		}
	}
	return lb
}

// leftOver returns hs, hs[j] being the least cost of the typed bytes from
// j on that are not below a state whose below set is below (missPos marks
// them). States with the same below set share the answer through a small
// cache, reset for each typed word.
func (s *search) leftOver(missPos uint64, below uint32) []float32 {
	n := s.n
	slot := int((below * 0x9e3779b1) >> (32 - hsCacheBits))
	hs := s.hsCache[slot*(n+1) : (slot+1)*(n+1)]
	if s.hsKeys[slot] == below+1 {
		return hs
	}
	s.hsKeys[slot] = below + 1
	// The prices of the typed bytes in missPos first, visiting only them,
	// then the sums from the end with no test per byte: a byte off
	// missPos adds zero, which leaves the sum bit for bit as it was (as
	// in the floor sums, missSel). A test of missPos per byte, whose
	// outcome follows the state's letters, cost about 0.5 % more of the
	// median word (measured, this project; BENCHMARKS.md, round 15).
	clear(hs)
	for m := missPos & (1<<n - 1); m != 0; m &= m - 1 {
		j := bitIndex64(m)
		hs[j] = s.missCost(j, below)
	}
	h := float32(0)
	for j := n - 1; j >= 0; j-- {
		h += hs[j]
		hs[j] = h
	}
	return hs
}

// hsCacheBits is the log2 of the number of slots of search.hsCache.
const hsCacheBits = 8

// canFinish reports whether the rest of a rule's intended side can
// follow the child prefix named by setChild: its first
// byte on one of the state's edges and all of it below the state.
func (s *search) canFinish(rest string) bool {
	sets := s.childSetsNow()
	if belowBit(rest[0])&sets.next() == 0 {
		return false
	}
	return classBits(rest[1:])&^sets.below() == 0
}

// canStart is canFinish(r.alpha[1:]) for a rule r of more than one
// intended byte that the child prefix starts, from the classes prepare
// stored with r.
func (s *search) canStart(r *appRule) bool {
	sets := s.childSetsNow()
	return r.next1&sets.next() != 0 && r.rest2&^sets.below() == 0
}

// setChild names the state of the child prefix that extend and
// childSetsNow work for.
func (s *search) setChild(state int) {
	s.childState = state
}

// childSetsNow returns the sets of the state (a node of s.below, which
// must not be nil) named by setChild.
func (s *search) childSetsNow() belowSets {
	return s.below.nodes[s.childState].sets
}

// bitIndex returns the index of the lowest set bit of x (x != 0).
func bitIndex(x uint32) int { return bits.TrailingZeros32(x) }

// bitIndex64 returns the index of the lowest set bit of x (x != 0).
func bitIndex64(x uint64) int { return bits.TrailingZeros64(x) }
