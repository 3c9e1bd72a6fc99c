package correct

import "math/bits"

// The keys' unit-cost rows as bit vectors. A row of the optimal string
// alignment DP of a walked key against a typed key t (entry j: the
// distance of the walked key against t's first j bytes) is kept capped at
// maxd+1, so it is told entirely by the sets of positions whose entry is
// at most e, for e = 0..maxd: one 64-bit word per e, bit j for entry j,
// as in the bit-parallel simulation of the edit automaton by Wu and
// Manber (1992, "Fast text searching allowing errors"; cited from memory)
// with the swap of adjacent bytes added in the manner of Hyyrö's
// transposition extension of the bit-vector methods (2001–2003; cited
// from memory). A row costs a few word operations per level instead of a
// loop over its band, and the questions the keys ask of a row (is an
// entry within reach, which bytes can match next, can a word below stay
// within reach) become masks of positions. TestBitRowsDistance checks the
// rows against github.com/agnivade/levenshtein and a direct OSA DP.

// maxBitTyped is the longest typed key the rows hold: bit j stands for
// entry j, 0 to len(t).
const maxBitTyped = 63

// Every typed word Correct searches fits the rows.
const _ = uint(maxBitTyped - maxTyped)

// unitRows is the unit-cost optimal-string-alignment DP of a walked key
// against a typed key t (at most maxBitTyped bytes), one row per walked
// byte, entries capped at maxd+1 (a capped entry stands for any larger
// distance, so that every comparison with maxd stays exact). Row k is
// kept as maxd+1 position sets (see the top of this file).
type unitRows struct {
	t    []byte
	all  uint64      // the positions 0..len(t)
	tall uint32      // the letters (belowBit) of t
	peq  [256]uint64 // peq[c]: the positions j ≥ 1 with t[j-1] == c
	pos  [32]uint64  // pos[i]: the typed bytes of letters of class i, bit j for t[j] (29 classes)
	// posOf[b][x]: the typed bytes of the letters of a set (of belowBit)
	// whose byte b is x, so that reach finds the typed bytes of the
	// letters missing below by four lookups rather than one per letter
	// (8 KB, filled by reset in about 1,000 steps).
	posOf  [4][256]uint64
	maxd   uint8
	lv     []uint64 // row k's sets at lv[k*stride:], set e: the entries at most e
	stride int      // maxd+1
	path   []byte   // the walked key
	nrows  int
}

// reset prepares u for typed key t, at most maxRows walked bytes and maxd
// edits. The caller keeps t within maxBitTyped bytes (Correct searches no
// typed word longer than maxTyped, and a skeleton is no longer than its
// word).
func (u *unitRows) reset(t []byte, maxRows int, maxd uint8) {
	for _, b := range u.t {
		u.peq[b] = 0
	}
	u.t = append(u.t[:0], t...)
	n := len(u.t)
	u.all = ^uint64(0) >> (63 - n)
	u.maxd = maxd
	u.tall = 0
	u.pos = [32]uint64{}
	for j, b := range u.t {
		u.tall |= belowBit(b)
		u.pos[bitIndex(belowBit(b))] |= 1 << j
		u.peq[b] |= 2 << j
	}
	for b := range u.posOf {
		u.posOf[b][0] = 0
		for x := 1; x < 256; x++ {
			low := x & -x
			u.posOf[b][x] = u.posOf[b][x&^low] | u.pos[b*8+bits.TrailingZeros(uint(low))]
		}
	}
	u.nrows = maxRows + 1
	L := int(maxd) + 1
	u.stride = L
	u.lv = grow(u.lv, u.nrows*L)
	for e := range L {
		// Row 0: entry j is j.
		u.lv[e] = u.all & (2<<e - 1)
	}
	u.path = grow(u.path, u.nrows)
}

// push computes row k+1 from rows k and k-1 for walked byte c
// (k+1 < nrows). Entry j of row k+1 is at most e when it is reached by a
// match from entry j-1 of row k at most e, or at cost one from an entry
// at most e-1: entry j-1 of row k (substitution), entry j of row k (the
// walked byte left out), entry j-1 of row k+1 (a typed byte left out), or
// entry j-2 of row k-1 when the last two walked bytes are t[j-2] and
// t[j-1] swapped; entry 0 is k+1.
func (u *unitRows) push(k int, c byte) {
	u.path[k] = c
	L := u.stride
	P := u.lv[k*L : k*L+L]
	R := u.lv[(k+1)*L : (k+1)*L+L]
	eq := u.peq[c]
	R[0] = P[0] << 1 & eq // entry 0 is k+1, never 0
	var sw uint64         // the positions j with t[j-2] == c and t[j-1] the last walked byte
	var Q []uint64
	if k > 0 {
		sw = u.peq[u.path[k-1]] & (eq << 1)
		Q = u.lv[(k-1)*L : k*L]
	}
	for e := 1; e < L; e++ {
		p := P[e-1]
		v := P[e]<<1&eq | p<<1 | p | R[e-1]<<1
		if sw != 0 {
			v |= Q[e-1] << 2 & sw
		}
		if k+1 <= e {
			v |= 1
		}
		R[e] = v & u.all
	}
}

// row returns row k's position sets.
func (u *unitRows) row(k int) []uint64 {
	L := u.stride
	return u.lv[k*L : k*L+L : k*L+L]
}

// nextMask adds to m the bytes c for which row k+1 (pushed with c) can
// hold an entry within maxd, or reports true when every byte can: while
// k+1 is within maxd (its first entry), or while row k holds an entry
// below maxd (an edit to spare: c left out); else c must match a typed
// byte after an entry of row k within maxd, or swap with the walked key's
// last byte.
func (u *unitRows) nextMask(k int, m *[4]uint64) bool {
	md := int(u.maxd)
	R := u.row(k)
	if k+1 <= md || md > 0 && R[md-1] != 0 {
		return true
	}
	// Entries j within maxd: t[j] may match next (j < len(t)).
	for x := R[md] &^ (1 << len(u.t)); x != 0; x &= x - 1 {
		c := u.t[bits.TrailingZeros64(x)]
		m[c>>6] |= 1 << (c & 63)
	}
	if k > 0 && md > 0 {
		// Entries j-2 of row k-1 below maxd with t[j-1] the walked
		// key's last byte: t[j-2] may follow it, swapped.
		for x := u.row(k - 1)[md-1] << 2 & u.peq[u.path[k-1]]; x != 0; x &= x - 1 {
			c := u.t[bits.TrailingZeros64(x)-2]
			m[c>>6] |= 1 << (c & 63)
		}
	}
	return false
}

// final reports whether the walked key of row k is within maxd edits of
// the typed key.
func (u *unitRows) final(k int) bool {
	return u.row(k)[u.maxd]>>len(u.t)&1 != 0
}

// reach reports whether a walked key that continues the one of row k with
// letters of below and with at least lo and at most hi more bytes may be
// within maxd edits of the typed key; false means none is. Every
// alignment passes through a cell of row k at some typed position j or
// swaps the key's last byte with the next, jumping from row k-1 at j-2 to
// row k+1 at j. From there on, each typed byte whose letter is on no path
// below costs an edit, and so does each byte by which the typed tail is
// longer than hi or shorter than lo (an insertion or deletion each); the
// tail costs at least the larger of the two counts, g(j). So some word
// may be within reach when an entry at most e sits at a position j with
// g(j) ≤ maxd-e (the swap: an entry of row k-1 at most e at j-2 with
// g(j) ≤ maxd-1-e). When every typed letter is below and no tail within
// maxd of the diagonal is out of the lengths' reach, an entry of row k,
// or one of row k-1 below maxd, is enough (a looser test, kept as the
// walk's prune was before the bit rows: the same prefixes are pruned).
func (u *unitRows) reach(k int, below uint32, lo, hi uint8) bool {
	n, md := len(u.t), int(u.maxd)
	R := u.row(k)
	var Q []uint64
	if k > 0 {
		Q = u.row(k - 1)
	}
	if R[md] == 0 && (Q == nil || md == 0 || Q[md-1] == 0) {
		return false // no entry within reach: out of reach by the rows alone
	}
	miss := u.tall &^ below
	if miss == 0 && int(lo) <= n-min(n, k+md) && int(hi) >= n-max(0, k-md) {
		return R[md] != 0 || md > 0 && k > 0 && Q[md-1] != 0
	}
	// The typed bytes whose letter is on no path below.
	mm := u.posOf[0][miss&255] | u.posOf[1][miss>>8&255] | u.posOf[2][miss>>16&255] | u.posOf[3][miss>>24]
	l, h := int(lo), int(hi)
	for x := 0; x <= md; x++ {
		// g(j) ≤ x: at most x typed bytes from j on missing below
		// (j ≥ jm), the tail n-j at most h+x and at least l-x.
		jm := bits.Len64(mm)
		a, b := max(jm, n-h-x), min(n, n-l+x)
		if r := R[md-x]; r != 0 && a <= b && r&span(a, b) != 0 {
			return true
		}
		if k > 0 && h > 0 && x < md && Q[md-1-x] != 0 {
			// The swap: row k-1's entries j-2 at most md-1-x, the tail
			// n-j against rests one byte shorter.
			l1, h1 := max(l, 1)-1, h-1
			a, b := max(jm, n-h1-x, 2), min(n, n-l1+x)
			if a <= b && Q[md-1-x]<<2&span(a, b) != 0 {
				return true
			}
		}
		if mm != 0 {
			mm &^= 1 << (jm - 1) // one more missing byte allowed
		}
	}
	return false
}

// span returns the positions a to b (0 ≤ a ≤ b ≤ 63).
func span(a, b int) uint64 {
	return (^uint64(0) >> (63 - b)) &^ (1<<a - 1)
}
