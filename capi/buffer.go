//go:build cgo

package main

/*
#include <stddef.h>
#include <stdint.h>
*/
import "C"

import "unsafe"

// putText copies s and a NUL into the caller's buffer under the size
// convention of keyloom.h: it returns len(s) and writes s only if it fits
// with its NUL; otherwise it leaves an empty string when cap > 0.
func putText(out *C.char, cap C.size_t, s []byte) C.int64_t {
	n := len(s)
	if out == nil || cap == 0 {
		return C.int64_t(n)
	}
	dst := unsafe.Slice((*byte)(unsafe.Pointer(out)), int(min(cap, C.size_t(n+1))))
	if uint64(n) >= uint64(cap) {
		dst[0] = 0
		return C.int64_t(n)
	}
	copy(dst, s)
	dst[n] = 0
	return C.int64_t(n)
}

// putBytes copies b into the caller's buffer if it fits (no NUL) and
// returns len(b).
func putBytes(out unsafe.Pointer, cap C.size_t, b []byte) C.int64_t {
	if out != nil && uint64(len(b)) <= uint64(cap) && len(b) > 0 {
		copy(unsafe.Slice((*byte)(out), len(b)), b)
	}
	return C.int64_t(len(b))
}
