package lm

// MaxK is the largest number of results TopK returns.
const MaxK = 32

// Scored is a word ID with its natural-log probability.
type Scored struct {
	ID   uint32
	LogP float64
}

// better orders results: higher probability first, then lower ID (byte order
// of the words), so rankings are deterministic.
func better(a, b Scored) bool {
	if a.LogP != b.LogP {
		return a.LogP > b.LogP
	}
	return a.ID < b.ID
}

// compareScored orders results as better does, for sorting.
func compareScored(a, b Scored) int {
	switch {
	case better(a, b):
		return -1
	case better(b, a):
		return 1
	}
	return 0
}

// topBuf keeps the k best entries seen, best first.
type topBuf struct {
	k   int
	n   int
	buf [MaxK + 3]Scored // room for the three special tokens a group scan may meet
}

func (t *topBuf) push(s Scored) {
	if t.n == t.k {
		if !better(s, t.buf[t.n-1]) {
			return
		}
		t.n--
	}
	i := t.n
	for i > 0 && better(s, t.buf[i-1]) {
		t.buf[i] = t.buf[i-1]
		i--
	}
	t.buf[i] = s
	t.n++
}

// TopK appends to dst the k most probable next words after ctx (oldest
// first) whose IDs lie in [lo, hi), best first, ties broken by ID. Pass
// lo=0, hi=VocabSize() for no restriction; a typed prefix's lexicon range
// restricts the answer to its completions. The special tokens <s>, </s> and
// <unk> are never returned. k is capped at MaxK.
//
// The search never scores the whole vocabulary: it takes the best k of each
// context's successor group that falls in the range (a prefix of the group's
// top list, or a scan of the range inside the group) and the best k
// unigrams in the range from a maximum tree, then scores those candidates
// exactly. For Kneser-Ney estimates, where a word's probability in a context
// is never below its backed-off value, this is exact. It does not allocate
// when dst has room for k results.
func (m *Model) TopK(ctx []uint32, lo, hi uint32, k int, dst []Scored) []Scored {
	if k > MaxK {
		k = MaxK
	}
	if hi > uint32(m.vocab) {
		hi = uint32(m.vocab)
	}
	if k <= 0 || lo >= hi {
		return dst
	}
	var nb [MaxOrder]node
	return m.topKNodes(m.contexts(ctx, &nb), lo, hi, k, dst, nil)
}

// groupTop calls add for the best k entries of a successor group whose words lie in [lo, hi).
func (m *Model) groupTop(nd *node, lo, hi uint32, k int, add func(uint32) bool) {
	glo, ghi := nd.lo, nd.hi
	whole := lo == 0 && hi >= uint32(m.vocab)
	if !whole {
		glo = m.lowerIn(nd, nd.lo, nd.hi, lo)
		ghi = m.lowerIn(nd, glo, nd.hi, hi)
	}
	if glo >= ghi {
		return
	}
	parent := &m.lv[nd.lvl-1]
	if whole && ghi-glo > TopListLen && k <= TopListLen {
		// Big group: its top list holds the best successors in order.
		if c := nd.ctx; c < parent.big.n && parent.big.get(c) {
			b := parent.big.rank1(c)
			got := 0
			for i := 0; got < k && i < TopListLen && (b*TopListLen+i) < parent.top.n; i++ {
				off := parent.top.at(b*TopListLen + i) // unsigned: a 64-bit value may not fit an int
				if off < uint64(ghi-glo) && add(uint32(m.wordAt(nd, glo+int(off)))) {
					got++
				}
			}
			if got == k {
				return
			}
		}
	}
	if nd.counted {
		m.countedTop(nd, glo, ghi, k, add)
		return
	}
	var t topBuf
	t.k = k + 3 // room for the special tokens, which add refuses
	// Positions ascend with word IDs inside a group, so ranking positions
	// breaks ties as ranking IDs would; only the winners are turned into IDs.
	for p := glo; p < ghi; p++ {
		t.push(Scored{ID: uint32(p), LogP: m.probAt(nd, p)})
	}
	for _, s := range t.buf[:t.n] {
		add(uint32(m.wordAt(nd, int(s.ID))))
	}
}

// heapItem is a node of the unigram maximum tree waiting in the search heap.
type heapItem struct {
	val   float64
	start uint32 // first leaf covered
	lvl   int8   // 0 = leaf
	idx   uint32
}

func itemBefore(a, b heapItem) bool {
	if a.val != b.val {
		return a.val > b.val
	}
	return a.start < b.start
}

type itemHeap struct {
	n   int
	buf [1024]heapItem
}

func (h *itemHeap) push(x heapItem) bool {
	if h.n == len(h.buf) {
		return false
	}
	i := h.n
	h.buf[i] = x
	h.n++
	for i > 0 {
		p := (i - 1) / 2
		if !itemBefore(h.buf[i], h.buf[p]) {
			break
		}
		h.buf[i], h.buf[p] = h.buf[p], h.buf[i]
		i = p
	}
	return true
}

func (h *itemHeap) pop() heapItem {
	top := h.buf[0]
	h.n--
	h.buf[0] = h.buf[h.n]
	i := 0
	for {
		l, r, b := 2*i+1, 2*i+2, i
		if l < h.n && itemBefore(h.buf[l], h.buf[b]) {
			b = l
		}
		if r < h.n && itemBefore(h.buf[r], h.buf[b]) {
			b = r
		}
		if b == i {
			break
		}
		h.buf[i], h.buf[b] = h.buf[b], h.buf[i]
		i = b
	}
	return top
}

// treeVal returns the value of node idx at tree level lvl (0 = leaves).
func (m *Model) treeVal(lvl int, idx uint32) float64 {
	u := &m.lv[0]
	if lvl == 0 {
		return u.prob(int(idx))
	}
	return u.probBook.value(m.tree[lvl-1].at(int(idx)))
}

// unigramTop calls add for the k most probable words in [lo, hi), best
// first, by a best-first search of the maximum tree.
func (m *Model) unigramTop(lo, hi uint32, k int, add func(uint32) bool) {
	var h itemHeap
	// Decompose [lo, hi) into maximal aligned tree nodes.
	span := uint32(1)
	lvl := 0
	for lo < hi {
		upper := lvl == len(m.tree)
		next := span * treeFanout
		for lo < hi && (upper || lo%next != 0) && lo+span <= hi {
			idx := lo / span
			h.push(heapItem{val: m.treeVal(lvl, idx), start: lo, lvl: int8(lvl), idx: idx})
			lo += span
		}
		for hi > lo && (upper || hi%next != 0) && hi-span >= lo {
			hi -= span
			idx := hi / span
			h.push(heapItem{val: m.treeVal(lvl, idx), start: hi, lvl: int8(lvl), idx: idx})
		}
		if upper {
			break
		}
		span = next
		lvl++
	}
	emitted := 0
	for h.n > 0 && emitted < k {
		it := h.pop()
		if it.lvl == 0 {
			if add(it.idx) {
				emitted++
			}
			continue
		}
		cl := int(it.lvl) - 1
		first := it.idx * treeFanout
		var size uint32
		if cl == 0 {
			size = uint32(m.vocab)
		} else {
			size = uint32(m.tree[cl-1].n)
		}
		cspan := uint32(1)
		for range cl {
			cspan *= treeFanout
		}
		for c := first; c < first+treeFanout && c < size; c++ {
			if !h.push(heapItem{val: m.treeVal(cl, c), start: c * cspan, lvl: int8(cl), idx: c}) {
				break
			}
		}
	}
}
