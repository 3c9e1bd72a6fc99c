package correct

import "math/bits"

// Lexicon is what the corrector needs from the word list: a finite-state
// transducer over lower-case UTF-8 words whose outputs, summed along a
// path and with the final output, give the word's ID. The corrector walks
// it state by state. Implementations must be safe for concurrent reads.
type Lexicon interface {
	// ID returns the ID of an exact word.
	ID(word string) (uint32, bool)
	// AppendWord appends the word with the given ID to dst.
	AppendWord(dst []byte, id uint32) []byte
	// Start returns the start state.
	Start() int
	// Step follows byte b from state; out is the transition's output.
	Step(state int, b byte) (next int, out uint64, ok bool)
	// Final reports whether state ends a word, and its final output.
	Final(state int) (ok bool, out uint64)
	// CanMatch reports whether any word can be reached from state.
	CanMatch(state int) bool
}

// maxTyped is the longest typed word (in bytes) the search will take on;
// longer input gets no candidates.
const maxTyped = 48

// maxExtra bounds how many more intended than typed bytes a search tries.
const maxExtra = 8

// hit is one word found within budget.
type hit struct {
	id   uint32
	cost float32
}

// appRule is a multi-letter rule whose typed side occurs in the word.
type appRule struct {
	src   int32
	alpha string
	la    int
	lb    int
	cost  float32
	ends  uint64 // bit e: β ends at typed position e
	// Copied from chRule: the classes (belowBit) of alpha, and with more
	// than one intended byte those of alpha[1] and of alpha[2:], for
	// prepareBelow and canStart.
	alphaBits, next1, rest2 uint32
}

// ruleHead is what extend reads of a rule before starting it, kept
// together per first intended byte (search.first) so that trying the
// rules of a byte reads one short array: the rule's cost, its index in
// search.rules, and the typed positions it can start after (bit x: its
// typed side starts at x).
type ruleHead struct {
	cost   float32
	rule   int32
	starts uint64
}

// partial is a rule whose intended side has been matched for k bytes,
// starting after the prefix whose row is in slot from of search.rows (the
// depth-first walk keeps depth d's row in slot d; the best-first one keeps
// one slot per queued prefix; slot 0 is the empty prefix in both). next is
// the intended byte it waits for (the rule's alpha[k]), kept here so that
// trying a byte does not look the rule up.
type partial struct {
	rule int32
	k    int32
	from int32
	next byte
}

// search is the scratch of one candidate search; it lives in a sync.Pool.
type search struct {
	ch        *channel
	lex       Lexicon
	t         []byte
	n, w      int
	budget    float32
	maxDepth  int
	rows      []float32
	mins      []float32
	path      []byte
	ins       []float32
	subC      []float32       // subC[c*n+j]: intended c typed as t[j]; 0 when equal (filled per byte c by subRow)
	subDone   [4]uint64       // bit c: subC's row for intended byte c is filled
	pos       [256]uint64     // bit j: t[j] is the byte
	rules     []appRule       // sorted by cost
	ruleSet   []uint64        // while collecting rules: bit r for ch.rules[r] (else zero)
	ruleEnds  []uint64        // while collecting rules: their ends, by index in ch.rules
	ruleMask  [][4]uint64     // ruleMask[i]: first intended bytes of rules[:i+1] (only with below nil)
	startOff  []int32         // startTab[startOff[x]:startOff[x+1]]: typed position x (rulestart.go)
	startTab  []startStep     // first bytes of the rules starting at each typed position, by cost
	startEv   []startEvent    // prepareStarts' first starts of each first byte, by cost
	startPos  []startEvent    // the same by typed position
	startSeen [256]uint64     // prepareStarts' scratch, zero between calls
	startMin  []float32       // startMin[x]: the cheapest rule starting at typed position x (inf if none)
	first     [256][]ruleHead // rules by first intended byte, by cost
	usedFirst []byte
	act       []partial // partial rule matches, stacked by depth
	actStart  []int     // act[actStart[d]:actEnd[d]] belongs to depth d
	actEnd    []int
	done      []partial // rules completed by the row being computed
	hits      []hit
	visited   int
	examined  int  // prefixes examined by this pass: DP rows, and children parentBound pruned
	capRows   bool // limit counts examined prefixes (rows), not entered states
	limit     int  // work (see spent) this search may do (0 = no limit)
	el        EdgeLister
	edges     [][]Edge  // per depth
	rk        *ranker   // if not nil, takes the words found instead of hits
	prepCh    *channel  // channel the typed-word tables were prepared for
	prepBelow bool      // whether they were prepared with the letters-below table
	nodes     []bfNode  // best-first: queued prefixes, by slot
	buckets   [][]int32 // best-first: slots by quantized lower bound
	// rowsDone counts the DP rows computed (for benchmarks; reset by the
	// caller, not by reset).
	rowsDone int
	// below, if not nil, is the copy of the lexicon's automaton the walk
	// follows instead of the lexicon (states are its node indices), with
	// the letters below each state for the tighter lower bound of
	// childBound (see below.go); the fields after it are that bound's
	// typed-word tables.
	below      *belowTable
	subGCh     *channel                 // channel subG and delG were made for
	subG       [256][]hopt              // substitution groups by typed byte (subGroups)
	delG       []hopt                   // deletions by class of the left-out letter
	stepBase   [29]float32              // the part of stepCls alike at every typed position (prepareBelow)
	tbits      uint32                   // byte classes (belowBit) of the typed bytes
	posBit     [29]uint64               // posBit[i]: typed positions of byte class i
	clsPos     classPos                 // posBit by sets of classes (classpos.go)
	ruleMiss   [][]hopt                 // per typed byte, see prepareBelow
	missOpt    []hopt                   // missCost's options of every typed byte, see prepareMissOpts
	missOff    []int32                  // where each typed byte's options start in missOpt (n+1 entries)
	stepCls    [][29]float32            // per typed byte, see prepareBelow
	hsCache    []float32                // leftOver answers, n+1 per slot
	hsKeys     [1 << hsCacheBits]uint32 // below set + 1 of each hsCache slot
	hzero      []float32                // n+1 zeros
	missLow    []float32                // per typed byte, see prepareBelow
	missSel    []float32                // per typed byte, 0 and missLow (see prepareBelow)
	hlow       []float32                // floorBound's scratch, n+1
	pnext      *[4]uint64               // if not nil: the bytes the parent's partials wait for
	childState int                      // node of the child prefix extend works for (see setChild)
	pnDepth    [][4]uint64              // partialNext sets of the depth-first walk, by depth
	// With the letters-below table, allowed also stores the first bytes
	// of the rules that can start within budget and the typed positions
	// they can start at (startSet, rulestart.go) in *rsOut when it is not
	// nil; extend skips starting rules with a byte outside *rnext, and
	// tries a rule's starts only at its positions, when that is not nil.
	rsOut, rnext *startSet
	rsDepth      []startSet // rule-start sets of the depth-first walk, by depth
	rsBest       startSet   // rule-start set of the best-first walk
	pnBest       [4]uint64  // partialNext set of the best-first walk
	// skel, if not nil, restricts the depth-first walk to the words
	// skelFilter keeps (skeleton.go); skf is what it points to when set.
	skel *skelFilter
	skf  skelFilter
	// kt, if not nil, restricts the depth-first walk (which must follow
	// s.below) to the paths of a keyTrie (keywalk.go): at depth d it is
	// at trie node ktAt[d], and visitKeys prices children with the
	// trie's sets (keysets.go). kwt is what it points to when set.
	kt   *keyTrie
	kwt  keyTrie
	ktAt []int32
	// ktSets and ktEbp are the letters-below sets of the keys' trie's
	// nodes and parentBound's sets of its edges (keysets.go).
	ktSets []belowSets
	ktEbp  []uint32
	// noParent turns off the check of parentBound (parentbound.go) before
	// a child's row is computed, for comparison in tests and benchmarks.
	noParent bool
	// scanEdges makes the depth-first walk read every edge in its general
	// loop instead of visitPicked, and walk the keys' trie in that loop
	// with the table's sets instead of visitKeys (keysets.go), for
	// comparison in tests and benchmarks.
	scanEdges bool
}

// plainByte marks the bytes the search tries as intended letters wherever
// the lexicon has them (alphabet); other bytes only where a typed byte, a
// cheap edit or a rule suggests them (see allowed).
var plainByte = func() (m [4]uint64) {
	for _, c := range alphabet {
		m[c>>6] |= 1 << (c & 63)
	}
	return m
}()

// Edge is one transition of the lexicon automaton.
type Edge struct {
	Byte byte
	Next int
	Out  uint64
}

// EdgeLister is implemented by lexicons that can list all transitions of a
// state at once (decoding it once); the search uses it when present instead
// of trying each candidate byte with Step.
type EdgeLister interface {
	AppendEdges(dst []Edge, state int) []Edge
}

// reset prepares a search of typed (already lower-cased) within budget.
// Intended words are followed to depth maxDepth.
func (s *search) reset(ch *channel, lex Lexicon, typed string, budget float32, maxDepth int) {
	s.ch, s.lex, s.budget = ch, lex, budget
	same := s.prepCh == ch && string(s.t) == typed && s.prepBelow == (s.below != nil)
	if !same {
		s.t = s.t[:0]
		s.t = append(s.t, typed...)
	}
	s.n = len(typed)
	s.w = s.n + 1
	s.maxDepth = maxDepth
	need := (s.maxDepth + 1) * s.w
	if cap(s.rows) < need {
		s.rows = make([]float32, need)
	}
	s.rows = s.rows[:need]
	s.mins = grow(s.mins, s.maxDepth+1)
	if cap(s.path) < s.maxDepth+1 {
		s.path = make([]byte, s.maxDepth+1)
	}
	s.path = s.path[:s.maxDepth+1]
	s.hits = s.hits[:0]
	s.skel = nil
	s.kt = nil
	s.visited = 0
	s.examined = 0
	s.limit = 0
	s.el, _ = lex.(EdgeLister)
	for len(s.edges) < s.maxDepth+1 {
		s.edges = append(s.edges, make([]Edge, 0, 8))
	}
	if !same {
		s.prepare(ch)
	}
	s.act = s.act[:0]
	if cap(s.actEnd) < s.maxDepth+1 {
		s.actEnd = make([]int, s.maxDepth+1)
	}
	s.actEnd = s.actEnd[:s.maxDepth+1]
	if cap(s.actStart) < s.maxDepth+1 {
		s.actStart = make([]int, s.maxDepth+1)
	}
	s.actStart = s.actStart[:s.maxDepth+1]
	for len(s.pnDepth) < s.maxDepth+1 {
		s.pnDepth = append(s.pnDepth, [4]uint64{})
	}
	for len(s.rsDepth) < s.maxDepth+1 {
		s.rsDepth = append(s.rsDepth, startSet{})
	}
	s.actStart[0], s.actEnd[0] = 0, 0
	// Row zero: typed bytes before any intended one are extra.
	r := s.rows[:s.w]
	r[0] = 0
	for j := 1; j <= s.n; j++ {
		r[j] = r[j-1] + s.ins[j-1]
	}
	s.mins[0] = 0
}

// prepare fills the tables that depend only on the channel and the typed
// word (s.t), so that the passes of one Correct call compute them once.
func (s *search) prepare(ch *channel) {
	s.prepCh, s.prepBelow = ch, s.below != nil
	s.ins = grow(s.ins, s.n)
	ch.insCosts(s.t, s.ins)
	n := s.n
	// subC's rows are filled when the walk first tries their intended
	// byte (subRow): a walk tries the lexicon's thirty-odd bytes, not 256.
	s.subC = grow(s.subC, n<<8)
	s.subDone = [4]uint64{}
	clear(s.pos[:])
	for j, tj := range s.t {
		s.pos[tj] |= 1 << j
	}
	if ch.lead > 0 && n > 0 {
		s.leadFirst()
	}
	for _, c := range s.usedFirst {
		s.first[c] = s.first[c][:0]
	}
	s.usedFirst = s.usedFirst[:0]
	s.ruleMask = s.ruleMask[:0]
	s.gatherRules(ch)
	s.prepareStarts()
	s.prepareBelow()
}

// gatherRules lists in s.rules the channel's rules whose typed side
// occurs in the typed word, with their end positions, by cost (rules of
// equal cost by index: ch.rules is stored in that order, newChannel), and
// fills the tables of their first intended bytes (s.first, s.ruleMask).
// The rules are found as a set of rule indices, one map look-up per typed
// substring of a typed-side length, so that listing the set lists them in
// the stored order and reads ch.rules at rising addresses. (Adding them
// one by one to a list, searched for duplicates, and insertion-sorting
// it cost about 60 µs per word: rules with short or empty typed sides
// occur in most words; measured, this project.) Cost: the look-ups, plus
// one bit-set word per 64 rules of the channel, plus the rules found.
func (s *search) gatherRules(ch *channel) {
	if len(s.ruleEnds) != len(ch.rules) {
		s.ruleSet = make([]uint64, (len(ch.rules)+63)/64)
		s.ruleEnds = make([]uint64, len(ch.rules))
	}
	// Rules with an empty typed side end at every typed position; those
	// of one typed byte are listed by byte (channel.byByte); longer typed
	// sides are looked up by string.
	for _, r := range ch.byBeta[""] {
		s.ruleSet[r>>6] |= 1 << (r & 63)
		s.ruleEnds[r] |= 2<<s.n - 1
	}
	for e := 1; e <= s.n; e++ {
		for _, r := range ch.byByte[s.t[e-1]] {
			s.ruleSet[r>>6] |= 1 << (r & 63)
			s.ruleEnds[r] |= 1 << e
		}
	}
	for _, lb := range ch.betaLens {
		if lb < 2 {
			continue
		}
		for e := lb; e <= s.n; e++ {
			for _, r := range ch.byBeta[string(s.t[e-lb:e])] {
				s.ruleSet[r>>6] |= 1 << (r & 63)
				s.ruleEnds[r] |= 1 << e
			}
		}
	}
	s.rules = s.rules[:0]
	var rm [4]uint64
	for wi, word := range s.ruleSet {
		for word != 0 {
			r := wi<<6 | bits.TrailingZeros64(word)
			word &= word - 1
			cr := &ch.rules[r]
			ends := s.ruleEnds[r]
			s.ruleEnds[r] = 0
			lb := len(cr.beta)
			c := cr.alpha[0]
			if s.below == nil { // allowed reads ruleMask only without the table
				rm[c>>6] |= 1 << (c & 63)
				s.ruleMask = append(s.ruleMask, rm)
			}
			if len(s.first[c]) == 0 {
				s.usedFirst = append(s.usedFirst, c)
			}
			// Bit x of starts: the typed side starts at x, ending at
			// x+lb.
			s.first[c] = append(s.first[c], ruleHead{cost: cr.cost, rule: int32(len(s.rules)), starts: ends >> lb})
			// The rule is written field by field into its slot: built
			// as a composite literal, it was assembled on the stack by
			// narrow stores and copied by 16-byte loads, which cannot be
			// forwarded from those stores (measured, round 18,
			// BENCHMARKS.md).
			k := len(s.rules)
			if k == cap(s.rules) {
				s.rules = append(s.rules, appRule{})
			}
			s.rules = s.rules[:k+1]
			ar := &s.rules[k]
			ar.src, ar.alpha, ar.la, ar.lb, ar.cost, ar.ends = int32(r), cr.alpha, len(cr.alpha), lb, cr.cost, ends
			ar.alphaBits, ar.next1, ar.rest2 = cr.alphaBits, cr.next1, cr.rest2
		}
		s.ruleSet[wi] = 0
	}
}

// subRow returns subC's row for intended byte c (the cost of typing each
// typed byte when c was meant), filling it on first use for this typed
// word. Cost: O(typed length) the first time, then a bit test.
func (s *search) subRow(c byte) []float32 {
	n := s.n
	q := s.subC[int(c)*n : int(c)*n+n]
	if s.subDone[c>>6]&(1<<(c&63)) != 0 {
		return q
	}
	s.subDone[c>>6] |= 1 << (c & 63)
	ch := s.ch
	for j, tj := range s.t {
		q[j] = ch.sub[tj][c]
	}
	for ps := s.pos[c]; ps != 0; ps &= ps - 1 {
		q[bitIndex64(ps)] = 0
	}
	if ch.lead > 0 && n > 0 {
		// The first-letter surcharge (leadCost) on the spelling
		// explanations of a substitution at the first typed byte;
		// keyboard slips there cost what they cost anywhere.
		if t0 := s.t[0]; c != t0 {
			v := q[0] + ch.lead
			if t0 < 128 && c < 128 {
				v = min(v, ch.slipSub[t0][c])
			}
			q[0] = v
		}
	}
	return q
}

// leadFirst adds the first-letter surcharge (leadCost) to the spelling
// explanations of an extra first typed byte (substitutions there get it in
// subRow); keyboard slips there cost what they cost anywhere.
func (s *search) leadFirst() {
	ch, n, t0 := s.ch, s.n, s.t[0]
	v := s.ins[0] + ch.lead
	if n > 1 {
		if t0 == s.t[1] {
			v = min(v, ch.slipRep)
		}
		v = min(v, ch.insNear[t0][s.t[1]])
	}
	s.ins[0] = v
}

// grow returns b with length n, reallocated when too short (the
// contents are then not kept).
func grow[T any](b []T, n int) []T {
	if cap(b) < n {
		return make([]T, n)
	}
	return b[:n]
}

// run walks the lexicon from its start state and collects every word
// whose channel cost is within budget. Cost: proportional to the number
// of lexicon states whose prefix can still be within budget, times the
// typed length.
func (s *search) run() {
	st := s.lex.Start()
	if !s.lex.CanMatch(st) {
		return
	}
	if s.below != nil {
		st = 0 // the start node
	}
	if s.kt != nil && !s.scanEdges {
		s.prepareKeySets()
	}
	s.visit(0, st, 0)
}

// finalAt reports whether state (a node of s.below when that is not nil)
// ends a word, and its final output.
func (s *search) finalAt(state int) (bool, uint64) {
	if g := s.below; g != nil {
		ok, fo := g.final(state)
		return ok, uint64(fo)
	}
	return s.lex.Final(state)
}

// listEdges lists the edges of state, a prefix with the given row and
// minimum, parent row prev (nil for the empty prefix), last byte and
// partial rule matches. With s.below the edges are the table's lo to hi
// (edges is nil); else the lexicon's, listed into dst (lo, hi = 0,
// len(edges)), or with no EdgeLister those on the bytes of set. When the
// state has setMinEdges edges or more (always, with no EdgeLister), it
// also returns the bytes worth trying (allowed; haveSet is true) and,
// with s.below, the rule-start set, stored in rsOut.
func (s *search) listEdges(dst []Edge, state int, rsOut *startSet, row, prev []float32, m float32, last byte, parts []partial) (edges []Edge, lo, hi int, set [4]uint64, haveSet bool, rs *startSet) {
	if g := s.below; g != nil {
		lo, hi = g.edges(state)
		if hi-lo >= setMinEdges {
			s.rsOut = rsOut
			set = s.allowed(row, prev, m, last, parts)
			s.rsOut = nil
			return nil, lo, hi, set, true, rsOut
		}
		return nil, lo, hi, set, false, nil
	}
	if s.el != nil {
		edges = s.el.AppendEdges(dst[:0], state)
		if len(edges) >= setMinEdges {
			set, haveSet = s.allowed(row, prev, m, last, parts), true
		}
		return edges, 0, len(edges), set, haveSet, nil
	}
	set = s.allowed(row, prev, m, last, parts)
	edges = dst[:0]
	for wi, word := range set {
		for word != 0 {
			c := byte(wi<<6 | bits.TrailingZeros64(word))
			word &= word - 1
			next, out, ok := s.lex.Step(state, c)
			if ok && s.lex.CanMatch(next) {
				edges = append(edges, Edge{Byte: c, Next: next, Out: out})
			}
		}
	}
	return edges, 0, len(edges), set, true, nil
}

// visit explores the lexicon below state, reached at depth d with output
// sum acc.
func (s *search) visit(d int, state int, acc uint64) {
	if s.limit > 0 && s.spent() >= s.limit {
		return // out of time: keep what was found
	}
	s.visited++
	w := s.w
	budget := s.budget
	if c := s.rows[d*w+s.n]; c <= budget && (s.skel == nil || s.skel.accepts(d)) && (s.kt == nil || s.kt.nodes[s.ktAt[d]].accept) {
		if ok, fo := s.finalAt(state); ok {
			if s.rk != nil {
				s.rk.add(uint32(acc+fo), c)
			} else {
				s.hits = append(s.hits, hit{id: uint32(acc + fo), cost: c})
			}
		}
	}
	if d >= s.maxDepth {
		return
	}
	var prev []float32
	var last byte
	if d > 0 {
		prev, last = s.rows[(d-1)*w:d*w], s.path[d-1]
	}
	parts := s.act[s.actStart[d]:s.actEnd[d]]
	if s.kt != nil && !s.scanEdges {
		s.visitKeys(d, acc, prev, last, parts)
		return
	}
	edges, lo, hi, set, haveSet, rs := s.listEdges(s.edges[d], state, &s.rsDepth[d], s.rows[d*w:(d+1)*w], prev, s.mins[d], last, parts)
	s.edges[d] = edges
	pn := s.partialNext(&s.pnDepth[d], parts)
	g := s.below
	var fm [4]uint64 // with skel: the bytes the filter may let through
	if s.skel != nil {
		fm = s.skel.mask(d)
	}
	if s.kt != nil {
		// Only the edges of the key trie's node, which are edges of
		// state in the table's order.
		kn := s.kt.nodes[s.ktAt[d]]
		lo, hi = int(kn.lo), int(kn.hi)
	}
	// With the set of bytes worth trying known, no filter and a state
	// whose edges are all letters, the loop goes straight to the edges of
	// the letters in the set (pickLetters, visitPicked) instead of reading
	// every edge: at the median 8-letter misspelling a third of the edges
	// the narrow pass looked at (about 460 of 1,400) pass the set
	// (measured, this project; BENCHMARKS.md, round 12).
	if haveSet && g != nil && g.ascending && s.skel == nil && s.kt == nil && !s.scanEdges {
		if pick, nx, ok := pickLetters(g.nodes[state].sets.next(), &set); ok {
			s.visitPicked(d, lo, pick, nx, acc, prev, last, parts, pn, rs)
			return
		}
	}
	for x := lo; x < hi; x++ {
		k := x
		if s.kt != nil {
			e := s.kt.edges[x]
			k = int(e.k)
			s.ktAt[d+1] = e.child
		}
		c, next, out := s.edgeAt(edges, k)
		if s.skel != nil && fm[c>>6]&(1<<(c&63)) == 0 {
			continue // no word below is one the filter keeps
		}
		if haveSet || plainByte[c>>6]&(1<<(c&63)) == 0 {
			// A byte outside the alphabet is tried only where the typed
			// word, a cheap edit or a rule suggests it.
			if !haveSet {
				set, haveSet = s.allowedDepth(d), true
			}
			if set[c>>6]&(1<<(c&63)) == 0 {
				continue
			}
		}
		s.path[d] = c
		if s.skel != nil && !s.skel.step(d, c, s.belowOf(next), s.restOf(next)) {
			continue // no word below is one the filter keeps
		}
		if g != nil && !s.noParent && s.parentBound(s.rows[d*w:(d+1)*w], prev, c, last, parts, g.ebp[k]) > budget {
			s.examined++ // counted for the cap as when its row was computed (parentbound.go)
			continue
		}
		s.pnext, s.rnext = pn, rs
		s.setChild(next)
		base := s.advance(d, c)
		s.pnext, s.rnext = nil, nil
		m := s.computeRowDepth(d + 1)
		keep := m <= budget || s.actEnd[d+1] > base
		if keep && g != nil {
			// The tighter bound of below.go, which also prunes children
			// kept only by a rule under way that cannot finish in budget.
			keep = s.childBound(s.rows[(d+1)*w:(d+2)*w], s.rows[d*w:(d+1)*w], m, c, s.act[base:s.actEnd[d+1]], s.childSetsNow()) <= budget
		}
		if keep {
			s.visit(d+1, next, acc+out)
		}
		s.act = s.act[:base]
	}
}

// visitPicked is visit's loop over the children of a state of the
// letters-below table whose edges are all letters, at depth d, reached
// with output sum acc, with no filter: pick holds the classes of the
// letters worth trying, nx those of the state's edges, which start at
// edge lo (pickLetters); prev, last, parts, pn and rs are the prefix's
// parent row, last byte, partial rule matches, partialNext set and
// rule-start set. It does what visit's general loop does for those
// edges, in the same order, with what only that state can need: the
// byte is the letter of the picked class, the set parentBound prices is
// read beside the edge (belowTable.ebp), the edge's target and output
// only for the children it keeps, and the rules are extended by
// extendBelow. Together about 4–5 % less time for the median 8-letter
// misspelling than the general loop (measured, this project;
// BENCHMARKS.md, round 16).
func (s *search) visitPicked(d, lo int, pick, nx uint32, acc uint64, prev []float32, last byte, parts []partial, pn *[4]uint64, rs *startSet) {
	g, w, budget := s.below, s.w, s.budget
	row := s.rows[d*w : (d+1)*w]
	for ; pick != 0; pick &= pick - 1 {
		b := bitIndex(pick)
		k := lo + bits.OnesCount32(nx&(1<<b-1))
		c := 'a' + byte(b)
		s.path[d] = c
		if !s.noParent && s.parentBound(row, prev, c, last, parts, g.ebp[k]) > budget {
			s.examined++ // counted for the cap as when its row was computed (parentbound.go)
			continue
		}
		next := int(g.en[k])
		sets := g.nodes[next].sets
		base := s.extendBelow(d, c, sets, pn, rs)
		m := s.computeRowDepth(d + 1)
		// The child is kept as in visit: within budget or with a rule
		// under way, and within budget by childBound.
		if (m <= budget || s.actEnd[d+1] > base) &&
			s.childBound(s.rows[(d+1)*w:(d+2)*w], row, m, c, s.act[base:s.actEnd[d+1]], sets) <= budget {
			s.visit(d+1, next, acc+uint64(g.eo[k]))
		}
		s.act = s.act[:base]
	}
}

// pickLetters returns the classes (belowBit) of the letters in set that
// label edges of a state whose edges' classes are next, and next itself,
// when all of the state's edges are letters a–z (ok); the state's edges
// then lie in the order of their classes, so that the edge of letter
// class b is the state's edge number OnesCount32(next & (1<<b - 1)).
func pickLetters(next uint32, set *[4]uint64) (pick, nx uint32, ok bool) {
	const letters = 1<<26 - 1
	if next&^letters != 0 {
		return 0, 0, false // an edge on the apostrophe, the hyphen or another byte
	}
	// Bytes 'a' to 'z' are bits 33 to 58 of the set's second word.
	return uint32(set[1]>>('a'-64)) & next, next, true
}

// belowOf returns the letters below state (belowAll without the
// letters-below table).
func (s *search) belowOf(state int) uint32 {
	if s.below == nil {
		return belowAll
	}
	return s.below.nodes[state].sets.below()
}

// edgeAt returns the byte, target state and output of edge k of the
// state listEdges listed: from the automaton copy when the search walks
// one (k indexes its edge arrays), else from the listed edges.
func (s *search) edgeAt(edges []Edge, k int) (c byte, next int, out uint64) {
	if t := s.below; t != nil {
		return t.eb[k], int(t.en[k]), uint64(t.eo[k])
	}
	e := &edges[k]
	return e.Byte, e.Next, e.Out
}

// spent returns the work the cap counts: rows computed (with capRows) or
// states entered.
func (s *search) spent() int {
	if s.capRows {
		return s.examined
	}
	return s.visited
}

// setMinEdges is the number of edges from which a state's edges are
// filtered through allowed before their rows are computed: the set costs
// about as much as a few rows (measured, this project).
const setMinEdges = 4

// allowed returns the set of intended bytes worth trying after depth d:
// every byte whose row can stay within budget by a match, a listed
// substitution or deletion, a transposition or a rule. Alphabet letters
// are listed with all their costs, so for them the set only saves work;
// other bytes are tried only when it holds them.
func (s *search) allowedDepth(d int) [4]uint64 {
	w := s.w
	var prev []float32
	var last byte
	if d > 0 {
		prev, last = s.rows[(d-1)*w:d*w], s.path[d-1]
	}
	return s.allowed(s.rows[d*w:(d+1)*w], prev, s.mins[d], last, s.act[s.actStart[d]:s.actEnd[d]])
}

// allowed is allowedDepth for a prefix with the given row and minimum,
// its parent's row prev and last byte (prev is nil for the empty prefix),
// and its partial rule matches.
func (s *search) allowed(row, prev []float32, m float32, last byte, parts []partial) [4]uint64 {
	var set [4]uint64
	add := func(c byte) { set[c>>6] |= 1 << (c & 63) }
	budget := s.budget
	ch := s.ch
	for j := 0; j < s.n; j++ {
		r := row[j]
		if r > budget {
			continue
		}
		tj := s.t[j]
		add(tj)
		for _, o := range ch.cheapSub[tj] {
			if r+o.cost > budget {
				break
			}
			add(o.c)
		}
	}
	// The deletions that fit: a scan of their costs (by cost), then the
	// union of their bytes (channel.delUpTo) instead of adding them one
	// by one, about 1 % of the median 8-letter misspelling (measured,
	// this project; BENCHMARKS.md, round 16).
	nd := 0
	for _, v := range ch.delCost {
		if m+v > budget {
			break
		}
		nd++
	}
	if nd > 0 {
		u := &ch.delUpTo[nd-1]
		set[0] |= u[0]
		set[1] |= u[1]
		set[2] |= u[2]
		set[3] |= u[3]
	}
	if prev != nil && m+ch.delDbl <= budget {
		add(last)
	}
	if prev != nil && ch.trans < inf {
		// Typed byte x (1 <= x < n) is last: t[x-1] and t[x] swapped.
		for ps := s.pos[last] &^ 1; ps != 0; ps &= ps - 1 {
			x := bitIndex64(ps)
			if prev[x-1]+ch.trans <= budget {
				add(s.t[x-1])
			}
		}
	}
	for _, p := range parts {
		add(p.next)
	}
	if s.below != nil {
		// Each rule only where it can start within budget (rulestart.go).
		var rs startSet
		s.addRuleStarts(row, &rs)
		for i := range set {
			set[i] |= rs.first[i]
		}
		if s.rsOut != nil {
			*s.rsOut = rs
		}
		return set
	}
	// Rules are sorted by cost: the first k within budget contribute their
	// first bytes, accumulated in ruleMask[k-1].
	lo, hi := 0, len(s.rules)
	for lo < hi {
		mid := int(uint(lo+hi) >> 1)
		if m+s.rules[mid].cost > budget {
			hi = mid
		} else {
			lo = mid + 1
		}
	}
	k := lo
	if k > 0 {
		rm := &s.ruleMask[k-1]
		for i := range set {
			set[i] |= rm[i]
		}
	}
	return set
}

// partialNext fills m with the set of bytes the partial rule matches
// parts wait for and returns it, so that extend can skip them for other
// bytes; it returns nil when there are too few for the set to pay.
func (s *search) partialNext(m *[4]uint64, parts []partial) *[4]uint64 {
	if len(parts) < 4 {
		return nil
	}
	*m = [4]uint64{}
	for _, p := range parts {
		m[p.next>>6] |= 1 << (p.next & 63)
	}
	return m
}

// advance extends the partial rule matches of depth d by byte c into
// depth d+1 and lists the rules c completes in s.done. It returns where
// depth d+1's partials start.
func (s *search) advance(d int, c byte) int {
	base := s.extend(s.actStart[d], s.actEnd[d], s.mins[d], int32(d), c)
	s.actStart[d+1], s.actEnd[d+1] = base, len(s.act)
	return base
}

// extend extends the partial rule matches act[lo:hi] of a prefix whose row
// is in slot from and has minimum m by byte c: the continued and newly
// started partials are appended to s.act from the returned index on, and
// the rules c completes are listed in s.done.
func (s *search) extend(lo, hi int, m float32, from int32, c byte) int {
	base := len(s.act)
	s.done = s.done[:0]
	first := s.first[c]
	if lo == hi && len(first) == 0 {
		return base
	}
	if s.pnext != nil && s.pnext[c>>6]&(1<<(c&63)) == 0 {
		hi = lo // no partial match waits for c
	}
	live := ^uint64(0) // typed positions a rule may start at
	if s.rnext != nil {
		if s.rnext.first[c>>6]&(1<<(c&63)) == 0 {
			first = nil // no rule starting with c fits the budget (rulestart.go)
		}
		live = s.rnext.at
	}
	for i := lo; i < hi; i++ {
		p := s.act[i]
		if p.next != c {
			continue
		}
		r := &s.rules[p.rule]
		p.k++
		if int(p.k) == r.la {
			s.done = append(s.done, p)
		} else if s.below == nil || s.canFinish(r.alpha[p.k:]) { // else no word below can use it
			p.next = r.alpha[p.k]
			s.act = append(s.act, p)
		}
	}
	var row []float32
	for _, f := range first {
		if m+f.cost > s.budget {
			break // first[c] is sorted by cost
		}
		if s.below != nil {
			// The rule can only end where its typed side does: it starts
			// from the row entry just before one of those places. (A
			// completion dearer than the budget only changes row entries
			// already above it.)
			if row == nil {
				row = s.rows[int(from)*s.w : (int(from)+1)*s.w]
			}
			// Only the starts where some rule fits: at the others even
			// the cheapest rule starting there does not.
			v := inf
			for st := f.starts & live; st != 0; st &= st - 1 {
				v = min(v, row[bitIndex64(st)])
			}
			if v+f.cost > s.budget {
				continue
			}
		}
		r := &s.rules[f.rule]
		p := partial{rule: f.rule, k: 1, from: from}
		if r.la == 1 {
			s.done = append(s.done, p)
		} else if s.below == nil || s.canStart(r) {
			p.next = r.alpha[1]
			s.act = append(s.act, p)
		}
	}
	return base
}

// extendParts moves the partial rule matches s.act[lo:hi] that wait for
// byte c one byte on, for a child whose state has the letter sets next
// (on its edges) and below: a match c completes goes to s.done, one that
// some word below can still finish (canFinish, from the two sets) is
// appended to s.act, and the others are dropped. extendBelow and
// extendKeys share it.
func (s *search) extendParts(lo, hi int, c byte, next, below uint32) {
	for i := lo; i < hi; i++ {
		p := s.act[i]
		if p.next != c {
			continue
		}
		r := &s.rules[p.rule]
		p.k++
		if int(p.k) == r.la {
			s.done = append(s.done, p)
		} else if rest := r.alpha[p.k:]; belowBit(rest[0])&next != 0 && classBits(rest[1:])&^below == 0 {
			p.next = rest[0]
			s.act = append(s.act, p)
		}
	}
}

// extendBelow is advance for visitPicked: it extends the partial rule
// matches of depth d by byte c into depth d+1, for a child whose state
// has the given sets, with pn the parent's partialNext set (nil when it
// has none) and rs its rule-start set (not nil), and lists the rules c
// completes in s.done. It returns where depth d+1's partials start. It
// gives the same partials, in the same order, as advance with setChild,
// s.pnext and s.rnext set, reading the child's sets once instead of
// through childSetsNow for each rule.
func (s *search) extendBelow(d int, c byte, sets belowSets, pn *[4]uint64, rs *startSet) int {
	lo, hi := s.actStart[d], s.actEnd[d]
	base := len(s.act)
	s.done = s.done[:0]
	if pn != nil && pn[c>>6]&(1<<(c&63)) == 0 {
		hi = lo // no partial match waits for c
	}
	next, below := sets.next(), sets.below()
	s.extendParts(lo, hi, c, next, below)
	if rs.first[c>>6]&(1<<(c&63)) != 0 {
		// Some rule starting with c fits the budget (rulestart.go).
		m, budget, live := s.mins[d], s.budget, rs.at
		row := s.rows[d*s.w : (d+1)*s.w]
		for _, f := range s.first[c] {
			if m+f.cost > budget {
				break // first[c] is sorted by cost
			}
			// As in extend: the least start entry among the positions
			// where some rule fits.
			v := inf
			for st := f.starts & live; st != 0; st &= st - 1 {
				v = min(v, row[bitIndex64(st)])
			}
			if v+f.cost > budget {
				continue
			}
			r := &s.rules[f.rule]
			p := partial{rule: f.rule, k: 1, from: int32(d)}
			if r.la == 1 {
				s.done = append(s.done, p)
			} else if r.next1&next != 0 && r.rest2&^below == 0 { // canStart
				p.next = r.alpha[1]
				s.act = append(s.act, p)
			}
		}
	}
	s.actStart[d+1], s.actEnd[d+1] = base, len(s.act)
	return base
}

// computeRow fills row d from the rows above it, path[:d] and the rules in
// s.done, stores and returns its minimum. Cost: O(typed length), with a
// plain loop when no transposition or rule applies.
func (s *search) computeRowDepth(d int) float32 {
	var pc byte
	if d >= 2 {
		pc = s.path[d-2]
	}
	return s.computeRow(d, d-1, d-2, d, s.path[d-1], pc)
}

// computeRow fills the row in slot rs of a depth-d prefix ending in byte c
// from its parent's row (slot ps, whose last byte is pc) and, for d >= 2,
// its grandparent's row (slot gs), and the rules in s.done; it stores the
// row's minimum in mins[rs] and returns it.
func (s *search) computeRow(rs, ps, gs, d int, c, pc byte) float32 {
	s.rowsDone++
	s.examined++
	w, n, ch := s.w, s.n, s.ch
	P := s.rows[ps*w : (ps+1)*w]
	R := s.rows[rs*w : (rs+1)*w]
	R = R[:len(P)]
	sub := s.subRow(c)
	ins := s.ins[:n]
	dc := ch.del[c]
	if d >= 2 && pc == c {
		dc = min(dc, ch.delDbl)
	}
	if d == 1 && ch.lead > 0 {
		dc = min(ch.slipDel, dc+ch.lead) // del is min(slip, spelling)
	}
	// tm has bit j set where typed bytes j-2, j-1 are c, pc swapped.
	var tm uint64
	if d >= 2 && c != pc {
		tm = (s.pos[c] << 2) & (s.pos[pc] << 1)
	}
	if len(s.done) == 0 && tm == 0 {
		// The plain row (rowplain.go: in assembly on amd64).
		m := rowPlain(R[:len(sub)+1], P[:len(sub)+1], sub, ins[:len(sub)], dc)
		s.mins[rs] = m
		return m
	}
	return s.computeRowEdits(R, P, sub, ins, dc, tm, rs, gs)
}

// computeRowEdits is computeRow for a row with rules completed (s.done)
// or transpositions (tm, from the grandparent's row in slot gs): the
// substitutions and deletions first, as in computeRow's plain loop, then
// each entry a rule or transposition ends at lowered to its term, then
// the typed extras. Each entry is the least of the same terms as when they
// were gathered in a row of their own first, and min gives the same value
// in any order: the terms are never NaN and never a negative zero (costs
// are sums of non-negative prices starting from +0). Without the extra
// row to fill and read, the rows with rules cost less (measured, this
// project; BENCHMARKS.md, round 16).
func (s *search) computeRowEdits(R, P, sub, ins []float32, dc float32, tm uint64, rs, gs int) float32 {
	w, ch := s.w, s.ch
	P, R = P[:len(sub)+1], R[:len(sub)+1]
	R[0] = P[0] + dc
	for j, x := range sub {
		R[j+1] = min(P[j]+x, P[j+1]+dc)
	}
	for _, p := range s.done {
		r := &s.rules[p.rule]
		base := s.rows[int(p.from)*w : (int(p.from)+1)*w]
		for ends := r.ends; ends != 0; ends &= ends - 1 {
			e := bits.TrailingZeros64(ends)
			v := base[e-r.lb] + r.cost
			if p.from == 0 && e == r.lb && (r.lb == 0 || r.alpha[0] != s.t[0]) {
				v += ch.lead
			}
			R[e] = min(R[e], v)
		}
	}
	if tm != 0 {
		T := s.rows[gs*w : (gs+1)*w]
		for ; tm != 0; tm &= tm - 1 {
			j := bits.TrailingZeros64(tm)
			R[j] = min(R[j], T[j-2]+ch.trans)
		}
	}
	v := R[0]
	m := v
	R1 := R[1:]
	for j, x := range ins[:len(R1)] {
		v = min(R1[j], v+x)
		R1[j] = v
		m = min(m, v)
	}
	s.mins[rs] = m
	return m
}

// distance returns the channel cost of typing typed when intended was
// meant, by the same row recurrence the search uses.
func (ch *channel) distance(typed, intended string) float32 {
	var s search
	return s.cost(ch, typed, intended)
}

// cost is channel.distance reusing s, whose typed-word tables are kept
// while typed stays the same.
func (s *search) cost(ch *channel, typed, intended string) float32 {
	s.reset(ch, nil, typed, inf, len(intended))
	for d := 0; d < len(intended); d++ {
		s.path[d] = intended[d]
		s.advance(d, intended[d])
		s.computeRowDepth(d + 1)
	}
	return s.rows[len(intended)*s.w+s.n]
}
