//go:build unix && !linux && !nommap

package mmap

// madviseNoHuge does nothing where the hint does not exist.
func madviseNoHuge(b []byte) error { return nil }
