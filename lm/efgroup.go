package lm

import (
	"fmt"
	"math/bits"
)

// Word groups: the words of the levels between the unigrams and the highest
// order in a version-4 section.
//
// A successor group's words rise strictly, so each group is stored as its
// own Elias-Fano code (Elias 1974, Fano 1971) over the universe of word IDs
// [0, V): with n words, every word keeps its low L bits (L ≈ log2(V/n)) in a
// packed run, and its high part h (the word >> L) is written in unary: word
// i sets bit h + i of the high part. A group of n words costs about
// n · (2 + log2(V/n)) bits, against n · log2(V) for plain IDs — large groups
// (the successors of frequent words) shrink the most.
//
// Groups longer than efSample1 words carry select samples in front of their
// high part, so that reading word i (select of set bits) and finding a word
// (select of clear bits: the high part's buckets) cost a sample read and a
// scan of a few words whatever the group's length. A group's shape — widths,
// lengths, sample counts — follows from its length n and V alone (groupShape),
// so the stream needs only the bit offset of each group, which the parent
// level stores as a monotone sequence beside its successor starts.

// efSample1 and efSample0 are the distances, in set and in clear bits of a
// group's high part, between two select samples. Set bits are sampled more
// densely: reading a word by its index (a top-list entry, a rank) is the
// more frequent query.
const (
	efSample1    = 1 << efSampleLog1
	efSampleLog1 = 5
	efSample0    = 1 << efSampleLog0
	efSampleLog0 = 6
)

// efShape is the layout of a group of n words below V.
type efShape struct {
	n      int
	lw     uint   // low bits per word, 0..20
	z      uint64 // clear bits of the high part: (V − 1) >> lw
	hlen   uint64 // bits of the high part: n + z
	n1, n0 int    // select samples of set and of clear bits
	sw     uint   // width of a sample
	size   uint64 // bits of the whole group
}

// groupShape returns the layout of a group of n ≥ 1 words below V ≥ 3
// (version 5 also codes ranks below F ≥ 3 so).
func groupShape(n, V int) efShape {
	var g efGroup
	size := g.shape(n, V)
	return efShape{n: n, lw: g.lw, z: g.hlen - uint64(n), hlen: g.hlen, n1: g.n1, n0: g.n0, sw: g.sw, size: size}
}

// efGroup reads one group in place. Positions in the high part are
// relative to its first bit. Reads never leave the group's bits (open
// checked that they lie inside the stream); a damaged group gives wrong
// words (possibly ≥ V), never a panic.
type efGroup struct {
	w      []uint64 // the level's stream, with its spare word
	sbase  uint64   // bit offset of the set-bit samples; the clear-bit samples follow
	hbase  uint64   // bit offset of the high part
	lbase  uint64   // bit offset of the low bits
	hlen   uint64
	n      int
	n1, n0 int
	lw, sw uint
}

// shape sets the widths and counts of a group of n ≥ 1 values below V ≥ 2
// and returns its length in bits (FORMAT.md, "One group").
func (g *efGroup) shape(n, V int) uint64 {
	// lw = ⌊log2(⌊u/n⌋)⌋ when u ≥ 2n, else 0: the largest t with n·2^t ≤ u,
	// found from the bit lengths without a division.
	u, un := uint64(V-1), uint64(n)
	var lw uint
	if u >= 2*un {
		lw = uint(bits.Len64(u) - bits.Len64(un))
		if un<<lw > u {
			lw--
		}
	}
	z := u >> lw // ≥ 1 because 2^lw ≤ u
	g.n, g.lw = n, lw
	g.hlen = z + un
	g.n1 = (n - 1) >> efSampleLog1
	g.n0 = int((z - 1) >> efSampleLog0)
	g.sw = bitsFor(g.hlen - 1)
	return uint64(g.n1+g.n0)*uint64(g.sw) + g.hlen + un*uint64(lw)
}

// open sets g to the group of n values below V at bit offset base of the
// stream w of limit bits. It returns false when n < 1, V < 2 or the group
// does not fit the stream (only a damaged section does that).
func (g *efGroup) open(w []uint64, base uint64, n, V int, limit uint64) bool {
	if n < 1 || V < 2 || base > limit {
		return false
	}
	if g.shape(n, V) > limit-base {
		return false
	}
	g.w, g.sbase = w, base
	g.hbase = base + uint64(g.n1+g.n0)*uint64(g.sw)
	g.lbase = g.hbase + g.hlen
	return true
}

// low returns the low bits of word i.
func (g *efGroup) low(i int) uint64 {
	if g.lw == 0 {
		return 0
	}
	return bitsAt(g.w, g.lbase+uint64(i)*uint64(g.lw), g.lw)
}

// high64 returns the 64 bits of the high part from position p (< hlen);
// bits past its end read as 0.
func (g *efGroup) high64(p uint64) uint64 {
	x := bitsAt(g.w, g.hbase+p, 64)
	if rest := g.hlen - p; rest < 64 {
		x &= 1<<rest - 1
	}
	return x
}

// selectOne returns the position of set bit number k (from 0) of the high
// part, or false when there is none.
func (g *efGroup) selectOne(k uint64) (uint64, bool) {
	var p uint64
	if j := k >> efSampleLog1; j > 0 {
		if j > uint64(g.n1) {
			return 0, false
		}
		p = bitsAt(g.w, g.sbase+(j-1)*uint64(g.sw), g.sw) // set bit number j·efSample1
		k &= efSample1 - 1
	}
	return g.scanSelect(p, k, 0)
}

// selectZero returns the position of clear bit number k (from 0) of the
// high part, or false when there is none.
func (g *efGroup) selectZero(k uint64) (uint64, bool) {
	var p uint64
	if j := k >> efSampleLog0; j > 0 {
		if j > uint64(g.n0) {
			return 0, false
		}
		p = bitsAt(g.w, g.sbase+(uint64(g.n1)+j-1)*uint64(g.sw), g.sw) // clear bit number j·efSample0
		k &= efSample0 - 1
	}
	return g.scanSelect(p, k, ^uint64(0))
}

// scanSelect returns the position of bit number k (from 0), counted from
// position p, among the high part's set bits (flip = 0) or clear bits
// (flip = all ones), or false when there is none.
func (g *efGroup) scanSelect(p, k, flip uint64) (uint64, bool) {
	for p < g.hlen {
		x := bitsAt(g.w, g.hbase+p, 64) ^ flip
		if rest := g.hlen - p; rest < 64 {
			x &= 1<<rest - 1
		}
		if c := uint64(bits.OnesCount64(x)); k >= c {
			k -= c
			p += 64
			continue
		}
		return p + uint64(select64(x, uint(k))), true
	}
	return 0, false
}

// at returns word i (0 ≤ i < n) of the group; a damaged group gives a
// value ≥ V or bad words.
func (g *efGroup) at(i int) uint64 {
	if i < 0 || i >= g.n {
		return ^uint64(0)
	}
	p, ok := g.selectOne(uint64(i))
	if !ok {
		return ^uint64(0)
	}
	return (p-uint64(i))<<g.lw | g.low(i)
}

// lower returns the first index whose word is ≥ w (n if none) and whether
// that word is w. Cost: one sample read, a scan of a few 64-bit words and
// of the words sharing w's high part.
func (g *efGroup) lower(w uint64) (int, bool) {
	h := w >> g.lw
	if h > g.hlen-uint64(g.n) { // above the largest high part, (V − 1) >> lw
		return g.n, false
	}
	var p uint64 // first position after the clear bit that closes bucket h − 1
	if h > 0 {
		q, ok := g.selectZero(h - 1)
		if !ok {
			return g.n, false
		}
		p = q + 1
	}
	if p < h || p-h > uint64(g.n) { // h clear bits precede p, and at most n set bits
		return g.n, false
	}
	i := int(p - h)
	wl := w & (1<<g.lw - 1)
	for i < g.n && p < g.hlen {
		run := bits.TrailingZeros64(^g.high64(p)) // words whose high part is h
		for range run {
			if i >= g.n {
				return g.n, false
			}
			if l := g.low(i); l >= wl {
				return i, l == wl
			}
			i++
		}
		if run < 64 {
			break
		}
		p += 64
	}
	return min(i, g.n), false
}

// putGroup appends the group of the strictly rising words ws (all < V) to s.
func putGroup(s *bitStream, ws []uint64, V int) {
	sh := groupShape(len(ws), V)
	high := make([]uint64, (sh.hlen+63)/64)
	var s1, s0 []uint64
	for i, w := range ws {
		p := w>>sh.lw + uint64(i)
		high[p>>6] |= 1 << (p & 63)
		if i > 0 && i%efSample1 == 0 {
			s1 = append(s1, p)
		}
	}
	zeros := 0
	for p := range sh.hlen {
		if high[p>>6]>>(p&63)&1 == 0 {
			if zeros > 0 && zeros%efSample0 == 0 {
				s0 = append(s0, p)
			}
			zeros++
		}
	}
	for _, x := range append(s1, s0...) {
		s.put(x, sh.sw)
	}
	for p := uint64(0); p < sh.hlen; p += 64 {
		s.put(high[p>>6], uint(min(64, sh.hlen-p)))
	}
	if sh.lw > 0 {
		for _, w := range ws {
			s.put(w, sh.lw)
		}
	}
}

// groupBase returns the bit offset of the word group of context c of
// level l, whose successors are entries [lo, hi) of the next level; the
// offset is checked when the group is opened (contextNode).
func (m *Model) groupBase(l *level, c int) (uint64, bool) {
	if c+1 >= l.gstart.n {
		return 0, false
	}
	return l.gstart.at(c), true
}

// ranksOf opens the coded ranks of a ranked node (version 5; a version-6
// node opened them once, in countedGroup).
func (l *level) ranksOf(nd *node, g *efGroup) bool {
	if nd.counted {
		*g = nd.rg
		return true
	}
	return g.open(l.recs, nd.base, nd.hi, nd.sn, l.recBits)
}

// check reads the group bit by bit and returns the first fault it finds
// ("" if none): a select sample that is not the position of the bit it
// names, a count of set bits other than n, or values that do not rise
// strictly below the universe V. Cost: O(bits of the group).
func (g *efGroup) check(V int) string {
	ones, zeros := 0, uint64(0)
	prev := int64(-1)
	for p := range g.hlen {
		if bitsAt(g.w, g.hbase+p, 1) == 1 {
			if ones >= g.n {
				return fmt.Sprintf("more than %d set bits in the high part", g.n)
			}
			if j := ones / efSample1; ones%efSample1 == 0 && j > 0 {
				if s := bitsAt(g.w, g.sbase+uint64(j-1)*uint64(g.sw), g.sw); s != p {
					return fmt.Sprintf("set-bit sample %d is %d, want %d", j, s, p)
				}
			}
			w := zeros<<g.lw | g.low(ones)
			if w >= uint64(V) || int64(w) <= prev {
				return fmt.Sprintf("value %d is %d after %d (universe %d)", ones, w, prev, V)
			}
			prev = int64(w)
			ones++
			continue
		}
		if j := zeros / efSample0; zeros%efSample0 == 0 && j > 0 {
			if s := bitsAt(g.w, g.sbase+uint64(g.n1+int(j)-1)*uint64(g.sw), g.sw); s != p {
				return fmt.Sprintf("clear-bit sample %d is %d, want %d", j, s, p)
			}
		}
		zeros++
	}
	if ones != g.n {
		return fmt.Sprintf("%d set bits in the high part for %d words", ones, g.n)
	}
	return ""
}
