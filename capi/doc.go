// Command capi is the C interface to Keyloom, built as a shared library:
//
//	go build -buildmode=c-shared -o libkeyloom.so ./capi
//
// The contract is the hand-written header keyloom.h: opaque handles, every
// output copied into a buffer the caller owns, negative error codes and a
// per-handle last-error message. README.md sketches its use from JNI
// (Android) and Swift (iOS).
//
// # Concurrency
//
// Every exported function may be called from any thread. A handle wraps one
// [keyloom.Engine], which is safe for concurrent use; closing waits for the
// calls in progress on that handle.
//
// # Package state
//
// The set of live handles is the one piece of package-level mutable state:
// a C interface hands out integers that outlive any Go call, and the set is
// what lets a stale or forged handle return an error instead of crashing the
// host process.
package main

func main() {}
