//go:build !linux

package cputime

import "time"

// ThreadOK reports whether Thread reads a real clock on this platform.
const ThreadOK = false

// Thread returns 0: the thread's CPU time is not read on this platform.
func Thread() time.Duration { return 0 }
