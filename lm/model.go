package lm

import "math"

// Model is a compact, read-only back-off n-gram model laid out for lookup
// straight from a model file's bytes (see LoadSection). It is immutable and safe
// for concurrent use by any number of goroutines.
type Model struct {
	order, vocab int
	qbits        int
	bos, eos     uint32
	unk          uint32
	lv           []level
	tree         []vec    // unigram maximum tree, finest level first
	uniTop       []uint32 // the most probable words, best first (computed at load)
	topMin       int      // a group longer than this has a top list
	version      int      // the section layout version (FORMAT.md)
}

type level struct {
	n                 int
	size              int // number of entries (the vocabulary size at order 1)
	probBook, bowBook codebook
	words, probs      vec
	// ranked records (version 3, highest order only): see ranked.go
	ranked  bool
	recs    []uint64
	recBits uint64
	recCode uint // probability code width inside a record
	choose  bool // version 5: each group of records starts with its form bit
	// version 6: the records hold counts, not probability codes (counted.go)
	counted bool
	disc    [3]float64 // D1, D2, D3+ of this (the highest) order
	// order N − 1 of version 6: e^value of each probability and back-off
	// code (nil when the codebooks are too large or absent; see expTables)
	expProb, expBow []float64
	// word groups (version 4, orders 2..N−1): see efgroup.go
	ef     bool
	efw    []uint64
	efBits uint64
	// successors of this level's entries in the next level
	has    rankBits
	start  monoSeq
	gstart monoSeq // version 4: bit offset of each context's word group in the next level
	bow    vec
	big    rankBits
	top    vec
}

// Order returns the highest n-gram order.
func (m *Model) Order() int { return m.order }

// VocabSize returns the number of word IDs, special tokens included.
func (m *Model) VocabSize() int { return m.vocab }

// LayoutVersion returns the version of the n-gram section layout the model
// was loaded from (1 to 6, lm/FORMAT.md).
func (m *Model) LayoutVersion() int { return m.version }

// QuantBits returns the code width of the stored values (0 = lossless).
func (m *Model) QuantBits() int { return m.qbits }

// Specials returns the IDs of <s>, </s> and <unk>.
func (m *Model) Specials() (bos, eos, unk uint32) { return m.bos, m.eos, m.unk }

// NGrams returns the number of stored n-grams per order, unigrams first.
func (m *Model) NGrams() []int {
	out := make([]int, m.order)
	for i := range m.lv {
		out[i] = m.lv[i].size
	}
	return out
}

func (l *level) prob(i int) float64 { return l.probBook.value(l.probs.at(i)) }

// children returns the successor group [lo, hi) of entry e in the next level,
// its context index and back-off weight. ok is false when e has no successors.
func (m *Model) children(l *level, e int) (lo, hi, c int, ok bool) {
	if l.n >= m.order || e < 0 || e >= l.size || !l.has.get(e) {
		return 0, 0, 0, false
	}
	c = l.has.rank1(e)
	if c+1 >= l.start.n {
		return 0, 0, 0, false
	}
	slo, shi := l.start.at2(c)
	lo, hi = int(slo), int(shi)
	limit := m.lv[l.n].size
	if m.lv[l.n].ranked {
		limit = int(m.lv[l.n].recBits) // starts are bit offsets into the records
	}
	if lo < 0 || hi > limit || lo > hi { // start values past 2^63 read as negative ints
		return 0, 0, 0, false
	}
	return lo, hi, c, true
}

func (l *level) bowAt(c int) float64 { return l.bowBook.value(l.bow.at(c)) }

// search returns the position of word w in [lo, hi) of level l (sorted by word), or -1.
func (l *level) search(lo, hi int, w uint32) int {
	p := l.lowerBound(lo, hi, w)
	if p < hi && l.words.at(p) == uint64(w) {
		return p
	}
	return -1
}

// lowerBound returns the first position in [lo, hi) whose word is ≥ w.
func (l *level) lowerBound(lo, hi int, w uint32) int {
	x := uint64(w)
	for lo < hi {
		mid := int(uint(lo+hi) >> 1)
		if l.words.at(mid) < x {
			lo = mid + 1
		} else {
			hi = mid
		}
	}
	return lo
}

// node is a context found in the model: its successor group and back-off
// weight. For a group of ranked records (ranked.go) lo, hi are positions
// 0..count and the other fields locate the records and the suffix group.
type node struct {
	lo, hi int
	bow    float64
	lvl    int // level index of the successors
	ctx    int // context index in the parent level

	ranked  bool
	base    uint64 // bit offset of the group's first record
	rw      uint   // rank width
	rec     uint64 // record width
	slo, sn int    // suffix group: first entry and size, one level down
	// eg reads the word group of a plain node, or the suffix group of a
	// ranked node, when their level stores word groups (efgroup.go).
	eg efGroup
	// version 5: a ranked group whose ranks are Elias-Fano coded from
	// bit base on (see ranksOf), its probability codes from cbase on
	efRanks bool
	cbase   uint64
	// version 6: counts of cw bits from cbase on (none when cw = 0), their
	// sum, and γ(h) = e^bow (counted.go)
	counted bool
	cw      uint
	sum     float64
	gamma   float64
	rg      efGroup // the coded ranks, opened (efRanks only)
}

// contextNode sets nd to the successor group of entry e of level l as a
// plain node (ranked records still need their suffix: see rankedGroup).
func (m *Model) contextNode(l *level, e int, nd *node) bool {
	lo, hi, c, ok := m.children(l, e)
	if !ok {
		return false
	}
	*nd = node{lo: lo, hi: hi, bow: l.bowAt(c), lvl: l.n, ctx: c}
	if m.lv[l.n].ef {
		next := &m.lv[l.n]
		base, ok := m.groupBase(l, c)
		if !ok || !nd.eg.open(next.efw, base, hi-lo, m.vocab, next.efBits) {
			return false
		}
	}
	return true
}

// searchNode returns the entry of word w in a plain node's group, or -1.
func (m *Model) searchNode(nd *node, w uint32) int {
	if m.lv[nd.lvl].ef {
		g := &nd.eg
		if i, ok := g.lower(uint64(w)); ok {
			return nd.lo + i
		}
		return -1
	}
	return m.lv[nd.lvl].search(nd.lo, nd.hi, w)
}

// contexts fills dst with the successor groups of every suffix of ctx that is
// a context in the model, longest first. It returns the filled part.
func (m *Model) contexts(ctx []uint32, dst *[MaxOrder]node) []node {
	if k := m.order - 1; len(ctx) > k {
		ctx = ctx[len(ctx)-k:]
	}
	out := dst[:0]
	for s := 0; s < len(ctx); s++ {
		h := ctx[s:]
		e, found := m.entryOf(h)
		if !found {
			continue
		}
		out = out[:len(out)+1]
		if !m.contextNode(&m.lv[len(h)-1], e, &out[len(out)-1]) {
			out = out[:len(out)-1]
		}
	}
	// Only the longest context can own ranked records; its suffix is next.
	if len(out) > 0 && m.lv[out[0].lvl].ranked {
		if len(out) < 2 || out[1].lvl != out[0].lvl-1 || !m.rankedGroup(&out[0], &out[1]) {
			out = append(out[:0], out[1:]...) // damaged section: drop the group
		}
	}
	return out
}

// LogProb returns ln p(w | ctx) by the back-off rule, using at most the last
// Order()-1 IDs of ctx (oldest first). Unknown IDs give -Inf for w and are
// treated as unseen in the context. Cost: O(order²) binary searches.
func (m *Model) LogProb(ctx []uint32, w uint32) float64 {
	if w >= uint32(m.vocab) {
		return math.Inf(-1)
	}
	var buf [MaxOrder]node
	return m.score(m.contexts(ctx, &buf), w)
}

func (m *Model) score(nodes []node, w uint32) float64 {
	acc := 0.0
	for i := 0; i < len(nodes); i++ {
		nd := &nodes[i]
		if !nd.ranked {
			if p := m.searchNode(nd, w); p >= 0 {
				return acc + m.lv[nd.lvl].prob(p)
			}
			acc += nd.bow
			continue
		}
		// contexts keeps a ranked node only with its suffix node right
		// after it, and the search of the ranks has already found w
		// there (or found it absent): answer that node too.
		p, s := m.rankedFind(nd, w)
		if p >= 0 {
			return acc + m.recordProb(nd, p, s)
		}
		acc += nd.bow
		if i+1 < len(nodes) {
			i++
			if s >= 0 {
				return acc + m.probAt(&nodes[i], s)
			}
			acc += nodes[i].bow
		}
	}
	return acc + m.lv[0].prob(int(w))
}
