package main

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"runtime"

	"github.com/keyloom/keyloom"
	"github.com/keyloom/keyloom/internal/evaluate"
	"github.com/keyloom/keyloom/lm"
)

// evalReport is the JSON of `keyloom eval`.
type evalReport struct {
	KSR                float64   `json:"ksr"`
	KSRCeiling         float64   `json:"ksr_ceiling"`
	KSRByK             []float64 `json:"ksr_by_k"`
	K                  int       `json:"k"`
	Top1               float64   `json:"top1"`
	Top3               float64   `json:"top3"`
	HitByPrefix        []float64 `json:"hit_by_prefix"`
	Perplexity         float64   `json:"perplexity"`
	PerplexityWithOOV  float64   `json:"perplexity_with_oov"`
	OOVRate            float64   `json:"oov_rate"`
	OOV                int64     `json:"oov"`
	Tokens             int64     `json:"tokens"`
	Sentences          int       `json:"sentences"`
	Words              int64     `json:"words"`
	Keystrokes         int64     `json:"keystrokes"`
	KeystrokesBaseline int64     `json:"keystrokes_baseline"`
	LatencyP50us       float64   `json:"latency_p50_us"`
	LatencyP99us       float64   `json:"latency_p99_us"`
	ModelBytes         int       `json:"model_bytes"`
	Partial            bool      `json:"partial,omitempty"`
}

func runEval(ctx context.Context, e *env, args []string) error {
	fs := newFlags(e, "eval", "TEST...",
		"Measures a model on test text the way a user would feel it. A simulated typist types\n"+
			"each word letter by letter and picks a suggestion as soon as the word is among the k\n"+
			"shown (1 keystroke, space included); keystroke savings KSR = 1 − used/(letters+spaces).\n"+
			"Also reports next-word top-1/top-3, completion hit rate by typed-prefix length,\n"+
			"perplexity (every word and sentence end is an event; out-of-vocabulary words are left\n"+
			"out, and scored as <unk> in perplexity_with_oov), latency per keystroke and model size.")
	model := fs.String("model", "", "model file (default: the bundled default model)")
	k := fs.Int("k", 3, "suggestions shown per keystroke (1-5)")
	ppl := fs.Bool("ppl", false, "report perplexity and OOV only (fast)")
	tokenized := fs.Bool("tokenized", false, "TEST is one sentence per line, tokens separated by spaces, no normalization")
	workers := fs.Int("workers", runtime.NumCPU(), "parallel typists")
	plotPath := fs.String("plot", "", "draw KSR against k and hit rate against prefix length into this .svg or .png")
	asJSON := fs.Bool("json", false, "print JSON")
	user := fs.String("user", "", "user overlay file to blend in")
	split := fs.Float64("split", 0, "learn a user overlay on this fraction of the text (in reading order) and test on the rest, base vs personalized")
	noOnline := fs.Bool("no-online", false, "with --split: do not learn test sentences after they are typed")
	correctList := fs.String("correct", "", "measure correction on a misspelling<TAB>correction(s) list instead of typing TEST")
	noise := fs.Float64("noise", 0, "type TEST with this per-letter error rate drawn from the key geometry, correction on")
	layout := fs.String("layout", "qwerty", "keyboard for --noise and correction: qwerty, azerty, qwertz or a layout file")
	seed := fs.Uint64("seed", 1, "random seed of --noise")
	heldOut := fs.Bool("held-out", false, "with --noise: measure on a model built as the default one but without the demo files given as TEST (leave-one-file-out)")
	folds := fs.Int("folds", 0, "with --correct: K-fold cross-validation, each fold corrected with a spelling-error model trained on the other folds (misspellings the model has not seen)")
	pos, err := parse(fs, args)
	if err != nil {
		return err
	}
	if *correctList != "" {
		return evalCorrect(ctx, e, *model, *user, *layout, *correctList, *folds, *asJSON)
	}
	if len(pos) == 0 {
		return fmt.Errorf("%w: give at least one TEST file (- for standard input)", errUsage)
	}
	if *noise != 0 {
		return evalNoise(ctx, e, *model, *user, *layout, pos, lm.ScanOptions{Pretokenized: *tokenized}, *noise, *seed, *k, *heldOut, *asJSON)
	}
	if *k < 1 || *k > evaluate.MaxK {
		return fmt.Errorf("%w: --k %d: want 1..%d", errUsage, *k, evaluate.MaxK)
	}
	if *split != 0 && (*split <= 0 || *split >= 1) {
		return fmt.Errorf("%w: --split %v: want a fraction between 0 and 1", errUsage, *split)
	}
	eng, err := openUser(ctx, e, *model, *user, true, engineOptions())
	if err != nil {
		return err
	}
	defer eng.Close()
	text, err := readAll(e, pos)
	if err != nil {
		return err
	}
	opts := lm.ScanOptions{Pretokenized: *tokenized}
	if *split > 0 {
		return evalSplit(ctx, e, eng, *model, text, opts, *split, !*noOnline, *k, *workers, *plotPath, *asJSON)
	}
	pr, err := eng.Perplexity(ctx, bytes.NewReader(text), opts)
	if err != nil {
		return err
	}
	if pr.Tokens == 0 {
		return fmt.Errorf("the test text holds no words")
	}
	rep := newEvalReport(pr, eng, *k)
	if *ppl {
		if *asJSON {
			return writeJSON(e.stdout, map[string]any{"perplexity": pr.Perplexity, "perplexity_with_oov": pr.PerplexityWithOOV, "oov": pr.OOV, "tokens": pr.Tokens, "oov_rate": rep.OOVRate})
		}
		printPPL(e.stdout, &rep)
		return nil
	}
	sents := splitSentences(text, opts)
	bar := newProgress(e.stderr, "typing", int64(len(sents)))
	r, err := evaluate.Run(ctx, eng, sents, evaluate.Options{K: *k, Workers: *workers, Progress: func(d, _ int) { bar.set(int64(d)) }})
	bar.done()
	if err != nil {
		return err
	}
	fill(&rep, r)
	if *plotPath != "" {
		if err := plotEval(*plotPath, []namedReport{{"", r}}); err != nil {
			return err
		}
	}
	if *asJSON {
		return writeJSON(e.stdout, rep)
	}
	printEval(e.stdout, &rep)
	if r.Partial {
		fmt.Fprintln(e.stdout, "(interrupted: partial results)")
	}
	return nil
}

// newEvalReport starts a report from a perplexity result and the engine measured.
func newEvalReport(pr lm.PerplexityResult, eng *keyloom.Engine, k int) evalReport {
	return evalReport{
		Perplexity: pr.Perplexity, PerplexityWithOOV: pr.PerplexityWithOOV, OOV: pr.OOV, Tokens: pr.Tokens,
		OOVRate: float64(pr.OOV) / float64(max(1, pr.Tokens)), ModelBytes: eng.Info().Bytes, K: k,
	}
}

func fill(rep *evalReport, r evaluate.Report) {
	rep.KSR, rep.KSRCeiling, rep.KSRByK = r.KSR, r.Ceiling, r.KSRByK
	rep.Top1, rep.Top3, rep.HitByPrefix = r.Top1, r.Top3, r.HitByPrefix
	rep.Sentences, rep.Words, rep.Keystrokes, rep.KeystrokesBaseline = r.Sentences, r.Words, r.Keystrokes, r.KeystrokesBaseline
	rep.LatencyP50us, rep.LatencyP99us, rep.Partial = r.LatencyP50us, r.LatencyP99us, r.Partial
}

type namedReport struct {
	name string
	r    evaluate.Report
}

func plotEval(path string, reps []namedReport) error {
	var byK, byP panel
	byK = panel{title: "Keystroke savings by suggestions shown", xlabel: "suggestions shown (k)", ylabel: "KSR"}
	byP = panel{title: "Completion hit rate by letters typed", xlabel: "letters typed (3 = 3 or more)", ylabel: "hit rate"}
	for _, nr := range reps {
		var xs []float64
		for i := range nr.r.KSRByK {
			xs = append(xs, float64(i+1))
		}
		byK.lines = append(byK.lines, series{nr.name, xs, nr.r.KSRByK})
		byP.lines = append(byP.lines, series{nr.name, []float64{0, 1, 2, 3}, nr.r.HitByPrefix})
	}
	return writeFigure(path, []panel{byK, byP})
}

func printPPL(w io.Writer, r *evalReport) {
	fmt.Fprintf(w, "events              %d\n", r.Tokens)
	fmt.Fprintf(w, "out of vocabulary   %d (%.2f%%)\n", r.OOV, 100*r.OOVRate)
	fmt.Fprintf(w, "perplexity          %.3f\n", r.Perplexity)
	fmt.Fprintf(w, "perplexity with OOV %.3f\n", r.PerplexityWithOOV)
}

func printEval(w io.Writer, r *evalReport) {
	fmt.Fprintf(w, "%d sentences, %d words, %d letters+spaces\n\n", r.Sentences, r.Words, r.KeystrokesBaseline)
	fmt.Fprintf(w, "keystroke savings (k=%d)  %6.2f%%   (ceiling %.2f%%; %d of %d keystrokes)\n", r.K, 100*r.KSR, 100*r.KSRCeiling, r.Keystrokes, r.KeystrokesBaseline)
	fmt.Fprintf(w, "  by k                  ")
	for i, v := range r.KSRByK {
		fmt.Fprintf(w, " k=%d %.2f%%", i+1, 100*v)
	}
	fmt.Fprintf(w, "\nnext word top-1 / top-3  %6.2f%% / %.2f%%\n", 100*r.Top1, 100*r.Top3)
	fmt.Fprintf(w, "completion hit rate       0 letters %.2f%%, 1: %.2f%%, 2: %.2f%%, 3+: %.2f%%\n", 100*r.HitByPrefix[0], 100*r.HitByPrefix[1], 100*r.HitByPrefix[2], 100*r.HitByPrefix[3])
	fmt.Fprintf(w, "perplexity               %7.2f   (with OOV %.2f; OOV rate %.2f%%)\n", r.Perplexity, r.PerplexityWithOOV, 100*r.OOVRate)
	fmt.Fprintf(w, "latency per keystroke    p50 %.1f µs, p99 %.1f µs\n", r.LatencyP50us, r.LatencyP99us)
	fmt.Fprintf(w, "model size               %d bytes\n", r.ModelBytes)
}

func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}

// readAll reads the named files (- = standard input) into memory.
func readAll(e *env, paths []string) ([]byte, error) {
	var all []byte
	for _, p := range paths {
		var b []byte
		var err error
		if p == "-" {
			b, err = io.ReadAll(e.stdin)
		} else {
			b, err = os.ReadFile(p)
		}
		if err != nil {
			return nil, err
		}
		all = append(all, b...)
		if len(b) > 0 && b[len(b)-1] != '\n' {
			all = append(all, '\n')
		}
		all = append(all, '\n') // files never run into each other's sentences
	}
	return all, nil
}

// splitSentences returns the folded tokens of every sentence of text.
func splitSentences(text []byte, opts lm.ScanOptions) [][]string {
	var out [][]string
	sc := lm.NewScanner(bytes.NewReader(text), opts)
	for sc.Scan() {
		s := make([]string, len(sc.Tokens()))
		for i, t := range sc.Tokens() {
			s[i] = string(t)
		}
		out = append(out, s)
	}
	return out
}
