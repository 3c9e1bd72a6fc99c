package trie

// This file holds the surface casing of words: a 2-bit code per word and a
// table of exceptions for surfaces that no code describes. The exception
// table of versions 1 and 2 is here; the compact one of version 3 is in
// casemask.go.

import (
	"encoding/binary"
	"unicode"
	"unicode/utf8"
)

// casingTable is a read-only view of the casing part of a section. Its
// slices alias the section bytes. In versions 1 and 2 codes holds a code
// for every word and excIDs, excEnds and excData the exceptions. A
// version-3 section (compact set) keeps a bitmap of the words that are not
// lower case, codes for those words only, and compact exception records
// (casemask.go).
type casingTable struct {
	codes   []byte // 2 bits per word (version 3: per non-lower word)
	excIDs  []byte // e little-endian uint32 word ids, strictly ascending
	excEnds []byte // e little-endian uint32 end offsets into excData
	excData []byte

	compact  bool
	nonLower uint32 // number of set bits in bitmap
	bitmap   []byte // bit i (of uint64 i/64) set when word i has a code other than caseSame
	bitRank  []byte // uint32 per bitRankStep words: set bits before the step
	rank     []byte // uint32 per rankStep codes: exceptions before the step
	samples  []byte // uint32 per recordStep records: offset of the record
	records  []byte // e exception records, see appendRecord
}

// capitalise appends w with its first rune upper-cased.
func capitalise(dst []byte, w []byte) []byte {
	r, size := utf8.DecodeRune(w)
	dst = utf8.AppendRune(dst, unicode.ToUpper(r))
	return append(dst, w[size:]...)
}

// upperAll appends w with every rune upper-cased.
func upperAll(dst []byte, w []byte) []byte {
	for len(w) > 0 {
		r, size := utf8.DecodeRune(w)
		dst = utf8.AppendRune(dst, unicode.ToUpper(r))
		w = w[size:]
	}
	return dst
}

// casingCode returns the code that turns word into surface, or caseExcept
// when none does.
func casingCode(word, surface string) byte {
	if surface == "" || surface == word {
		return caseSame
	}
	var buf [2 * MaxWordLen]byte // upper-casing may grow a rune by one byte
	if string(capitalise(buf[:0], []byte(word))) == surface {
		return caseCapital
	}
	if string(upperAll(buf[:0], []byte(word))) == surface {
		return caseUpper
	}
	return caseExcept
}

// code returns the casing code of word id, which must be below the word
// count.
func (c *casingTable) code(id uint32) byte {
	if c.compact {
		j, ok := c.nonLowerRank(id)
		if !ok {
			return caseSame
		}
		return codeAt(c.codes, j)
	}
	return codeAt(c.codes, int(id))
}

// codeAt returns code i of the 2-bit codes, or caseSame past their end.
func codeAt(codes []byte, id int) byte {
	i := id / 4
	if i >= len(codes) {
		return caseSame
	}
	return codes[i] >> (2 * (id % 4)) & 3
}

// size returns the bytes the casing parts take, padding excluded.
func (c *casingTable) size() int {
	return len(c.codes) + len(c.excIDs) + len(c.excEnds) + len(c.excData) +
		len(c.bitmap) + len(c.bitRank) + len(c.rank) + len(c.samples) + len(c.records)
}

// appendException appends the surface of word id, which has code
// caseExcept, to dst: the stored surface, or in a version-3 section the
// folded word with the runes of its mask upper-cased. It reports false,
// with dst unchanged, when the table does not hold it.
func (l *Lexicon) appendException(dst []byte, id uint32) ([]byte, bool) {
	c := &l.casing
	if !c.compact {
		s, ok := c.exception(id)
		return append(dst, s...), ok
	}
	rec, ok := c.compactRecord(id)
	switch {
	case !ok:
		return dst, false
	case rec.mask == 0:
		return append(dst, rec.surface...), true
	}
	var buf [MaxWordLen]byte
	return appendMasked(dst, l.AppendWord(buf[:0], id), rec.mask), true
}

// exception returns the stored surface of word id, or false when the table
// has none.
func (c *casingTable) exception(id uint32) ([]byte, bool) {
	le := binary.LittleEndian
	lo, hi := 0, len(c.excIDs)/4
	for lo < hi {
		m := int(uint(lo+hi) >> 1)
		if le.Uint32(c.excIDs[4*m:]) < id {
			lo = m + 1
		} else {
			hi = m
		}
	}
	if lo >= len(c.excIDs)/4 || le.Uint32(c.excIDs[4*lo:]) != id || 4*lo+4 > len(c.excEnds) {
		return nil, false
	}
	var start uint32
	if lo > 0 {
		start = le.Uint32(c.excEnds[4*lo-4:])
	}
	end := le.Uint32(c.excEnds[4*lo:])
	if start > end || uint64(end) > uint64(len(c.excData)) {
		return nil, false
	}
	return c.excData[start:end], true
}

// validate checks the casing part against the word count n: unused code
// bits are zero, exception ids are strictly ascending and below n, each
// exception id has code caseExcept and no other word does, end offsets
// ascend to the end of the data, and every stored surface is non-empty,
// valid UTF-8 and at most MaxSurfaceLen bytes. The offsets are those of
// the parts within the section, for error reports.
func (c *casingTable) validate(n uint32, caseOff, idOff, endOff, dataOff int) error {
	le := binary.LittleEndian
	if n%4 != 0 && c.codes[len(c.codes)-1]>>(2*(n%4)) != 0 {
		return corrupt("casing", caseOff+len(c.codes)-1, "unused code bits are set")
	}
	e := len(c.excIDs) / 4
	var excepts uint32
	for i := uint32(0); i < n; i++ {
		if c.code(i) == caseExcept {
			excepts++
		}
	}
	if excepts != uint32(e) {
		return corrupt("casing", caseOff, "%d words marked as exceptions, table has %d", excepts, e)
	}
	var prevEnd uint32
	for k := 0; k < e; k++ {
		id := le.Uint32(c.excIDs[4*k:])
		if id >= n || (k > 0 && id <= le.Uint32(c.excIDs[4*k-4:])) {
			return corrupt("exceptions", idOff+4*k, "exception id %d out of order or range", id)
		}
		if c.code(id) != caseExcept {
			return corrupt("exceptions", idOff+4*k, "exception id %d is not marked as an exception", id)
		}
		end := le.Uint32(c.excEnds[4*k:])
		if end <= prevEnd || uint64(end) > uint64(len(c.excData)) || end-prevEnd > MaxSurfaceLen {
			return corrupt("exceptions", endOff+4*k, "exception end offset %d out of order or range", end)
		}
		if !utf8.Valid(c.excData[prevEnd:end]) {
			return corrupt("exceptions", dataOff+int(prevEnd), "exception surface is not valid utf-8")
		}
		prevEnd = end
	}
	if uint64(prevEnd) != uint64(len(c.excData)) {
		return corrupt("exceptions", dataOff+int(prevEnd), "%d bytes after the last exception surface", len(c.excData)-int(prevEnd))
	}
	return nil
}

// appendCasing appends the casing parts of entries to out, whose section
// starts at base, in the layout of h.version, and records their offsets
// and counts in h.
func appendCasing(out []byte, base int, entries []Entry, h *header) []byte {
	if h.version >= SectionVersion {
		return appendCompactCasing(out, base, entries, h)
	}
	h.caseOff = uint32(len(out) - base)
	codes := make([]byte, (len(entries)+3)/4)
	var excIDs, excEnds []uint32
	var excData []byte
	for i, e := range entries {
		c := casingCode(e.Word, e.Surface)
		codes[i/4] |= c << (2 * (i % 4))
		if c == caseExcept {
			excIDs = append(excIDs, uint32(i))
			excData = append(excData, e.Surface...)
			excEnds = append(excEnds, uint32(len(excData)))
		}
	}
	out = append(out, codes...)
	out = padTo(out, base)
	h.excCount = uint32(len(excIDs))
	h.excIDOff = uint32(len(out) - base)
	out = appendUint32s(out, excIDs)
	h.excEndOff = uint32(len(out) - base)
	out = appendUint32s(out, excEnds)
	h.excDataOff = uint32(len(out) - base)
	h.excDataLen = uint32(len(excData))
	out = append(out, excData...)
	return padTo(out, base)
}
