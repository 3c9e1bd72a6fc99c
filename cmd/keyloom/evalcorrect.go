package main

import (
	"bufio"
	"bytes"
	"context"
	"fmt"
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
func evalNoise(ctx context.Context, e *env, model, user, layout string, pos []string, opts lm.ScanOptions, rate float64, seed uint64, k int, asJSON bool) error {
	if rate < 0 || rate >= 1 {
		return fmt.Errorf("%w: --noise %v: want a per-letter error rate in [0, 1)", errUsage, rate)
	}
	eng, err := openForCorrection(ctx, e, model, user, layout)
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
	fix := func(hist []string, typed string) string {
		c, _ := eng.Correct(strings.Join(hist, " ") + " " + typed)
		if c != nil && c.Apply && !strings.Contains(c.Typed, " ") {
			return lm.Fold(c.Replacement)
		}
		return typed
	}
	r, err := evaluate.RunNoisy(ctx, eng, fix, sents, typist.Type, k)
	if err != nil {
		return err
	}
	if asJSON {
		return writeJSON(e.stdout, map[string]any{"noise_rate": rate, "layout": layout, "noisy": r})
	}
	fmt.Fprintf(e.stdout, "%d words typed with %.1f%% per-letter errors (%s): %d corrupted\n", r.Words, 100*rate, layout, r.Corrupted)
	fmt.Fprintf(e.stdout, "repaired %d (%.2f%% of corrupted), broken %d (%.2f%% of clean words)\n", r.Repaired, 100*r.RepairedShare, r.Broken, 100*r.BrokenShare)
	fmt.Fprintf(e.stdout, "net keystroke savings: correction on %.2f%%, off %.2f%%\n", 100*r.KSROn, 100*r.KSROff)
	return nil
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
