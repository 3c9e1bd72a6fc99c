package correct

import "math/bits"

// bucketsPerNat is the resolution of the best-first queue: prefixes whose
// lower bounds differ by less than 1/bucketsPerNat nats may be expanded in
// either order (the last queued first).
const bucketsPerNat = 4

// bfNode is one prefix queued by the best-first walk. Its row and row
// minimum are in slot (its index) of search.rows and search.mins.
type bfNode struct {
	state  int
	acc    uint64
	parent int32 // slot of the parent prefix (-1 for the empty one)
	d      int32
	c      byte  // last byte
	actLo  int32 // its partial rule matches are act[actLo:actHi]
	actHi  int32
}

// runBest walks the lexicon like run, but expands prefixes in order of a
// lower bound on the cost of any word below them (a bucket queue), so
// that a state cap (s.limit) leaves out the least promising prefixes. With
// no cap it finds the same words at the same costs as
// run (TestBestFirstMatchesDepthFirst). Cost: as run, about a third more
// per state (BenchmarkWidePass), plus one row of memory per queued prefix.
func (s *search) runBest() {
	st := s.lex.Start()
	if !s.lex.CanMatch(st) {
		return
	}
	w := s.w
	nb := int(s.budget*bucketsPerNat) + 1
	for len(s.buckets) < nb {
		s.buckets = append(s.buckets, nil)
	}
	s.buckets = s.buckets[:nb]
	for i := range s.buckets {
		s.buckets[i] = s.buckets[i][:0]
	}
	if s.below != nil {
		st = 0 // the start node
	}
	s.nodes = append(s.nodes[:0], bfNode{state: st, parent: -1})
	s.rows = s.rows[:w]
	s.mins = s.mins[:1]
	s.act = s.act[:0]
	if c := s.rows[s.n]; c <= s.budget {
		if ok, fo := s.finalAt(st); ok {
			s.found(uint32(fo), c)
		}
	}
	s.buckets[0] = append(s.buckets[0], 0)
	for b := 0; b < nb; {
		q := s.buckets[b]
		if len(q) == 0 {
			b++
			continue
		}
		if s.limit > 0 && s.spent() >= s.limit {
			return // out of time: keep what was found
		}
		i := q[len(q)-1]
		s.buckets[b] = q[:len(q)-1]
		if nb2 := s.expand(i); nb2 < b {
			b = nb2
		}
	}
}

// found passes a word within budget to the ranker or the hit list.
func (s *search) found(id uint32, cost float32) {
	if s.rk != nil {
		s.rk.add(id, cost)
	} else {
		s.hits = append(s.hits, hit{id: id, cost: cost})
	}
}

// expand computes the rows of node i's children, reports the words they
// end and queues those that can still lead within budget. It returns the
// lowest bucket it queued into (len(buckets) if none).
func (s *search) expand(i int32) int {
	nd := s.nodes[i]
	low := len(s.buckets)
	if int(nd.d) >= s.maxDepth {
		return low
	}
	w := s.w
	row := s.rows[int(i)*w : int(i+1)*w]
	var prev []float32
	if nd.parent >= 0 {
		prev = s.rows[int(nd.parent)*w : int(nd.parent+1)*w]
	}
	m := s.mins[i]
	parts := s.act[nd.actLo:nd.actHi]
	edges, lo, hi, set, haveSet, rs := s.listEdges(s.edges[0], nd.state, &s.rsBest, row, prev, m, nd.c, parts)
	s.edges[0] = edges
	pn := s.partialNext(&s.pnBest, parts)
	d := int(nd.d) + 1
	tab := s.below
	for k := lo; k < hi; k++ {
		c, next, out := s.edgeAt(edges, k)
		if haveSet || plainByte[c>>6]&(1<<(c&63)) == 0 {
			if !haveSet {
				set, haveSet = s.allowed(row, prev, m, nd.c, parts), true
			}
			if set[c>>6]&(1<<(c&63)) == 0 {
				continue
			}
		}
		if tab != nil && !s.noParent && s.parentBound(row, prev, c, nd.c, parts, tab.nodes[next].sets.below()|belowBit(c)) > s.budget {
			s.examined++ // counted for the cap as when its row was computed (parentbound.go)
			continue
		}
		j := len(s.nodes)
		s.growSlots(j + 1)
		s.pnext, s.rnext = pn, rs
		s.setChild(next)
		base := s.extend(int(nd.actLo), int(nd.actHi), m, i, c)
		s.pnext, s.rnext = nil, nil
		g := int(nd.parent)
		cm := s.computeRow(j, int(i), g, d, c, nd.c)
		if cm > s.budget && len(s.act) == base {
			s.act = s.act[:base]
			continue
		}
		if cost := s.rows[j*w+s.n]; cost <= s.budget {
			if ok, fo := s.finalAt(next); ok {
				s.found(uint32(nd.acc+out+fo), cost)
			}
		}
		// Lower bound of any word below the child: with the letters-below
		// table, childBound (below.go); else its row minimum, a rule under
		// way from the row it started at, and a transposition of the
		// child's byte with the next from this node's row.
		var lb float32
		if tab != nil {
			lb = s.childBound(s.rows[j*w:(j+1)*w], row, cm, c, s.act[base:], s.childSetsNow())
		} else {
			lb = cm
			for _, p := range s.act[base:] {
				lb = min(lb, s.mins[p.from]+s.rules[p.rule].cost)
			}
			if s.ch.trans < inf {
				for ps := s.pos[c] &^ 1; ps != 0; ps &= ps - 1 {
					x := bits.TrailingZeros64(ps)
					lb = min(lb, row[x-1]+s.ch.trans)
				}
			}
		}
		if lb > s.budget {
			s.act = s.act[:base]
			continue // no word below is within budget
		}
		s.visited++ // counted like the depth-first walk's entered states
		s.nodes = append(s.nodes, bfNode{state: next, acc: nd.acc + out, parent: i, d: int32(d), c: c, actLo: int32(base), actHi: int32(len(s.act))})
		bk := int(lb * bucketsPerNat)
		if bk >= len(s.buckets) {
			bk = len(s.buckets) - 1
		}
		s.buckets[bk] = append(s.buckets[bk], int32(j))
		low = min(low, bk)
	}
	return low
}

// growSlots makes room for n row slots.
func (s *search) growSlots(n int) {
	if need := n * s.w; cap(s.rows) < need {
		r := make([]float32, need, 2*need)
		copy(r, s.rows)
		s.rows = r
	} else {
		s.rows = s.rows[:need]
	}
	if cap(s.mins) < n {
		m := make([]float32, n, 2*n)
		copy(m, s.mins)
		s.mins = m
	} else {
		s.mins = s.mins[:n]
	}
}
