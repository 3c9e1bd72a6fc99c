package correct

// This file holds the bound the search checks before it computes a child
// prefix's row: from the parent's row alone, a lower bound on the channel
// cost of any word below the child. Three of four children whose rows the
// search computed were then pruned by childBound (below.go), and this
// bound, which needs no row of the child and no rule bookkeeping (extend),
// prunes three of four of those first (on the 8-letter misspellings of the
// development list, the depth-first passes; measured, this project).
//
// Any alignment of the typed word with a word below the child either
// passes through a cell of the parent's row, at some typed position j, or
// carries an edit across the end of the parent's prefix: a rule under way
// that the child's byte c continues, or a transposition of the parent's
// last byte with c. From a cell at j, the intended bytes left are c and the
// letters below the child's state, so each typed byte from j on whose class
// (belowBit) is none of those costs at least missCost: typed extra, typed
// for one of those letters, or its share of a rule whose intended side is
// made of them (the letters-below bound of below.go, with c added to the
// letters). A rule under way costs at least the row entry it started from
// plus its cost plus the bytes after its typed side, and a transposition
// the grandparent's entry plus its cost plus the bytes after the two. The
// least of these terms never exceeds the cost of a word below the child,
// so pruning on it keeps the words found (TestParentBoundKeepsWords).

// parentBound returns a lower bound on the channel cost of any word below
// the child prefix that byte c makes of a parent prefix with the given row,
// parent row prev (nil for the empty prefix), last byte pc and partial rule
// matches parts, where below is the set (belowBit) of c and the bytes below
// the child's state. As floorBound, it may return the first term it finds
// within budget instead of the least; a value above budget means every
// term is. Cost: O(typed length) with floor prices (missLow, summed
// without a branch per byte through missSel); the exact
// prices (leftOver, cached by byte set) only when the floor prices leave a
// term within budget.
func (s *search) parentBound(row, prev []float32, c, pc byte, parts []partial, below uint32) float32 {
	miss := s.tbits &^ below
	if miss == 0 {
		return 0 // nothing to charge: the bound cannot prune
	}
	missPos := s.clsPos.of(miss)
	// Floor prices (missLow) first, in one pass from the end that stops
	// at the first term within budget; the exact prices (missCost) only
	// then.
	n, budget := s.n, s.budget
	fl := s.hlow[:n+1]
	h := float32(0)
	lb := row[n]
	fl[n] = 0
	if lb <= budget {
		return lb
	}
	sel := s.missSel[:2*n]
	for j := n - 1; j >= 0; j-- {
		h += sel[2*j|int(missPos>>j&1)] // missLow[j], or 0 off missPos
		fl[j] = h
		v := row[j] + h
		if v <= budget {
			// Within budget at floor prices: try the exact prices.
			return s.parentTerms(row, prev, c, pc, parts, s.leftOver(missPos, below))
		}
		lb = min(lb, v)
	}
	if v := s.crossTerms(lb, prev, c, pc, parts, fl); v > budget {
		return v
	}
	return s.parentTerms(row, prev, c, pc, parts, s.leftOver(missPos, below))
}

// parentTerms returns the first term of parentBound within budget, or the
// least term when none is, with h[j] the price of the typed bytes from j on
// that the child's letters cannot match.
func (s *search) parentTerms(row, prev []float32, c, pc byte, parts []partial, h []float32) float32 {
	n, budget := s.n, s.budget
	lb := inf
	for j, v := range row[:n+1] {
		v += h[j]
		if v <= budget {
			return v
		}
		lb = min(lb, v)
	}
	return s.crossTerms(lb, prev, c, pc, parts, h)
}

// crossTerms lowers lb to the terms of parentBound for the edits across
// the end of the parent's prefix: rules under way that c continues, and a
// transposition of pc with c.
func (s *search) crossTerms(lb float32, prev []float32, c, pc byte, parts []partial, h []float32) float32 {
	w := s.w
	for _, p := range parts {
		if p.next != c {
			continue // c does not continue this rule
		}
		r := &s.rules[p.rule]
		base := s.rows[int(p.from)*w : (int(p.from)+1)*w]
		for ends := r.ends; ends != 0; ends &= ends - 1 {
			e := bitIndex64(ends)
			lb = min(lb, base[e-r.lb]+r.cost+h[e])
		}
	}
	if prev != nil && c != pc && s.ch.trans < inf {
		// Typed bytes j-2, j-1 are c, pc: the two intended bytes swapped.
		for tm := (s.pos[c] << 2) & (s.pos[pc] << 1); tm != 0; tm &= tm - 1 {
			j := bitIndex64(tm)
			lb = min(lb, prev[j-2]+s.ch.trans+h[j])
		}
	}
	return lb
}
