package trie

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"math"
	"unicode/utf8"

	"github.com/blevesearch/vellum"
)

// Entry is one word of a lexicon as given to [AppendSection].
type Entry struct {
	// Word is the folded (lower-cased) key: non-empty, valid UTF-8, at most
	// MaxWordLen bytes. Its rank among all Words in byte order is its id.
	Word string
	// Surface is the usual display form of the word, such as "London" for
	// "london" or "NASA" for "nasa". The empty string means the same as
	// Word. It must be valid UTF-8 of at most MaxSurfaceLen bytes.
	Surface string
}

// Size of vellum's suffix registry used when building: rows and cells per
// row. A larger registry finds more shared suffixes (a smaller FST) at the
// cost of build memory and time. Measured on the 74,286 SUBTLEX-US words:
// vellum's default (10000×2) gives 366,937 bytes, 100000×4 gives 355,488,
// the size of the fully minimal FST. Small lexicons get fewer rows (twice
// the word count, at least 64) so that building them stays cheap. The
// sizes depend on the entries alone, so the same entries always give the
// same bytes.
const (
	fstRegistryRows  = 100000
	fstRegistryCells = 4
)

// AppendSection appends a lexicon section holding entries to dst and returns
// the extended slice. The entries must be sorted by Word in byte order
// (as sort.Strings orders them) with no Word repeated; the id of each word
// is its index in entries. The section is a whole number of 8-byte words
// long and, if it starts 8-byte aligned, every part inside it is aligned
// too (see FORMAT.md). The same entries always give the same bytes.
//
// It returns an error wrapping [ErrEmptyWord], [ErrInvalidUTF8],
// [ErrWordTooLong], [ErrUnsorted], [ErrDuplicate] or [ErrTooLarge] naming
// the offending entry, and then dst is returned unchanged. It costs
// O(total bytes of the entries) time.
func AppendSection(dst []byte, entries []Entry) ([]byte, error) {
	return appendSection(dst, entries, 0)
}

// appendSection is AppendSection with a given number of words per block of
// the word table: 0 writes version 3 (no table), 1..maxBlockSize version 1.
func appendSection(dst []byte, entries []Entry, bs int) ([]byte, error) {
	if bs > 0 {
		return appendSectionVersion(dst, entries, tableVersion, bs)
	}
	return appendSectionVersion(dst, entries, SectionVersion, 0)
}

// appendSectionVersion is AppendSection writing the given layout version:
// tableVersion with bs words per block, listVersion or SectionVersion with
// bs 0. Versions before SectionVersion are kept for tests and comparisons.
func appendSectionVersion(dst []byte, entries []Entry, version uint16, bs int) ([]byte, error) {
	if err := checkEntries(entries); err != nil {
		return dst, err
	}
	fst, err := buildFST(entries)
	if err != nil {
		return dst, err
	}

	base := len(dst)
	out := append(dst, make([]byte, headerSize)...)
	var h header
	h.version = version
	h.count = uint32(len(entries))
	h.blockSize = uint32(bs)
	for _, e := range entries {
		h.maxWordLen = max(h.maxWordLen, uint32(len(e.Word)))
	}

	h.fstOff = uint32(len(out) - base)
	h.fstLen = uint32(len(fst))
	out = append(out, fst...)
	out = padTo(out, base)

	var words []byte
	var offs []uint32
	if bs > 0 {
		words, offs = appendWords(nil, entries, bs)
	}
	h.blocksOff = uint32(len(out) - base)
	for _, o := range offs {
		out = binary.LittleEndian.AppendUint32(out, o)
	}
	h.wordsOff = uint32(len(out) - base)
	h.wordsLen = uint32(len(words))
	out = append(out, words...)
	out = padTo(out, base)

	out = appendCasing(out, base, entries, &h)

	if len(out)-base > math.MaxUint32 {
		return dst, fmt.Errorf("%w: section would be %d bytes", ErrTooLarge, len(out)-base)
	}
	h.totalLen = uint32(len(out) - base)
	h.put(out[base : base+headerSize])
	return out, nil
}

// checkEntries checks every rule AppendSection states for its entries.
func checkEntries(entries []Entry) error {
	if uint64(len(entries)) > MaxWords {
		return fmt.Errorf("%w: %d words", ErrTooLarge, len(entries))
	}
	var total uint64
	for i, e := range entries {
		switch {
		case e.Word == "":
			return fmt.Errorf("%w: entry %d", ErrEmptyWord, i)
		case len(e.Word) > MaxWordLen:
			return fmt.Errorf("%w: entry %d is %d bytes, limit %d", ErrWordTooLong, i, len(e.Word), MaxWordLen)
		case len(e.Surface) > MaxSurfaceLen:
			return fmt.Errorf("%w: surface of entry %d is %d bytes, limit %d", ErrWordTooLong, i, len(e.Surface), MaxSurfaceLen)
		case !utf8.ValidString(e.Word):
			return fmt.Errorf("%w: entry %d (%q)", ErrInvalidUTF8, i, e.Word)
		case !utf8.ValidString(e.Surface):
			return fmt.Errorf("%w: surface of entry %d (%q)", ErrInvalidUTF8, i, e.Surface)
		case i > 0 && e.Word == entries[i-1].Word:
			return fmt.Errorf("%w: entry %d (%q)", ErrDuplicate, i, e.Word)
		case i > 0 && e.Word < entries[i-1].Word:
			return fmt.Errorf("%w: entry %d (%q) comes after %q", ErrUnsorted, i, e.Word, entries[i-1].Word)
		}
		total += uint64(len(e.Word)) + uint64(len(e.Surface))
	}
	if total > math.MaxUint32 {
		return fmt.Errorf("%w: %d words of %d bytes", ErrTooLarge, len(entries), total)
	}
	return nil
}

// buildFST builds the vellum FST mapping each Word to its index.
func buildFST(entries []Entry) ([]byte, error) {
	var buf bytes.Buffer
	bld, err := vellum.New(&buf, &vellum.BuilderOpts{
		Encoder:           fstVersion,
		RegistryTableSize: min(fstRegistryRows, 2*len(entries)+64),
		RegistryMRUSize:   fstRegistryCells,
	})
	if err != nil {
		return nil, fmt.Errorf("trie: start fst: %w", err)
	}
	for i, e := range entries {
		if err := bld.Insert([]byte(e.Word), uint64(i)); err != nil {
			return nil, fmt.Errorf("trie: insert %q into fst: %w", e.Word, err)
		}
	}
	if err := bld.Close(); err != nil {
		return nil, fmt.Errorf("trie: finish fst: %w", err)
	}
	return buf.Bytes(), nil
}
