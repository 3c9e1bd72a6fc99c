//go:build !unix

package lm

import "time"

// cpuTime returns 0: the process CPU time is not read on this platform, and
// benchmarks then leave out their per-CPU-second figures.
func cpuTime() time.Duration { return 0 }
