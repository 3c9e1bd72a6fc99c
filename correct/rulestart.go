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
// Cost: O(rules × their end positions) per typed word.
func (s *search) prepareStarts() {
	n := s.n
	for len(s.startBy) <= n {
		s.startBy = append(s.startBy, nil)
	}
	var seen [maxTyped + 1][4]uint64
	for x := 0; x <= n; x++ {
		s.startBy[x] = s.startBy[x][:0]
	}
	for i := range s.rules {
		r := &s.rules[i]
		c := r.alpha[0]
		bit := uint64(1) << (c & 63)
		for ends := r.ends; ends != 0; ends &= ends - 1 {
			x := bitIndex64(ends) - r.lb
			m := &seen[x]
			if m[c>>6]&bit != 0 {
				continue
			}
			m[c>>6] |= bit
			st := s.startBy[x]
			if k := len(st); k > 0 && st[k-1].cost == r.cost {
				st[k-1].mask = *m
			} else {
				s.startBy[x] = append(st, startStep{cost: r.cost, mask: *m})
			}
		}
	}
	s.startOff = s.startOff[:0]
	s.startTab = s.startTab[:0]
	for x := 0; x <= n; x++ {
		s.startOff = append(s.startOff, int32(len(s.startTab)))
		s.startTab = append(s.startTab, s.startBy[x]...)
	}
	s.startOff = append(s.startOff, int32(len(s.startTab)))
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
// of them does.
func (s *search) addRuleStarts(row []float32, rs *startSet) {
	budget := s.budget
	set := &rs.first
	rs.at = 0
	for x := 0; x <= s.n; x++ {
		lo, hi := int(s.startOff[x]), int(s.startOff[x+1])
		if lo == hi {
			continue
		}
		if row[x]+s.startTab[lo].cost <= budget {
			// In the form extend tests a rule's start entry with, so
			// that a position left out here fails that test for every
			// rule starting there (float addition is monotone).
			rs.at |= 1 << x
		}
		room := budget - row[x]
		if s.startTab[lo].cost > room {
			continue
		}
		// The last step that fits: steps are few (one per new first
		// byte), so a binary search is short.
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
