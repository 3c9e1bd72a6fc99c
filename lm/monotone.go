package lm

import "math/bits"

// monoSeq is a non-decreasing sequence of n integers — the successor starts
// of a level — read by index. Version-2 sections store it Elias-Fano coded
// (Elias 1974, Fano 1971): each value's low L bits in a packed array, its
// high part as a unary-coded gap in a bit vector (value i's high part h sets
// bit h+i), with the position of every 64th set bit sampled so that reading
// value i costs a table read and a short scan. About 2 + log2(U/n) bits per
// value instead of log2(U). Version-1 sections store the values plainly.
type monoSeq struct {
	n     int
	plain bool
	vals  vec // plain values (version 1)

	low    vec      // low L bits of each value
	lbits  uint     // L
	high   []uint64 // unary high parts
	hbits  int      // number of valid bits in high
	sample vec      // position in high of set bit every()·j
	dense  bool     // a sample every monoSampleDense values instead of monoSample
}

// monoSample is the distance, in set bits, between samples;
// monoSampleDense that of a dense sequence (the word-group offsets of
// version 4, read on every lookup).
const (
	monoSample      = 64
	monoSampleDense = 16
)

// every returns the sample distance of s.
func (s *monoSeq) every() int {
	if s.dense {
		return monoSampleDense
	}
	return monoSample
}

func (s *monoSeq) at(i int) uint64 {
	if s.plain {
		return s.vals.at(i)
	}
	w, x, ok := s.highWord(i)
	if !ok {
		return 0
	}
	pos := w<<6 + bits.TrailingZeros64(x)
	return uint64(pos-i)<<s.lbits | s.low.at(i)
}

// highWord returns the index of the word of the high part that holds set
// bit number i, and that word with the bits below set bit i cleared; ok is
// false when the high part runs out of set bits, which only a corrupt
// section does.
func (s *monoSeq) highWord(i int) (w int, x uint64, ok bool) {
	d := s.every()
	p := int(s.sample.at(i / d)) // position of set bit number i − i%d
	k := i % d                   // set bits still to skip
	w = p >> 6
	if w >= len(s.high) {
		return 0, 0, false
	}
	x = s.high[w] &^ (1<<(uint(p)&63) - 1)
	for {
		c := bits.OnesCount64(x)
		if k < c {
			break
		}
		k -= c
		w++
		if w >= len(s.high) {
			return 0, 0, false
		}
		x = s.high[w]
	}
	b := select64(x, uint(k))
	return w, x &^ (1<<b - 1), true
}

// at2 returns values i and i + 1 (i + 1 < n) with one select: the high
// part of value i + 1 is at the next set bit.
func (s *monoSeq) at2(i int) (uint64, uint64) {
	if s.plain {
		return s.vals.at(i), s.vals.at(i + 1)
	}
	w, x, ok := s.highWord(i)
	if !ok {
		return 0, 0
	}
	pos := w<<6 + bits.TrailingZeros64(x)
	// The next set bit: in the rest of this word, or in a later one.
	x &= x - 1
	for x == 0 {
		w++
		if w >= len(s.high) {
			return 0, 0
		}
		x = s.high[w]
	}
	pos2 := w<<6 + bits.TrailingZeros64(x)
	return uint64(pos-i)<<s.lbits | s.low.at(i), uint64(pos2-i-1)<<s.lbits | s.low.at(i+1)
}

// encodeMono returns the Elias-Fano arrays of vals (non-decreasing).
func encodeMono(vals []uint64, every int) (low []uint64, lbits uint, high []uint64, hbits int, sample []uint64) {
	n := len(vals)
	u := uint64(0)
	if n > 0 {
		u = vals[n-1]
	}
	lbits = 1
	if n > 0 && u/uint64(n) > 1 {
		lbits = uint(bits.Len64(u/uint64(n))) - 1
		lbits = max(lbits, 1)
	}
	lo := make([]uint64, n)
	hbits = n + int(u>>lbits) + 1
	high = make([]uint64, (hbits+63)/64+1)
	for i, v := range vals {
		lo[i] = v & (1<<lbits - 1)
		p := int(v>>lbits) + i
		high[p>>6] |= 1 << (uint(p) & 63)
		if i%every == 0 {
			sample = append(sample, uint64(p))
		}
	}
	return packVec(lo, lbits), lbits, high, hbits, sample
}
