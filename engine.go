package keyloom

import (
	"fmt"
	"sync"
	"sync/atomic"
	"time"

	"github.com/keyloom/keyloom/correct"
	"github.com/keyloom/keyloom/internal/bundle"
	"github.com/keyloom/keyloom/internal/mmap"
	"github.com/keyloom/keyloom/lm"
	"github.com/keyloom/keyloom/trie"
)

// DefaultSuggestions is the number of completions and predictions Suggest
// returns when Options.Suggestions is zero.
const DefaultSuggestions = 3

// Options configures an Engine. The zero value gives the documented defaults.
type Options struct {
	// Suggestions is how many completions and how many predictions Suggest
	// returns (default DefaultSuggestions, at most lm.MaxK).
	Suggestions int
	// VerifyChecksums checks the CRC-32C of every section when opening, which
	// reads the whole file. By default only the small metadata and lexicon
	// sections are checked, so that opening costs about a millisecond.
	VerifyChecksums bool

	// MinTyped is how many times a word outside the model's vocabulary must
	// be typed before it is suggested (default 2).
	MinTyped int
	// HalfLifeDays is the number of days of use after which what was learned
	// counts half as much (default 90).
	HalfLifeDays float64
	// MaxUserEntries caps the user overlay's n-grams; the weakest are evicted
	// first (default 50000).
	MaxUserEntries int
	// NoLearning starts with learning off (see SetLearning).
	NoLearning bool
	// Clock, if not nil, replaces time.Now for the day count used by decay.
	Clock func() time.Time

	// Layout is the keyboard geometry the corrector assumes (default QWERTY).
	Layout Layout
	// Keyboard, if not nil, replaces Layout (see ParseLayout).
	Keyboard *Keyboard
	// ErrorModel, if not nil, replaces the corrector's built-in
	// spelling-error model (trained on the development misspellings list;
	// `keyloom eval --correct FILE --folds K` trains one per fold to
	// measure misspellings the model has not seen).
	ErrorModel *ErrorModel
	// CorrectionStates caps the lexicon prefixes one correction may
	// examine (a DP row each, or a cheaper bound from the parent's row
	// that rules the prefix out first), bounding its worst case (about
	// 0.2–0.4 µs per prefix on a phone-class core): default DefaultCorrectionStates;
	// −1 removes the cap (a few milliseconds for badly misspelled long
	// words).
	CorrectionStates int
	// AutoApplyConfidence is the confidence a correction of an unknown word
	// needs to be applied on space (default DefaultAutoApplyConfidence).
	// Lower means more fixes and more wrong ones: on the development
	// misspellings list with the default model, 0.5 applies 85.5 % of the
	// words with 95.5 % right, 0.8 applies 71 % with 98.3 % right.
	AutoApplyConfidence float64
}

// DefaultAutoApplyConfidence is the default of Options.AutoApplyConfidence:
// the engine prefers leaving a typo to making a wrong correction.
const DefaultAutoApplyConfidence = 0.8

// DefaultCorrectionStates is the default of Options.CorrectionStates,
// chosen for misspellings the error model has not seen: the 5-fold
// cross-validation of the package corrector on the development list gives
// top-1/top-3 92.82/96.27 % at 7,000 prefixes, 93.01/96.59 % at 15,000,
// 93.24/96.96 % at 20,000 and 93.28/97.01 % at 25,000, the same as with no
// cap (measured while the widest pass still walked the whole lexicon).
// The engine's figures on the development list itself hide this (its
// error model was trained there: no loss down to 3,000). Since the search
// after the narrow pass follows only spellings near the typed word's consonant skeleton or
// within two plain edits (correct/skeleton.go), the 8-letter
// misspellings of the package's benchmark (74k-word lexicon) examine at
// most about 9,000 prefixes, so the cap now bounds only rarer, longer
// words; the slowest corrections take about 2 ms on this project's
// machine (BENCHMARKS.md).
const DefaultCorrectionStates = 25000

func (o Options) withDefaults() (Options, error) {
	if o.Suggestions == 0 {
		o.Suggestions = DefaultSuggestions
	}
	if o.AutoApplyConfidence == 0 {
		o.AutoApplyConfidence = DefaultAutoApplyConfidence
	}
	if !(o.AutoApplyConfidence > 0 && o.AutoApplyConfidence <= 1) {
		return o, fmt.Errorf("keyloom: Options.AutoApplyConfidence = %v, want (0, 1]", o.AutoApplyConfidence)
	}
	switch {
	case o.CorrectionStates == 0:
		o.CorrectionStates = DefaultCorrectionStates
	case o.CorrectionStates < 0:
		o.CorrectionStates = -1
	}
	if o.Suggestions < 0 || o.Suggestions > lm.MaxK {
		return o, fmt.Errorf("keyloom: Options.Suggestions = %d, want 1..%d", o.Suggestions, lm.MaxK)
	}
	return o, nil
}

// Engine answers keystrokes from one model file. It is safe for concurrent
// use by any number of goroutines.
type Engine struct {
	opts   Options
	region *mmap.Region // nil for OpenBytes
	model  *bundle.Model
	closed atomic.Bool
	user   userState
	// The corrector is built on first use: building it costs about a
	// megabyte of tables and a few milliseconds that apps which only
	// predict should not pay at Open.
	corrOnce sync.Once
	corr     *correct.Corrector
	corrErr  error
}

// Open maps the model file at path read-only and returns an Engine for it.
// Where memory mapping is unavailable (js/wasm) the file is read instead.
// Opening does not read the tables: the first queries fault in the pages they touch.
func Open(path string, opts Options) (*Engine, error) {
	opts, err := opts.withDefaults()
	if err != nil {
		return nil, err
	}
	r, err := mmap.Open(path)
	if err != nil {
		return nil, fmt.Errorf("keyloom: open %s: %w", path, err)
	}
	e, err := newEngine(r.Bytes(), opts)
	if err != nil {
		r.Close()
		return nil, fmt.Errorf("keyloom: open %s: %w", path, err)
	}
	e.region = r
	return e, nil
}

// OpenBytes returns an Engine over a model file the caller already holds in
// memory. The Engine reads b in place: b must not change while it is used.
func OpenBytes(b []byte, opts Options) (*Engine, error) {
	opts, err := opts.withDefaults()
	if err != nil {
		return nil, err
	}
	e, err := newEngine(b, opts)
	if err != nil {
		return nil, fmt.Errorf("keyloom: %w", err)
	}
	return e, nil
}

func newEngine(b []byte, opts Options) (*Engine, error) {
	m, err := bundle.Load(b, bundle.LoadOptions{VerifyAll: opts.VerifyChecksums})
	if err != nil {
		return nil, err
	}
	e := &Engine{opts: opts, model: m}
	if err := e.initUser(); err != nil {
		return nil, err
	}
	return e, nil
}

// Close releases the mapping. Calls made after Close return ErrClosed.
// Close must not run while other goroutines are inside Engine methods.
func (e *Engine) Close() error {
	if e.closed.Swap(true) {
		return nil
	}
	if e.region != nil {
		return e.region.Close()
	}
	return nil
}

// Info describes an opened model.
type Info struct {
	Order     int    // highest n-gram order
	Words     int    // lexicon size, special tokens included
	NGrams    []int  // stored n-grams per order, unigrams first
	QuantBits int    // code width of stored values (0 = lossless)
	Bytes     int    // size of the model file
	Corpus    string // description given at build time
}

// Info returns a description of the model.
func (e *Engine) Info() Info {
	m := e.model
	return Info{Order: m.LM.Order(), Words: m.Lex.Len(), NGrams: m.LM.NGrams(), QuantBits: m.LM.QuantBits(), Bytes: m.Size, Corpus: m.Meta.Corpus}
}

// LM returns the n-gram model, for tools that measure it. It is valid until Close.
func (e *Engine) LM() *lm.Model { return e.model.LM }

// Lexicon returns the word list, for tools that measure it. It is valid until Close.
func (e *Engine) Lexicon() *trie.Lexicon { return e.model.Lex }
