package trie

// This file holds the surface casing of words: a 2-bit code per word and a
// table of exceptions for surfaces that no code describes.

import (
	"encoding/binary"
	"unicode"
	"unicode/utf8"
)

// casingTable is a read-only view of the casing part of a section. Its
// slices alias the section bytes.
type casingTable struct {
	codes   []byte // 2 bits per word
	excIDs  []byte // e little-endian uint32 word ids, strictly ascending
	excEnds []byte // e little-endian uint32 end offsets into excData
	excData []byte
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
	i := int(id / 4)
	if i >= len(c.codes) {
		return caseSame
	}
	return c.codes[i] >> (2 * (id % 4)) & 3
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
