package keyloom

import (
	"strings"
	"unicode/utf8"

	"github.com/keyloom/keyloom/correct"
	"github.com/keyloom/keyloom/lm"
	"github.com/keyloom/keyloom/trie"
)

// Layout names a built-in keyboard geometry for the corrector.
type Layout = correct.Layout

// Built-in keyboard layouts.
const (
	LayoutQWERTY = correct.LayoutQWERTY
	LayoutAZERTY = correct.LayoutAZERTY
	LayoutQWERTZ = correct.LayoutQWERTZ
)

// Keyboard is a keyboard geometry, built in or read with ParseLayout.
type Keyboard = correct.Keyboard

// ParseLayout reads a keyboard layout file (format: correct/LAYOUT.md).
var ParseLayout = correct.ParseLayout

// corrector returns the engine's corrector, building it on first use.
func (e *Engine) corrector() (*correct.Corrector, error) {
	e.corrOnce.Do(func() { e.corrErr = e.initCorrector() })
	return e.corr, e.corrErr
}

func (e *Engine) initCorrector() error {
	scorer := func(ctx []uint32, w uint32) float64 {
		v := e.user.ov.Load().View()
		if !v.Empty() {
			return v.LogProb(ctx, w)
		}
		return e.model.LM.LogProb(ctx, w)
	}
	c, err := correct.New(lexEdges{e.model.Lex}, scorer, correct.Options{
		Layout:    e.opts.Layout,
		Keyboard:  e.opts.Keyboard,
		MaxStates: max(e.opts.CorrectionStates, 0),
		// Alternatives to a correctly spelled word would be noise: offer
		// them only when fairly likely (common practice, no source).
		KnownOfferConfidence: 0.3,
		ApplyThreshold:       e.opts.AutoApplyConfidence,
		Known: func(w string) bool {
			return e.user.ov.Load().View().Known(w)
		},
		Rejected: func(typed, w string) bool {
			return e.user.ov.Load().View().Rejected(typed, w)
		},
	})
	if err != nil {
		return err
	}
	e.corr = c
	return nil
}

// lexEdges lets the corrector list a lexicon state's transitions at once.
type lexEdges struct{ *trie.Lexicon }

// AppendEdges implements correct.EdgeLister. It allocates only for states
// with more than 32 transitions.
func (l lexEdges) AppendEdges(dst []correct.Edge, state int) []correct.Edge {
	var buf [32]trie.Transition
	for _, t := range l.AppendTransitions(buf[:0], state) {
		dst = append(dst, correct.Edge{Byte: t.Byte, Next: t.Next, Out: t.Out})
	}
	return dst
}

// lastField splits before into the text before its last whitespace-separated
// field and that field (trailing white space ignored).
func lastField(before string) (head, field string) {
	t := strings.TrimRight(before, " \t\n\r")
	i := strings.LastIndexAny(t, " \t\n\r")
	return t[:i+1], t[i+1:]
}

// Correct decides what to do with the last word of the text before the
// cursor when the user finishes it (types a space or punctuation): it
// returns nil to leave the word alone, or a Correction whose Apply flag says
// whether replacing it automatically is safe. Words the lexicon or the user
// knows are replaced only when the context makes the alternative far more
// likely; a correction the user undid (Reject) is not offered again.
// Cost: typically tens of microseconds.
func (e *Engine) Correct(beforeCursor string) (*Correction, error) {
	if e.closed.Load() {
		return nil, ErrClosed
	}
	head, field := lastField(beforeCursor)
	if field == "" {
		return nil, nil
	}
	c, err := e.corrector()
	if err != nil {
		return nil, err
	}
	return e.correctField(c, e.query(), head, field), nil
}

// correctField corrects field, typed after head, under the query snapshot q.
func (e *Engine) correctField(corr *correct.Corrector, q query, head, field string) *Correction {
	c := parseCursor(head, e.model.LM.Order()-1)
	var ib [lm.MaxOrder + 1]uint32
	ctx := q.contextIDs(c.words, ib[:0])
	var buf [4]correct.Candidate
	cands, dec := corr.Correct(field, ctx, 3, buf[:0])
	var best *Correction
	if len(cands) > 0 {
		best = &Correction{Typed: field, Replacement: cands[0].Word, Confidence: dec.Confidence, Apply: dec.Apply}
		for _, x := range cands[1:] {
			best.Alternatives = append(best.Alternatives, x.Word)
		}
	}
	// A space typed inside a word: join with the previous field.
	if h2, prev := lastField(head); prev != "" && (best == nil || !best.Apply) {
		pc := parseCursor(h2, e.model.LM.Order()-1)
		pctx := q.contextIDs(pc.words, ib[:0])
		if m, mdec, ok := corr.Merge(prev, field, pctx); ok && mdec.Apply {
			best = &Correction{Typed: prev + " " + field, Replacement: m.Word, Confidence: mdec.Confidence, Apply: true}
		}
	}
	return best
}

// correctPrefix proposes a correction for a partial word that cannot start
// any known word (no completions), so that Suggest can show it.
func (e *Engine) correctPrefix(q query, before, prefix string) *Correction {
	if utf8.RuneCountInString(prefix) < 2 {
		return nil
	}
	head, field := lastField(before)
	if field == "" {
		return nil
	}
	c, err := e.corrector()
	if err != nil {
		return nil
	}
	return e.correctField(c, q, head, field)
}
