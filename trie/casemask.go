package trie

// This file holds the casing parts of a version-3 section: a bitmap of the
// words that are not lower case with a rank directory, the 2-bit codes of
// those words only, and one short record per exception, usually an
// upper-case mask over the runes of the folded word, found by counting
// instead of by searching a list of ids.

import (
	"encoding/binary"
	"math/bits"
	"unicode"
	"unicode/utf8"
)

// Sizes of the version-3 casing structures.
const (
	// bitRankStep is the number of words per rank sample of the non-lower
	// bitmap: one uint32 for every 512 words (8 uint64 words of bitmap),
	// 0.0625 bits a word.
	bitRankStep = 512
	// rankStep is the number of codes per exception rank sample: one
	// uint32 for every 256 codes (8 uint64 words of codes).
	rankStep = 256
	// recordStep is the number of exception records per offset sample:
	// a look-up skips at most recordStep-1 records.
	recordStep = 16
	// maxMaskRunes is the longest folded word, in runes, whose surface
	// can be stored as a mask (one bit a rune in a uint64).
	maxMaskRunes = 64
	// fullRecord is the first byte of a record that stores the surface in
	// full; a mask record never starts with it, because its mask is not 0.
	fullRecord = 0
)

// exceptMask returns the upper-case mask that turns word into surface:
// bit i set when rune i of surface is unicode.ToUpper of rune i of word
// and differs from it, clear when the runes are equal. It returns false
// when the two differ in any other way (another rune count, another
// letter, a rune changed that upper-casing does not give) or the word has
// more than maxMaskRunes runes.
func exceptMask(word, surface string) (uint64, bool) {
	var mask uint64
	i := 0
	for word != "" && surface != "" {
		rw, nw := utf8.DecodeRuneInString(word)
		rs, ns := utf8.DecodeRuneInString(surface)
		if rs != rw {
			if i >= maxMaskRunes || unicode.ToUpper(rw) != rs {
				return 0, false
			}
			mask |= 1 << i
		}
		word, surface = word[nw:], surface[ns:]
		i++
	}
	return mask, word == "" && surface == ""
}

// appendMasked appends word with rune i upper-cased (unicode.ToUpper) for
// every bit i set in mask; bits past the last rune are ignored.
func appendMasked(dst, word []byte, mask uint64) []byte {
	for i := 0; len(word) > 0; i++ {
		r, size := utf8.DecodeRune(word)
		if i < maxMaskRunes && mask>>i&1 != 0 {
			dst = utf8.AppendRune(dst, unicode.ToUpper(r))
		} else {
			dst = append(dst, word[:size]...)
		}
		word = word[size:]
	}
	return dst
}

// appendRecord appends the exception record that turns word into surface:
// the mask as a uvarint when the surface is a mask of the word, else the
// byte fullRecord, the surface's length as a uvarint and its bytes.
func appendRecord(dst []byte, word, surface string) []byte {
	if mask, ok := exceptMask(word, surface); ok && mask != 0 {
		return binary.AppendUvarint(dst, mask)
	}
	dst = append(dst, fullRecord)
	dst = binary.AppendUvarint(dst, uint64(len(surface)))
	return append(dst, surface...)
}

// record is one decoded exception record.
type record struct {
	mask    uint64 // the upper-case mask; 0 for a full record
	surface []byte // the stored surface of a full record, aliasing the section
	size    int    // bytes the record takes
}

// readRecord decodes the record at the start of b. It reports false when
// b does not start with a whole, canonical record (a uvarint of the
// shortest form, a full surface of 1..MaxSurfaceLen bytes).
func readRecord(b []byte) (record, bool) {
	v, n := binary.Uvarint(b)
	if n <= 0 || (n > 1 && b[n-1] == 0) {
		return record{}, false
	}
	if v != 0 {
		return record{mask: v, size: n}, true
	}
	l, m := binary.Uvarint(b[1:])
	if m <= 0 || (m > 1 && b[m] == 0) || l == 0 || l > MaxSurfaceLen || l > uint64(len(b)-1-m) {
		return record{}, false
	}
	end := 1 + m + int(l)
	return record{surface: b[1+m : end], size: end}, true
}

// recordLen returns the length of the record at the start of b, or 0 when
// b does not start with one. It is readRecord without the checks the
// loader has already made.
func recordLen(b []byte) int {
	if len(b) == 0 {
		return 0
	}
	if b[0] != fullRecord {
		for i, c := range b {
			if c < 0x80 {
				return i + 1
			}
		}
		return 0
	}
	l, m := binary.Uvarint(b[1:])
	if m <= 0 || l > uint64(len(b)-1-m) {
		return 0
	}
	return 1 + m + int(l)
}

// exceptPairs is the mask that keeps, of each 2-bit code in a uint64, the
// low bit.
const exceptPairs = 0x5555555555555555

// countExcept returns the number of codes equal to caseExcept among the 32
// codes packed in x.
func countExcept(x uint64) int {
	return bits.OnesCount64(x & (x >> 1) & exceptPairs)
}

// word64 returns the i-th little-endian uint64 of b, or 0 past its end.
func word64(b []byte, i int) uint64 {
	if 8*i+8 > len(b) {
		return 0
	}
	return binary.LittleEndian.Uint64(b[8*i:])
}

// sample returns the i-th little-endian uint32 of b, and false past its
// end.
func sample(b []byte, i int) (uint32, bool) {
	if 4*i+4 > len(b) {
		return 0, false
	}
	return binary.LittleEndian.Uint32(b[4*i:]), true
}

// nonLowerRank reports whether word id is marked in the non-lower bitmap
// and, if so, its index among the marked words: the index of its code.
// It reads the rank sample of id's 512-word step and counts the bits of
// at most eight uint64 words: O(1).
func (c *casingTable) nonLowerRank(id uint32) (int, bool) {
	w := int(id / 64)
	x := word64(c.bitmap, w)
	if x>>(id%64)&1 == 0 {
		return 0, false
	}
	s := int(id / bitRankStep)
	r, ok := sample(c.bitRank, s)
	if !ok {
		return 0, false
	}
	j := int(r)
	for v := s * (bitRankStep / 64); v < w; v++ {
		j += bits.OnesCount64(word64(c.bitmap, v))
	}
	return j + bits.OnesCount64(x&(1<<(id%64)-1)), true
}

// exceptRank returns the number of codes equal to caseExcept before code
// j, from the rank sample of j's 256-code step and at most seven whole
// code words and one part word: O(1). It returns -1 when the samples do
// not reach j (only possible in a damaged section loaded with SkipWalk).
func (c *casingTable) exceptRank(j int) int {
	s := j / rankStep
	r, ok := sample(c.rank, s)
	if !ok {
		return -1
	}
	k := int(r)
	w := s * (rankStep / 32)
	for ; w < j/32; w++ {
		k += countExcept(word64(c.codes, w))
	}
	if b := j % 32; b != 0 {
		k += countExcept(word64(c.codes, w) & (1<<(2*b) - 1))
	}
	return k
}

// compactRecord returns the exception record of word id, which must have
// code caseExcept: the word's index among the non-lower words gives its
// exception number k, the offset sample of k's step gives a record at
// most recordStep-1 records before it, and those are skipped. It reports
// false when the bytes do not hold it (only possible in a section loaded
// with SkipWalk).
func (c *casingTable) compactRecord(id uint32) (record, bool) {
	j, ok := c.nonLowerRank(id)
	if !ok {
		return record{}, false
	}
	k := c.exceptRank(j)
	if k < 0 {
		return record{}, false
	}
	o, ok := sample(c.samples, k/recordStep)
	if !ok {
		return record{}, false
	}
	off := uint64(o)
	for i := k / recordStep * recordStep; i < k; i++ {
		if off >= uint64(len(c.records)) {
			return record{}, false
		}
		n := recordLen(c.records[off:])
		if n == 0 {
			return record{}, false
		}
		off += uint64(n)
	}
	if off >= uint64(len(c.records)) {
		return record{}, false
	}
	return readRecord(c.records[off:])
}

// validateCompact checks the version-3 casing parts against the word count
// n and exception count e: bits of the bitmap past word n-1 are zero, each
// bitmap rank sample counts the set bits before its step and there are
// c.nonLower set bits; every code is 1, 2 or 3 and the bits after the last
// are zero; each exception rank sample counts the exceptions before its
// step and there are e exceptions; the records are canonical and fill
// the record bytes exactly; and each offset sample points at the start of
// its record. The offsets are those of the parts within the section, for
// error reports.
func (c *casingTable) validateCompact(n, e uint32, caseOff, rankOff, sampleOff, recOff int) error {
	le := binary.LittleEndian
	words := len(c.bitmap) / 8
	if used := int(n % 64); used != 0 && word64(c.bitmap, words-1)>>used != 0 {
		return corrupt("casing", caseOff+8*(words-1), "bitmap bits past the last word are set")
	}
	var set uint32
	for w := 0; w < words; w++ {
		if c.nonLower > 0 && w%(bitRankStep/64) == 0 {
			s := w / (bitRankStep / 64)
			if got := le.Uint32(c.bitRank[4*s:]); got != set {
				return corrupt("casing", rankOff+4*s, "bitmap rank sample %d is %d, the bitmap before it has %d", s, got, set)
			}
		}
		set += uint32(bits.OnesCount64(word64(c.bitmap, w)))
	}
	if set != c.nonLower {
		return corrupt("casing", caseOff, "bitmap marks %d words, header has %d", set, c.nonLower)
	}
	codesOff := caseOff + len(c.bitmap)
	m := int(c.nonLower)
	if b := m % 32; b != 0 && word64(c.codes, m/32)>>(2*b) != 0 {
		return corrupt("casing", codesOff+8*(m/32), "unused code bits are set")
	}
	excRankOff := rankOff + len(c.bitRank)
	var total uint32
	for w := 0; w < len(c.codes)/8; w++ {
		if e > 0 && w%(rankStep/32) == 0 {
			s := w / (rankStep / 32)
			if got := le.Uint32(c.rank[4*s:]); got != total {
				return corrupt("casing", excRankOff+4*s, "exception rank sample %d is %d, the codes before it hold %d", s, got, total)
			}
		}
		x := word64(c.codes, w)
		if w == m/32 {
			x |= ^uint64(0) << (2 * (m % 32)) // make the unused codes non-zero
		}
		if (x|x>>1)&exceptPairs != exceptPairs {
			return corrupt("casing", codesOff+8*w, "a non-lower word has code 0")
		}
		total += uint32(countExcept(word64(c.codes, w)))
	}
	if total != e {
		return corrupt("casing", codesOff, "%d words marked as exceptions, header has %d", total, e)
	}
	var off int
	for k := 0; k < int(e); k++ {
		if k%recordStep == 0 {
			s := k / recordStep
			if got := le.Uint32(c.samples[4*s:]); uint64(got) != uint64(off) {
				return corrupt("exceptions", sampleOff+4*s, "record sample %d is %d, record %d starts at %d", s, got, k, off)
			}
		}
		rec, ok := readRecord(c.records[off:])
		if !ok {
			return corrupt("exceptions", recOff+off, "exception record %d is malformed", k)
		}
		if rec.surface != nil && !utf8.Valid(rec.surface) {
			return corrupt("exceptions", recOff+off, "exception surface %d is not valid utf-8", k)
		}
		off += rec.size
	}
	if off != len(c.records) {
		return corrupt("exceptions", recOff+off, "%d bytes after the last exception record", len(c.records)-off)
	}
	return nil
}

// appendCompactCasing appends the version-3 casing parts of entries to
// out, whose section starts at base, and records their offsets and counts
// in h.
func appendCompactCasing(out []byte, base int, entries []Entry, h *header) []byte {
	le := binary.LittleEndian
	n := len(entries)
	bitmap := make([]uint64, (n+63)/64)
	var codes []byte
	var bitRank, rank, samples []uint32
	var records []byte
	m, e := 0, 0
	for i, en := range entries {
		if i%bitRankStep == 0 {
			bitRank = append(bitRank, uint32(m))
		}
		c := casingCode(en.Word, en.Surface)
		if c == caseSame {
			continue
		}
		bitmap[i/64] |= 1 << (i % 64)
		if m%rankStep == 0 {
			rank = append(rank, uint32(e))
		}
		if m%4 == 0 {
			codes = append(codes, 0)
		}
		codes[m/4] |= c << (2 * (m % 4))
		m++
		if c == caseExcept {
			if e%recordStep == 0 {
				samples = append(samples, uint32(len(records)))
			}
			records = appendRecord(records, en.Word, en.Surface)
			e++
		}
	}
	h.caseOff = uint32(len(out) - base)
	for _, x := range bitmap {
		out = le.AppendUint64(out, x)
	}
	out = append(out, codes...)
	out = padTo(out, base)
	h.nonLower, h.excCount = uint32(m), uint32(e)
	h.excIDOff = uint32(len(out) - base)
	if m > 0 {
		out = appendUint32s(out, bitRank)
	}
	if e > 0 {
		out = appendUint32s(out, rank)
	}
	h.excEndOff = uint32(len(out) - base)
	out = appendUint32s(out, samples)
	h.excDataOff = uint32(len(out) - base)
	h.excDataLen = uint32(len(records))
	out = append(out, records...)
	return padTo(out, base)
}
