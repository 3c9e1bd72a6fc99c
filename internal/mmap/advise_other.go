//go:build unix && !linux && !keyloom_nommap

package mmap

// madviseNoHuge does nothing where the hint does not exist.
func madviseNoHuge(b []byte) error { return nil }
