package main

import (
	"bufio"
	"bytes"
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
}

func openForCorrection(ctx context.Context, e *env, model, user, layout string) (*keyloom.Engine, error) {
	opts := engineOptions()
	if err := layoutOption(layout, &opts); err != nil {
		return nil, err
	}
	return openUser(ctx, e, model, user, true, opts)
}

// evalCorrect measures correction on a list of misspelling<TAB>correction(s):
// a hit when any listed correction matches case-insensitively.
func evalCorrect(ctx context.Context, e *env, model, user, layout, path string, asJSON bool) error {
	eng, err := openForCorrection(ctx, e, model, user, layout)
	if err != nil {
		return err
	}
	defer eng.Close()
	data, err := os.ReadFile(path)
	if err != nil {
		return err
	}
	var rep correctReport
	var hit1, hit3, appliedRight int
	sc := bufio.NewScanner(bytes.NewReader(data))
	for sc.Scan() {
		line := sc.Text()
		if line == "" || strings.HasPrefix(line, "#") {
			continue
		}
		typed, fixes, ok := strings.Cut(line, "\t")
		if !ok {
			return fmt.Errorf("%s: line %q: want misspelling<TAB>correction(s)", path, line)
		}
		want := map[string]bool{}
		for _, f := range strings.Split(fixes, ",") {
			want[strings.ToLower(strings.TrimSpace(f))] = true
		}
		if ctx.Err() != nil {
			break
		}
		rep.N++
		c, err := eng.Correct(typed)
		if err != nil {
			return err
		}
		if c == nil {
			rep.NoCorrection++
			continue
		}
		ranked := append([]string{c.Replacement}, c.Alternatives...)
		for i, r := range ranked {
			if want[strings.ToLower(r)] {
				if i == 0 {
					hit1++
				}
				if i < 3 {
					hit3++
				}
				break
			}
		}
		if c.Apply {
			rep.Applied++
			if want[strings.ToLower(c.Replacement)] {
				appliedRight++
			}
		}
	}
	if rep.N == 0 {
		return fmt.Errorf("%s: no pairs", path)
	}
	rep.Top1 = float64(hit1) / float64(rep.N)
	rep.Top3 = float64(hit3) / float64(rep.N)
	rep.AutoRecall = float64(appliedRight) / float64(rep.N)
	if rep.Applied > 0 {
		rep.AutoPrecision = float64(appliedRight) / float64(rep.Applied)
	}
	if asJSON {
		return writeJSON(e.stdout, rep)
	}
	fmt.Fprintf(e.stdout, "%d misspellings\ntop-1 %.2f%%, top-3 %.2f%%\nauto-apply: %d applied, precision %.2f%%, recall %.2f%%; no proposal for %d\n",
		rep.N, 100*rep.Top1, 100*rep.Top3, rep.Applied, 100*rep.AutoPrecision, 100*rep.AutoRecall, rep.NoCorrection)
	return nil
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
		eng, err = openForCorrection(ctx, e, model, user, layout)
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
