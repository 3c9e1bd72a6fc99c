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
	sample vec      // position in high of set bit 64·j
}

// monoSample is the distance, in set bits, between samples.
const monoSample = 64

func (s *monoSeq) at(i int) uint64 {
	if s.plain {
		return s.vals.at(i)
	}
	p := int(s.sample.at(i / monoSample)) // position of set bit number i − i%64
	k := i % monoSample                   // set bits still to skip
	w := p >> 6
	if w >= len(s.high) {
		return 0
	}
	x := s.high[w] &^ (1<<(uint(p)&63) - 1)
	for {
		c := bits.OnesCount64(x)
		if k < c {
			break
		}
		k -= c
		w++
		if w >= len(s.high) {
			return 0 // only a corrupt section runs out of set bits
		}
		x = s.high[w]
	}
	for ; k > 0; k-- {
		x &= x - 1
	}
	pos := w<<6 + bits.TrailingZeros64(x)
	return uint64(pos-i)<<s.lbits | s.low.at(i)
}

// encodeMono returns the Elias-Fano arrays of vals (non-decreasing).
func encodeMono(vals []uint64) (low []uint64, lbits uint, high []uint64, hbits int, sample []uint64) {
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
		if i%monoSample == 0 {
			sample = append(sample, uint64(p))
		}
	}
	return packVec(lo, lbits), lbits, high, hbits, sample
}
