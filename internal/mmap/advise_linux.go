//go:build linux && !keyloom_nommap

package mmap

import "golang.org/x/sys/unix"

// madviseNoHuge asks the kernel not to map the region with huge pages.
func madviseNoHuge(b []byte) error { return unix.Madvise(b, unix.MADV_NOHUGEPAGE) }
