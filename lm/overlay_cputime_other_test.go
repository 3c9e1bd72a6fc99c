//go:build !linux

package lm

import "time"

// threadClock is not available here: it returns 0 and the benchmarks that
// use it report wall time only.
func threadClock() time.Duration { return 0 }

const threadClockOK = false
