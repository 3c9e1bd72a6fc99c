package mmap

import "errors"

// Errors returned by Open.
var (
	// ErrNotRegular is returned when the path names a directory, device or
	// other file that is not a regular file.
	ErrNotRegular = errors.New("mmap: not a regular file")

	// ErrTooLarge is returned when the file is larger than this process can
	// address in one slice.
	ErrTooLarge = errors.New("mmap: file too large to map")
)
