package format

import (
	"encoding/binary"
	"fmt"
	"slices"
)

// SectionInfo describes one entry of a file's section table.
type SectionInfo struct {
	// Kind is the section kind; it may be a kind this version does not know.
	Kind Kind
	// Offset is the start of the section body from the start of the file.
	Offset uint64
	// Length is the length of the section body in bytes.
	Length uint64
	// CRC is the stored CRC-32C of the section body.
	CRC uint32
}

// File is a parsed model file: its header and section table over the bytes
// given to [Parse]. A File is immutable and safe for use by any number of
// goroutines.
type File struct {
	b        []byte
	major    uint16
	minor    uint16
	flags    uint32
	sections []SectionInfo // sorted by kind, strictly ascending
}

// Parse checks the header and section table of the model file b and
// returns a File over it. It keeps b and never copies it: sections returned
// by [File.Section] alias b.
//
// The checks run in this fixed order, and the first failure is returned:
//
//  1. b holds at least the fixed header; otherwise [ErrNotModel] when b is
//     empty or not a prefix of [Magic], else [ErrCorrupt] (a truncated file);
//  2. the magic ([ErrNotModel]);
//  3. the major version ([ErrVersion], naming both versions);
//  4. the section count against [MaxSections] and the bytes left
//     ([ErrCorrupt]), before anything is allocated;
//  5. the header CRC over the header and table ([ErrChecksum]);
//  6. for each table entry in order: a valid kind in strictly ascending
//     order, then bounds (after the table, inside b, no uint64 overflow),
//     then alignment ([ErrCorrupt]);
//  7. that no two sections overlap ([ErrCorrupt]).
//
// Parse does not checksum section bodies, so opening a mapped file touches
// only the pages of its header; call [File.Verify] or [File.VerifyAll] for
// that. Parse runs in O(n) for n sections when, as [Append] writes them,
// the bodies are in table order, and O(n log n) otherwise.
func Parse(b []byte) (*File, error) {
	le := binary.LittleEndian
	if len(b) < HeaderSize {
		if len(b) == 0 {
			return nil, fmt.Errorf("%w: empty", ErrNotModel)
		}
		if n := min(len(b), len(Magic)); string(b[:n]) != Magic[:n] {
			return nil, fmt.Errorf("%w: bad magic % x", ErrNotModel, b[:n])
		}
		return nil, corrupt(0, uint64(len(b)), "truncated header: %d bytes, need %d", len(b), HeaderSize)
	}
	if string(b[offMagic:offMagic+len(Magic)]) != Magic {
		return nil, fmt.Errorf("%w: bad magic % x", ErrNotModel, b[offMagic:offMagic+len(Magic)])
	}
	major, minor := le.Uint16(b[offMajor:]), le.Uint16(b[offMinor:])
	if major != MajorVersion {
		return nil, fmt.Errorf("%w: file has version %d.%d, this library reads version %d.x",
			ErrVersion, major, minor, MajorVersion)
	}

	count := le.Uint32(b[offCount:])
	if count > MaxSections {
		return nil, corrupt(0, offCount, "section count %d exceeds the maximum %d", count, MaxSections)
	}
	left := uint64(len(b) - HeaderSize)
	if need := uint64(count) * EntrySize; need > left {
		return nil, corrupt(0, offCount, "section table of %d entries needs %d bytes, %d left", count, need, left)
	}
	tableEnd := HeaderSize + int(count)*EntrySize
	if stored, got := le.Uint32(b[offHeaderCRC:]), headerChecksum(b, tableEnd); stored != got {
		return nil, fmt.Errorf("%w: header: stored %08x, computed %08x", ErrChecksum, stored, got)
	}

	size := uint64(len(b))
	sections := make([]SectionInfo, count)
	inOrder := true
	for i := range sections {
		at := uint64(HeaderSize + i*EntrySize)
		e := b[at : at+EntrySize]
		s := SectionInfo{
			Kind:   Kind(le.Uint32(e[entKind:])),
			CRC:    le.Uint32(e[entCRC:]),
			Offset: le.Uint64(e[entOffset:]),
			Length: le.Uint64(e[entLength:]),
		}
		switch {
		case s.Kind == 0:
			return nil, corrupt(0, at+entKind, "table entry %d has kind 0", i)
		case i > 0 && s.Kind == sections[i-1].Kind:
			return nil, corrupt(s.Kind, at+entKind, "duplicate section kind")
		case i > 0 && s.Kind < sections[i-1].Kind:
			return nil, corrupt(s.Kind, at+entKind, "table not sorted by kind: follows %s", sections[i-1].Kind)
		case s.Offset < uint64(tableEnd):
			return nil, corrupt(s.Kind, at+entOffset, "section offset %d lies inside the header, which ends at %d", s.Offset, tableEnd)
		case s.Offset > size:
			return nil, corrupt(s.Kind, at+entOffset, "section offset %d is past the end of the file (%d bytes)", s.Offset, size)
		case s.Length > size-s.Offset:
			return nil, corrupt(s.Kind, at+entLength, "section of %d bytes at offset %d runs past the end of the file (%d bytes)", s.Length, s.Offset, size)
		case s.Offset%SectionAlign != 0:
			return nil, corrupt(s.Kind, at+entOffset, "section offset %d is not a multiple of %d", s.Offset, SectionAlign)
		}
		if i > 0 && s.Offset < sections[i-1].Offset {
			inOrder = false
		}
		sections[i] = s
	}
	if err := checkOverlap(sections, inOrder); err != nil {
		return nil, err
	}
	return &File{b: b, major: major, minor: minor, flags: le.Uint32(b[offFlags:]), sections: sections}, nil
}

// checkOverlap returns an ErrCorrupt error when two sections share a byte.
// Empty sections overlap nothing.
func checkOverlap(sections []SectionInfo, inOrder bool) error {
	order := sections
	if !inOrder {
		order = slices.Clone(sections)
		slices.SortFunc(order, func(a, b SectionInfo) int {
			switch {
			case a.Offset < b.Offset:
				return -1
			case a.Offset > b.Offset:
				return 1
			}
			return 0
		})
	}
	var prev *SectionInfo
	for i := range order {
		s := &order[i]
		if s.Length == 0 {
			continue
		}
		if prev != nil && s.Offset < prev.Offset+prev.Length {
			return corrupt(s.Kind, s.Offset, "section overlaps section %s (bytes %d to %d)", prev.Kind, prev.Offset, prev.Offset+prev.Length)
		}
		prev = s
	}
	return nil
}

// Major returns the file's major format version.
func (f *File) Major() uint16 { return f.major }

// Minor returns the file's minor format version, which may be newer than
// [MinorVersion].
func (f *File) Minor() uint16 { return f.minor }

// Flags returns the file's flag bits. Version 1.0 defines none; a later
// minor version may add some, which older readers ignore.
func (f *File) Flags() uint32 { return f.flags }

// Sections returns a copy of the section table in ascending kind order,
// including kinds this version does not know.
func (f *File) Sections() []SectionInfo { return slices.Clone(f.sections) }

// find returns the table entry of kind k.
func (f *File) find(k Kind) (SectionInfo, bool) {
	i, ok := slices.BinarySearchFunc(f.sections, k, func(s SectionInfo, k Kind) int {
		switch {
		case s.Kind < k:
			return -1
		case s.Kind > k:
			return 1
		}
		return 0
	})
	if !ok {
		return SectionInfo{}, false
	}
	return f.sections[i], true
}

// Section returns the body of the section of kind k and whether the file has
// one. The slice aliases the bytes given to [Parse]: it is valid until the
// mapping holding them is closed and must not be modified. Its capacity
// equals its length, so appending to it copies. Its checksum is not
// checked; see [File.Verify]. Section runs in O(log n) and does not
// allocate.
func (f *File) Section(k Kind) ([]byte, bool) {
	s, ok := f.find(k)
	if !ok {
		return nil, false
	}
	end := s.Offset + s.Length
	return f.b[s.Offset:end:end], true
}

// Verify computes the CRC-32C of the body of the section of kind k and
// returns [ErrChecksum] if it differs from the stored one, or
// [ErrNoSection] if the file has no such section. It reads every byte of
// the section.
func (f *File) Verify(k Kind) error {
	s, ok := f.find(k)
	if !ok {
		return fmt.Errorf("%w: %s", ErrNoSection, k)
	}
	return f.verify(s)
}

func (f *File) verify(s SectionInfo) error {
	if got := checksum(f.b[s.Offset : s.Offset+s.Length]); got != s.CRC {
		return fmt.Errorf("%w: section %s: stored %08x, computed %08x", ErrChecksum, s.Kind, s.CRC, got)
	}
	return nil
}

// VerifyAll verifies every section, known kinds or not, in table order and
// returns the first [ErrChecksum] error. It reads every byte of every
// section.
func (f *File) VerifyAll() error {
	for _, s := range f.sections {
		if err := f.verify(s); err != nil {
			return err
		}
	}
	return nil
}
