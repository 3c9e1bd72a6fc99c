package format

import (
	"encoding/binary"
	"fmt"
	"math"
	"slices"
)

// Section is one section to write: its kind and its body bytes.
type Section struct {
	Kind Kind
	Data []byte
}

// fileHeader holds the header fields Append writes. Tests use it to build
// files of other versions.
type fileHeader struct {
	major, minor uint16
	flags        uint32
}

// Append appends a complete model file holding sections to dst and returns
// the extended slice. The header carries [MajorVersion], [MinorVersion] and
// no flags. Sections are written in ascending kind order whatever their
// order in the argument, each starting on a [SectionAlign] boundary counted
// from the start of the appended file, with zero padding between them, so
// the same sections always give the same bytes. The section bodies are
// copied; Append keeps no reference to them.
//
// Append returns [ErrInvalidKind] for a section of kind 0,
// [ErrDuplicateKind] when two sections share a kind and [ErrTooLarge] for
// more than [MaxSections] sections or a file too large for one slice; dst
// is then returned unchanged.
// It runs in O(total bytes + n log n) for n sections.
func Append(dst []byte, sections []Section) ([]byte, error) {
	return appendFile(dst, fileHeader{major: MajorVersion, minor: MinorVersion}, sections)
}

// appendFile is Append with explicit header fields.
func appendFile(dst []byte, h fileHeader, sections []Section) ([]byte, error) {
	if len(sections) > MaxSections {
		return dst, fmt.Errorf("%w: %d sections, at most %d", ErrTooLarge, len(sections), MaxSections)
	}
	sorted := slices.Clone(sections)
	slices.SortStableFunc(sorted, func(a, b Section) int {
		switch {
		case a.Kind < b.Kind:
			return -1
		case a.Kind > b.Kind:
			return 1
		}
		return 0
	})
	for i, s := range sorted {
		if s.Kind == 0 {
			return dst, fmt.Errorf("%w: kind 0", ErrInvalidKind)
		}
		if i > 0 && sorted[i-1].Kind == s.Kind {
			return dst, fmt.Errorf("%w: %s", ErrDuplicateKind, s.Kind)
		}
	}

	tableEnd := HeaderSize + EntrySize*len(sorted)
	offsets := make([]uint64, len(sorted))
	end := uint64(tableEnd)
	for i, s := range sorted {
		end = alignUp(end)
		offsets[i] = end
		end += uint64(len(s.Data))
	}

	base := len(dst)
	if end > uint64(math.MaxInt-base) {
		return dst, fmt.Errorf("%w: %d bytes do not fit in memory", ErrTooLarge, end)
	}
	dst = slices.Grow(dst, int(end))
	dst = dst[:base+int(end)]
	file := dst[base:]
	clear(file)

	le := binary.LittleEndian
	copy(file[offMagic:], Magic)
	le.PutUint16(file[offMajor:], h.major)
	le.PutUint16(file[offMinor:], h.minor)
	le.PutUint32(file[offFlags:], h.flags)
	le.PutUint32(file[offCount:], uint32(len(sorted)))
	for i, s := range sorted {
		e := file[HeaderSize+i*EntrySize:]
		le.PutUint32(e[entKind:], uint32(s.Kind))
		le.PutUint32(e[entCRC:], checksum(s.Data))
		le.PutUint64(e[entOffset:], offsets[i])
		le.PutUint64(e[entLength:], uint64(len(s.Data)))
		copy(file[offsets[i]:], s.Data)
	}
	le.PutUint32(file[offHeaderCRC:], headerChecksum(file, tableEnd))
	return dst, nil
}
