//go:build cgo

package main

/*
#include "keyloom.h"
*/
import "C"

import (
	"errors"
	"io/fs"

	"github.com/keyloom/keyloom"
)

// Errors the interface itself reports, beside those of the engine.
var (
	// errHandle is returned when a handle is 0, unknown or closed.
	errHandle = errors.New("capi: invalid or closed handle")
	// errNilArg is returned when a required pointer argument is NULL.
	errNilArg = errors.New("capi: NULL argument")
	// errRange is returned when a numeric argument is out of range.
	errRange = errors.New("capi: argument out of range")
)

// code maps an error to the KLM_ERR_* code the C caller sees.
func code(err error) C.int32_t {
	switch {
	case err == nil:
		return C.KLM_OK
	case errors.Is(err, errHandle), errors.Is(err, keyloom.ErrClosed):
		return C.KLM_ERR_HANDLE
	case errors.Is(err, errNilArg), errors.Is(err, errRange):
		return C.KLM_ERR_ARG
	case errors.Is(err, keyloom.ErrNotModel), errors.Is(err, keyloom.ErrVersion),
		errors.Is(err, keyloom.ErrChecksum), errors.Is(err, keyloom.ErrCorrupt),
		errors.Is(err, keyloom.ErrMissingSection), errors.Is(err, keyloom.ErrOverlay):
		return C.KLM_ERR_FORMAT
	case errors.As(err, new(*fs.PathError)):
		return C.KLM_ERR_IO
	default:
		return C.KLM_ERR_OTHER
	}
}
