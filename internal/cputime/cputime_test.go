package cputime

import (
	"runtime"
	"testing"
	"time"
)

// TestClocksAdvance checks that both clocks move forward while the thread
// spins for 20 ms of wall time (a busy loop uses CPU; common practice, no
// source) and never by more than the wall time plus a scheduling tick for
// the thread's own clock.
func TestClocksAdvance(t *testing.T) {
	runtime.LockOSThread()
	defer runtime.UnlockOSThread()
	t0, p0, w0 := Thread(), Process(), time.Now()
	x := 0
	for time.Since(w0) < 20*time.Millisecond {
		x++
	}
	wall := time.Since(w0)
	dt, dp := Thread()-t0, Process()-p0
	if ThreadOK && (dt <= 0 || dt > wall+10*time.Millisecond) {
		t.Errorf("thread clock moved %v over %v of spinning", dt, wall)
	}
	if runtime.GOOS == "linux" && dp <= 0 {
		t.Errorf("process clock moved %v over %v of spinning", dp, wall)
	}
	if x == 0 {
		t.Fatal("the loop did not run")
	}
}
