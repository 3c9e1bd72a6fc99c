// Package cputime reads CPU clocks for benchmarks that must tell their own
// work from the other jobs of a shared machine: the calling thread's CPU
// time (lock the goroutine to its thread first, runtime.LockOSThread) and
// the whole process's. Where a clock cannot be read it returns 0.
package cputime
