package lm

import (
	"math/bits"
	"slices"
	"sync"
)

// sortEnts sorts entries by key. Keys of orders up to 3 live entirely in
// k[0] (3 × 21 bits), so they are sorted with a least-significant-digit
// radix sort: several times faster than comparison sorting for the millions
// of n-grams a large corpus brings. Longer keys use a comparison sort.
//
// The radix sort first squeezes out the bits no key uses: each 21-bit ID
// field is cut to the width of the largest ID in it (a 10 000-word
// vocabulary needs 14 bits, so a trigram key shrinks from 63 to 42 bits),
// which keeps the order of the keys and saves digits. When the squeezed key
// and the largest count fit in 64 bits together, the sort moves one 8-byte
// word per entry instead of the 24-byte entry. Equal keys keep no particular
// order. Cost: O(len(ents) × digits), digits ≈ key bits / 11.
func sortEnts(ents []ent) {
	if len(ents) < 256 {
		slices.SortFunc(ents, cmpEnt)
		return
	}
	var or, maxc uint64
	for _, e := range ents {
		if e.k[1] != 0 {
			slices.SortFunc(ents, cmpEnt)
			return
		}
		or |= e.k[0]
		maxc = max(maxc, e.c)
	}
	const m21 = 1<<21 - 1
	b2 := uint(bits.Len64(or & m21))
	b1 := uint(bits.Len64(or >> 21 & m21))
	b0 := uint(bits.Len64(or >> 42))
	cb := uint(bits.Len64(maxc))
	if b0+b1+b2+cb > 64 {
		sortWide(ents)
		return
	}
	keyBits := b0 + b1 + b2
	p := make([]uint64, len(ents))
	for i, e := range ents {
		k := e.k[0]
		ck := (k>>42)<<(b1+b2) | (k>>21&m21)<<b2 | k&m21
		p[i] = ck<<cb | e.c
	}
	p = radixSortBits(p, nil, cb, keyBits)
	cmask := uint64(1)<<cb - 1
	for i, v := range p {
		ck := v >> cb
		k := (ck>>(b1+b2))<<42 | (ck>>b2&(1<<b1-1))<<21 | ck&(1<<b2-1)
		ents[i] = ent{k: key2{k, 0}, c: v & cmask}
	}
}

// radixSortBits sorts p by bits [lo, lo+width) of each value with an LSD
// radix sort of at most 11-bit digits, using tmp as scratch space (made when
// shorter than p), and returns the sorted slice: p or tmp[:len(p)].
func radixSortBits(p, tmp []uint64, lo, width uint) []uint64 {
	if width == 0 || len(p) < 2 {
		return p
	}
	const maxDigit = 11
	passes := (width + maxDigit - 1) / maxDigit
	digit := (width + passes - 1) / passes
	masks := digitMasks(passes, digit, width)
	counts := make([]int, passes<<digit)
	for _, v := range p {
		v >>= lo
		for d := range passes {
			counts[d<<digit+uint(v>>(d*digit)&masks[d])]++
		}
	}
	if cap(tmp) < len(p) {
		tmp = make([]uint64, len(p))
	}
	src, dst := p, tmp[:len(p)]
	for d := range passes {
		shift, mask := lo+d*digit, masks[d]
		c := counts[d<<digit : (d+1)<<digit]
		if c[src[0]>>shift&mask] == len(src) {
			continue // every value has the same digit here
		}
		sum := 0
		for i, n := range c {
			c[i] = sum
			sum += n
		}
		for _, v := range src {
			j := v >> shift & mask
			dst[c[j]] = v
			c[j]++
		}
		src, dst = dst, src
	}
	return src
}

// sortWide sorts entries whose squeezed key and count do not fit in 64 bits
// together, by k[0] with an LSD radix sort of 11-bit digits on the entries.
func sortWide(ents []ent) {
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

// digitMasks returns the mask of each pass's digit: digit bits, fewer in
// the last pass when passes × digit exceeds width.
func digitMasks(passes, digit, width uint) []uint64 {
	masks := make([]uint64, passes)
	for d := range passes {
		masks[d] = uint64(1)<<min(digit, width-d*digit) - 1
	}
	return masks
}

// parallelSortMin is the length below which radixSortParallel sorts on one
// goroutine (common practice, no source: below it starting goroutines costs
// more than it saves).
const parallelSortMin = 1 << 16

// radixSortParallel is radixSortBits with the counting and the scattering
// of every pass split among workers goroutines, each over a contiguous
// chunk. Chunk w's values of a digit go after those of chunks before it, so
// the sort stays stable and the result is the same as radixSortBits'.
func radixSortParallel(p, tmp []uint64, lo, width uint, workers int) []uint64 {
	if workers <= 1 || len(p) < parallelSortMin || width == 0 {
		return radixSortBits(p, tmp, lo, width)
	}
	const maxDigit = 11
	passes := (width + maxDigit - 1) / maxDigit
	digit := (width + passes - 1) / passes
	masks := digitMasks(passes, digit, width)
	if cap(tmp) < len(p) {
		tmp = make([]uint64, len(p))
	}
	src, dst := p, tmp[:len(p)]
	bounds := make([]int, workers+1)
	for w := range bounds {
		bounds[w] = len(p) * w / workers
	}
	counts := make([][]int, workers)
	for w := range counts {
		counts[w] = make([]int, 1<<digit)
	}
	for d := range passes {
		shift, mask := lo+d*digit, masks[d]
		parallelDo(workers, func(w int) {
			c := counts[w]
			clear(c)
			for _, v := range src[bounds[w]:bounds[w+1]] {
				c[v>>shift&mask]++
			}
		})
		first, same := src[0]>>shift&mask, 0
		for w := range counts {
			same += counts[w][first]
		}
		if same == len(src) {
			continue // every value has the same digit here
		}
		sum := 0
		for j := range counts[0] {
			for w := range counts {
				n := counts[w][j]
				counts[w][j] = sum
				sum += n
			}
		}
		parallelDo(workers, func(w int) {
			c := counts[w]
			for _, v := range src[bounds[w]:bounds[w+1]] {
				j := v >> shift & mask
				dst[c[j]] = v
				c[j]++
			}
		})
		src, dst = dst, src
	}
	return src
}

// parallelDo calls f(0) … f(n-1) on n goroutines and waits for them.
func parallelDo(n int, f func(i int)) {
	var wg sync.WaitGroup
	for i := range n {
		wg.Go(func() { f(i) })
	}
	wg.Wait()
}
