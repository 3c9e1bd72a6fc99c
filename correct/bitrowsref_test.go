package correct

import "math/bits"

// The keys' rows and walk as they were before the bit rows (round 11),
// kept as the reference the current ones must equal: the banded byte
// rows (refUnitRows), the filter over them (refSkelFilter) and the walk
// with its skeleton-only part (refKeyWalk11, refSkelWalk11).

// refSkelFilter is skelFilter over refUnitRows.
type refSkelFilter struct {
	skel    refUnitRows // the skeleton's rows, by skeleton bytes walked
	plain   refUnitRows // the word's rows, by depth
	k       []int32     // by depth: skeleton bytes of the path to that depth
	skelOK  []bool      // by depth: a word below may have a skeleton in reach
	plainOK []bool      // by depth: a word below may be within plainEdits
	skMiss  []uint32    // by depth: the typed skeleton's letters missing below, when skelOK
	skRest  []uint8     // by depth: the longest skeleton tail below (restLens.skel), when skelOK
	skMask  [][4]uint64 // by skeleton bytes walked: the byte mask (mask) of keyTrie.skelWalk
	buf     []byte      // the typed skeleton
	tw      []byte      // the typed word
}

// reset prepares the filter for typed (lower-cased) and walks of at most
// maxDepth bytes.
func (f *refSkelFilter) reset(typed string, maxDepth int) {
	f.buf = appendSkeleton(f.buf[:0], typed)
	f.skel.reset(f.buf, maxDepth, skelEditsFor(len(f.buf)))
	f.tw = append(f.tw[:0], typed...)
	f.plain.reset(f.tw, maxDepth, plainEdits)
	f.k = grow(f.k, maxDepth+1)
	f.k[0] = 0
	f.skelOK = grow(f.skelOK, maxDepth+1)
	f.plainOK = grow(f.plainOK, maxDepth+1)
	f.skelOK[0], f.plainOK[0] = true, true
	f.skMiss = grow(f.skMiss, maxDepth+1)
	f.skRest = grow(f.skRest, maxDepth+1)
	f.skMiss[0] = ^uint32(0) // no bound computed at the empty prefix (round 11)
	f.skMask = grow(f.skMask, f.skel.nrows)
}

// step extends the path at depth d by byte c to depth d+1; below is the
// set of letters (belowBit) on the paths below the new prefix and rest
// the lengths of the rests below it (restLens). It reports false when no
// word below can be kept: for each key, the distance of every word below
// is over its limit (by refUnitRows.bound). A key once out of reach stays so
// below (the words below a prefix are among those below its parent), and
// its rows are no longer computed.
func (f *refSkelFilter) step(d int, c byte, below uint32, rest restLens) bool {
	p := f.plainOK[d]
	if p {
		f.plain.push(d, c)
		p = f.plain.bound(d+1, below, rest.min, rest.max) <= f.plain.maxd
	}
	f.plainOK[d+1] = p
	k := int(f.k[d])
	sk := f.skelOK[d]
	if sk {
		moved := false
		if inSkeleton(c) && (k == 0 || f.skel.path[k-1] != c) && k+1 < f.skel.nrows {
			f.skel.push(k, c)
			k++
			moved = true
		}
		miss := f.skel.tall &^ below
		// A byte the skeleton leaves out, with the same letters missing
		// below and the same longest skeleton tail, gives the bound the
		// parent had, which let it through.
		if moved || miss != f.skMiss[d] || rest.skel != f.skRest[d] {
			sk = f.skel.bound(k, below, 0, rest.skel) <= f.skel.maxd
		}
		f.skMiss[d+1], f.skRest[d+1] = miss, rest.skel
	}
	f.k[d+1] = int32(k)
	f.skelOK[d+1] = sk
	return p || sk
}

// mask returns a superset of the bytes c for which step(d, c, ·) can
// report true, so that the walk can skip the other children of a prefix
// without a step each: a key within reach lets through every byte while
// it has an edit to spare, else only the typed bytes its row can match
// (or swap) next; the skeleton also lets through the bytes that leave it
// as it is.
func (f *refSkelFilter) mask(d int) (m [4]uint64) {
	all := [4]uint64{^uint64(0), ^uint64(0), ^uint64(0), ^uint64(0)}
	if f.plainOK[d] && f.plain.nextMask(d, &m) {
		return all
	}
	if f.skelOK[d] {
		k := int(f.k[d])
		if f.skel.nextMask(k, &m) {
			return all
		}
		for i := range m {
			m[i] |= notSkeleton[i]
		}
		if k > 0 {
			c := f.skel.path[k-1]
			m[c>>6] |= 1 << (c & 63)
		}
	}
	return m
}

// accepts reports whether the word spelled by the path to depth d is
// kept.
func (f *refSkelFilter) accepts(d int) bool {
	return f.skelOK[d] && f.skel.final(int(f.k[d])) || f.plainOK[d] && f.plain.final(d)
}

// refUnitRows is unitRows as banded byte rows (round 11), kept as the
// reference: the unit-cost optimal-string-alignment DP of a walked key
// against a typed key t, one row per walked byte, entries capped at
// maxd+1 (a capped entry stands for any larger distance, so that every
// comparison with maxd stays exact).
type refUnitRows struct {
	t    []byte
	tall uint32     // the letters (belowBit) of t
	pos  [32]uint64 // pos[i]: the typed positions of letters of class i (29 classes)
	// posOf[b][x]: the typed positions of the letters of a set (of
	// belowBit) whose byte b is x, so that bound finds the positions of
	// the letters missing below by four lookups rather than one per
	// letter (8 KB, filled by reset in about 1,000 steps).
	posOf [4][256]uint64
	maxd  uint8
	rows  []uint8 // row k at rows[k*(len(t)+1):]
	rmin  []uint8 // by row: its least entry
	path  []byte  // the walked key
	nrows int
}

// reset prepares u for typed key t, at most maxRows walked bytes and
// maxd edits.
func (u *refUnitRows) reset(t []byte, maxRows int, maxd uint8) {
	u.t = append(u.t[:0], t...)
	u.maxd = maxd
	u.tall = 0
	u.pos = [32]uint64{}
	for j, b := range u.t {
		u.tall |= belowBit(b)
		u.pos[bitIndex(belowBit(b))] |= 1 << j
	}
	for b := range u.posOf {
		u.posOf[b][0] = 0
		for x := 1; x < 256; x++ {
			low := x & -x
			u.posOf[b][x] = u.posOf[b][x&^low] | u.pos[b*8+bits.TrailingZeros(uint(low))]
		}
	}
	w := len(u.t) + 1
	u.nrows = maxRows + 1
	u.rows = grow(u.rows, u.nrows*w)
	for j := range w {
		u.rows[j] = uint8(min(j, int(maxd)+1))
	}
	u.rmin = grow(u.rmin, u.nrows)
	u.rmin[0] = 0
	u.path = grow(u.path, u.nrows)
}

// push computes row k+1 from rows k and k-1 for walked byte c
// (k+1 < nrows). Only the band of typed positions within maxd of k+1 can
// hold entries within maxd; the entries just outside it are set to the
// cap for the next row to read, and the others are left stale (see at).
func (u *refUnitRows) push(k int, c byte) {
	w := len(u.t) + 1
	n := w - 1
	md := int(u.maxd)
	u.path[k] = c
	P := u.rows[k*w : (k+1)*w]
	R := u.rows[(k+1)*w : (k+2)*w]
	R[0] = uint8(min(k+1, md+1))
	m := R[0]
	lo, hi := max(1, k+1-md), min(n, k+1+md)
	if lo > 1 && lo-1 <= n {
		R[lo-1] = u.maxd + 1
	}
	for j := lo; j <= hi; j++ {
		v := P[j-1]
		if u.t[j-1] != c {
			v++
		}
		v = min(v, P[j]+1, R[j-1]+1)
		if k > 0 && j > 1 && u.t[j-1] == u.path[k-1] && u.t[j-2] == c {
			v = min(v, u.rows[(k-1)*w+j-2]+1)
		}
		R[j] = min(v, u.maxd+1)
		m = min(m, R[j])
	}
	if hi < n {
		R[hi+1] = u.maxd + 1
	}
	u.rmin[k+1] = m
}

// nextMask adds to m the bytes c for which row k+1 (pushed with c) can
// hold an entry within maxd, or reports true when every byte can: while
// k+1 is within maxd (its first entry), or while row k holds an entry
// below maxd (an edit to spare: c left out); else c must match a typed
// byte after an entry of row k within maxd, or swap with the walked key's
// last byte.
func (u *refUnitRows) nextMask(k int, m *[4]uint64) bool {
	md := int(u.maxd)
	n := len(u.t)
	if k+1 <= md || u.rmin[k] < u.maxd {
		return true
	}
	for j := max(1, k+1-md); j <= min(n, k+1+md); j++ {
		if u.at(k, j-1) <= u.maxd {
			c := u.t[j-1]
			m[c>>6] |= 1 << (c & 63)
		}
		if k > 0 && j > 1 && u.t[j-1] == u.path[k-1] && u.at(k-1, j-2) < u.maxd {
			c := u.t[j-2]
			m[c>>6] |= 1 << (c & 63)
		}
	}
	return false
}

// at returns entry j of row k, the cap outside the row's band.
func (u *refUnitRows) at(k, j int) uint8 {
	md := int(u.maxd)
	if j > 0 && (j < k-md || j > k+md) {
		return u.maxd + 1
	}
	return u.rows[k*(len(u.t)+1)+j]
}

// final reports whether the walked key of row k is within maxd edits of
// the typed key.
func (u *refUnitRows) final(k int) bool {
	return u.at(k, len(u.t)) <= u.maxd
}

// bound returns a lower bound on the distance of any walked key that
// continues the one of row k with letters of below and with at least lo
// and at most hi more bytes, exact where it is within maxd: every
// alignment passes through a cell of row k at some typed position j or
// swaps the key's last byte with the next, jumping from row k-1 at j-2 to
// row k+1 at j. From there on, each typed byte whose letter is on no path
// below costs an edit, and so does each byte by which the typed tail is
// longer than hi or shorter than lo (an insertion or deletion each); the
// tail pays the larger of the two counts. Only the rows' bands can hold
// entries within maxd, so only they are read.
func (u *refUnitRows) bound(k int, below uint32, lo, hi uint8) uint8 {
	n, md, w := len(u.t), int(u.maxd), len(u.t)+1
	rows := u.rmin[k] // the rows alone: every term is at least this
	if k > 0 {
		rows = min(rows, u.rmin[k-1]+1)
	}
	miss := u.tall &^ below
	if rows > u.maxd || miss == 0 && int(lo) <= n-min(n, k+md) && int(hi) >= n-max(0, k-md) {
		// Out of reach by the rows alone, or every typed letter is
		// below and no tail in the bands is out of the lengths' reach.
		return rows
	}
	// The typed positions whose letter is on no path below.
	mm := u.posOf[0][miss&255] | u.posOf[1][miss>>8&255] | u.posOf[2][miss>>16&255] | u.posOf[3][miss>>24]
	// Each term: an entry plus what the typed bytes from j on cost at
	// least after it, the larger of the letters missing below and the
	// length gap to a walked tail of l to h bytes.
	lb := u.maxd + 1
	R := u.rows[k*w : (k+1)*w]
	l, h := int(lo), int(hi)
	for j := max(0, k-md); j <= min(n, k+md); j++ {
		r := n - j
		g := max(0, r-h, l-r, bits.OnesCount64(mm>>j))
		lb = min(lb, R[j]+uint8(min(g, md+1)))
	}
	if k > 0 && h > 0 {
		Q := u.rows[(k-1)*w : k*w]
		l, h := max(l, 1)-1, h-1
		for j := max(0, k-1-md); j <= min(n-2, k-1+md); j++ {
			r := n - j - 2
			g := max(0, r-h, l-r, bits.OnesCount64(mm>>(j+2)))
			lb = min(lb, Q[j]+1+uint8(min(g, md+1)))
		}
	}
	return lb
}

// refKeyWalk11 is keyTrie.keyWalk of round 11 over refSkelFilter: the
// walk under the keys alone from node of g at depth d, going on with
// refSkelWalk11 below a child whose plain key is out of reach.
func (t *keyTrie) refKeyWalk11(f *refSkelFilter, g *belowTable, node, d, maxDepth int) int32 {
	ok, _ := g.final(node)
	accept := ok && f.accepts(d)
	idx := int32(len(t.nodes))
	t.nodes = append(t.nodes, keyNode{accept: accept})
	base := len(t.pending)
	if d < maxDepth {
		m := f.mask(d)
		lo, hi := g.edges(node)
		for k := lo; k < hi; k++ {
			c := g.eb[k]
			if m[c>>6]&(1<<(c&63)) == 0 {
				continue
			}
			t.steps++
			if t.steps > keyWalkMax {
				return -1
			}
			next := int(g.en[k])
			if !f.step(d, c, g.nodes[next].sets.below(), g.rest[next]) {
				continue
			}
			var ch int32
			if f.plainOK[d+1] {
				ch = t.refKeyWalk11(f, g, next, d+1, maxDepth)
			} else {
				// Only the skeleton key is left below: skelWalk.
				sl := int(f.k[d+1])
				f.skMask[sl] = f.mask(d + 1)
				ch = t.refSkelWalk11(f, g, next, d+1, maxDepth, f.skel.final(sl))
			}
			if ch >= 0 {
				t.pending = append(t.pending, keyEdge{k: int32(k), child: ch})
			} else if t.steps > keyWalkMax {
				return -1
			}
		}
	}
	return t.close(idx, base, accept)
}

// refSkelWalk11 is keyTrie.skelWalk of round 11 over refSkelFilter: the
// walk below a prefix whose plain key is out of reach, with fin whether
// its skeleton is within reach.
func (t *keyTrie) refSkelWalk11(f *refSkelFilter, g *belowTable, node, d, maxDepth int, fin bool) int32 {
	ok, _ := g.final(node)
	accept := ok && fin
	idx := int32(len(t.nodes))
	t.nodes = append(t.nodes, keyNode{accept: accept})
	base := len(t.pending)
	if d < maxDepth {
		sk := &f.skel
		k := int(f.k[d])
		var last byte
		if k > 0 {
			last = sk.path[k-1]
		}
		miss0, rest0 := f.skMiss[d], f.skRest[d]
		m := &f.skMask[k]
		lo, hi := g.edges(node)
		for x := lo; x < hi; x++ {
			c := g.eb[x]
			if m[c>>6]&(1<<(c&63)) == 0 {
				continue
			}
			t.steps++
			if t.steps > keyWalkMax {
				return -1
			}
			next := int(g.en[x])
			below := g.nodes[next].sets.below()
			rs := g.rest[next].skel
			miss := sk.tall &^ below
			k2 := k
			if inSkeleton(c) && (k == 0 || last != c) && k+1 < sk.nrows {
				sk.push(k, c)
				k2 = k + 1
				if sk.bound(k2, below, 0, rs) > sk.maxd {
					continue
				}
			} else if (miss != miss0 || rs != rest0) && sk.bound(k, below, 0, rs) > sk.maxd {
				// The parent's bound, which passed, holds unless the
				// letters missing below or the longest tail changed.
				continue
			}
			f.k[d+1] = int32(k2)
			f.plainOK[d+1], f.skelOK[d+1] = false, true
			f.skMiss[d+1], f.skRest[d+1] = miss, rs
			var ch int32
			if k2 == k {
				ch = t.refSkelWalk11(f, g, next, d+1, maxDepth, fin)
			} else {
				f.skMask[k2] = f.mask(d + 1)
				ch = t.refSkelWalk11(f, g, next, d+1, maxDepth, sk.final(k2))
			}
			if ch >= 0 {
				t.pending = append(t.pending, keyEdge{k: int32(x), child: ch})
			} else if t.steps > keyWalkMax {
				return -1
			}
		}
	}
	return t.close(idx, base, accept)
}
