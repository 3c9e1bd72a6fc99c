package lm

import "github.com/keyloom/keyloom/internal/cputime"

// The benchmarks' CPU clocks (internal/cputime).
var (
	threadClock = cputime.Thread
	cpuTime     = cputime.Process
)

const threadClockOK = cputime.ThreadOK
