//go:build !unix

package cputime

import "time"

// Process returns 0: the process CPU time is not read on this platform.
func Process() time.Duration { return 0 }
