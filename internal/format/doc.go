// Package format frames the sections of a Keyloom model file: one file
// holding everything a device needs, opened by mapping it into memory with
// no table parsing and no copying.
//
// A file is a fixed header (magic, version, flags, section count, header
// CRC-32C), a section table (kind, CRC-32C, offset, length per entry) and the
// section bodies, each starting on an 8-byte boundary. Every integer is
// little-endian. FORMAT.md in this directory is the byte-level spec; the
// layout constants live in layout.go.
//
// # Lifecycle
//
// Writing: each package that owns a section kind encodes its body as bytes;
// [Append] frames them into one file deterministically and
// [WriteFileAtomic] puts it on disk so that a crash never leaves a torn
// file:
//
//	file, err := format.Append(nil, []format.Section{
//		{Kind: format.KindLexicon, Data: lex},
//		{Kind: format.KindNgrams, Data: grams},
//	})
//	if err != nil { ... }
//	err = format.WriteFileAtomic(path, file, 0o644)
//
// Reading: map the file (package internal/mmap) or hold its bytes, then
// [Parse] checks the header and table without reading the bodies, and
// [File.Section] hands out each body as a slice of the same bytes:
//
//	f, err := format.Parse(region.Bytes())
//	if err != nil { ... } // errors.Is(err, format.ErrNotModel), ErrVersion, ErrChecksum, ErrCorrupt
//	if err := f.Verify(format.KindLexicon); err != nil { ... }
//	lex, ok := f.Section(format.KindLexicon)
//
// [Uint64s], [Uint32s] and [Uint16s] turn a section's bytes into typed
// slices, without copying where alignment and the host's byte order allow.
//
// # Compatibility
//
// A reader opens every minor version of its major version: unknown section
// kinds are listed by [File.Sections] and otherwise skipped, and unknown
// flags are ignored. A file of another major version is refused with
// [ErrVersion].
//
// # Concurrency and ownership
//
// A [File] is immutable and safe for any number of goroutines. Slices it
// returns alias the bytes given to [Parse]: they are valid until the mapping
// holding those bytes is closed, and must not be modified.
//
// # Damaged input
//
// No input makes this package panic or read out of range: every count,
// offset and length is checked against the bytes there before use.
package format
