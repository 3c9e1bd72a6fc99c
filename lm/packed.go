package lm

import "math/bits"

// vec is a read-only array of n unsigned integers of width bits each, packed
// into 64-bit words (little-endian bit order). The backing slice always has
// one spare word so that a value straddling a word boundary can be read
// without a bounds branch.
type vec struct {
	w     []uint64
	n     int
	width uint
	mask  uint64
}

func newVec(w []uint64, n int, width uint) vec {
	m := ^uint64(0)
	if width < 64 {
		m = 1<<width - 1
	}
	return vec{w: w, n: n, width: width, mask: m}
}

// vecWords is the number of 64-bit words a vec of n values of the given width occupies.
func vecWords(n int, width uint) int { return (n*int(width)+63)/64 + 1 }

// at returns value i. The caller guarantees 0 <= i < n.
func (v *vec) at(i int) uint64 {
	if v.width == 0 {
		return 0
	}
	b := uint(i) * v.width
	wi, off := b>>6, b&63
	x := v.w[wi] >> off
	if off+v.width > 64 {
		x |= v.w[wi+1] << (64 - off)
	}
	return x & v.mask
}

// packVec packs vals into a new word slice of the given width.
func packVec(vals []uint64, width uint) []uint64 {
	w := make([]uint64, vecWords(len(vals), width))
	if width == 0 {
		return w
	}
	for i, x := range vals {
		b := uint(i) * width
		wi, off := b>>6, b&63
		w[wi] |= x << off
		if off+width > 64 {
			w[wi+1] |= x >> (64 - off)
		}
	}
	return w
}

// bitsFor returns the width needed to store values up to max.
func bitsFor(max uint64) uint {
	if max == 0 {
		return 1
	}
	return uint(bits.Len64(max))
}

// rankBits is a bit vector with a rank directory: one cumulative count per
// 512 bits, so rank is a table read plus at most eight popcounts.
type rankBits struct {
	w       []uint64
	samples vec // width 32, len n/512+1
	n       int
}

func (r *rankBits) get(i int) bool { return r.w[i>>6]>>(uint(i)&63)&1 == 1 }

// rank1 returns the number of set bits before position i (0 <= i <= n).
func (r *rankBits) rank1(i int) int {
	blk := i >> 9
	c := int(r.samples.at(blk))
	for wi := blk << 3; wi < i>>6; wi++ {
		c += bits.OnesCount64(r.w[wi])
	}
	if off := uint(i) & 63; off != 0 {
		c += bits.OnesCount64(r.w[i>>6] & (1<<off - 1))
	}
	return c
}

// buildRank returns the words and rank samples of a bit vector.
func buildRank(set []bool) (w []uint64, samples []uint64) {
	w = make([]uint64, vecWords(len(set), 1))
	for i, b := range set {
		if b {
			w[i>>6] |= 1 << (uint(i) & 63)
		}
	}
	c := 0
	for i := 0; i <= len(set); i++ {
		if i&511 == 0 {
			samples = append(samples, uint64(c))
		}
		if i < len(set) && set[i] {
			c++
		}
	}
	return w, samples
}

// bitsAt returns the width bits (1..64) of w starting at bit off, least
// significant first. The caller guarantees that off+width lies within the
// words before the spare one.
func bitsAt(w []uint64, off uint64, width uint) uint64 {
	wi, sh := off>>6, uint(off&63)
	x := w[wi] >> sh
	if sh+width > 64 {
		x |= w[wi+1] << (64 - sh)
	}
	if width < 64 {
		x &= 1<<width - 1
	}
	return x
}

// bitStream collects values of varying widths into one packed bit stream.
type bitStream struct {
	w []uint64
	n uint64 // bits written
}

func (s *bitStream) put(x uint64, width uint) {
	for uint64(len(s.w))*64 < s.n+uint64(width)+64 {
		s.w = append(s.w, 0)
	}
	if width < 64 {
		x &= 1<<width - 1
	}
	wi, sh := s.n>>6, uint(s.n&63)
	s.w[wi] |= x << sh
	if sh+width > 64 {
		s.w[wi+1] |= x >> (64 - sh)
	}
	s.n += uint64(width)
}

// words returns the stream with exactly one spare word after its last bit.
func (s *bitStream) words() []uint64 {
	need := int((s.n+63)/64) + 1
	for len(s.w) < need {
		s.w = append(s.w, 0)
	}
	return s.w[:need]
}
