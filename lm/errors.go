package lm

import (
	"errors"
	"fmt"
)

// Errors returned while building a model.
var (
	// ErrEmptyCorpus is returned when the inputs of a build hold no sentence and no word count.
	ErrEmptyCorpus = errors.New("lm: no training text or word counts")
	// ErrOrder is returned when an order outside 1..MaxOrder is requested.
	ErrOrder = errors.New("lm: order out of range")
	// ErrVocabTooLarge is returned when the vocabulary outgrows MaxVocab words.
	ErrVocabTooLarge = errors.New("lm: vocabulary too large")
	// ErrQuantBits is returned when a quantization width other than 0 (lossless) or 4..16 is requested.
	ErrQuantBits = errors.New("lm: quantization bits out of range")
	// ErrBadCounts is returned when a word-count list has a malformed line.
	ErrBadCounts = errors.New("lm: malformed word-count line")
)

// Errors returned while loading a model section.
var (
	// ErrCorrupt is returned when the bytes of an n-gram section are inconsistent
	// (wrong lengths, offsets past the end, unsorted keys). Use errors.As with
	// *SectionError for the detail.
	ErrCorrupt = errors.New("lm: corrupt n-gram section")
	// ErrSectionVersion is returned when an n-gram section was written by a newer layout.
	ErrSectionVersion = errors.New("lm: unsupported n-gram section version")
)

// Errors returned while reading ARPA text.
var (
	// ErrARPA is returned when ARPA text is malformed; use errors.As with *ARPAError for the line.
	ErrARPA = errors.New("lm: malformed ARPA text")
)

// Errors returned by the user overlay.
var (
	// ErrOverlayCorrupt is returned when the bytes given to LoadOverlay are
	// not a valid overlay section (wrong magic, truncated, lengths or indexes
	// out of range, unsorted entries, counts that are not positive and finite).
	ErrOverlayCorrupt = errors.New("lm: corrupt user overlay")
	// ErrOverlayVersion is returned when an overlay section was written by a newer layout.
	ErrOverlayVersion = errors.New("lm: unsupported user overlay version")
	// ErrOverlayOptions is returned when NewOverlay or LoadOverlay get a nil
	// model or vocabulary or an option out of range.
	ErrOverlayOptions = errors.New("lm: invalid overlay options")
)

// Errors returned while pruning.
var (
	// ErrNoUnknown is returned by PruneVocab when the model has no <unk> word
	// to take the probability of the words it drops.
	ErrNoUnknown = errors.New("lm: model has no <unk> word")
	// ErrCutoff is returned when a count cut-off is negative or more cut-offs
	// than orders are given.
	ErrCutoff = errors.New("lm: bad count cut-off")
	// ErrModel is returned when a Backoff handed to Score, Prune or
	// PruneVocab is inconsistent (an n-gram whose context is missing, a level
	// of the wrong shape).
	ErrModel = errors.New("lm: inconsistent back-off model")
)

// Errors returned while reading count shards.
var (
	// ErrShard is returned when a count shard has a malformed line (bad count,
	// empty word, misplaced <s> or </s>, an order above the build's, an unknown
	// casing class) or holds fewer orders than the build asks for.
	ErrShard = errors.New("lm: malformed count shard")
)

// SectionError reports where an n-gram section is bad. It matches ErrCorrupt.
type SectionError struct {
	Offset int    // byte offset inside the section
	Reason string // what was wrong
}

func (e *SectionError) Error() string {
	return fmt.Sprintf("lm: corrupt n-gram section at byte %d: %s", e.Offset, e.Reason)
}

// Is reports whether target is ErrCorrupt.
func (e *SectionError) Is(target error) bool { return target == ErrCorrupt }

func corrupt(off int, format string, args ...any) error {
	return &SectionError{Offset: off, Reason: fmt.Sprintf(format, args...)}
}

// ARPAError reports the line of ARPA text that could not be read. It matches ErrARPA.
type ARPAError struct {
	Line   int
	Reason string
}

func (e *ARPAError) Error() string { return fmt.Sprintf("lm: arpa line %d: %s", e.Line, e.Reason) }

// Is reports whether target is ErrARPA.
func (e *ARPAError) Is(target error) bool { return target == ErrARPA }
