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
	alpha string
	la    int
	lb    int
	cost  float32
	ends  uint64 // bit e: β ends at typed position e
}

// search is the scratch of one candidate search; it lives in a sync.Pool.
type search struct {
	ch       *channel
	lex      Lexicon
	t        []byte
	n, w     int
	budget   float32
	maxDepth int
	rows     []float32
	mins     []float32
	extra    []float32
	path     []byte
	ins      []float32
	rules    []appRule
	head     [256]int32
	next     []int32
	usedLast []byte
	hits     []hit
	visited  int
}

// reset prepares a search of typed (already lower-cased) within budget.
// Intended words are followed to depth maxDepth.
func (s *search) reset(ch *channel, lex Lexicon, typed []byte, budget float32, maxDepth int) {
	s.ch, s.lex, s.budget = ch, lex, budget
	s.t = append(s.t[:0], typed...)
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
	ch.insCosts(s.t, s.ins)
	// Rules whose typed side occurs in the word, with their end positions.
	for _, c := range s.usedLast {
		s.head[c] = -1
	}
	s.usedLast = s.usedLast[:0]
	s.rules = s.rules[:0]
	s.next = s.next[:0]
	for _, lb := range ch.betaLens {
		for e := lb; e <= s.n; e++ {
			list := ch.byBeta[string(s.t[e-lb:e])]
			for _, ri := range list {
				s.addRule(ri, e)
			}
		}
	}
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
	last := r.alpha[len(r.alpha)-1]
	for i := s.head[last]; i >= 0 && int(i) < len(s.rules); i = s.next[i] {
		if s.rules[i].alpha == r.alpha && s.rules[i].lb == len(r.beta) && s.rules[i].cost == r.cost {
			s.rules[i].ends |= 1 << e
			return
		}
	}
	found := false
	for _, c := range s.usedLast {
		if c == last {
			found = true
			break
		}
	}
	if !found {
		s.usedLast = append(s.usedLast, last)
		s.head[last] = -1
	}
	s.rules = append(s.rules, appRule{alpha: r.alpha, la: len(r.alpha), lb: len(r.beta), cost: r.cost, ends: 1 << e})
	s.next = append(s.next, s.head[last])
	s.head[last] = int32(len(s.rules) - 1)
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
	for i := range s.rules {
		r := &s.rules[i]
		for k := 0; k < r.la && k <= d; k++ {
			if s.mins[d-k]+r.cost <= budget && string(s.path[d-k:d]) == r.alpha[:k] {
				add(r.alpha[k])
			}
		}
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
			if s.computeRow(d+1) <= budget || s.pending(d+1) {
				s.visit(d+1, next, acc+out)
			}
		}
	}
}

// computeRow fills row d from the rows above it and path[:d], stores and
// returns its minimum.
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
	hasRules := false
	if s.head[c] >= 0 && s.containsLast(c) {
		E := s.extra
		for j := range E {
			E[j] = inf
		}
		for ri := s.head[c]; ri >= 0; ri = s.next[ri] {
			r := &s.rules[ri]
			if r.la > d || string(s.path[d-r.la:d]) != r.alpha {
				continue
			}
			base := s.rows[(d-r.la)*w : (d-r.la+1)*w]
			for ends := r.ends; ends != 0; ends &= ends - 1 {
				e := bits.TrailingZeros64(ends)
				if v := base[e-r.lb] + r.cost; v < E[e] {
					E[e] = v
				}
			}
			hasRules = true
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
	for j := 1; j <= n; j++ {
		tj := s.t[j-1]
		v := P[j-1]
		if tj != c {
			v += ch.sub[tj][c]
		}
		v = min(v, P[j]+dc, R[j-1]+s.ins[j-1])
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

// containsLast reports whether head[c] was set during this search.
func (s *search) containsLast(c byte) bool {
	for _, u := range s.usedLast {
		if u == c {
			return true
		}
	}
	return false
}

// pending reports whether a rule whose intended side has begun at the end
// of path[:d] could still bring the row back within budget.
func (s *search) pending(d int) bool {
	for i := range s.rules {
		r := &s.rules[i]
		for k := 1; k < r.la && k <= d; k++ {
			if s.mins[d-k]+r.cost <= s.budget && string(s.path[d-k:d]) == r.alpha[:k] {
				return true
			}
		}
	}
	return false
}

// distance returns the channel cost of typing typed when intended was
// meant, by the same row recurrence the search uses.
func (ch *channel) distance(typed, intended string) float32 {
	var s search
	for i := range s.head {
		s.head[i] = -1
	}
	s.reset(ch, nil, []byte(typed), inf, len(intended))
	for d := 1; d <= len(intended); d++ {
		s.path[d-1] = intended[d-1]
		s.computeRow(d)
	}
	return s.rows[len(intended)*s.w+s.n]
}
