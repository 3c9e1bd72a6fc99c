// Package mmap gives read-only access to a whole file as one byte slice:
// memory-mapped where the platform supports it, read into memory
// otherwise.
//
//	r, err := mmap.Open(path)
//	if err != nil { ... }
//	defer r.Close()
//	b := r.Bytes() // valid until Close
//
// On Unix systems the file is mapped with PROT_READ and MAP_SHARED, so
// opening costs about the same whatever the file's size and pages are read
// from disk only when touched. On js/wasm, wasip1, Windows and Plan 9, and
// in any build with the keyloom_nommap tag (not vellum's own nommap tag,
// whose file does not compile), Open reads the whole file into memory
// instead; [Region.Mapped] tells which happened.
//
// # Caveats
//
// The bytes of a mapping must not be written: doing so faults. A mapped file
// must not be truncated or rewritten in place while mapped, or reading it
// may fault (SIGBUS); the project only ever replaces files by renaming a new
// one over them, which leaves existing mappings intact. After
// [Region.Close] every slice obtained from [Region.Bytes] is invalid.
//
// A Region is safe for concurrent use except that Close must not run while
// another goroutine still uses the bytes.
package mmap
