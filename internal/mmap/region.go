package mmap

import (
	"fmt"
	"math"
	"os"
	"sync"
)

// Region is a read-only view of a whole file, mapped or read into memory.
type Region struct {
	mu     sync.Mutex
	data   []byte
	mapped bool
	closed bool
}

// Open opens the regular file at path and returns its contents as a
// Region: mapped read-only where the platform allows, otherwise read into
// memory. An empty file gives a Region with no bytes. Open returns
// [ErrNotRegular] for directories and devices and [ErrTooLarge] for files
// that do not fit in the address space. Mapping costs O(1) in the file's
// size; the fallback reads every byte.
func Open(path string) (*Region, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("mmap: %w", err)
	}
	defer f.Close()
	fi, err := f.Stat()
	if err != nil {
		return nil, fmt.Errorf("mmap: %w", err)
	}
	if !fi.Mode().IsRegular() {
		return nil, fmt.Errorf("%w: %s", ErrNotRegular, path)
	}
	size := fi.Size()
	if size < 0 || uint64(size) > math.MaxInt {
		return nil, fmt.Errorf("%w: %s is %d bytes", ErrTooLarge, path, size)
	}
	if size == 0 {
		return &Region{data: []byte{}}, nil
	}
	data, mapped, err := load(f, int(size))
	if err != nil {
		return nil, fmt.Errorf("mmap: %s: %w", path, err)
	}
	return &Region{data: data, mapped: mapped}, nil
}

// Bytes returns the file's contents. The slice is valid until [Region.Close]
// and must not be modified; a mapped region faults on writes. After Close,
// Bytes returns nil.
func (r *Region) Bytes() []byte {
	r.mu.Lock()
	defer r.mu.Unlock()
	return r.data
}

// Mapped reports whether the bytes are a memory mapping of the file rather
// than a copy read into memory. An empty file is never mapped.
func (r *Region) Mapped() bool { return r.mapped }

// Close releases the mapping or the copy. Every slice obtained from
// [Region.Bytes] is invalid afterwards. Calling Close again does nothing
// and returns nil.
func (r *Region) Close() error {
	r.mu.Lock()
	defer r.mu.Unlock()
	if r.closed {
		return nil
	}
	r.closed = true
	data := r.data
	r.data = nil
	if r.mapped {
		if err := unmap(data); err != nil {
			return fmt.Errorf("mmap: close: %w", err)
		}
	}
	return nil
}
