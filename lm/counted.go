package lm

import (
	"math"
	"math/bits"
)

// Counted records: the highest order of a version-6 section.
//
// Estimate's model is interpolated modified Kneser-Ney (Chen & Goodman 1998,
// TR-10-98 §3.4). At the highest order N it works from raw counts:
//
//	p(w | h) = max(c(hw) − D(c(hw)), 0) / S(h) + γ(h) · p(w | h′),   S(h) = Σ_v c(hv),
//
// and in back-off form the weight stored for the context h at order N − 1 is
// γ(h) itself. A ranked record (ranked.go) already names (h′, w)'s entry at
// order N − 1, so p(w | h′) is one probability-code read away. Version 6
// therefore stores, instead of a probability code per N-gram, its count
// c(hw): in a width chosen per successor group, zero bits when every count
// of the group is 1 (most N-grams of a large corpus are seen once). S(h) is
// the group's size when all counts are 1, is stored after the ranks for a
// group longer than countSumMin with larger counts, and is summed from the
// counts otherwise. The three discounts of order N travel in a small array
// of the section (kind 46). The reader's value, computed by topLogProb
// alone, is exact in its first term and uses the stored (quantized) γ(h)
// and p(w | h′) in the second.
//
// A group of version 6, r = bitsFor(F − 1) with F the size of the
// suffix's successor group:
//
//	1 bit         form f (as version 5)
//	k + 1 bits    count width k in unary: k one bits, then a zero bit
//	f = 0         n ranks of r bits
//	f = 1         n − 1 in r bits, then the n ranks as one Elias-Fano group over F
//	r + k bits    S(h) − n, only when k > 0 and n > countSumMin
//	n · k bits    c − 1 of each record, in rank order (absent when k = 0)
const (
	// countSumMin is the group length above which a group whose counts are
	// not all 1 stores its count sum; shorter groups sum their counts when
	// a query opens them (at most 16 reads). Chosen from estimates on the
	// ~10 M-token real-text model (BENCHMARKS.md): the stored sums cost 0.09
	// bits per trigram with 16, 0.17 with 8, 0.04 with 32.
	countSumMin = 16
	// maxCountWidth bounds the count width; a larger one is damage, and a
	// model with a larger count is written in version 5. With ranks of at
	// most 21 bits (MaxVocab) a stored sum then fits 64 bits.
	maxCountWidth = 40
	tagDiscounts  = 46 // version 6: D1, D2, D3+ of the highest order (float64 bits)
)

// topLogProb is ln p(w | h) at the highest order of a version-6 section:
// ln(max(c − D(c), 0)/S + γ·p′) with γ = e^(ln γ(h)) and p′ = p(w | h′) =
// e^(ln p(w | h′)), both taken by math.Exp of the stored values. Writer (top-list order) and reader (every query,
// Check, export) call only this, so both see the same value. Coded γ and
// p(w | h′) can push the sum a little past 1; the value is capped at
// ln 1 = 0, which the exact value never exceeds.
func topLogProb(c uint64, sum float64, d *[3]float64, gamma, lower float64) float64 {
	return logCapped(topLinear(c, sum, d, gamma, lower))
}

// topLinear is the probability whose logarithm topLogProb takes.
func topLinear(c uint64, sum float64, d *[3]float64, gamma, lower float64) float64 {
	a := max(float64(c)-disc(*d, c), 0) / sum
	// The explicit conversion keeps a fused multiply-add from changing
	// the last bit on some platforms.
	return a + float64(gamma*lower)
}

// logCapped is min(ln x, 0).
func logCapped(x float64) float64 { return min(math.Log(x), 0) }

// expTableMax is the largest codebook whose e^values a version-6 model
// keeps in a table (4096 entries, 32 KB; 8-bit codes take 2 KB).
const expTableMax = 1 << 12

// expTables fills the tables of e^value of the probability and back-off
// codebooks of level l (order N − 1 of a version-6 section), so that a
// query takes no exponential. Lossless levels and codebooks larger than
// expTableMax get none.
func (l *level) expTables() {
	for _, t := range []struct {
		cb  codebook
		dst *[]float64
	}{{l.probBook, &l.expProb}, {l.bowBook, &l.expBow}} {
		if t.cb == nil || len(t.cb) > expTableMax {
			continue
		}
		e := make([]float64, len(t.cb))
		for i, x := range t.cb {
			e[i] = math.Exp(x)
		}
		*t.dst = e
	}
}

// expOf returns math.Exp(cb.value(code)) through table e when there is one.
func expOf(e []float64, cb codebook, code uint64) float64 {
	if e == nil {
		return math.Exp(cb.value(code))
	}
	return e[min(code, uint64(len(e)-1))] // a code past the end reads the last value, as value does
}

// validDiscounts reports whether d can be a highest order's discounts:
// 0 ≤ D1 ≤ 1, 0 ≤ D2 ≤ 2, 0 ≤ D3+ ≤ 3 (Chen & Goodman 1998's bounds, which
// discounts() enforces).
func validDiscounts(d [3]float64) bool {
	for i, v := range d {
		if !(v >= 0 && v <= float64(i+1)) {
			return false
		}
	}
	return true
}

// countWidth returns the count width of a group whose largest count is mx.
func countWidth(mx uint64) uint {
	if mx <= 1 {
		return 0
	}
	return bitsFor(mx - 1)
}

// putCountedGroup writes one version-6 group: ranks below F (rising),
// counts ≥ 1 in rank order.
func putCountedGroup(s *bitStream, ranks, counts []uint64, F int) {
	n := len(ranks)
	r := bitsFor(uint64(F - 1))
	var mx, sum uint64
	for _, c := range counts {
		mx = max(mx, c)
		sum += c
	}
	k := countWidth(mx)
	coded := F >= 3 && uint64(r)+groupShape(n, F).size < uint64(n)*uint64(r)
	if coded {
		s.put(1, 1)
	} else {
		s.put(0, 1)
	}
	for range k {
		s.put(1, 1)
	}
	s.put(0, 1)
	if coded {
		s.put(uint64(n-1), r)
		putGroup(s, ranks, F)
	} else {
		for _, x := range ranks {
			s.put(x, r)
		}
	}
	if k > 0 && n > countSumMin {
		s.put(sum-uint64(n), r+k)
	}
	if k > 0 {
		for _, c := range counts {
			s.put(c-1, k)
		}
	}
}

// countedGroup completes a ranked node of a version-6 level from the bits
// [base, base+bitsLen) of its group: F is the suffix group's size and r
// its rank width. It returns false when the bits do not make a group of
// the announced form, width and length (only a damaged section does that).
func (m *Model) countedGroup(nd *node, base, bitsLen uint64, F int, r uint) bool {
	l := &m.lv[nd.lvl]
	if bitsLen < 2 {
		return false
	}
	coded := bitsAt(l.recs, base, 1) == 1
	// The unary width: the run of one bits after the form bit.
	k := uint(bits.TrailingZeros64(^bitsAt(l.recs, base+1, 64)))
	if k > maxCountWidth || uint64(k)+2 > bitsLen {
		return false
	}
	base += uint64(k) + 2
	bitsLen -= uint64(k) + 2
	var n, sumBits, sbase uint64
	nd.efRanks = false
	if coded {
		if F < 3 || bitsLen < uint64(r) {
			return false
		}
		n = bitsAt(l.recs, base, r) + 1
		if n > uint64(F) {
			return false
		}
		if k > 0 && n > countSumMin {
			sumBits = uint64(r + k)
		}
		size := groupShape(int(n), F).size
		if uint64(r)+size+sumBits+n*uint64(k) != bitsLen {
			return false
		}
		nd.efRanks = true
		nd.base = base + uint64(r)
		sbase = nd.base + size
	} else {
		rw := uint64(r + k)
		if bitsLen%rw != 0 {
			return false
		}
		n = bitsLen / rw
		if k > 0 && n > countSumMin {
			// The sum takes one record's width: n + 1 slots were counted.
			n--
			sumBits = rw
			if n <= countSumMin {
				return false
			}
		}
		if n == 0 || n > uint64(F) {
			return false
		}
		nd.base = base
		sbase = base + n*uint64(r)
	}
	nd.cbase = sbase + sumBits
	nd.cw = k
	switch {
	case k == 0:
		nd.sum = float64(n)
	case sumBits > 0:
		nd.sum = float64(bitsAt(l.recs, sbase, uint(sumBits)) + n)
	default:
		var s uint64
		for p := range n {
			s += bitsAt(l.recs, nd.cbase+p*uint64(k), k)
		}
		nd.sum = float64(s + n)
	}
	nd.ranked, nd.counted = true, true
	nd.rw, nd.rec = r, uint64(r)
	nd.lo, nd.hi = 0, int(n)
	if nd.efRanks && !nd.rg.open(l.recs, nd.base, int(n), F, l.recBits) {
		return false
	}
	up := &m.lv[nd.lvl-1]
	nd.gamma = expOf(up.expBow, up.bowBook, up.bow.at(nd.ctx))
	return true
}

// countAt returns the count of record p of a counted node.
func (l *level) countAt(nd *node, p int) uint64 {
	if nd.cw == 0 {
		return 1
	}
	return bitsAt(l.recs, nd.cbase+uint64(p)*uint64(nd.cw), nd.cw) + 1
}

// countedProb returns ln p of record p of a counted node whose rank is r.
func (m *Model) countedProb(nd *node, p int, r uint64) float64 {
	return logCapped(m.countedLinear(nd, p, r))
}

// countedLinear is the probability whose logarithm countedProb takes (0
// for a damaged rank).
func (m *Model) countedLinear(nd *node, p int, r uint64) float64 {
	if r >= uint64(nd.sn) {
		return 0 // a damaged rank
	}
	up := &m.lv[nd.lvl-1]
	lower := expOf(up.expProb, up.probBook, up.probs.at(nd.slo+int(r)))
	return topLinear(m.lv[nd.lvl].countAt(nd, p), nd.sum, &m.lv[nd.lvl].disc, nd.gamma, lower)
}

// countedTop is groupTop's scan of the records [lo, hi) of a counted node:
// it calls add for the best k + 3 of them (room for the special tokens,
// which add refuses) as probAt ranks them, ties broken by position. It
// ranks by the probability rather than its logarithm, which orders the
// records the same way unless a record left out has the same logarithm as
// the last one kept (values within a rounding of each other); then it
// ranks again by probAt.
func (m *Model) countedTop(nd *node, lo, hi, k int, add func(uint32) bool) {
	l := &m.lv[nd.lvl]
	var t topBuf
	t.k = k + 3
	out := -1.0 // the largest probability left out
	for p := lo; p < hi; p++ {
		s := Scored{ID: uint32(p), LogP: m.countedLinear(nd, p, l.rankAt(nd, p))}
		if t.n == t.k {
			if !better(s, t.buf[t.n-1]) {
				out = max(out, s.LogP)
				continue
			}
			out = max(out, t.buf[t.n-1].LogP)
		}
		t.push(s)
	}
	if out >= 0 && logCapped(out) == logCapped(t.buf[t.n-1].LogP) {
		t = topBuf{k: k + 3}
		for p := lo; p < hi; p++ {
			t.push(Scored{ID: uint32(p), LogP: m.probAt(nd, p)})
		}
	}
	for _, s := range t.buf[:t.n] {
		add(uint32(m.wordAt(nd, int(s.ID))))
	}
}

// checkCounted verifies the counts of a counted node: the width is the
// least that holds the largest count, a stored sum equals the counts'
// sum, and every value the reader computes is a number.
func (m *Model) checkCounted(nd *node) string {
	l := &m.lv[nd.lvl]
	var mx, sum uint64
	for p := nd.lo; p < nd.hi; p++ {
		c := l.countAt(nd, p)
		mx = max(mx, c)
		sum += c
		if x := m.probAt(nd, p); math.IsNaN(x) || math.IsInf(x, 1) {
			return "probability is not a number"
		}
	}
	if countWidth(mx) != nd.cw {
		return "count width does not fit the largest count"
	}
	if float64(sum) != nd.sum {
		return "stored count sum differs from the counts' sum"
	}
	return ""
}

// countsUsable reports whether b carries what version 6 needs: the counts
// of its highest order (TopCounts, each from 1 to 2^40) and valid discounts for
// it, at order 3 or more. rankRecords then also checks that every stored
// probability of that order is what the formula gives from them.
func countsUsable(b *Backoff) bool {
	N := b.Order()
	if N < 3 || len(b.Discounts) != N || !validDiscounts(b.Discounts[N-1]) || len(b.TopCounts) != b.Levels[N-1].Len() {
		return false
	}
	for _, c := range b.TopCounts {
		if c == 0 || c-1 >= 1<<maxCountWidth {
			return false
		}
	}
	return true
}

// groupCount returns the sum of the counts of b's highest-order records
// [lo, hi): S(h) of their context.
func groupCount(b *Backoff, lo, hi int) uint64 {
	var sum uint64
	for _, c := range b.TopCounts[lo:hi] {
		sum += c
	}
	return sum
}

// countsAgree reports whether the stored probabilities of the records
// [g, e) of b's highest order (one successor group, context entry j at
// order N − 1, suffix entries sfx) are what the interpolation formula gives
// from the counts, the context's back-off weight and the suffixes'
// probabilities, within 1e-9 in ln p (rounding only). Pruned, imported or
// edited models fail and are written in version 5.
func countsAgree(b *Backoff, g, e, j int, sfx []int) bool {
	N := b.Order()
	top, mid := &b.Levels[N-1], &b.Levels[N-2]
	sum, d := float64(groupCount(b, g, e)), b.Discounts[N-1]
	gamma := math.Exp(mid.Bow[j])
	for i := g; i < e; i++ {
		x := topLogProb(b.TopCounts[i], sum, &d, gamma, math.Exp(mid.LogP[sfx[i-g]]))
		if !(math.Abs(x-top.LogP[i]) <= 1e-9) {
			return false
		}
	}
	return true
}

// countedValues returns what a reader of the version-6 layout of b computes
// for the highest-order records [lo, hi) (one successor group) when the
// context's stored back-off weight is bow and the order below has codebook
// book and codes: the values that order the context's top list.
func countedValues(b *Backoff, lo, hi int, bow float64, book codebook, codes []uint64) []float64 {
	N := b.Order()
	top, mid := &b.Levels[N-1], &b.Levels[N-2]
	sum, d := float64(groupCount(b, lo, hi)), b.Discounts[N-1]
	gamma := math.Exp(bow)
	out := make([]float64, hi-lo)
	slo, shi := keyPrefixRange(mid, top.Key(lo)[1:N-1])
	for i := lo; i < hi; i++ {
		s := findLast(mid, slo, shi, top.Key(i)[N-1]) // present: rankRecords checked
		out[i-lo] = topLogProb(b.TopCounts[i], sum, &d, gamma, math.Exp(book.value(codes[s])))
	}
	return out
}

// countedBowWeight returns the weight the back-off weight of context j
// (an entry of order N − 1 of b, N its order, whose successors are the
// records [g, e) with suffix entries sfx) gets when version 6 trains that
// order's back-off codebook: one for the words the context backs off for,
// plus, for each of its successors, the share of the backed-off term in
// its probability, γ·p(w|h′)/p(w|h) — how much a coding error of ln γ
// moves ln p(w|h). Weighting so keeps the coded weights from erring to one
// side where most N-grams use them.
func countedBowWeight(b *Backoff, g, e, j int, sfx []int) float64 {
	N := b.Order()
	top, mid := &b.Levels[N-1], &b.Levels[N-2]
	w := 1.0
	for i := g; i < e; i++ {
		w += min(math.Exp(mid.Bow[j]+mid.LogP[sfx[i-g]]-top.LogP[i]), 1)
	}
	return w
}

// countedSlack is how far, in nats, Check lets a successor computed from
// counts exceed the last entry of its top list: a few units in the last
// place of a log-probability, so that a near tie rounded differently by
// another machine's math.Exp or math.Log is not reported as damage, while
// any real misordering (at least one count or code apart) still is.
const countedSlack = 1e-12
