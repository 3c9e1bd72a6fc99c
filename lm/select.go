package lm

import "math/bits"

// Broadword select inside one 64-bit word (Vigna 2008, "Broadword
// implementation of rank/select queries", WEA): byte-wise population
// counts summed by one multiplication locate the byte that holds the wanted
// set bit, and clearing at most seven set bits finishes inside that byte.
// It replaces clearing the lowest set bit up to 63 times.

const (
	ones8 = 0x0101010101010101 // 1 in every byte
	msbs8 = 0x8080808080808080 // the top bit of every byte
)

// select64 returns the position of set bit number k (from 0) of x. The
// caller guarantees k < bits.OnesCount64(x).
func select64(x uint64, k uint) uint {
	s := x - (x>>1)&0x5555555555555555
	s = s&0x3333333333333333 + (s>>2)&0x3333333333333333
	s = (s + s>>4) & 0x0f0f0f0f0f0f0f0f
	s *= ones8 // byte i: set bits in bytes 0..i
	kk := uint64(k) * ones8
	below := ((kk | msbs8) - s) & msbs8 // top bit of byte i set when bytes 0..i hold ≤ k set bits
	place := uint(bits.OnesCount64(below)) * 8
	rest := k - uint((s<<8)>>place&0xff)
	b := uint8(x >> place)
	for ; rest > 0; rest-- { // fewer than 8 set bits to clear
		b &= b - 1
	}
	return place + uint(bits.TrailingZeros8(b))
}
