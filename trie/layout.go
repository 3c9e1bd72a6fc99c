package trie

// This file holds the whole byte layout of a lexicon section in one place.
// FORMAT.md describes the same layout byte by byte; change both together.

import "encoding/binary"

// SectionMagic is the 4 bytes every lexicon section starts with.
const SectionMagic = "KLXw"

// SectionVersion is the layout version this package writes. Version 2 keeps
// no word table: a word is rebuilt from its id by walking the FST (see
// [Lexicon.AppendWord]). Version 3 is version 2 with a compact table of
// casing exceptions (a rank directory instead of a list of ids, and most
// surfaces as an upper-case mask over the word). Versions 1, 2 and 3 are
// read; a section with any other version is refused with [ErrVersion].
const SectionVersion uint16 = 3

// tableVersion is the layout version that keeps the front-coded word table.
const tableVersion uint16 = 1

// listVersion is the layout version without a word table whose casing
// exceptions are a list of ids, end offsets and whole surfaces.
const listVersion uint16 = 2

// MaxWordLen is the longest Word, in bytes, a lexicon can hold. Word lengths
// are stored in one byte in the word table, so AppendWord never needs more
// than this much room in dst.
const MaxWordLen = 255

// MaxSurfaceLen is the longest stored Surface, in bytes.
const MaxSurfaceLen = 1024

// MaxWords is the largest number of words a lexicon can hold.
const MaxWords = 1<<31 - 1

// headerSize is the size in bytes of the fixed section header.
const headerSize = 64

// blockSize is the number of words per front-coded block of the word table
// of a version-1 section. The loader accepts any value from 1 to
// maxBlockSize recorded in a version-1 header and requires 0 (no table) in
// a version-2 or version-3 one; AppendSection writes version 3.
const blockSize = 16

// maxBlockSize is the largest block size the loader accepts.
const maxBlockSize = 256

// partAlign is the alignment, in bytes from the start of the section, of
// every part after the header. The section itself starts 8-byte aligned in
// the model file, so the uint32 arrays can be read straight from a mapping.
const partAlign = 8

// Byte offsets of the header fields. All integers are little-endian uint32
// unless noted.
const (
	hMagic      = 0  // [4]byte, SectionMagic
	hVersion    = 4  // uint16, SectionVersion
	hFlags      = 6  // uint16, no flags are defined; must be 0
	hTotalLen   = 8  // length of the whole section, a multiple of partAlign
	hCount      = 12 // number of words n
	hBlockSize  = 16 // uint16, words per front-coded block (1..maxBlockSize); 0 in versions 2 and 3
	hMaxWordLen = 18 // uint16, length in bytes of the longest word
	hFSTOff     = 20 // offset of the vellum FST
	hFSTLen     = 24 // length of the vellum FST
	hBlocksOff  = 28 // offset of the block offset array: ceil(n/blockSize)+1 uint32
	hWordsOff   = 32 // offset of the front-coded word bytes
	hWordsLen   = 36 // length of the front-coded word bytes (version 3: hNonLower)
	hNonLower   = 36 // version 3: number of words whose surface is not the word itself
	hCaseOff    = 40 // offset of the 2-bit casing codes: ceil(n/4) bytes (version 3: of the non-lower bitmap)
	hExcCount   = 44 // number of casing exceptions e
	hExcIDOff   = 48 // offset of the exception word ids: e uint32, ascending (version 3: of the rank samples)
	hExcEndOff  = 52 // offset of the exception end offsets: e uint32 (version 3: the record offset samples)
	hExcDataOff = 56 // offset of the exception surfaces, concatenated (version 3: the records)
	hExcDataLen = 60 // length of the exception surfaces (version 3: of the records)
)

// Casing codes, two bits per word, word i at bits 2*(i%4) of byte i/4 of the
// casing part.
const (
	caseSame    = 0 // the surface is the word itself
	caseCapital = 1 // the first rune upper-cased (unicode.ToUpper), the rest as is
	caseUpper   = 2 // every rune upper-cased (unicode.ToUpper)
	caseExcept  = 3 // the surface is stored in the exception table
)

// header is the decoded fixed header of a section.
type header struct {
	version    uint16
	totalLen   uint32
	count      uint32
	blockSize  uint32
	maxWordLen uint32
	fstOff     uint32
	fstLen     uint32
	blocksOff  uint32
	wordsOff   uint32
	wordsLen   uint32
	nonLower   uint32 // version 3 only, stored where wordsLen is
	caseOff    uint32
	excCount   uint32
	excIDOff   uint32
	excEndOff  uint32
	excDataOff uint32
	excDataLen uint32
}

// put writes h, with the magic and version, into b[:headerSize].
func (h *header) put(b []byte) {
	le := binary.LittleEndian
	copy(b[hMagic:], SectionMagic)
	le.PutUint16(b[hVersion:], h.version)
	le.PutUint16(b[hFlags:], 0)
	le.PutUint32(b[hTotalLen:], h.totalLen)
	le.PutUint32(b[hCount:], h.count)
	le.PutUint16(b[hBlockSize:], uint16(h.blockSize))
	le.PutUint16(b[hMaxWordLen:], uint16(h.maxWordLen))
	le.PutUint32(b[hFSTOff:], h.fstOff)
	le.PutUint32(b[hFSTLen:], h.fstLen)
	le.PutUint32(b[hBlocksOff:], h.blocksOff)
	le.PutUint32(b[hWordsOff:], h.wordsOff)
	le.PutUint32(b[hWordsLen:], h.wordsLen)
	if h.version >= SectionVersion {
		le.PutUint32(b[hNonLower:], h.nonLower)
	}
	le.PutUint32(b[hCaseOff:], h.caseOff)
	le.PutUint32(b[hExcCount:], h.excCount)
	le.PutUint32(b[hExcIDOff:], h.excIDOff)
	le.PutUint32(b[hExcEndOff:], h.excEndOff)
	le.PutUint32(b[hExcDataOff:], h.excDataOff)
	le.PutUint32(b[hExcDataLen:], h.excDataLen)
}

// get reads the fields of h from b, which holds at least headerSize bytes.
// It does not check magic or version.
func (h *header) get(b []byte) {
	le := binary.LittleEndian
	h.version = le.Uint16(b[hVersion:])
	h.totalLen = le.Uint32(b[hTotalLen:])
	h.count = le.Uint32(b[hCount:])
	h.blockSize = uint32(le.Uint16(b[hBlockSize:]))
	h.maxWordLen = uint32(le.Uint16(b[hMaxWordLen:]))
	h.fstOff = le.Uint32(b[hFSTOff:])
	h.fstLen = le.Uint32(b[hFSTLen:])
	h.blocksOff = le.Uint32(b[hBlocksOff:])
	h.wordsOff = le.Uint32(b[hWordsOff:])
	h.wordsLen = le.Uint32(b[hWordsLen:])
	if h.version >= SectionVersion {
		h.nonLower, h.wordsLen = h.wordsLen, 0
	}
	h.caseOff = le.Uint32(b[hCaseOff:])
	h.excCount = le.Uint32(b[hExcCount:])
	h.excIDOff = le.Uint32(b[hExcIDOff:])
	h.excEndOff = le.Uint32(b[hExcEndOff:])
	h.excDataOff = le.Uint32(b[hExcDataOff:])
	h.excDataLen = le.Uint32(b[hExcDataLen:])
}

// numBlocks returns the number of front-coded blocks for n words.
func numBlocks(n, size uint32) uint32 {
	return uint32((uint64(n) + uint64(size) - 1) / uint64(size))
}

// blockPartLen returns the length in bytes of the block offsets for n words
// in blocks of size words: ceil(n/size)+1 uint32 values, and none when size
// is 0 (a version-2 or version-3 section, which has no word table).
func blockPartLen(n, size uint32) uint64 {
	if size == 0 {
		return 0
	}
	return 4 * (uint64(numBlocks(n, size)) + 1)
}

// padTo appends zero bytes to b until len(b)-base is a multiple of
// partAlign.
func padTo(b []byte, base int) []byte {
	for (len(b)-base)%partAlign != 0 {
		b = append(b, 0)
	}
	return b
}

// appendUint32s appends xs to b, little-endian.
func appendUint32s(b []byte, xs []uint32) []byte {
	for _, x := range xs {
		b = binary.LittleEndian.AppendUint32(b, x)
	}
	return b
}

// layout is where every part of a section goes, computed in uint64 so that
// no recorded size can overflow it.
type layout struct {
	fstOff, fstEnd        uint64
	blocksOff, wordsOff   uint64
	wordsEnd, caseOff     uint64
	codesOff              uint64 // version 3: the codes of the non-lower words
	caseEnd, excIDOff     uint64
	excEndOff, excDataOff uint64
	excDataEnd, total     uint64
}

// layoutFor returns the placement of the parts of a section of the given
// layout version with n words in blocks of bs words (0: no word table), an
// FST of fstLen bytes, wordsLen bytes of front-coded words, m non-lower
// words (version 3 only) and e exceptions with excDataLen bytes of
// surfaces (version 3: of records).
func layoutFor(version uint16, n, bs uint32, fstLen, wordsLen, m, e, excDataLen uint64) layout {
	al := func(x uint64) uint64 { return (x + partAlign - 1) &^ (partAlign - 1) }
	var l layout
	l.fstOff = headerSize
	l.fstEnd = l.fstOff + fstLen
	l.blocksOff = al(l.fstEnd)
	l.wordsOff = l.blocksOff + blockPartLen(n, bs)
	l.wordsEnd = l.wordsOff + wordsLen
	l.caseOff = al(l.wordsEnd)
	if version >= SectionVersion {
		// The non-lower bitmap and the codes of the non-lower words, both
		// in whole uint64 words; the rank samples of the bitmap (none
		// when m is 0) and of the exceptions among the codes (none when e
		// is 0); the record offset samples.
		l.codesOff = l.caseOff + 8*((uint64(n)+63)/64)
		l.caseEnd = l.codesOff + 8*((m+31)/32)
		l.excIDOff = l.caseEnd
		l.excEndOff = l.excIDOff
		if m > 0 {
			l.excEndOff += 4 * ((uint64(n) + bitRankStep - 1) / bitRankStep)
		}
		if e > 0 {
			l.excEndOff += 4 * ((m + rankStep - 1) / rankStep)
		}
		l.excDataOff = l.excEndOff + 4*((e+recordStep-1)/recordStep)
	} else {
		l.caseEnd = l.caseOff + (uint64(n)+3)/4
		l.codesOff = l.caseOff
		l.excIDOff = al(l.caseEnd)
		l.excEndOff = l.excIDOff + 4*e
		l.excDataOff = l.excEndOff + 4*e
	}
	l.excDataEnd = l.excDataOff + excDataLen
	l.total = al(l.excDataEnd)
	return l
}

// padding returns the [start, end) byte ranges of a section that hold
// alignment padding.
func (l layout) padding() [][2]uint64 {
	return [][2]uint64{
		{l.fstEnd, l.blocksOff},
		{l.wordsEnd, l.caseOff},
		{l.caseEnd, l.excIDOff},
		{l.excDataEnd, l.total},
	}
}
