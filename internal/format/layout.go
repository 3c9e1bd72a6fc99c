package format

// This file holds the whole on-disk layout of a model file in one place.
// FORMAT.md describes the same layout byte by byte; change both together.

import (
	"hash/crc32"
	"strconv"
)

// Magic is the 8 bytes every model file starts with. The first byte has its
// high bit set and the last two are CR LF, so that a file mangled by a 7-bit
// or line-ending-converting transfer no longer matches.
const Magic = "\xabKLOOM\r\n"

// MajorVersion is the major format version this package writes and the only
// one it reads. A file with any other major version is refused with
// [ErrVersion].
const MajorVersion uint16 = 1

// MinorVersion is the minor format version this package writes. A reader of
// major version 1 opens every minor version of it: a minor version may only
// add section kinds or flags, which older readers skip.
const MinorVersion uint16 = 0

// HeaderSize is the size in bytes of the fixed header that starts every
// model file. The section table follows it directly.
const HeaderSize = 24

// EntrySize is the size in bytes of one section table entry.
const EntrySize = 24

// SectionAlign is the alignment, in bytes from the start of the file, of
// every section body. It lets 8-byte integers be read straight from a
// mapping (see [Uint64s]).
const SectionAlign = 8

// MaxSections is the largest section count a file may declare.
const MaxSections = 1024

// Byte offsets of the fields of the fixed header. All integers are
// little-endian.
const (
	offMagic     = 0  // [8]byte, Magic
	offMajor     = 8  // uint16
	offMinor     = 10 // uint16
	offFlags     = 12 // uint32, file flags; none are defined in 1.0
	offCount     = 16 // uint32, number of section table entries
	offHeaderCRC = 20 // uint32, CRC-32C of bytes [0,20) followed by the table
)

// Byte offsets of the fields of one section table entry, relative to the
// start of the entry.
const (
	entKind   = 0  // uint32, Kind; 0 is invalid
	entCRC    = 4  // uint32, CRC-32C of the section body
	entOffset = 8  // uint64, offset of the body from the start of the file
	entLength = 16 // uint64, length of the body in bytes
)

// Kind identifies what a section holds. The container never looks inside a
// section; the package that owns a kind encodes and decodes its bytes.
type Kind uint32

// Section kinds known to this version. Kind 0 is invalid. Kinds 5 to 1023
// are reserved for sections a later minor version may add; readers skip any
// kind they do not know.
const (
	// KindMeta holds model metadata (owned by the root package).
	KindMeta Kind = 1
	// KindLexicon holds the word lexicon FST (owned by package trie).
	KindLexicon Kind = 2
	// KindNgrams holds the n-gram tables (owned by package lm).
	KindNgrams Kind = 3
	// KindOverlay holds a user count overlay (owned by package lm).
	KindOverlay Kind = 4
)

// String returns the lower-case name of a known kind, or "kind(N)" for any
// other value.
func (k Kind) String() string {
	switch k {
	case KindMeta:
		return "meta"
	case KindLexicon:
		return "lexicon"
	case KindNgrams:
		return "ngrams"
	case KindOverlay:
		return "overlay"
	}
	return "kind(" + strconv.FormatUint(uint64(k), 10) + ")"
}

// Known reports whether k is a kind defined by this version of the format.
func (k Kind) Known() bool { return k >= KindMeta && k <= KindOverlay }

// castagnoli is the CRC-32C table (Castagnoli polynomial 0x1EDC6F41,
// reflected 0x82F63B78). It is built once and never changed; the standard
// library uses hardware instructions for it where the CPU has them.
var castagnoli = crc32.MakeTable(crc32.Castagnoli)

// checksum returns the CRC-32C of b.
func checksum(b []byte) uint32 { return crc32.Checksum(b, castagnoli) }

// headerChecksum returns the CRC-32C that covers a header and table:
// bytes [0, offHeaderCRC) followed by bytes [HeaderSize, tableEnd).
func headerChecksum(b []byte, tableEnd int) uint32 {
	c := crc32.Update(0, castagnoli, b[:offHeaderCRC])
	return crc32.Update(c, castagnoli, b[HeaderSize:tableEnd])
}

// alignUp rounds n up to the next multiple of SectionAlign.
func alignUp(n uint64) uint64 {
	return (n + SectionAlign - 1) &^ (SectionAlign - 1)
}
