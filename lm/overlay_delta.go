package lm

import (
	"slices"
	"sync/atomic"
)

// The write-side delta.
//
// Copying the touched context nodes and shards of the main store on every
// Learn costs far more than the change itself, so a change goes first into
// a delta: a small open-addressing table from a node's key to a patch that
// holds the node's changed or added entries with their new values, its new
// entry count and total, and (for a node of more than ovNodeBest entries)
// its new best list. A patch is immutable: a change makes a new patch that
// copies the previous one's few entries and links to it, tagged with the
// version of the view being built. A reader takes, for a key, the newest
// patch whose version is not past its view's (older views skip newer
// patches, so every view keeps seeing exactly its own state), and reads an
// entry from the patch first, then from the main node the patch was made
// over. Once the delta holds deltaFoldKeys keys, the writer folds it into a
// copy of the main store (the copy-on-write shards of overlay_store.go) and
// the next view starts with an empty delta; views that still use the old
// table keep it, and the writer never touches it again.
//
// Counts and totals are added in the same order as the main store's own
// update does, so a value read through a patch is bit-for-bit the value a
// direct update would have stored.

const (
	// deltaSlots is the size of a delta table (a power of two).
	deltaSlots = 2048
	// deltaFoldKeys is the number of keys at which a delta is folded into
	// the main store (load factor 0.3; one Learn adds at most a few dozen).
	// Project choice, no source: larger folds less often, smaller keeps
	// the table's probes short.
	deltaFoldKeys = 640
)

// ovPatch is one version of a node's delta.
type ovPatch struct {
	ver   uint64   // version of the view that made it
	prev  *ovPatch // the version before it (nil: none since the last fold)
	base  *ovNode  // the node of the main store (nil: a node the main store lacks)
	n     int      // entries of the node with the patch applied
	total float64  // Σ cnt over the node with the patch applied
	ents  []ovEntry
	top   *ovBest // best list of the patched node when n > ovNodeBest
}

// ovDelta is a table of patches by key (linear probing). Slots are only
// ever filled, never emptied; the writer marks a key's home slot, then
// stores the key, then its first patch. A reader whose key's home slot is
// unmarked skips the table (most keys of a query have no patch).
type ovDelta struct {
	home [deltaSlots / 64]atomic.Uint64 // bit s: some key's home slot is s
	keys [deltaSlots]atomic.Uint64      // key+1; 0: empty
	recs [deltaSlots]atomic.Pointer[ovPatch]
	n    int // keys held (read and written by the writer only)
}

func deltaSlot(key uint64) int { return int((key * 0x9E3779B97F4A7C15) >> (64 - 11)) }

// maybe reports whether the table may hold key: false when no key's probe
// starts at key's home slot.
func (d *ovDelta) maybe(key uint64) bool {
	h := deltaSlot(key)
	return d.home[h>>6].Load()&(1<<(h&63)) != 0
}

// get returns the newest patch of key made for version ver or earlier, or nil.
func (d *ovDelta) get(key, ver uint64) *ovPatch {
	if !d.maybe(key) {
		return nil
	}
	for i := deltaSlot(key); ; i = (i + 1) & (deltaSlots - 1) {
		k := d.keys[i].Load()
		if k == 0 {
			return nil
		}
		if k == key+1 {
			p := d.recs[i].Load()
			for p != nil && p.ver > ver {
				p = p.prev
			}
			return p
		}
	}
}

// put makes p the newest patch of key (writer only).
func (d *ovDelta) put(key uint64, p *ovPatch) {
	h := deltaSlot(key)
	for i := h; ; i = (i + 1) & (deltaSlots - 1) {
		k := d.keys[i].Load()
		if k == 0 {
			d.home[h>>6].Or(1 << (h & 63))
			d.keys[i].Store(key + 1)
			d.n++
		} else if k != key+1 {
			continue
		}
		d.recs[i].Store(p)
		return
	}
}

// nref is a node as a view sees it: a node of the main store, a patch over
// it, both, or neither (an empty node).
type nref struct {
	nd *ovNode
	p  *ovPatch
}

// ref returns the node with the key as the view sees it.
func (v *OverlayView) ref(key uint64) nref {
	if v.delta != nil && v.delta.maybe(key) {
		return v.refDelta(key)
	}
	return nref{nd: v.lookup(key)}
}

// refDelta is ref for a key the delta may hold.
func (v *OverlayView) refDelta(key uint64) nref {
	if p := v.delta.get(key, v.ver); p != nil {
		return nref{nd: p.base, p: p}
	}
	return nref{nd: v.lookup(key)}
}

// size returns the number of entries.
func (r nref) size() int {
	switch {
	case r.p != nil:
		return r.p.n
	case r.nd != nil:
		return r.nd.n
	}
	return 0
}

// total returns Σ cnt over the entries.
func (r nref) total() float64 {
	switch {
	case r.p != nil:
		return r.p.total
	case r.nd != nil:
		return r.nd.total
	}
	return 0
}

// find returns the entry of tok, or nil.
func (r nref) find(tok uint32) *ovEntry {
	if r.p == nil {
		return r.nd.find(tok)
	}
	return r.findPatched(tok)
}

// findPatched is find for a node with a patch.
func (r nref) findPatched(tok uint32) *ovEntry {
	s := r.p.ents
	if i := entryLower(s, tok); i < len(s) && s[i].tok == tok {
		return &s[i]
	}
	return r.nd.find(tok)
}

// best returns the list of highest counts (nil for a node of at most ovNodeBest entries).
func (r nref) best() *ovBest {
	switch {
	case r.p != nil:
		return r.p.top
	case r.nd != nil:
		return r.nd.top
	}
	return nil
}

// maxCnt returns the largest count (0 when empty). Counts only grow
// between folds, so a patched entry is at least its old value and the
// largest of the main node's and the patch's counts is the node's largest.
func (r nref) maxCnt() float64 {
	if b := r.best(); b != nil {
		return b.e[0].cnt
	}
	m := 0.0
	if r.nd != nil {
		m = r.nd.maxCnt()
	}
	if r.p != nil {
		for _, e := range r.p.ents {
			m = max(m, e.cnt)
		}
	}
	return m
}

// each calls f for each entry with lo ≤ tok < hi, by increasing tok.
func (r nref) each(lo, hi uint32, f func(uint32, float64)) {
	var ps []ovEntry
	if r.p != nil {
		ps = r.p.ents[entryLower(r.p.ents, lo):]
	}
	if r.nd != nil && r.nd.n > 0 {
		c, i := r.nd.span(lo)
		for ; c < len(r.nd.parts); c, i = c+1, 0 {
			p := r.nd.parts[c]
			for ; i < len(p); i++ {
				t := p[i].tok
				if t >= hi {
					c = len(r.nd.parts)
					break
				}
				for len(ps) > 0 && ps[0].tok < t {
					f(ps[0].tok, ps[0].cnt)
					ps = ps[1:]
				}
				if len(ps) > 0 && ps[0].tok == t {
					f(t, ps[0].cnt)
					ps = ps[1:]
					continue
				}
				f(t, p[i].cnt)
			}
		}
	}
	for _, e := range ps {
		if e.tok >= hi {
			return
		}
		f(e.tok, e.cnt)
	}
}

// entries calls f for every entry (patched values, days and typed counts), by increasing tok.
func (r nref) entries(f func(ovEntry)) {
	var ps []ovEntry
	if r.p != nil {
		ps = r.p.ents
	}
	if r.nd != nil {
		for _, p := range r.nd.parts {
			for _, e := range p {
				for len(ps) > 0 && ps[0].tok < e.tok {
					f(ps[0])
					ps = ps[1:]
				}
				if len(ps) > 0 && ps[0].tok == e.tok {
					e = ps[0]
					ps = ps[1:]
				}
				f(e)
			}
		}
	}
	for _, e := range ps {
		f(e)
	}
}

// eachNode calls f for every non-empty node the view holds, main nodes
// with their patches first, then nodes only the delta holds.
func (v *OverlayView) eachNode(f func(key uint64, r nref)) {
	for _, sh := range v.shards {
		if sh == nil {
			continue
		}
		for _, sl := range sh.slots {
			r := nref{nd: sl.nd}
			if v.delta != nil {
				if p := v.delta.get(sl.key, v.ver); p != nil {
					r.p = p
				}
			}
			f(sl.key, r)
		}
	}
	if v.delta == nil {
		return
	}
	for i := range v.delta.keys {
		k := v.delta.keys[i].Load()
		if k == 0 {
			continue
		}
		if p := v.delta.get(k-1, v.ver); p != nil && p.base == nil {
			f(k-1, nref{p: p})
		}
	}
}

// patchSlab is the number of entries the writer allocates at once for patches.
const patchSlab = 512

// entrySpace returns an empty slice with room for n entries, cut from the
// writer's slab (n larger than a slab gets its own allocation). Slices
// handed out are never written again once published.
func (o *Overlay) entrySpace(n int) []ovEntry {
	if n > patchSlab/4 {
		return make([]ovEntry, 0, n)
	}
	if len(o.slab)+n > cap(o.slab) {
		o.slab = make([]ovEntry, 0, patchSlab)
	}
	s := o.slab[len(o.slab) : len(o.slab) : len(o.slab)+n]
	o.slab = o.slab[:len(o.slab)+n]
	return s
}

// newPatch returns a zeroed patch from the writer's slab.
func (o *Overlay) newPatch() *ovPatch {
	if len(o.pslab) == cap(o.pslab) {
		o.pslab = make([]ovPatch, 0, 64)
	}
	o.pslab = o.pslab[:len(o.pslab)+1]
	return &o.pslab[len(o.pslab)-1]
}

// patch records the updates of one key (sorted by tok) in the delta: it
// makes the key's next patch from its current state cur. It adds counts
// in the order update does, so values match the main store's bit for bit.
func (w *writer) patch(o *Overlay, cur nref, key uint64, ups []ovUpdate) {
	v := w.v
	isUni := keyTag(key) == tagUni
	np := o.newPatch()
	np.ver, np.prev, np.base = v.ver, cur.p, cur.nd
	np.n, np.total = cur.size(), cur.total()
	var old []ovEntry
	if cur.p != nil {
		old = cur.p.ents
	}
	ents := o.entrySpace(len(old) + len(ups))
	i := 0
	for x := 0; x < len(ups); {
		t := ups[x].tok
		for i < len(old) && old[i].tok < t {
			ents = append(ents, old[i])
			i++
		}
		var ent ovEntry
		if i < len(old) && old[i].tok == t {
			ent = old[i]
			i++
		} else if e := cur.nd.find(t); e != nil {
			ent = *e
		} else {
			ent.tok = t
			np.n++
			v.entries++
			if isUni {
				v.uniTypes++
			}
		}
		for ; x < len(ups) && ups[x].tok == t; x++ {
			ent.cnt += ups[x].delta
			np.total += ups[x].delta
			if isUni {
				v.uniTotal += ups[x].delta
			}
			if s := ent.typed + ups[x].typed; s >= ent.typed {
				ent.typed = s
			}
		}
		ent.day = v.day
		ents = append(ents, ent)
		if isUni {
			w.noteTop(ent)
		}
	}
	np.ents = append(ents, old[i:]...)
	if np.n > ovNodeBest {
		nr := nref{nd: cur.nd, p: np}
		if ob := cur.best(); ob != nil {
			b := o.newBest()
			*b = *ob
			for _, u := range ups {
				if e := nr.find(u.tok); e != nil {
					b.note(e.tok, e.cnt)
				}
			}
			np.top = b
		} else {
			b := o.newBest()
			nr.entries(func(e ovEntry) { b.note(e.tok, e.cnt) })
			np.top = b
		}
	}
	if v.delta == nil {
		v.delta = new(ovDelta)
	}
	v.delta.put(key, np)
}

// newBest returns a zeroed best list from the writer's slab.
func (o *Overlay) newBest() *ovBest {
	if len(o.bslab) == cap(o.bslab) {
		o.bslab = make([]ovBest, 0, 16)
	}
	o.bslab = o.bslab[:len(o.bslab)+1]
	return &o.bslab[len(o.bslab)-1]
}

// fold moves the delta into a private copy of the main store and leaves
// the view with an empty delta.
func (w *writer) fold() {
	v := w.v
	d := v.delta
	if d == nil {
		return
	}
	for i := range d.keys {
		k := d.keys[i].Load()
		if k == 0 {
			continue
		}
		key := k - 1
		p := d.get(key, v.ver)
		if p == nil {
			continue
		}
		sh := w.shardFor(shardOf(key))
		pos, found := sh.search(key)
		nn := foldNode(p, key)
		if found {
			sh.slots[pos].nd = nn
		} else {
			sh.slots = slices.Insert(sh.slots, pos, ovSlot{key, nn})
		}
	}
	v.delta = nil
}

// foldNode returns a new main node: p's base node with p's entries in
// place. Chunks of the base without patched entries are shared.
func foldNode(p *ovPatch, key uint64) *ovNode {
	nn := &ovNode{key: key, n: p.n, total: p.total}
	if p.n > ovNodeBest {
		b := *p.top
		nn.top = &b
	}
	old := p.base
	if old == nil || old.n == 0 {
		var parts [][]ovEntry
		list := p.ents
		if len(list) <= ovSmall {
			parts = [][]ovEntry{append(nn.small[:0], list...)}
		} else {
			list = append([]ovEntry(nil), list...)
			for len(list) > 0 {
				n := min(len(list), ovChunkFill)
				parts = append(parts, list[:n:n])
				list = list[n:]
			}
		}
		nn.setParts(parts)
		return nn
	}
	var parts [][]ovEntry
	if len(old.parts) > 1 {
		parts = make([][]ovEntry, 0, len(old.parts)+len(p.ents))
	} else {
		parts = nn.one[:0]
	}
	ps := p.ents
	c := 0
	for len(ps) > 0 {
		cu := old.chunkOf(ps[0].tok)
		parts = append(parts, old.parts[c:cu]...)
		ue := 1
		for ue < len(ps) && old.chunkOf(ps[ue].tok) == cu {
			ue++
		}
		ol := old.parts[cu]
		var chunk []ovEntry
		if len(old.parts) == 1 && len(ol)+ue <= ovSmall {
			chunk = nn.small[:0]
		} else {
			chunk = make([]ovEntry, 0, len(ol)+ue)
		}
		i := 0
		for _, e := range ps[:ue] {
			for i < len(ol) && ol[i].tok < e.tok {
				chunk = append(chunk, ol[i])
				i++
			}
			if i < len(ol) && ol[i].tok == e.tok {
				i++
			}
			chunk = append(chunk, e)
		}
		chunk = append(chunk, ol[i:]...)
		for len(chunk) > ovChunkMax {
			h := min(len(chunk)/2, ovChunkFill)
			parts = append(parts, chunk[:h:h])
			chunk = chunk[h:]
		}
		parts = append(parts, chunk)
		c = cu + 1
		ps = ps[ue:]
	}
	parts = append(parts, old.parts[c:]...)
	nn.setParts(parts)
	return nn
}
