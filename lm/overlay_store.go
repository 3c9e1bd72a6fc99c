package lm

import (
	"cmp"
	"math"
	"slices"
)

// The overlay's counts live in an immutable snapshot (OverlayView) that is
// replaced as a whole on every change. To keep a change cheap, the n-gram
// counts are spread over ovShardCount shards chosen by a hash of the
// context; a change copies the shard pointer array once, then only the
// shards and context nodes it touches (copy-on-write). Everything reachable
// from a published view is never written again.
//
// A context node holds the successors of one context, sorted by token:
// the n-grams "a b w" of the trigram context (a, b), "b w" of the bigram
// context b, and, for unigrams, the words of one bucket of 1<<ovBucketShift
// consecutive tokens (so that a prefix's token range is a run of buckets).
const (
	ovShardBits   = 10
	ovShardCount  = 1 << ovShardBits
	ovBucketShift = 8
	ovTokenBits   = 31 // tokens must stay below 1<<31 to be packed in a key
	tagUni        = uint64(0)
	tagBi         = uint64(1)
	tagTri        = uint64(2)
	uniTopLen     = 24
)

// ovEntry is one counted n-gram: its last word, its count and when it was last used.
type ovEntry struct {
	tok   uint32
	typed uint32  // times the word was typed (unigrams only; never decays; saturates)
	day   int32   // day of last use
	cnt   float64 // count in stored units (see OverlayView.grow)
}

// ovNode holds the successors of one context (or one unigram bucket), sorted by tok.
type ovNode struct {
	key   uint64
	total float64 // Σ cnt over list
	list  []ovEntry
	best  [ovNodeBest]uint32 // positions in list of the highest counts, best first
	nbest int
}

// ovNodeBest is the number of best successors a node keeps in order.
const ovNodeBest = 8

// rank fills the node's best list (O(len(list))).
func (n *ovNode) rank() {
	var tb topBuf
	tb.k = ovNodeBest
	for i, e := range n.list {
		if tb.n == tb.k && e.cnt <= tb.buf[tb.n-1].LogP {
			continue
		}
		tb.push(Scored{ID: uint32(i), LogP: e.cnt})
	}
	n.nbest = tb.n
	for i, s := range tb.buf[:tb.n] {
		n.best[i] = s.ID
	}
}

func (n *ovNode) find(tok uint32) int {
	if n == nil {
		return -1
	}
	i, ok := slices.BinarySearchFunc(n.list, tok, func(e ovEntry, t uint32) int { return cmp.Compare(e.tok, t) })
	if !ok {
		return -1
	}
	return i
}

// ovShard holds context nodes sorted by key.
type ovShard struct{ nodes []*ovNode }

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
	nodes := sh.nodes
	lo, hi := 0, len(nodes)
	for lo < hi {
		m := int(uint(lo+hi) >> 1)
		if nodes[m].key < key {
			lo = m + 1
		} else {
			hi = m
		}
	}
	if lo < len(nodes) && nodes[lo].key == key {
		return nodes[lo]
	}
	return nil
}

// uniEntry returns the unigram entry of tok, or nil.
func (v *OverlayView) uniEntry(tok uint32) *ovEntry {
	n := v.lookup(uniKey(tok))
	if i := n.find(tok); i >= 0 {
		return &n.list[i]
	}
	return nil
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
		sh.nodes = slices.Clone(old.nodes)
	}
	w.v.shards[i] = sh
	w.owned[i] = w.batch
	return sh
}

// apply adds the updates (any order; the slice is sorted in place) to the view.
func (w *writer) apply(ups []ovUpdate) {
	slices.SortFunc(ups, func(a, b ovUpdate) int {
		if c := cmp.Compare(a.key, b.key); c != 0 {
			return c
		}
		return cmp.Compare(a.tok, b.tok)
	})
	v := w.v
	for g := 0; g < len(ups); {
		e := g + 1
		for e < len(ups) && ups[e].key == ups[g].key {
			e++
		}
		key := ups[g].key
		sh := w.shardFor(shardOf(key))
		pos, found := slices.BinarySearchFunc(sh.nodes, key, func(n *ovNode, k uint64) int { return cmp.Compare(n.key, k) })
		var old *ovNode
		if found {
			old = sh.nodes[pos]
		}
		nn := &ovNode{key: key}
		if old != nil {
			nn.total = old.total
			nn.list = make([]ovEntry, 0, len(old.list)+e-g)
		} else {
			nn.list = make([]ovEntry, 0, e-g)
		}
		// Merge the sorted updates into the sorted list.
		i := 0
		var ol []ovEntry
		if old != nil {
			ol = old.list
		}
		isUni := keyTag(key) == tagUni
		for u := g; u < e; {
			t := ups[u].tok
			for i < len(ol) && ol[i].tok < t {
				nn.list = append(nn.list, ol[i])
				i++
			}
			var ent ovEntry
			if i < len(ol) && ol[i].tok == t {
				ent = ol[i]
				i++
			} else {
				ent.tok = t
				v.entries++
				if isUni {
					v.uniTypes++
				}
			}
			for ; u < e && ups[u].tok == t; u++ {
				ent.cnt += ups[u].delta
				nn.total += ups[u].delta
				if isUni {
					v.uniTotal += ups[u].delta
				}
				if s := ent.typed + ups[u].typed; s >= ent.typed {
					ent.typed = s
				}
			}
			ent.day = v.day
			nn.list = append(nn.list, ent)
			if isUni {
				w.noteTop(ent)
			}
		}
		nn.list = append(nn.list, ol[i:]...)
		nn.rank()
		if found {
			sh.nodes[pos] = nn
		} else {
			sh.nodes = slices.Insert(sh.nodes, pos, nn)
		}
		g = e
	}
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
	for _, sh := range v.shards {
		if sh == nil {
			continue
		}
		for _, nd := range sh.nodes {
			a, b := keyTokens(nd.key)
			for _, e := range nd.list {
				g := gram{typed: e.typed, day: e.day, cnt: e.cnt * inv}
				switch keyTag(nd.key) {
				case tagUni:
					g.n, g.toks = 1, [3]uint32{e.tok}
				case tagBi:
					g.n, g.toks = 2, [3]uint32{b, e.tok}
				default:
					g.n, g.toks = 3, [3]uint32{a, b, e.tok}
				}
				dst = append(dst, g)
			}
		}
	}
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
	for _, g := range keep {
		key := gramKey(g)
		if cur == nil || cur.key != key {
			cur = &ovNode{key: key}
			i := shardOf(key)
			if nv.shards[i] == nil {
				nv.shards[i] = &ovShard{}
			}
			nv.shards[i].nodes = append(nv.shards[i].nodes, cur)
		}
		if n := len(cur.list); n > 0 && cur.list[n-1].tok == g.toks[g.n-1] {
			continue // duplicate n-gram: keep the first
		}
		cur.list = append(cur.list, ovEntry{tok: g.toks[g.n-1], typed: g.typed, day: g.day, cnt: g.cnt})
		cur.total += g.cnt
		nv.entries++
		if g.n == 1 {
			nv.uniTypes++
			nv.uniTotal += g.cnt
		}
	}
	for _, sh := range nv.shards {
		if sh != nil {
			for _, nd := range sh.nodes {
				nd.rank()
			}
			slices.SortFunc(sh.nodes, func(a, b *ovNode) int { return cmp.Compare(a.key, b.key) })
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
