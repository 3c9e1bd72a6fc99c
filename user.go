package keyloom

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"sync/atomic"
	"time"

	"github.com/keyloom/keyloom/internal/format"
	"github.com/keyloom/keyloom/lm"
)

// ErrOverlay is returned (wrapped) when a user overlay file cannot be read;
// the engine then keeps working from the base model and whatever overlay it had.
var ErrOverlay = errors.New("keyloom: bad user overlay")

// userState holds the current user overlay; swapped whole by OpenOverlay and Wipe.
type userState struct {
	ov atomic.Pointer[lm.Overlay]
}

func (o Options) overlayOptions() lm.OverlayOptions {
	return lm.OverlayOptions{MinTyped: o.MinTyped, HalfLifeDays: o.HalfLifeDays, MaxEntries: o.MaxUserEntries}
}

func (e *Engine) initUser() error {
	var ov *lm.Overlay
	var err error
	if e.model.Overlay != nil {
		ov, err = lm.LoadOverlay(e.model.Overlay, e.model.LM, e.model.Lex, e.opts.overlayOptions())
		if err != nil {
			return fmt.Errorf("%w: overlay section: %w", ErrOverlay, err)
		}
	} else if ov, err = lm.NewOverlay(e.model.LM, e.model.Lex, e.opts.overlayOptions()); err != nil {
		return err
	}
	ov.SetLearning(!e.opts.NoLearning)
	e.user.ov.Store(ov)
	return nil
}

// day is the current day number for decay.
func (e *Engine) day() int {
	now := time.Now
	if e.opts.Clock != nil {
		now = e.opts.Clock
	}
	return int(now().Unix() / 86400)
}

// Learn teaches the engine the user's text: words and phrases become more
// likely, new words become suggestible after they have been typed
// Options.MinTyped times. Tokens that look like secrets (long digit runs,
// card numbers, e-mail addresses, letter-digit mixes) are never learned, and
// nothing is learned while learning is off. Safe to call while other
// goroutines call Suggest.
func (e *Engine) Learn(text string) error {
	if e.closed.Load() {
		return ErrClosed
	}
	e.user.ov.Load().Learn(text, e.day())
	return nil
}

// Commit records that the user entered word after context (the text before
// it), as a keyboard does when a word is finished.
func (e *Engine) Commit(word, context string) error {
	if e.closed.Load() {
		return ErrClosed
	}
	c := parseCursor(context+" ", lm.MaxOrder-1)
	hist := c.words
	if c.start || len(hist) < e.model.LM.Order()-1 {
		hist = append([]string{lm.BOS}, hist...)
	}
	e.user.ov.Load().Commit(word, hist, e.day())
	return nil
}

// Reject records that the user undid the correction of original to
// correction: original is learned as a valid word and that correction is not
// offered for it again.
func (e *Engine) Reject(original, correction string) error {
	if e.closed.Load() {
		return ErrClosed
	}
	ov := e.user.ov.Load()
	ov.Reject(original, correction, e.day())
	return nil
}

// Forget removes every trace of a word or phrase from the user overlay: all
// n-grams containing it, the word itself and its rejected corrections. It
// returns the number of entries removed. Save afterwards to remove it from disk.
func (e *Engine) Forget(phrase string) (int, error) {
	if e.closed.Load() {
		return 0, ErrClosed
	}
	return e.user.ov.Load().Forget(phrase), nil
}

// Wipe empties the user overlay.
func (e *Engine) Wipe() error {
	if e.closed.Load() {
		return ErrClosed
	}
	e.user.ov.Load().Wipe()
	return nil
}

// SetLearning turns learning on or off (for password fields, incognito
// modes). While off, Learn, Commit and Reject change nothing.
func (e *Engine) SetLearning(on bool) { e.user.ov.Load().SetLearning(on) }

// UserEntries returns the number of n-grams the user overlay holds.
func (e *Engine) UserEntries() int { return e.user.ov.Load().Entries() }

// Save writes the user overlay to path atomically (temporary file, fsync,
// rename, fsync of the directory) with mode 0600, so a crash leaves either
// the old or the new file. The base model is never written.
func (e *Engine) Save(path string) error {
	if e.closed.Load() {
		return ErrClosed
	}
	data, err := e.SaveBytes()
	if err != nil {
		return err
	}
	if err := format.WriteFileAtomic(path, data, 0o600); err != nil {
		return fmt.Errorf("keyloom: save %s: %w", path, err)
	}
	removeStaleTemps(path)
	return nil
}

// staleTempAge is how old a leftover temporary file of an interrupted save
// must be before Save removes it (a younger one may belong to a save in
// progress in another process).
const staleTempAge = 10 * time.Minute

// removeStaleTemps deletes temporary files that saves of path killed midway
// left behind; they hold personal data and are never read.
func removeStaleTemps(path string) {
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	matches, _ := filepath.Glob(filepath.Join(dir, "."+globEscape(base)+".tmp-*"))
	for _, m := range matches {
		if st, err := os.Lstat(m); err == nil && st.Mode().IsRegular() && time.Since(st.ModTime()) > staleTempAge {
			os.Remove(m)
		}
	}
}

func globEscape(s string) string {
	r := strings.NewReplacer(`\`, `\\`, "*", `\*`, "?", `\?`, "[", `\[`)
	return r.Replace(s)
}

// OpenOverlay replaces the user overlay with the one saved at path. On any
// error the engine keeps its current overlay and the error wraps ErrOverlay
// (or the file system error).
func (e *Engine) OpenOverlay(path string) error {
	if e.closed.Load() {
		return ErrClosed
	}
	b, err := os.ReadFile(path)
	if err != nil {
		return fmt.Errorf("keyloom: open overlay: %w", err)
	}
	ov, err := e.loadOverlay(b)
	if err != nil {
		return fmt.Errorf("keyloom: open overlay %s: %w", path, err)
	}
	ov.SetLearning(e.user.ov.Load().Learning())
	e.user.ov.Store(ov)
	return nil
}

// LoadOverlayBytes replaces the user overlay with one previously written by
// Save (the whole file's bytes), for embedders that keep it elsewhere than in
// a file (browser storage, a database). Errors are as for OpenOverlay.
func (e *Engine) LoadOverlayBytes(b []byte) error {
	if e.closed.Load() {
		return ErrClosed
	}
	ov, err := e.loadOverlay(b)
	if err != nil {
		return fmt.Errorf("keyloom: %w", err)
	}
	ov.SetLearning(e.user.ov.Load().Learning())
	e.user.ov.Store(ov)
	return nil
}

// SaveBytes returns what Save would write.
func (e *Engine) SaveBytes() ([]byte, error) {
	if e.closed.Load() {
		return nil, ErrClosed
	}
	return format.Append(nil, []format.Section{{Kind: format.KindOverlay, Data: e.user.ov.Load().AppendSection(nil)}})
}

func (e *Engine) loadOverlay(b []byte) (*lm.Overlay, error) {
	f, err := format.Parse(b)
	if err != nil {
		return nil, fmt.Errorf("%w: %w", ErrOverlay, err)
	}
	if err := f.Verify(format.KindOverlay); err != nil {
		return nil, fmt.Errorf("%w: %w", ErrOverlay, err)
	}
	sec, _ := f.Section(format.KindOverlay)
	ov, err := lm.LoadOverlay(sec, e.model.LM, e.model.Lex, e.opts.overlayOptions())
	if err != nil {
		return nil, fmt.Errorf("%w: %w", ErrOverlay, err)
	}
	return ov, nil
}

// OverlayBytes returns the user overlay section as it would be saved (for
// `keyloom merge`, which bakes it into a copy of the base model).
func (e *Engine) OverlayBytes() []byte { return e.user.ov.Load().AppendSection(nil) }
