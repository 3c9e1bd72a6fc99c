package correct

import "github.com/keyloom/keyloom/internal/cputime"

// threadClock is the benchmarks' per-thread CPU clock (internal/cputime).
var threadClock = cputime.Thread
