package format

import (
	"encoding/binary"
	"hash/crc32"
	"testing"
)

// refCRC is CRC-32C computed with the standard library's own table, the
// reference implementation the tests compare against.
func refCRC(b []byte) uint32 { return crc32.Checksum(b, crc32.MakeTable(crc32.Castagnoli)) }

// sampleSections returns four sections of lengths that are not multiples
// of 8, so that padding is exercised.
func sampleSections() []Section {
	return []Section{
		{Kind: KindNgrams, Data: []byte("ngram tables: 0123456789abcdef-0123456789abcdef!")},
		{Kind: KindMeta, Data: []byte(`{"name":"tiny"}`)},
		{Kind: KindLexicon, Data: []byte{1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11}},
		{Kind: KindOverlay, Data: []byte("overlay")},
	}
}

// mustAppend frames sections or fails the test.
func mustAppend(t testing.TB, sections []Section) []byte {
	t.Helper()
	b, err := Append(nil, sections)
	if err != nil {
		t.Fatalf("Append: %v", err)
	}
	return b
}

// rawEntry is one section table entry written verbatim by rawFile.
type rawEntry struct {
	kind           uint32
	crc            uint32
	offset, length uint64
}

// rawFile builds a file byte by byte from the layout in FORMAT.md, without
// using the package's writer, so that tests can place sections anywhere.
// body is copied to the start of the file after the header and table have
// been written over it; size is the total length. The header CRC is
// computed as FORMAT.md describes, so only the tested fault is present.
func rawFile(t testing.TB, major, minor uint16, entries []rawEntry, size int) []byte {
	t.Helper()
	le := binary.LittleEndian
	tableEnd := 24 + 24*len(entries)
	if size < tableEnd {
		t.Fatalf("rawFile: size %d smaller than header %d", size, tableEnd)
	}
	b := make([]byte, size)
	copy(b, "\xabKLOOM\r\n")
	le.PutUint16(b[8:], major)
	le.PutUint16(b[10:], minor)
	le.PutUint32(b[16:], uint32(len(entries)))
	for i, e := range entries {
		p := b[24+24*i:]
		le.PutUint32(p[0:], e.kind)
		le.PutUint32(p[4:], e.crc)
		le.PutUint64(p[8:], e.offset)
		le.PutUint64(p[16:], e.length)
	}
	fixHeaderCRC(b)
	return b
}

// fixHeaderCRC recomputes the header CRC of b as FORMAT.md defines it:
// CRC-32C of bytes [0,20) then [24, 24+24*count).
func fixHeaderCRC(b []byte) {
	le := binary.LittleEndian
	n := int(le.Uint32(b[16:]))
	covered := append(append([]byte{}, b[:20]...), b[24:24+24*n]...)
	le.PutUint32(b[20:], refCRC(covered))
}
