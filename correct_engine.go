package keyloom

import (
	"math"
	"slices"
	"strings"
	"unicode"
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

// ErrorModel is the corrector's spelling-error model (correct.ErrorModel):
// the built-in one, or one trained with correct.TrainErrorModel.
type ErrorModel = correct.ErrorModel

// corrector returns the engine's corrector, building it on first use.
func (e *Engine) corrector() (*correct.Corrector, error) {
	e.corrOnce.Do(func() { e.corrErr = e.initCorrector() })
	return e.corr, e.corrErr
}

// correctionLogProb is the language-model scorer of the corrector: the
// base model blended with the user overlay when there is one.
func (e *Engine) correctionLogProb(ctx []uint32, w uint32) float64 {
	v := e.user.ov.Load().View()
	if !v.Empty() {
		return v.LogProb(ctx, w)
	}
	return e.model.LM.LogProb(ctx, w)
}

func (e *Engine) initCorrector() error {
	c, err := correct.New(lexEdges{e.model.Lex}, e.correctionLogProb, correct.Options{
		Layout:     e.opts.Layout,
		Keyboard:   e.opts.Keyboard,
		ErrorModel: e.opts.ErrorModel,
		MaxStates:  max(e.opts.CorrectionStates, 0),
		// Alternatives to a correctly spelled word would be noise: offer
		// them only when fairly likely (common practice, no source).
		KnownOfferConfidence: 0.3,
		RareLogProb:          e.rareLogProb(),
		UnknownLogProb:       unknownLogProb,
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

// commonWords is how many of the model's most probable words count as
// common for the corrector: a word the lexicon lists but the model ranks
// below them is rare (correct.Options.RareLogProb), and the engine then
// offers alternatives to it whatever their confidence, from a wider search
// than other known words get, though it never replaces it unless the
// known-word rule allows
// (README: a rare listed word one edit from a far more frequent word is
// offered, not auto-applied). The number is that of the project's
// false-correction check, the 20,000 most frequent SUBTLEX-US words
// (Brysbaert & New 2009): words a user commonly types keep the 30 %
// offer gate, so that check's share of words with an offer stays where it
// was (8.79 % with the built-in error model), while the list's rare
// spellings ("aircrafts", "liquify", "heterogenous") get their
// corrections shown. Measured on corpora/misspellings-dev.tsv (`keyloom
// eval --correct --folds 5`, spelling errors unseen): top-1 92.45 →
// 92.96 %, top-3 96.27 → 97.05 %; the typist and the false auto-apply
// check unchanged. The cost: a rare word typed right now gets offers
// (about 82 % of SUBTLEX-US words ranked 20,001–30,000, 12 % before) and
// a wider search (BENCHMARKS.md).
const commonWords = 20000

// rareLogProb returns the log-probability with no context of the model's
// commonWords-th most probable lexicon word, or 0 (no word rare) when the
// lexicon has no more words than that. Cost: one LogProb call per
// lexicon word and a sort, about 8 ms for the default model's 177k words
// (once, when the corrector is built; measured, this project).
func (e *Engine) rareLogProb() float64 {
	n := e.model.Lex.Len()
	if n <= commonWords {
		return 0
	}
	lps := make([]float64, n)
	for id := range lps {
		lps[id] = e.model.LM.LogProb(nil, uint32(id))
	}
	slices.Sort(lps)
	cut := lps[n-commonWords]
	if cut >= 0 || math.IsNaN(cut) || math.IsInf(cut, 0) {
		return 0
	}
	return cut
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
// Cost: a word the lexicon knows, typically tens of microseconds (the
// narrow pass); a misspelled 8-letter word about 0.2 ms at the median and
// up to ~7 ms when the search reaches Options.CorrectionStates, on this
// project's 2-core machine (BenchmarkCorrect, BENCHMARKS.md).
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
	if strings.IndexFunc(field, unicode.IsLetter) < 0 {
		return nil // a number or a symbol: no lexicon says which one was meant
	}
	var wb [lm.MaxOrder]string
	c := parseCursorInto(head, e.model.LM.Order()-1, wb[:0])
	var ib [lm.MaxOrder + 1]uint32
	ctx := correctionContext(q.contextIDs(c.words, ib[:0]), len(c.words))
	var buf [4]correct.Candidate
	cands, dec := corr.Correct(field, ctx, 3, buf[:0])
	if !dec.Apply && len(cands) > 0 && len(c.words) > 0 && cands[0].Kind == correct.KindWord {
		dec.Apply = e.contextOverrules(field, ctx, cands[0])
	}
	var best *Correction
	if len(cands) > 0 {
		best = &Correction{Typed: field, Replacement: cands[0].Word, Confidence: dec.Confidence, Apply: dec.Apply}
		for _, x := range cands[1:] {
			best.Alternatives = append(best.Alternatives, x.Word)
		}
	}
	// A space typed inside a word: join with the previous field.
	if h2, prev := lastField(head); prev != "" && (best == nil || !best.Apply) {
		pc := parseCursorInto(h2, e.model.LM.Order()-1, wb[:0])
		pctx := q.contextIDs(pc.words, ib[:0])
		if m, mdec, ok := corr.Merge(prev, field, pctx); ok && mdec.Apply {
			best = &Correction{Typed: prev + " " + field, Replacement: m.Word, Confidence: mdec.Confidence, Apply: true}
		}
	}
	return best
}

// correctionContext returns the context the corrector ranks a word in:
// ctx, the model's context for a word after n words of its sentence, or
// no context at all for the first word of a sentence (n == 0), whose
// context is only the sentence-start marker. The corrector's prior is
// then the model's unigram, an isolated-word frequency, as in the
// noisy-channel spelling correctors of Kernighan, Church and Gale (1990)
// and Brill and Moore (2000), which rank by P(w)·P(typed | w) (from
// memory). The sentence-start statistics of a model are those of its
// running text only, which for the default model is a small invented
// corpus: words seen there at a sentence start keep their own estimate
// while every other word is scaled down by the start marker's back-off
// weight (about 0.2), so dozens of them outranked a likelier correction
// ("fourties" → "fourteen" before "forties"). Measured on
// corpora/misspellings-dev.tsv (engine 5-fold cross-validation, spelling
// errors unseen): top-1 91.49 → 92.45 %, top-3 96.23 → 96.27 %; typist
// pooled over the demo files (leave-one-file-out, seeds 1–3) 86.68 →
// 86.61 % repaired, 0.098 → 0.087 % broken (BENCHMARKS.md). Words after
// the first keep their context: there it tells real-word errors apart
// (contextOverrules) and helps the typist.
func correctionContext(ctx []uint32, n int) []uint32 {
	if n == 0 {
		return ctx[:0]
	}
	return ctx
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

// unknownLogProb is the log-probability the engine gives a typed word the
// lexicon does not know, as the "leave it as typed" alternative of a
// correction: the chance that the intended word is outside the lexicon,
// about 1.1 % (issue 4: 98.9 % of the development list's corrections are
// SUBTLEX-US or SCOWL words), times the chance of its spelling under a
// uniform model of 26 letters and a word end for a five-letter word:
// ln 0.011 + 6 ln(1/27) ≈ -24.3. The corrector's own default, -21, gives
// the typed word some 20 times more weight and left more plain slips
// uncorrected (measured with -18, -21, -24, -27 on the demo typist and
// the development list; see BENCHMARKS.md).
const unknownLogProb = -24

// contextMargin is how many nats a correction of a word the lexicon knows
// must out-score the word as typed, given the words before it, to be
// applied on space: about one ordinary edit (the corrector's first search
// pass), that is the alternative with its slip must be some 400 times
// likelier in context than the typed word typed right. The corrector
// itself asks for Options.KnownMargin (10 nats) without looking at how the
// score arose (common practice, no source).
const contextMargin = 6

// contextOverrules reports whether cand, the best correction of a word the
// lexicon knows, should replace it on space because of the words before
// it (real-word errors: "to get a new kob" → "job"). Two conditions: the
// alternative out-scores the typed word in context by contextMargin, and
// the context favours it more than the words' prior frequencies do, so
// that a rare word is never replaced on frequency alone, which is what the
// false-correction check over the 20,000 most frequent words guards
// against. Words the user taught are never replaced.
func (e *Engine) contextOverrules(field string, ctx []uint32, cand correct.Candidate) bool {
	id, ok := e.lexiconOnly(field)
	if !ok || len(ctx) == 0 {
		return false
	}
	sc := e.correctionLogProb
	inContext := cand.Score - sc(ctx, id)                // -cost + ln P(cand|ctx) - ln P(typed|ctx)
	prior := -cand.Cost + sc(nil, cand.ID) - sc(nil, id) // the same without context
	return inContext >= contextMargin && inContext > prior
}

// lexiconOnly returns the lexicon ID of the word in field (its surrounding
// punctuation left out) when the lexicon knows it and the user has not
// taught it.
func (e *Engine) lexiconOnly(field string) (uint32, bool) {
	core := lm.Fold(trimWord(field))
	id, ok := e.model.Lex.ID(core)
	if !ok || e.user.ov.Load().View().Known(core) {
		return 0, false
	}
	return id, true
}

// CorrectWord is the core of Correct for simulators and measurement tools,
// as Predict is of Suggest: typed is a finished word after history (the
// current sentence's folded words, oldest first). It returns the
// corrections Correct would offer, best first and folded, whether the
// first would be applied on space, and whether the lexicon knows the word
// as typed (surrounding punctuation left out). A word that Correct would
// split in two ("aboutthe") gets no corrections here.
func (e *Engine) CorrectWord(history []string, typed string) (offered []string, apply, known bool, err error) {
	known = e.Listed(typed)
	c, err := e.Correct(strings.Join(history, " ") + " " + typed)
	if err != nil || c == nil || strings.Contains(c.Typed, " ") {
		return nil, false, known, err
	}
	offered = append(offered, lm.Fold(c.Replacement))
	for _, a := range c.Alternatives {
		offered = append(offered, lm.Fold(a))
	}
	return offered, c.Apply, known, nil
}

// Listed reports whether the lexicon lists word, ignoring the punctuation
// around it and its case: a word Correct treats as known (so do the words
// the user taught, which this does not report).
func (e *Engine) Listed(word string) bool {
	_, ok := e.model.Lex.ID(lm.Fold(trimWord(word)))
	return ok
}

// trimWord returns w without the punctuation around it.
func trimWord(w string) string {
	return strings.TrimFunc(w, func(r rune) bool { return !unicode.IsLetter(r) && !unicode.IsDigit(r) })
}
