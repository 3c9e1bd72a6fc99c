package main

import (
	"context"
	"fmt"
	"strings"

	"github.com/keyloom/keyloom"
	"github.com/keyloom/keyloom/internal/evaluate"
	"github.com/keyloom/keyloom/lm"
)

// evalSplit learns a user overlay on the first part of text and measures the
// rest with the base model alone and with the overlay.
func evalSplit(ctx context.Context, e *env, base *keyloom.Engine, model string, text []byte, opts lm.ScanOptions, frac float64, online bool, k, workers int, plotPath string, asJSON bool) error {
	sents := splitSentences(text, opts)
	cut := int(float64(len(sents)) * frac)
	if cut == 0 || cut == len(sents) {
		return fmt.Errorf("--split %v leaves nothing to learn or to test (%d sentences)", frac, len(sents))
	}
	train, test := sents[:cut], sents[cut:]
	testText := joinSentences(test)
	measure := func(eng *keyloom.Engine, learn bool) (evalReport, error) {
		pr, err := eng.Perplexity(ctx, strings.NewReader(testText), lm.ScanOptions{Pretokenized: true})
		if err != nil {
			return evalReport{}, err
		}
		o := evaluate.Options{K: k, Workers: workers}
		if learn {
			o.Learn = func(s []string) { eng.Learn(strings.Join(s, " ")) }
		}
		bar := newProgress(e.stderr, "typing", int64(len(test)))
		o.Progress = func(d, _ int) { bar.set(int64(d)) }
		r, err := evaluate.Run(ctx, eng, test, o)
		bar.done()
		if err != nil {
			return evalReport{}, err
		}
		rep := newEvalReport(pr, eng, k)
		fill(&rep, r)
		return rep, nil
	}
	personal := func() (*keyloom.Engine, error) {
		eng, err := openModel(ctx, e, model, engineOptions())
		if err != nil {
			return nil, err
		}
		for _, s := range train {
			if err := eng.Learn(strings.Join(s, " ")); err != nil {
				return nil, err
			}
		}
		return eng, nil
	}
	rb, err := measure(base, false)
	if err != nil {
		return err
	}
	out := map[string]evalReport{"base": rb}
	p1, err := personal()
	if err != nil {
		return err
	}
	defer p1.Close()
	rp, err := measure(p1, online)
	if err != nil {
		return err
	}
	out["personal"] = rp
	if online {
		p2, err := personal()
		if err != nil {
			return err
		}
		defer p2.Close()
		if out["personal_offline"], err = measure(p2, false); err != nil {
			return err
		}
	}
	if plotPath != "" {
		var reps []namedReport
		for _, name := range []string{"base", "personal", "personal_offline"} {
			if r, ok := out[name]; ok {
				reps = append(reps, namedReport{name, evaluate.Report{KSRByK: r.KSRByK, HitByPrefix: r.HitByPrefix}})
			}
		}
		if err := plotEval(plotPath, reps); err != nil {
			return err
		}
	}
	if asJSON {
		return writeJSON(e.stdout, out)
	}
	fmt.Fprintf(e.stdout, "learned %d sentences, tested %d (online learning: %v)\n\n", len(train), len(test), online)
	fmt.Fprintf(e.stdout, "%-22s %10s %10s", "", "base", "personal")
	if online {
		fmt.Fprintf(e.stdout, " %12s", "no online")
	}
	fmt.Fprintln(e.stdout)
	row := func(name string, f func(r evalReport) float64, pct bool) {
		fmt.Fprintf(e.stdout, "%-22s", name)
		for _, n := range []string{"base", "personal", "personal_offline"} {
			r, ok := out[n]
			if !ok {
				continue
			}
			if pct {
				fmt.Fprintf(e.stdout, " %9.2f%%", 100*f(r))
			} else {
				fmt.Fprintf(e.stdout, " %10.2f", f(r))
			}
		}
		fmt.Fprintln(e.stdout)
	}
	row("keystroke savings", func(r evalReport) float64 { return r.KSR }, true)
	row("next word top-1", func(r evalReport) float64 { return r.Top1 }, true)
	row("next word top-3", func(r evalReport) float64 { return r.Top3 }, true)
	row("perplexity", func(r evalReport) float64 { return r.Perplexity }, false)
	row("OOV rate", func(r evalReport) float64 { return r.OOVRate }, true)
	row("latency p50 (µs)", func(r evalReport) float64 { return r.LatencyP50us }, false)
	return nil
}

func joinSentences(s [][]string) string {
	var b strings.Builder
	for _, x := range s {
		b.WriteString(strings.Join(x, " "))
		b.WriteByte('\n')
	}
	return b.String()
}
