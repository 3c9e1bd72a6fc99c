//go:build linux

package cputime

import (
	"time"

	"golang.org/x/sys/unix"
)

// ThreadOK reports whether Thread reads a real clock on this platform.
const ThreadOK = true

// Thread returns the CPU time the calling thread has used, or 0 if the
// clock cannot be read.
func Thread() time.Duration {
	var ts unix.Timespec
	if err := unix.ClockGettime(unix.CLOCK_THREAD_CPUTIME_ID, &ts); err != nil {
		return 0
	}
	return time.Duration(ts.Nano())
}
