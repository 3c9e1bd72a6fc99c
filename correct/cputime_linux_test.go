//go:build linux

package correct

import (
	"time"

	"golang.org/x/sys/unix"
)

// threadClock returns the CPU time the calling thread has used. Callers
// lock the goroutine to its thread (runtime.LockOSThread) first, so that
// per-call differences count this goroutine's work only, whatever else
// the machine runs.
func threadClock() time.Duration {
	var ts unix.Timespec
	if err := unix.ClockGettime(unix.CLOCK_THREAD_CPUTIME_ID, &ts); err != nil {
		return 0
	}
	return time.Duration(ts.Nano())
}
