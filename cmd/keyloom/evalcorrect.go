package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/keyloom/keyloom"
	"github.com/keyloom/keyloom/correct"
	"github.com/keyloom/keyloom/internal/evaluate"
	"github.com/keyloom/keyloom/lm"
)

type correctReport struct {
	N             int     `json:"n"`
	Top1          float64 `json:"top1"`
	Top3          float64 `json:"top3"`
	AutoPrecision float64 `json:"auto_precision"`
	AutoRecall    float64 `json:"auto_recall"`
	Applied       int     `json:"applied"`
	NoCorrection  int     `json:"no_correction"`
	// KnownTyped counts the pairs whose typed word the lexicon knows (a
	// real-word error, or a rare spelling the lexicon lists): Correct
	// offers alternatives to a word the model counts as common only when
	// they are fairly likely, and to a rare one whenever it finds any, so
	// KnownLeft of them get no proposal.
	KnownTyped int `json:"known_typed"`
	KnownLeft  int `json:"known_left"`
	Folds      int `json:"folds,omitempty"`
}

// correctTally counts what correction did with a list of pairs.
type correctTally struct {
	rep                      correctReport
	hit1, hit3, appliedRight int
}

func openForCorrection(ctx context.Context, e *env, model, user, layout string, em *keyloom.ErrorModel) (*keyloom.Engine, error) {
	opts := engineOptions()
	if err := layoutOption(layout, &opts); err != nil {
		return nil, err
	}
	opts.ErrorModel = em
	return openUser(ctx, e, model, user, true, opts)
}

// evalCorrect measures correction on a list of misspelling<TAB>correction(s):
// a hit when any listed correction matches case-insensitively. With folds
// ≥ 2 the list is split into that many folds (pair i in fold i mod folds)
// and each fold is corrected with an error model trained on the others.
func evalCorrect(ctx context.Context, e *env, model, user, layout, path string, folds int, asJSON bool) error {
	f, err := os.Open(path)
	if err != nil {
		return err
	}
	pairs, err := correct.ParsePairs(f)
	f.Close()
	if err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	if len(pairs) == 0 {
		return fmt.Errorf("%s: no pairs", path)
	}
	if folds == 1 || folds < 0 || folds > len(pairs) {
		return fmt.Errorf("%w: --folds %d: want 0 (no cross-validation) or 2 to %d", errUsage, folds, len(pairs))
	}
	var t correctTally
	if folds == 0 {
		if err := t.run(ctx, e, model, user, layout, nil, pairs); err != nil {
			return err
		}
	}
	for k := 0; k < folds && ctx.Err() == nil; k++ {
		train, test := correct.SplitPairs(pairs, k, folds)
		fmt.Fprintf(e.stderr, "fold %d of %d: training on %d pairs, correcting %d\n", k+1, folds, len(train), len(test))
		if err := t.run(ctx, e, model, user, layout, correct.TrainErrorModel(train, correct.TrainOptions{}), test); err != nil {
			return err
		}
	}
	rep := t.report()
	rep.Folds = folds
	if asJSON {
		return writeJSON(e.stdout, rep)
	}
	if folds > 0 {
		fmt.Fprintf(e.stdout, "%d-fold cross-validation: each fold corrected with an error model trained on the others\n", folds)
	}
	fmt.Fprintf(e.stdout, "%d misspellings\ntop-1 %.2f%%, top-3 %.2f%%\nauto-apply: %d applied, precision %.2f%%, recall %.2f%%; no proposal for %d\n",
		rep.N, 100*rep.Top1, 100*rep.Top3, rep.Applied, 100*rep.AutoPrecision, 100*rep.AutoRecall, rep.NoCorrection)
	fmt.Fprintf(e.stdout, "typed word in the lexicon: %d (left alone: %d)\n", rep.KnownTyped, rep.KnownLeft)
	return nil
}

// run corrects pairs with the model (and the error model em, nil for the
// built-in one) and adds to the tally.
func (t *correctTally) run(ctx context.Context, e *env, model, user, layout string, em *keyloom.ErrorModel, pairs []correct.Pair) error {
	eng, err := openForCorrection(ctx, e, model, user, layout, em)
	if err != nil {
		return err
	}
	defer eng.Close()
	for _, p := range pairs {
		if ctx.Err() != nil {
			break
		}
		t.rep.N++
		c, err := eng.Correct(p.Typed)
		if err != nil {
			return err
		}
		known := eng.Listed(p.Typed)
		if known {
			t.rep.KnownTyped++
		}
		if c == nil {
			t.rep.NoCorrection++
			if known {
				t.rep.KnownLeft++
			}
			continue
		}
		want := func(w string) bool {
			for _, x := range p.Intended {
				if strings.EqualFold(x, w) {
					return true
				}
			}
			return false
		}
		for i, r := range append([]string{c.Replacement}, c.Alternatives...) {
			if want(r) {
				if i == 0 {
					t.hit1++
				}
				if i < 3 {
					t.hit3++
				}
				break
			}
		}
		if c.Apply {
			t.rep.Applied++
			if want(c.Replacement) {
				t.appliedRight++
			}
		}
	}
	return nil
}

// report returns the tally as shares of the pairs corrected.
func (t *correctTally) report() correctReport {
	rep := t.rep
	if rep.N == 0 {
		return rep
	}
	rep.Top1 = float64(t.hit1) / float64(rep.N)
	rep.Top3 = float64(t.hit3) / float64(rep.N)
	rep.AutoRecall = float64(t.appliedRight) / float64(rep.N)
	if rep.Applied > 0 {
		rep.AutoPrecision = float64(t.appliedRight) / float64(rep.Applied)
	}
	return rep
}

// evalNoise types the test text with key-geometry noise and correction on.
// With heldOut the model is the default recipe without the demo files that
// are tested (see openHeldOut); model must then be empty.
func evalNoise(ctx context.Context, e *env, model, user, layout string, pos []string, opts lm.ScanOptions, rate float64, seed uint64, k int, heldOut, asJSON bool) error {
	if rate < 0 || rate >= 1 {
		return fmt.Errorf("%w: --noise %v: want a per-letter error rate in [0, 1)", errUsage, rate)
	}
	var eng *keyloom.Engine
	var left []string
	var err error
	if heldOut {
		if model != "" {
			return fmt.Errorf("%w: --held-out builds its own model: give no --model", errUsage)
		}
		o := engineOptions()
		if err := layoutOption(layout, &o); err != nil {
			return err
		}
		eng, left, err = openHeldOut(ctx, e, pos, o)
		if err == nil && user != "" {
			if err = eng.OpenOverlay(user); err != nil {
				eng.Close()
			}
		}
	} else {
		eng, err = openForCorrection(ctx, e, model, user, layout, nil)
	}
	if err != nil {
		return err
	}
	defer eng.Close()
	kb, err := keyboardFor(layout)
	if err != nil {
		return err
	}
	text, err := readAll(e, pos)
	if err != nil {
		return err
	}
	sents := splitSentences(text, opts)
	typist := correct.NewTypist(kb, seed, rate)
	fix, fixErr := evaluate.NewFixer(eng.CorrectWord)
	r, err := evaluate.RunNoisy(ctx, eng, fix, sents, typist.Type, k)
	if err == nil {
		err = fixErr()
	}
	if err != nil {
		return err
	}
	if asJSON {
		out := map[string]any{"noise_rate": rate, "seed": seed, "layout": layout, "noisy": r}
		if heldOut {
			out["held_out"] = left
		}
		return writeJSON(e.stdout, out)
	}
	if heldOut {
		fmt.Fprintf(e.stdout, "model: default recipe without %v\n", left)
	}
	fmt.Fprintf(e.stdout, "%d words typed with %.1f%% per-letter errors (%s, seed %d): %d corrupted\n", r.Words, 100*rate, layout, seed, r.Corrupted)
	fmt.Fprintf(e.stdout, "repaired %d (%.2f%% of corrupted), broken %d (%.2f%% of clean words)\n", r.Repaired, 100*r.RepairedShare, r.Broken, 100*r.BrokenShare)
	fmt.Fprintf(e.stdout, "net keystroke savings: correction on %.2f%%, off %.2f%%\n", 100*r.KSROn, 100*r.KSROff)
	printMisses(e.stdout, r)
	return nil
}

// printMisses prints the breakdown of the corrupted and broken words.
func printMisses(w io.Writer, r evaluate.NoisyReport) {
	m := r.Misses
	pct := func(n, of int64) float64 { return 100 * float64(n) / float64(max(of, 1)) }
	fmt.Fprintf(w, "\n%-48s %7s %7s\n", "corrupted words", "count", "share")
	clean := r.Words - r.Corrupted
	for _, row := range []struct {
		name  string
		n, of int64
		key   string
	}{
		{"repaired: intended word suggested while typing", m.Predicted, r.Corrupted, ""},
		{"repaired: right correction applied on space", m.Applied, r.Corrupted, ""},
		{"missed: another known word typed, left alone", m.RealWord, r.Corrupted, "real_word"},
		{"missed: right word not offered", m.NotOffered, r.Corrupted, "not_offered"},
		{"missed: right word offered first, not applied", m.FirstNotApplied, r.Corrupted, "first_not_applied"},
		{"missed: right word offered, not first", m.RankedLower, r.Corrupted, "ranked_lower"},
		{"missed: wrong word applied", m.WrongApplied, r.Corrupted, "wrong_applied"},
		{"clean known words broken", m.BrokenKnown, clean, "broken_known"},
		{"clean unknown words broken", m.BrokenUnknown, clean, "broken_unknown"},
	} {
		fmt.Fprintf(w, "%-48s %7d %6.2f%%", row.name, row.n, pct(row.n, row.of))
		if ex := m.Examples[row.key]; len(ex) > 0 && row.key != "" {
			fmt.Fprintf(w, "   e.g. %s", strings.Join(ex, " "))
		}
		fmt.Fprintln(w)
	}
}

func keyboardFor(layout string) (*correct.Keyboard, error) {
	var o keyloom.Options
	if err := layoutOption(layout, &o); err != nil {
		return nil, err
	}
	if o.Keyboard != nil {
		return o.Keyboard, nil
	}
	return o.Layout.Keyboard()
}
