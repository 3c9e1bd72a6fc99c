//go:build !unix || keyloom_nommap

package mmap

import (
	"errors"
	"io"
	"os"
)

// canMap reports whether this build maps files rather than reading them.
const canMap = false

// load reads exactly size bytes of f into memory; this build does not map.
func load(f *os.File, size int) ([]byte, bool, error) {
	b := make([]byte, size)
	if _, err := io.ReadFull(f, b); err != nil {
		if errors.Is(err, io.ErrUnexpectedEOF) {
			err = errors.New("file shrank while being read")
		}
		return nil, false, err
	}
	return b, false, nil
}

// unmap is never called for a region that was read into memory.
func unmap(b []byte) error { return nil }
