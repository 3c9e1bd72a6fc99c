package lm

import "slices"

// sortEnts sorts entries by key. Keys of orders up to 3 live entirely in
// k[0] (3 × 21 bits), so they are sorted with a least-significant-digit
// radix sort on it (11-bit digits, digits that are equal in every key
// skipped): several times faster than comparison sorting for the millions
// of n-grams a large corpus brings. Longer keys use a comparison sort.
func sortEnts(ents []ent) {
	if len(ents) < 256 {
		slices.SortFunc(ents, cmpEnt)
		return
	}
	for _, e := range ents {
		if e.k[1] != 0 {
			slices.SortFunc(ents, cmpEnt)
			return
		}
	}
	const digitBits = 11
	const buckets = 1 << digitBits
	tmp := make([]ent, len(ents))
	src, dst := ents, tmp
	var counts [buckets]int
	for shift := uint(0); shift < 64; shift += digitBits {
		clear(counts[:])
		for _, e := range src {
			counts[(e.k[0]>>shift)&(buckets-1)]++
		}
		if counts[(src[0].k[0]>>shift)&(buckets-1)] == len(src) {
			continue // every key has the same digit here
		}
		sum := 0
		for i, c := range counts {
			counts[i] = sum
			sum += c
		}
		for _, e := range src {
			d := (e.k[0] >> shift) & (buckets - 1)
			dst[counts[d]] = e
			counts[d]++
		}
		src, dst = dst, src
	}
	if &src[0] != &ents[0] {
		copy(ents, src)
	}
}
