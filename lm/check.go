package lm

import (
	"math"
	"math/bits"
)

// Check verifies every value of a loaded section, which LoadSection does
// not read (loading stays O(1) in the model size and touches no table page):
//
//   - every word ID is below the vocabulary size;
//   - every probability and back-off code is below its codebook's length
//     (lossless values are not NaN or +Inf);
//   - the successor bits agree with their rank directory, and their count
//     with the start array; the start array begins at 0, rises strictly (a
//     context has at least one successor) and ends at the next order's size;
//   - each successor group is sorted strictly by word;
//   - version 4: the word groups follow each other without gaps, each of
//     the length its word count gives it, with exactly one set bit per word
//     in its high part and every select sample at the bit it names;
//   - version 5: each group of coded ranks likewise (ranks rising strictly
//     below the size of their suffix's group), and the group's length
//     matching the form and count it announces;
//   - version 6: each group's count width is the least that holds its
//     largest count, a stored count sum equals the counts' sum, and every
//     probability the reader computes from them is a number;
//   - a context has a top list exactly when its group is longer than
//     the threshold (TopListLen before version 3, 32 since), the
//     top-list bits agree with their rank directory and the lists fill
//     the top array; each list holds distinct offsets inside its
//     group, in non-increasing probability, and no successor outside it is
//     more probable than its last entry;
//   - each node of the unigram maximum tree holds the largest value below it.
//
// Check returns nil or a *SectionError (matching ErrCorrupt) naming the
// first fault. It never panics on a model that LoadSection accepted. Cost:
// O(n-grams); it reads every page of the section.
func (m *Model) Check() error {
	V := m.vocab
	for i := range m.lv {
		l := &m.lv[i]
		n := l.n
		if err := checkCodes(l.probs, l.probBook, n, "probability"); err != nil {
			return err
		}
		if n > 1 && !l.ranked && !l.ef { // ranks and word groups are checked with their groups
			for p := range l.size {
				if w := l.words.at(p); w >= uint64(V) {
					return corrupt(0, "order %d entry %d: word id %d of %d", n, p, w, V)
				}
			}
		}
		if n == m.order {
			continue
		}
		if err := m.checkSuccessors(l); err != nil {
			return err
		}
	}
	return m.checkTree()
}

// checkCodes checks the codes (or lossless values) of a vector.
func checkCodes(v vec, cb codebook, n int, what string) error {
	for i := range v.n {
		c := v.at(i)
		if cb == nil {
			if x := math.Float64frombits(c); math.IsNaN(x) || math.IsInf(x, 1) {
				return corrupt(0, "order %d %s %d: value %v", n, what, i, x)
			}
		} else if c >= uint64(len(cb)) {
			return corrupt(0, "order %d %s %d: code %d, codebook has %d", n, what, i, c, len(cb))
		}
	}
	return nil
}

// checkRank checks a bit vector's rank directory and returns its count of set bits.
func checkRank(r rankBits, n int, what string) (int, error) {
	c := 0
	for blk := 0; blk*512 <= r.n; blk++ {
		if s := r.samples.at(blk); s != uint64(c) {
			return 0, corrupt(0, "order %d %s rank sample %d is %d, want %d", n, what, blk, s, c)
		}
		for wi := blk * 8; wi < blk*8+8 && wi*64 < r.n; wi++ {
			x := r.w[wi]
			if rest := r.n - wi*64; rest < 64 {
				x &= 1<<uint(rest) - 1
			}
			c += bits.OnesCount64(x)
		}
	}
	return c, nil
}

// checkSuccessors checks the successor tables of level l (order < model order).
func (m *Model) checkSuccessors(l *level) error {
	n := l.n
	next := &m.lv[n]
	C := l.start.n - 1
	nc, err := checkRank(l.has, n, "successor")
	if err != nil {
		return err
	}
	if nc != C {
		return corrupt(0, "order %d: %d entries have successors, the start array has %d contexts", n, nc, C)
	}
	if err := checkCodes(l.bow, l.bowBook, n, "back-off weight"); err != nil {
		return err
	}
	if s := l.start.at(0); s != 0 {
		return corrupt(0, "order %d: start array begins at %d", n, s)
	}
	end := uint64(next.size)
	if next.ranked {
		end = next.recBits
	}
	if e := l.start.at(C); e != end {
		return corrupt(0, "order %d: start array ends at %d, order %d needs %d", n, e, n+1, end)
	}
	var keys []uint32 // this level's n-grams, to find the suffix groups of ranked records
	if next.ranked {
		var ok bool
		if keys, ok = m.levelKeys(n); !ok {
			return corrupt(0, "order %d: successor groups do not tile the levels", n)
		}
	}
	records := 0
	nb, err := checkRank(l.big, n, "top-list")
	if err != nil {
		return err
	}
	if want := uint64(nb) * TopListLen; uint64(l.top.n) != want {
		return corrupt(0, "order %d: top array holds %d offsets, want %d", n, l.top.n, want)
	}
	b := 0 // top lists seen
	nctx := 0
	var gbits uint64 // bits of the word groups seen
	for e := range l.size {
		if !l.has.get(e) {
			continue
		}
		c := nctx
		nctx++
		lo64, hi64 := l.start.at(c), l.start.at(c+1)
		if hi64 <= lo64 || hi64 > end {
			return corrupt(0, "order %d context %d: successor group [%d, %d)", n, c, lo64, hi64)
		}
		var key []uint32
		if next.ranked {
			key = keys[e*n : (e+1)*n]
		}
		nd, ok := m.groupNode(l, e, key)
		if !ok || nd.ctx != c {
			return corrupt(0, "order %d context %d: successor group [%d, %d) cannot be read", n, c, lo64, hi64)
		}
		lo, hi := nd.lo, nd.hi
		if next.ef {
			if g := l.gstart.at(c); g != gbits {
				return corrupt(0, "order %d context %d: word group at bit %d, the groups before it end at %d", n, c, g, gbits)
			}
			g := &nd.eg
			if why := g.check(m.vocab); why != "" {
				return corrupt(0, "order %d context %d: word group: %s", n, c, why)
			}
			gbits += groupShape(hi-lo, m.vocab).size
		}
		if nd.efRanks {
			var g efGroup
			if !next.ranksOf(&nd, &g) {
				return corrupt(0, "order %d context %d: coded ranks do not fit the stream", n, c)
			}
			if why := g.check(nd.sn); why != "" {
				return corrupt(0, "order %d context %d: coded ranks: %s", n, c, why)
			}
		}
		if nd.ranked {
			records += hi - lo
			for p := lo; p < hi; p++ {
				if r := next.rankAt(&nd, p); r >= uint64(nd.sn) || (p > lo && r <= next.rankAt(&nd, p-1)) {
					return corrupt(0, "order %d context %d: rank %d of record %d out of order or past its suffix's %d successors", n, c, r, p, nd.sn)
				}
				if nd.counted {
					continue
				}
				if code := next.codeAt(&nd, p); next.probBook != nil && code >= uint64(len(next.probBook)) {
					return corrupt(0, "order %d context %d: record %d code %d, codebook has %d", n, c, p, code, len(next.probBook))
				}
			}
		}
		if nd.counted {
			if why := m.checkCounted(&nd); why != "" {
				return corrupt(0, "order %d context %d: counts: %s", n, c, why)
			}
		}
		for p := lo + 1; p < hi; p++ {
			if m.wordAt(&nd, p-1) >= m.wordAt(&nd, p) {
				return corrupt(0, "order %d entry %d: successors not sorted strictly by word", n+1, p)
			}
		}
		isBig := l.big.get(c)
		if isBig != (hi-lo > m.topMin) {
			return corrupt(0, "order %d context %d: top-list bit %v for a group of %d", n, c, isBig, hi-lo)
		}
		if !isBig {
			continue
		}
		// Probabilities computed from counts (version 6) go through
		// math.Exp and math.Log, whose last bit may differ between the
		// machine that wrote the top list and the one checking it: a near
		// tie within countedSlack is not damage.
		slack := 0.0
		if nd.counted {
			slack = countedSlack
		}
		var listed [TopListLen]int
		for i := range TopListLen {
			off := l.top.at(b*TopListLen + i)
			if off >= uint64(hi-lo) {
				return corrupt(0, "order %d context %d: top-list offset %d outside a group of %d", n, c, off, hi-lo)
			}
			listed[i] = lo + int(off)
			for _, q := range listed[:i] {
				if q == listed[i] {
					return corrupt(0, "order %d context %d: top-list offset %d repeated", n, c, off)
				}
			}
			if i > 0 && m.probAt(&nd, listed[i]) > m.probAt(&nd, listed[i-1])+slack {
				return corrupt(0, "order %d context %d: top list not in probability order", n, c)
			}
		}
		last := m.probAt(&nd, listed[TopListLen-1])
	scan:
		for p := lo; p < hi; p++ {
			for _, q := range listed {
				if q == p {
					continue scan
				}
			}
			if m.probAt(&nd, p) > last+slack {
				return corrupt(0, "order %d context %d: entry %d is more probable than the top list's last", n, c, p)
			}
		}
		b++
	}
	if next.ef && gbits != next.efBits {
		return corrupt(0, "order %d: word groups hold %d bits, the stream %d", n+1, gbits, next.efBits)
	}
	if next.ranked && records != next.size {
		return corrupt(0, "order %d: groups hold %d ranked records, the count says %d", n+1, records, next.size)
	}
	return nil
}

// checkTree checks the unigram maximum tree.
func (m *Model) checkTree() error {
	u := &m.lv[0]
	below := m.vocab
	for lvl := 1; lvl <= len(m.tree); lvl++ {
		t := m.tree[lvl-1]
		if err := checkCodes(t, u.probBook, 1, "maximum-tree node"); err != nil {
			return err
		}
		for i := range t.n {
			best := math.Inf(-1)
			for c := i * treeFanout; c < min((i+1)*treeFanout, below); c++ {
				best = max(best, m.treeVal(lvl-1, uint32(c)))
			}
			if got := m.treeVal(lvl, uint32(i)); got != best {
				return corrupt(0, "maximum tree level %d node %d holds %v, the largest below is %v", lvl, i, got, best)
			}
		}
		below = t.n
	}
	return nil
}
