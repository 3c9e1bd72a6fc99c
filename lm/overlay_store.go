package lm

import (
	"cmp"
	"math"
	"slices"
)

// The overlay's counts live in an immutable snapshot (OverlayView) that is
// replaced as a whole on every change. The main store spreads the n-gram
// counts over ovShardCount shards chosen by a hash of the context. A Learn
// or Commit records its changes in the view's delta (overlay_delta.go);
// folding the delta into the main store, once it has grown, copies the
// shard pointer array once, then only the shards, context nodes and chunks
// it touches (copy-on-write). Everything reachable from a published view
// is never written again, except the delta's table, whose slots a writer
// fills with patches of later versions that earlier views skip.
//
// A context node holds the successors of one context, sorted by token:
// the n-grams "a b w" of the trigram context (a, b), "b w" of the bigram
// context b, and, for unigrams, the words of one bucket of 1<<ovBucketShift
// consecutive tokens (so that a prefix's token range is a run of buckets).
// The successors are kept in chunks of at most ovChunkMax entries (a node
// of at most ovSmall entries holds its one chunk inline), so a change to a
// context with a thousand successors copies one chunk and the chunk table,
// not the list; a node of more than ovNodeBest entries also keeps its
// highest counts in order, updated as counts grow (they only grow between
// rebuilds), for the top-k search.
const (
	ovShardBits   = 10
	ovShardCount  = 1 << ovShardBits
	ovBucketShift = 8
	ovTokenBits   = 31 // tokens must stay below 1<<31 to be packed in a key
	tagUni        = uint64(0)
	tagBi         = uint64(1)
	tagTri        = uint64(2)
	uniTopLen     = 64
)

// ovEntry is one counted n-gram: its last word, its count and when it was last used.
type ovEntry struct {
	tok   uint32
	typed uint32  // times the word was typed (unigrams only; never decays; saturates)
	day   int32   // day of last use
	cnt   float64 // count in stored units (see OverlayView.grow)
}

// ovNode holds the successors of one context (or one unigram bucket),
// sorted by tok, in chunks of at most ovChunkMax entries, so that a change
// copies one chunk and the chunk table instead of the whole list.
type ovNode struct {
	key   uint64
	total float64 // Σ cnt over the node
	n     int     // number of entries
	parts [][]ovEntry
	one   [1][]ovEntry     // backing of parts for a node of one chunk
	small [ovSmall]ovEntry // backing of the chunk of a node of at most ovSmall entries
	top   *ovBest          // the highest counts, for a node of more than ovNodeBest entries
}

// ovSmall is the size of the chunk a node holds inline (most contexts have
// one or two successors).
const ovSmall = 2

// ovBest lists a node's highest counts, best first (ties: lower tok).
type ovBest struct {
	e [ovNodeBest]topEntry
	n int
}

const (
	// ovNodeBest is the number of best successors a node keeps in order.
	ovNodeBest = 16
	// ovChunkMax is the largest chunk; a fuller one is split in halves.
	ovChunkMax = 32
	// ovChunkFill is the chunk size a rebuild lays out.
	ovChunkFill = 24
)

// setParts points the node at its chunks.
func (n *ovNode) setParts(parts [][]ovEntry) {
	if len(parts) == 1 {
		n.one[0] = parts[0]
		n.parts = n.one[:]
		return
	}
	n.parts = parts
}

// rank fills the node's best list from scratch (O(n)); small nodes keep none.
func (n *ovNode) rank() {
	n.top = nil
	if n.n <= ovNodeBest {
		return
	}
	n.top = new(ovBest)
	for _, p := range n.parts {
		for _, e := range p {
			n.top.note(e.tok, e.cnt)
		}
	}
}

// maxCnt returns the largest count of the node (0 when empty).
func (n *ovNode) maxCnt() float64 {
	if n.top != nil {
		return n.top.e[0].cnt
	}
	m := 0.0
	for _, p := range n.parts {
		for _, e := range p {
			m = max(m, e.cnt)
		}
	}
	return m
}

// note keeps the list exact after the count of tok grew to cnt (counts
// only grow between rebuilds, so a word outside the list can only enter it
// through such a change).
func (b *ovBest) note(tok uint32, cnt float64) {
	nb := b.n
	i := 0
	for i < nb && b.e[i].tok != tok {
		i++
	}
	if i == nb { // not listed: enter at the end if there is room or it beats the last
		if nb == ovNodeBest {
			last := b.e[nb-1]
			if !(cnt > last.cnt || cnt == last.cnt && tok < last.tok) {
				return
			}
			i = nb - 1
		} else {
			i = nb
			b.n++
		}
	}
	for i > 0 && (cnt > b.e[i-1].cnt || cnt == b.e[i-1].cnt && tok < b.e[i-1].tok) {
		b.e[i] = b.e[i-1]
		i--
	}
	b.e[i] = topEntry{tok: tok, cnt: cnt}
}

// chunkOf returns the index of the chunk that holds tok or would receive it.
func (n *ovNode) chunkOf(tok uint32) int {
	ps := n.parts
	lo, hi := 1, len(ps)
	for lo < hi {
		m := int(uint(lo+hi) >> 1)
		if ps[m][0].tok <= tok {
			lo = m + 1
		} else {
			hi = m
		}
	}
	return lo - 1
}

// find returns the entry of tok, or nil.
func (n *ovNode) find(tok uint32) *ovEntry {
	if n == nil || n.n == 0 {
		return nil
	}
	p := n.parts[n.chunkOf(tok)]
	i := entryLower(p, tok)
	if i < len(p) && p[i].tok == tok {
		return &p[i]
	}
	return nil
}

// span returns the position of the first entry with tok ≥ t: a chunk index
// and an index inside it (len(parts), 0 past the end).
func (n *ovNode) span(t uint32) (int, int) {
	if n.n == 0 {
		return len(n.parts), 0
	}
	c := n.chunkOf(t)
	i := entryLower(n.parts[c], t)
	if i == len(n.parts[c]) {
		return c + 1, 0
	}
	return c, i
}

// ovShard holds context nodes sorted by key.
type ovShard struct {
	slots []ovSlot
}

// ovSlot is a node with its key beside the pointer, so that a lookup's
// binary search does not follow pointers.
type ovSlot struct {
	key uint64
	nd  *ovNode
}

// search returns the position of key in the shard, or where it would go.
func (sh *ovShard) search(key uint64) (int, bool) {
	sl := sh.slots
	lo, hi := 0, len(sl)
	for lo < hi {
		m := int(uint(lo+hi) >> 1)
		if sl[m].key < key {
			lo = m + 1
		} else {
			hi = m
		}
	}
	return lo, lo < len(sl) && sl[lo].key == key
}

func uniKey(tok uint32) uint64  { return tagUni<<62 | uint64(tok>>ovBucketShift) }
func biKey(b uint32) uint64     { return tagBi<<62 | uint64(b) }
func triKey(a, b uint32) uint64 { return tagTri<<62 | uint64(a)<<ovTokenBits | uint64(b) }
func shardOf(key uint64) int    { return int((key * 0x9E3779B97F4A7C15) >> (64 - ovShardBits)) }
func keyTag(key uint64) uint64  { return key >> 62 }
func keyTokens(key uint64) (a, b uint32) {
	return uint32(key>>ovTokenBits) & (1<<ovTokenBits - 1), uint32(key) & (1<<ovTokenBits - 1)
}

// lookup returns the node with the key, or nil.
func (v *OverlayView) lookup(key uint64) *ovNode {
	sh := v.shards[shardOf(key)]
	if sh == nil {
		return nil
	}
	if i, ok := sh.search(key); ok {
		return sh.slots[i].nd
	}
	return nil
}

// uniEntry returns the unigram entry of tok, or nil.
func (v *OverlayView) uniEntry(tok uint32) *ovEntry {
	key := uniKey(tok)
	if v.delta == nil || !v.delta.maybe(key) {
		return v.lookup(key).find(tok)
	}
	return v.refDelta(key).find(tok)
}

// ovUpdate is one count change waiting to be applied.
type ovUpdate struct {
	key   uint64
	tok   uint32
	typed uint32
	delta float64
}

// writer applies changes to a private copy of a view (under Overlay.mu).
type writer struct {
	v      *OverlayView
	o      *Overlay              // slabs for patches (nil: the writer applies nothing)
	owned  *[ovShardCount]uint64 // batch that copied each shard
	batch  uint64
	copied bool // v.shards is private
}

// shardFor returns a private copy of shard i, copying it once per batch.
func (w *writer) shardFor(i int) *ovShard {
	if !w.copied {
		cp := *w.v.shards
		w.v.shards = &cp
		w.copied = true
	}
	if w.owned[i] == w.batch && w.v.shards[i] != nil {
		return w.v.shards[i]
	}
	sh := &ovShard{}
	if old := w.v.shards[i]; old != nil {
		sh.slots = slices.Clone(old.slots)
	}
	w.v.shards[i] = sh
	w.owned[i] = w.batch
	return sh
}

// apply adds the updates (any order; the slice is sorted in place) to the
// view's delta (see overlay_delta.go).
func (w *writer) apply(ups []ovUpdate) {
	sortUpdates(ups)
	// Find every touched node and read the entries the patches will need
	// in stages: each stage's loads depend only on the stage before, not
	// on each other, so the processor overlaps their cache misses instead
	// of waiting for a binary search's probes one after another. The
	// patches then read memory that is already near.
	o := w.o
	v := w.v
	refs := o.refs[:0]
	for g := 0; g < len(ups); {
		e := g + 1
		for e < len(ups) && ups[e].key == ups[g].key {
			e++
		}
		gr := groupRef{lo: g, hi: e}
		if sh := v.shards[shardOf(ups[g].key)]; sh != nil {
			gr.slots = sh.slots
		}
		refs = append(refs, gr)
		g = e
	}
	o.refs = refs
	touch := uint64(0)
	for i := range refs { // every cache line of the shards' slot arrays
		s := refs[i].slots
		for j := 0; j < len(s); j += 4 {
			touch += s[j].key
		}
	}
	for i := range refs {
		refs[i].r = v.ref(ups[refs[i].lo].key)
	}
	for i := range refs { // node headers
		if nd := refs[i].r.nd; nd != nil && nd.n > 0 {
			touch += uint64(len(nd.parts[0]))
		}
	}
	for i := range refs { // the chunks the updates fall in
		nd := refs[i].r.nd
		if nd == nil || nd.n == 0 {
			continue
		}
		for _, u := range ups[refs[i].lo:refs[i].hi] {
			p := nd.parts[nd.chunkOf(u.tok)]
			for j := 0; j < len(p); j += 2 {
				touch += uint64(p[j].tok)
			}
		}
	}
	o.touch = touch
	for i := range refs {
		g := &refs[i]
		w.patch(o, g.r, ups[g.lo].key, ups[g.lo:g.hi])
	}
}

// sortUpdates sorts updates by key, then tok, keeping updates of the same
// n-gram in the order given. A sentence's few dozen go through an
// insertion sort with the comparison inline, which is cheaper at that size
// than a general sort calling a comparison function.
func sortUpdates(ups []ovUpdate) {
	less := func(a, b *ovUpdate) bool { return a.key < b.key || a.key == b.key && a.tok < b.tok }
	if len(ups) > smallSort {
		slices.SortStableFunc(ups, func(a, b ovUpdate) int {
			if c := cmp.Compare(a.key, b.key); c != 0 {
				return c
			}
			return cmp.Compare(a.tok, b.tok)
		})
		return
	}
	for i := 1; i < len(ups); i++ {
		u := ups[i]
		j := i
		for j > 0 && less(&u, &ups[j-1]) {
			ups[j] = ups[j-1]
			j--
		}
		ups[j] = u
	}
}

// smallSort is the length up to which sortUpdates and sortCache use an
// insertion sort. Common practice, no source: insertion sort wins for a
// few dozen elements.
const smallSort = 64

// groupRef is the node of one key of a batch of updates and the bounds of
// the key's updates.
type groupRef struct {
	r      nref
	slots  []ovSlot // the main store's slots of the key's shard
	lo, hi int
}

// noteTop keeps v.top, the most counted suggestible unigrams, up to date
// after a count grew.
func (w *writer) noteTop(ent ovEntry) {
	v := w.v
	if !v.suggestible(ent.tok, ent.typed) {
		return
	}
	top := v.top[:v.nTop]
	if i := slices.IndexFunc(top, func(s topEntry) bool { return s.tok == ent.tok }); i >= 0 {
		top = slices.Delete(top, i, i+1)
	}
	s := topEntry{tok: ent.tok, cnt: ent.cnt}
	pos := 0
	for pos < len(top) && (top[pos].cnt > s.cnt || top[pos].cnt == s.cnt && top[pos].tok < s.tok) {
		pos++
	}
	if pos >= uniTopLen {
		v.nTop = len(top)
		return
	}
	if len(top) == uniTopLen {
		top = top[:uniTopLen-1]
	}
	top = slices.Insert(top, pos, s)
	v.nTop = len(top)
}

type topEntry struct {
	tok uint32
	cnt float64
}

// gram is an n-gram in flat form, used to rebuild, filter and save views.
type gram struct {
	n     int
	toks  [3]uint32 // context then word
	typed uint32
	day   int32
	cnt   float64 // effective count
}

// flatten lists every n-gram of v with effective counts, in no particular order.
func (v *OverlayView) flatten(dst []gram) []gram {
	if v.shards == nil {
		return dst
	}
	inv := 1 / v.grow
	v.eachNode(func(key uint64, r nref) {
		a, b := keyTokens(key)
		r.entries(func(e ovEntry) {
			g := gram{typed: e.typed, day: e.day, cnt: e.cnt * inv}
			switch keyTag(key) {
			case tagUni:
				g.n, g.toks = 1, [3]uint32{e.tok}
			case tagBi:
				g.n, g.toks = 2, [3]uint32{b, e.tok}
			default:
				g.n, g.toks = 3, [3]uint32{a, b, e.tok}
			}
			dst = append(dst, g)
		})
	})
	return dst
}

// minCount is the effective count below which a decayed n-gram is dropped
// when the view is rebuilt. Project choice, no source.
const minCount = 0.01

// rebuild returns a copy of v holding exactly the given n-grams (effective
// counts) with user words renumbered: only words that some n-gram or
// rejected pair uses are kept, in byte order. The decay epoch restarts, so
// stored counts equal effective counts.
func (v *OverlayView) rebuild(grams []gram) *OverlayView {
	nv := *v
	nv.delta = nil
	nv.epoch = v.useDays
	nv.grow = 1
	// Renumber user words.
	V := v.V
	used := make([]bool, len(v.words))
	for _, g := range grams {
		for _, t := range g.toks[:g.n] {
			if t >= V && int(t-V) < len(used) {
				used[t-V] = true
			}
		}
	}
	order := make([]uint32, 0, len(v.words))
	for i, u := range used {
		if u {
			order = append(order, uint32(i))
		}
	}
	slices.SortFunc(order, func(a, b uint32) int { return cmp.Compare(v.words[a], v.words[b]) })
	remap := make([]uint32, len(v.words))
	nv.words = make([]string, len(order))
	nv.surf = make([]string, len(order))
	nv.byStr = make([]uint32, len(order))
	for ni, oi := range order {
		remap[oi] = V + uint32(ni)
		nv.words[ni] = v.words[oi]
		nv.surf[ni] = v.surf[oi]
		nv.byStr[ni] = uint32(ni)
	}
	nv.shards = new([ovShardCount]*ovShard)
	nv.entries, nv.uniTypes, nv.uniTotal, nv.nTop = 0, 0, 0, 0
	nv.top = [uniTopLen]topEntry{}
	keep := grams[:0]
	for _, g := range grams {
		if !(g.cnt >= minCount) || math.IsInf(g.cnt, 0) {
			continue
		}
		ok := true
		for j, t := range g.toks[:g.n] {
			if t >= V {
				if int(t-V) >= len(remap) || !used[t-V] {
					ok = false
					break
				}
				g.toks[j] = remap[t-V]
			}
		}
		if ok {
			keep = append(keep, g)
		}
	}
	slices.SortFunc(keep, func(a, b gram) int {
		if c := cmp.Compare(gramKey(a), gramKey(b)); c != 0 {
			return c
		}
		return cmp.Compare(a.toks[a.n-1], b.toks[b.n-1])
	})
	var cur *ovNode
	var list []ovEntry
	flush := func() {
		if cur == nil {
			return
		}
		var parts [][]ovEntry
		for len(list) > 0 {
			n := min(len(list), ovChunkFill)
			parts = append(parts, list[:n:n])
			list = list[n:]
		}
		cur.setParts(parts)
		cur.rank()
	}
	for _, g := range keep {
		key := gramKey(g)
		if cur == nil || cur.key != key {
			flush()
			cur = &ovNode{key: key}
			list = nil
			i := shardOf(key)
			if nv.shards[i] == nil {
				nv.shards[i] = &ovShard{}
			}
			nv.shards[i].slots = append(nv.shards[i].slots, ovSlot{key, cur})
		}
		if n := len(list); n > 0 && list[n-1].tok == g.toks[g.n-1] {
			continue // duplicate n-gram: keep the first
		}
		list = append(list, ovEntry{tok: g.toks[g.n-1], typed: g.typed, day: g.day, cnt: g.cnt})
		cur.total += g.cnt
		cur.n++
		nv.entries++
		if g.n == 1 {
			nv.uniTypes++
			nv.uniTotal += g.cnt
		}
	}
	flush()
	for _, sh := range nv.shards {
		if sh != nil {
			slices.SortFunc(sh.slots, func(a, b ovSlot) int { return cmp.Compare(a.key, b.key) })
		}
	}
	nv.cache = v.cache.remap(V, func(t uint32) uint32 {
		if i := int(t - V); i < len(used) && used[i] {
			return remap[i]
		}
		return noPrev
	})
	w := writer{v: &nv, copied: true}
	for _, g := range keep {
		if g.n == 1 {
			w.noteTop(ovEntry{tok: g.toks[0], typed: g.typed, cnt: g.cnt})
		}
	}
	return &nv
}

func gramKey(g gram) uint64 {
	switch g.n {
	case 1:
		return uniKey(g.toks[0])
	case 2:
		return biKey(g.toks[0])
	}
	return triKey(g.toks[0], g.toks[1])
}
