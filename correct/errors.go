package correct

import "errors"

// Errors about keyboard layouts.
var (
	// ErrLayout is returned when a layout file cannot be parsed: an unknown
	// directive, a malformed number, a key defined twice, or no keys at all.
	ErrLayout = errors.New("correct: bad layout")

	// ErrUnknownLayout is returned when a Layout value names no built-in layout.
	ErrUnknownLayout = errors.New("correct: unknown layout")
)

// Errors about error models.
var (
	// ErrErrorModel is returned when an error-model table cannot be parsed or
	// holds a value out of range (a negative or non-finite cost, an empty rule).
	ErrErrorModel = errors.New("correct: bad error model")
)

// Errors about construction.
var (
	// ErrNoLexicon is returned by New when the lexicon is nil.
	ErrNoLexicon = errors.New("correct: no lexicon")

	// ErrNoScorer is returned by New when the language-model scorer is nil.
	ErrNoScorer = errors.New("correct: no scorer")

	// ErrOptions is returned by New when an option is out of range (a negative
	// or non-finite cost, weight or threshold, or a threshold above one).
	ErrOptions = errors.New("correct: bad options")
)
