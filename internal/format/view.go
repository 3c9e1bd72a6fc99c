package format

// This is the only file in the project that imports unsafe. It turns byte
// slices into typed little-endian views without copying when that is safe,
// and decodes into a heap copy otherwise.

import (
	"encoding/binary"
	"unsafe"
)

// hostLittleEndian reports whether the host stores integers little-endian.
func hostLittleEndian() bool {
	x := uint16(1)
	return *(*byte)(unsafe.Pointer(&x)) == 1
}

// aligned reports whether the first byte of b sits on an n-byte boundary.
func aligned(b []byte, n uintptr) bool {
	return uintptr(unsafe.Pointer(unsafe.SliceData(b)))%n == 0
}

// Uint64s returns b read as little-endian uint64 values, len(b)/8 of them.
// The trailing len(b)%8 bytes are ignored: a caller that needs an exact fit
// checks len(b) first.
//
// When b starts on an 8-byte boundary and the host is little-endian, the
// result aliases b without copying or allocating: it is valid as long as b
// is (for a mapped file, until the mapping is closed) and must not be
// modified. Its capacity equals its length. Otherwise the values are
// decoded into a new slice with encoding/binary. Sections of a model file
// start on 8-byte boundaries of the file, and a mapping or a Go heap
// allocation of 8 bytes or more starts on one too, so whole sections
// normally take the zero-copy path. Uint64s returns nil when len(b) < 8.
func Uint64s(b []byte) []uint64 {
	n := len(b) / 8
	if n == 0 {
		return nil
	}
	if hostLittleEndian() && aligned(b, unsafe.Alignof(uint64(0))) {
		return unsafe.Slice((*uint64)(unsafe.Pointer(unsafe.SliceData(b))), n)
	}
	out := make([]uint64, n)
	for i := range out {
		out[i] = binary.LittleEndian.Uint64(b[8*i:])
	}
	return out
}

// Uint32s returns b read as little-endian uint32 values, len(b)/4 of them.
// The trailing len(b)%4 bytes are ignored. Aliasing, alignment and the
// fallback are as for [Uint64s], with a 4-byte boundary. Uint32s returns
// nil when len(b) < 4.
func Uint32s(b []byte) []uint32 {
	n := len(b) / 4
	if n == 0 {
		return nil
	}
	if hostLittleEndian() && aligned(b, unsafe.Alignof(uint32(0))) {
		return unsafe.Slice((*uint32)(unsafe.Pointer(unsafe.SliceData(b))), n)
	}
	out := make([]uint32, n)
	for i := range out {
		out[i] = binary.LittleEndian.Uint32(b[4*i:])
	}
	return out
}

// Uint16s returns b read as little-endian uint16 values, len(b)/2 of them.
// A trailing odd byte is ignored. Aliasing, alignment and the fallback are
// as for [Uint64s], with a 2-byte boundary. Uint16s returns nil when
// len(b) < 2.
func Uint16s(b []byte) []uint16 {
	n := len(b) / 2
	if n == 0 {
		return nil
	}
	if hostLittleEndian() && aligned(b, unsafe.Alignof(uint16(0))) {
		return unsafe.Slice((*uint16)(unsafe.Pointer(unsafe.SliceData(b))), n)
	}
	out := make([]uint16, n)
	for i := range out {
		out[i] = binary.LittleEndian.Uint16(b[2*i:])
	}
	return out
}
