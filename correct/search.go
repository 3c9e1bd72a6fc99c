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
}

// partial is a rule whose intended side has been matched for k bytes,
// starting at depth from.
type partial struct {
	rule int32
	k    int32
	from int32
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
	extra     []float32
	path      []byte
	ins       []float32
	subQ      []float32 // subQ[j<<8|c]: intended c typed as t[j]; 0 when equal
	rules     []appRule // sorted by cost
	first     [256][]int32
	usedFirst []byte
	act       []partial // partial rule matches, stacked by depth
	actStart  []int     // act[actStart[d]:actEnd[d]] belongs to depth d
	actEnd    []int
	done      []partial // rules completed by the row being computed
	hits      []hit
	visited   int
	limit     int // states this search may visit (0 = no limit)
	el        EdgeLister
	edges     [][]Edge // per depth
}

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
	s.t = s.t[:0]
	s.t = append(s.t, typed...)
	s.n = len(typed)
	s.w = s.n + 1
	s.maxDepth = maxDepth
	need := (s.maxDepth + 1) * s.w
	if cap(s.rows) < need {
		s.rows = make([]float32, need)
	}
	s.rows = s.rows[:need]
	s.mins = grow(s.mins, s.maxDepth+1)
	s.extra = grow(s.extra, s.w)
	s.ins = grow(s.ins, s.n)
	if cap(s.path) < s.maxDepth+1 {
		s.path = make([]byte, s.maxDepth+1)
	}
	s.path = s.path[:s.maxDepth+1]
	s.hits = s.hits[:0]
	s.visited = 0
	s.limit = 0
	s.el, _ = lex.(EdgeLister)
	for len(s.edges) < s.maxDepth+1 {
		s.edges = append(s.edges, make([]Edge, 0, 8))
	}
	ch.insCosts(s.t, s.ins)
	s.subQ = grow(s.subQ, s.n<<8)
	for j, tj := range s.t {
		q := s.subQ[j<<8 : (j+1)<<8]
		copy(q, ch.sub[tj][:])
		q[tj] = 0
	}
	// Rules whose typed side occurs in the word, with their end positions.
	for _, c := range s.usedFirst {
		s.first[c] = s.first[c][:0]
	}
	s.usedFirst = s.usedFirst[:0]
	s.rules = s.rules[:0]
	for _, lb := range ch.betaLens {
		for e := lb; e <= s.n; e++ {
			for _, ri := range ch.byBeta[string(s.t[e-lb:e])] {
				s.addRule(ri, e)
			}
		}
	}
	sortRules(s.rules)
	for i := range s.rules {
		c := s.rules[i].alpha[0]
		if len(s.first[c]) == 0 {
			s.usedFirst = append(s.usedFirst, c)
		}
		s.first[c] = append(s.first[c], int32(i))
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
	s.actStart[0], s.actEnd[0] = 0, 0
	// Row zero: typed bytes before any intended one are extra.
	r := s.rows[:s.w]
	r[0] = 0
	for j := 1; j <= s.n; j++ {
		r[j] = r[j-1] + s.ins[j-1]
	}
	s.mins[0] = 0
}

func grow(b []float32, n int) []float32 {
	if cap(b) < n {
		return make([]float32, n)
	}
	return b[:n]
}

// addRule records that rule ri's typed side ends at e.
func (s *search) addRule(ri int32, e int) {
	r := &s.ch.rules[ri]
	for i := range s.rules {
		if s.rules[i].src == ri {
			s.rules[i].ends |= 1 << e
			return
		}
	}
	s.rules = append(s.rules, appRule{src: ri, alpha: r.alpha, la: len(r.alpha), lb: len(r.beta), cost: r.cost, ends: 1 << e})
}

// sortRules orders rules by cost (insertion sort: the lists are short and
// this allocates nothing).
func sortRules(r []appRule) {
	for i := 1; i < len(r); i++ {
		for j := i; j > 0 && r[j].cost < r[j-1].cost; j-- {
			r[j], r[j-1] = r[j-1], r[j]
		}
	}
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
	s.visit(0, st, 0)
}

func (s *search) visit(d int, state int, acc uint64) {
	if s.limit > 0 && s.visited >= s.limit {
		return // out of time: keep what was found
	}
	s.visited++
	w := s.w
	row := s.rows[d*w : (d+1)*w]
	if ok, fo := s.lex.Final(state); ok && row[s.n] <= s.budget {
		s.hits = append(s.hits, hit{id: uint32(acc + fo), cost: row[s.n]})
	}
	if d >= s.maxDepth {
		return
	}
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
	m := s.mins[d]
	for _, o := range ch.cheapDel {
		if m+o.cost > budget {
			break
		}
		add(o.c)
	}
	if d > 0 && m+ch.delDbl <= budget {
		add(s.path[d-1])
	}
	if d > 0 && ch.trans < inf {
		prev := s.rows[(d-1)*w : d*w]
		for j := 2; j <= s.n; j++ {
			if s.path[d-1] == s.t[j-1] && prev[j-2]+ch.trans <= budget {
				add(s.t[j-2])
			}
		}
	}
	for _, p := range s.act[s.actStart[d]:s.actEnd[d]] {
		add(s.rules[p.rule].alpha[p.k])
	}
	for i := range s.rules {
		if m+s.rules[i].cost > budget {
			break
		}
		add(s.rules[i].alpha[0])
	}
	if s.el != nil {
		edges := s.el.AppendEdges(s.edges[d][:0], state)
		s.edges[d] = edges
		for _, e := range edges {
			c := e.Byte
			if set[c>>6]&(1<<(c&63)) == 0 {
				continue
			}
			s.path[d] = c
			base := s.advance(d, c)
			if s.computeRow(d+1) <= budget || s.actEnd[d+1] > base {
				s.visit(d+1, e.Next, acc+e.Out)
			}
			s.act = s.act[:base]
		}
		return
	}
	for wi, word := range set {
		for word != 0 {
			b := bits.TrailingZeros64(word)
			word &= word - 1
			c := byte(wi<<6 | b)
			next, out, ok := s.lex.Step(state, c)
			if !ok || !s.lex.CanMatch(next) {
				continue
			}
			s.path[d] = c
			base := s.advance(d, c)
			if s.computeRow(d+1) <= budget || s.actEnd[d+1] > base {
				s.visit(d+1, next, acc+out)
			}
			s.act = s.act[:base]
		}
	}
}

// advance extends the partial rule matches of depth d by byte c into
// depth d+1 and lists the rules c completes in s.done. It returns where
// depth d+1's partials start.
func (s *search) advance(d int, c byte) int {
	base := len(s.act)
	s.done = s.done[:0]
	for i := s.actStart[d]; i < s.actEnd[d]; i++ {
		p := s.act[i]
		r := &s.rules[p.rule]
		if r.alpha[p.k] != c {
			continue
		}
		p.k++
		if int(p.k) == r.la {
			s.done = append(s.done, p)
		} else {
			s.act = append(s.act, p)
		}
	}
	m := s.mins[d]
	for _, ri := range s.first[c] {
		r := &s.rules[ri]
		if m+r.cost > s.budget {
			break // first[c] is sorted by cost
		}
		p := partial{rule: ri, k: 1, from: int32(d)}
		if r.la == 1 {
			s.done = append(s.done, p)
		} else {
			s.act = append(s.act, p)
		}
	}
	s.actStart[d+1], s.actEnd[d+1] = base, len(s.act)
	return base
}

// computeRow fills row d from the rows above it, path[:d] and the rules in
// s.done, stores and returns its minimum.
func (s *search) computeRow(d int) float32 {
	w, n, ch := s.w, s.n, s.ch
	c := s.path[d-1]
	var pc byte
	if d >= 2 {
		pc = s.path[d-2]
	}
	P := s.rows[(d-1)*w : d*w]
	R := s.rows[d*w : (d+1)*w]
	dc := ch.del[c]
	if d >= 2 && pc == c {
		dc = min(dc, ch.delDbl)
	}
	hasRules := len(s.done) > 0
	if hasRules {
		E := s.extra
		for j := range E {
			E[j] = inf
		}
		for _, p := range s.done {
			r := &s.rules[p.rule]
			base := s.rows[int(p.from)*w : (int(p.from)+1)*w]
			for ends := r.ends; ends != 0; ends &= ends - 1 {
				e := bits.TrailingZeros64(ends)
				if v := base[e-r.lb] + r.cost; v < E[e] {
					E[e] = v
				}
			}
		}
	}
	v0 := P[0] + dc
	if hasRules {
		v0 = min(v0, s.extra[0])
	}
	R[0] = v0
	m := v0
	var T []float32
	if d >= 2 {
		T = s.rows[(d-2)*w : (d-1)*w]
	}
	subQ := s.subQ
	for j := 1; j <= n; j++ {
		tj := s.t[j-1]
		v := min(P[j-1]+subQ[(j-1)<<8|int(c)], P[j]+dc, R[j-1]+s.ins[j-1])
		if T != nil && j >= 2 && c == s.t[j-2] && pc == tj && c != pc {
			v = min(v, T[j-2]+ch.trans)
		}
		if hasRules {
			v = min(v, s.extra[j])
		}
		R[j] = v
		m = min(m, v)
	}
	s.mins[d] = m
	return m
}

// distance returns the channel cost of typing typed when intended was
// meant, by the same row recurrence the search uses.
func (ch *channel) distance(typed, intended string) float32 {
	var s search
	s.reset(ch, nil, typed, inf, len(intended))
	for d := 0; d < len(intended); d++ {
		s.path[d] = intended[d]
		s.advance(d, intended[d])
		s.computeRow(d + 1)
	}
	return s.rows[len(intended)*s.w+s.n]
}
