//go:build unix && !keyloom_nommap

package mmap

import (
	"os"

	"golang.org/x/sys/unix"
)

// canMap reports whether this build maps files rather than reading them.
const canMap = true

// load maps the first size bytes of f read-only and shared.
func load(f *os.File, size int) ([]byte, bool, error) {
	b, err := unix.Mmap(int(f.Fd()), 0, size, unix.PROT_READ, unix.MAP_SHARED)
	if err != nil {
		return nil, false, err
	}
	// Lookups touch a few scattered pages per query. Without these hints the
	// kernel may map whole 2 MiB page-cache folios or read ahead on every
	// fault, so that opening a model makes megabytes resident. Hints are
	// advisory: a kernel that refuses them still serves the mapping.
	_ = unix.Madvise(b, unix.MADV_RANDOM)
	_ = madviseNoHuge(b)
	return b, true, nil
}

// unmap releases a mapping made by load.
func unmap(b []byte) error { return unix.Munmap(b) }
