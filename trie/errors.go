package trie

import (
	"errors"
	"fmt"
)

// Errors returned by AppendSection when the entries cannot form a lexicon.
var (
	// ErrEmptyWord is returned when an entry has an empty Word.
	ErrEmptyWord = errors.New("trie: empty word")

	// ErrInvalidUTF8 is returned when an entry's Word or Surface is not valid
	// UTF-8.
	ErrInvalidUTF8 = errors.New("trie: word is not valid utf-8")

	// ErrWordTooLong is returned when an entry's Word is longer than
	// [MaxWordLen] bytes or its Surface is longer than [MaxSurfaceLen] bytes.
	ErrWordTooLong = errors.New("trie: word too long")

	// ErrUnsorted is returned when the entries are not sorted by Word in byte
	// order.
	ErrUnsorted = errors.New("trie: entries not sorted by word")

	// ErrDuplicate is returned when two entries have the same Word.
	ErrDuplicate = errors.New("trie: duplicate word")

	// ErrTooLarge is returned when the entries would make a section of 4 GiB
	// or more, or hold more than [MaxWords] words.
	ErrTooLarge = errors.New("trie: lexicon too large")
)

// Errors returned by LoadSection.
var (
	// ErrCorrupt is returned, wrapped in a [*FormatError], when the bytes of a
	// lexicon section are truncated, out of bounds, unsorted, inconsistent
	// between the FST and the word table, or otherwise impossible.
	ErrCorrupt = errors.New("trie: corrupt lexicon section")

	// ErrVersion is returned when a lexicon section was written with a layout
	// version outside 1 (the version with a word table) to [SectionVersion],
	// or with flags this version does not know.
	ErrVersion = errors.New("trie: unsupported lexicon section version")
)

// FormatError reports where and why a lexicon section is corrupt. It matches
// [ErrCorrupt] through errors.Is.
type FormatError struct {
	// Part names the part of the section where the problem was found:
	// "header", "fst", "blocks", "words", "casing" or "exceptions".
	Part string
	// Offset is the byte offset from the start of the section where the
	// problem was found.
	Offset int
	// Reason says what is wrong, in lower case.
	Reason string
}

// Error returns a message naming the part, offset and reason.
func (e *FormatError) Error() string {
	return fmt.Sprintf("trie: corrupt lexicon section: %s at offset %d: %s", e.Part, e.Offset, e.Reason)
}

// Is reports whether target is [ErrCorrupt].
func (e *FormatError) Is(target error) bool { return target == ErrCorrupt }

// corrupt builds a *FormatError.
func corrupt(part string, offset int, format string, args ...any) error {
	return &FormatError{Part: part, Offset: offset, Reason: fmt.Sprintf(format, args...)}
}
