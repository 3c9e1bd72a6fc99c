package correct

// This file lists, for each typed position, the first intended bytes of
// the rules that can start there, so that the search's set of bytes worth
// trying (allowed) takes a rule's first byte only where its start row
// entry plus its cost fits the budget, rather than wherever the row
// minimum plus its cost does. A rule whose typed side β ends at typed
// position e starts after the row entry e-len(β) (extend starts it from
// there, and only if that entry plus its cost fits the budget), so the set
// keeps every byte a kept child can need: the words found are the same.
// On the 8-letter misspellings of BenchmarkCorrect8 it cuts DP rows per
// word from 777 to 499 at the median (measured, this project).

// startStep is one step of the cumulative first-byte set of the rules
// starting at a typed position: mask holds the first intended bytes of
// every rule starting there that costs at most cost.
type startStep struct {
	cost float32
	mask [4]uint64
}

// prepareStarts fills s.startTab and s.startOff from s.rules (sorted by
// cost): s.startTab[s.startOff[x]:s.startOff[x+1]] are the steps of typed
// position x, by rising cost, one step per cost at which the set grows.
// A step's set holds each first byte whose cheapest rule starting at x
// costs at most the step's cost, so only the first start of each first
// byte and position in cost order matters: a rule gives its first byte
// the positions no earlier rule with that byte starts at (one AND per
// rule), and those starts, put in order of position by a stable counting
// sort (so that each position's starts stay in cost order) and merged by
// cost, are the steps. Cost: O(rules + starts kept + typed length) per
// typed word.
func (s *search) prepareStarts() {
	n := s.n
	ev := s.startEv[:0]
	seen := &s.startSeen
	for i := range s.rules {
		r := &s.rules[i]
		c := r.alpha[0]
		for nx := r.ends >> r.lb &^ seen[c]; nx != 0; nx &= nx - 1 {
			ev = append(ev, startEvent{cost: r.cost, x: uint8(bitIndex64(nx)), c: c})
		}
		seen[c] |= r.ends >> r.lb
	}
	for _, c := range s.usedFirst {
		seen[c] = 0
	}
	s.startEv = ev
	// Count the starts at each position, then place them position by
	// position, keeping their order.
	var at [maxTyped + 2]int32
	for i := range ev {
		at[ev[i].x+1]++
	}
	for x := 1; x <= n+1; x++ {
		at[x] += at[x-1]
	}
	s.startPos = grow(s.startPos, len(ev))
	sorted := s.startPos
	for i := range ev {
		x := ev[i].x
		sorted[at[x]] = ev[i]
		at[x]++
	}
	s.startOff = s.startOff[:0]
	s.startTab = s.startTab[:0]
	lo := 0
	for x := 0; x <= n; x++ {
		first := len(s.startTab)
		s.startOff = append(s.startOff, int32(first))
		hi := int(at[x])
		var m [4]uint64
		for i := lo; i < hi; i++ {
			c := sorted[i].c
			m[c>>6] |= 1 << (c & 63)
			if k := len(s.startTab); k > first && s.startTab[k-1].cost == sorted[i].cost {
				setMask(&s.startTab[k-1].mask, &m)
			} else {
				// Written in place, not as a literal copied from the
				// stack (as in gatherRules).
				if k == cap(s.startTab) {
					s.startTab = append(s.startTab, startStep{})
				}
				s.startTab = s.startTab[:k+1]
				st := &s.startTab[k]
				st.cost = sorted[i].cost
				setMask(&st.mask, &m)
			}
		}
		lo = hi
	}
	s.startOff = append(s.startOff, int32(len(s.startTab)))
	// startMin[x]: the cost of x's first step, inf when no rule starts
	// at x (addRuleStarts).
	s.startMin = grow(s.startMin, n+1)
	for x := 0; x <= n; x++ {
		v := inf
		if lo := s.startOff[x]; lo < s.startOff[x+1] {
			v = s.startTab[lo].cost
		}
		s.startMin[x] = v
	}
}

// setMask copies src to dst one word at a time. src is being built by
// single-word ORs; a copy in 16-byte halves (what the compiler emits for
// an array assignment) reads each half across two of those stores, a
// load the processor cannot forward from its store buffer, and waits for
// the stores to complete (measured, round 18, BENCHMARKS.md).
func setMask(dst, src *[4]uint64) {
	dst[0], dst[1], dst[2], dst[3] = src[0], src[1], src[2], src[3]
}

// startEvent is the cheapest start of the rules of first intended byte c
// at typed position x, for prepareStarts.
type startEvent struct {
	cost float32
	x    uint8
	c    byte
}

// startSet is what the rule-start pass of allowed learns of a prefix for
// its children's extend: the first intended bytes of the rules that can
// start after it within budget, and the typed positions some rule can
// start at (bit x: the row entry x plus the cheapest rule starting at x
// fits the budget).
type startSet struct {
	first [4]uint64
	at    uint64
}

// addRuleStarts adds to rs.first the first intended bytes of the rules
// that can start after a prefix with the given row within the budget:
// for each typed position x, those of the rules starting at x that cost
// at most budget - row[x]; and it sets rs.at to the positions where one
// of them does. It reads each position's cheapest start from startMin, a
// short array beside the row, and the steps only where that one fits:
// reading the first step through startOff at every position cost about
// 1 % more of the median 8-letter word (measured, this project;
// BENCHMARKS.md, round 16).
func (s *search) addRuleStarts(row []float32, rs *startSet) {
	budget := s.budget
	set := &rs.first
	rs.at = 0
	sm := s.startMin[:s.n+1]
	row = row[:len(sm)]
	for x, c0 := range sm {
		if c0 >= inf {
			continue // no rule starts at x
		}
		if row[x]+c0 <= budget {
			// In the form extend tests a rule's start entry with, so
			// that a position left out here fails that test for every
			// rule starting there (float addition is monotone).
			rs.at |= 1 << x
		}
		room := budget - row[x]
		if c0 > room {
			continue
		}
		// The last step that fits: steps are few (one per new first
		// byte), so a binary search is short.
		lo, hi := int(s.startOff[x]), int(s.startOff[x+1])
		a, b := lo+1, hi
		for a < b {
			mid := int(uint(a+b) >> 1)
			if s.startTab[mid].cost > room {
				b = mid
			} else {
				a = mid + 1
			}
		}
		m := &s.startTab[a-1].mask
		set[0] |= m[0]
		set[1] |= m[1]
		set[2] |= m[2]
		set[3] |= m[3]
	}
}
