package keyloom

import (
	"errors"

	"github.com/keyloom/keyloom/internal/bundle"
	"github.com/keyloom/keyloom/internal/format"
)

// Errors returned when opening a model file. Test for them with errors.Is.
var (
	// ErrNotModel is returned when a file is not a Keyloom model.
	ErrNotModel = format.ErrNotModel
	// ErrVersion is returned when a model file has a major version this library cannot read.
	ErrVersion = format.ErrVersion
	// ErrChecksum is returned when a section's CRC-32C does not match its bytes.
	ErrChecksum = format.ErrChecksum
	// ErrCorrupt is returned when a model file's structure is damaged.
	ErrCorrupt = format.ErrCorrupt
	// ErrMissingSection is returned when a model file lacks a required section.
	ErrMissingSection = bundle.ErrMissingSection
)

// Errors returned by an Engine.
var (
	// ErrClosed is returned by every call made after Close.
	ErrClosed = errors.New("keyloom: engine closed")
)
