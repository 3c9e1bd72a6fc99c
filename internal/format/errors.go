package format

import (
	"errors"
	"fmt"
)

// Errors returned by Parse, in the order its checks run.
var (
	// ErrNotModel is returned when the bytes are not a model file at all:
	// they are empty or do not start with [Magic].
	ErrNotModel = errors.New("format: not a model file")

	// ErrVersion is returned when a model file has a major version other than
	// [MajorVersion]. The wrapping message names the file's version and the
	// version this package reads.
	ErrVersion = errors.New("format: unsupported format version")

	// ErrChecksum is returned when a stored CRC-32C does not match the bytes
	// it covers: the header CRC (by Parse) or a section CRC (by
	// [File.Verify] and [File.VerifyAll]).
	ErrChecksum = errors.New("format: checksum mismatch")

	// ErrCorrupt is returned, wrapped in a [*FormatError], when a file has
	// the right magic and version but its header, section table or a
	// section's placement is damaged: truncated, out of bounds, misaligned,
	// overlapping, duplicated or otherwise impossible.
	ErrCorrupt = errors.New("format: corrupt model file")
)

// Errors returned when asking a parsed file for a section.
var (
	// ErrNoSection is returned by [File.Verify] when the file has no section
	// of the requested kind.
	ErrNoSection = errors.New("format: no such section")
)

// Errors returned by Append.
var (
	// ErrTooLarge is returned when Append is given more than [MaxSections]
	// sections, or sections whose file would not fit in one slice.
	ErrTooLarge = errors.New("format: file too large")

	// ErrInvalidKind is returned when Append is given a section of kind 0.
	ErrInvalidKind = errors.New("format: invalid section kind")

	// ErrDuplicateKind is returned when Append is given two sections of the
	// same kind.
	ErrDuplicateKind = errors.New("format: duplicate section kind")
)

// FormatError reports where and why a model file is corrupt. It matches
// [ErrCorrupt] through errors.Is.
type FormatError struct {
	// Section is the kind of the section whose table entry or placement is
	// bad, or 0 when the problem is in the fixed header or the table as a
	// whole.
	Section Kind
	// Offset is the byte offset from the start of the file where the
	// problem was found: the header field, the table entry, or the end of
	// the bytes for a truncation.
	Offset uint64
	// Reason says what is wrong, in lower case.
	Reason string
}

// Error returns a message naming the section, offset and reason.
func (e *FormatError) Error() string {
	if e.Section == 0 {
		return fmt.Sprintf("format: corrupt model file at offset %d: %s", e.Offset, e.Reason)
	}
	return fmt.Sprintf("format: corrupt model file: section %s at offset %d: %s", e.Section, e.Offset, e.Reason)
}

// Is reports whether target is [ErrCorrupt].
func (e *FormatError) Is(target error) bool { return target == ErrCorrupt }

// corrupt builds a *FormatError.
func corrupt(section Kind, offset uint64, format string, args ...any) error {
	return &FormatError{Section: section, Offset: offset, Reason: fmt.Sprintf(format, args...)}
}
