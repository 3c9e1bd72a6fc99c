package main

import (
	"bufio"
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"runtime"
	"slices"
	"strings"
	"time"

	"github.com/keyloom/keyloom"
	"github.com/keyloom/keyloom/internal/bundle"
	"github.com/keyloom/keyloom/internal/evaluate"
	"github.com/keyloom/keyloom/internal/format"
	"github.com/keyloom/keyloom/lm"
)

// errBudgetTooSmall is returned when no pruning, quantization or vocabulary
// cut can bring the model file under the byte budget.
var errBudgetTooSmall = errors.New("budget too small")

// budgetError reports a budget below the smallest file a model can give
// (its unigrams alone, at the fewest bits, with the smallest vocabulary
// allowed). It matches errBudgetTooSmall.
type budgetError struct {
	Budget, Smallest int64
	Bits, Words      int
}

func (e *budgetError) Error() string {
	return fmt.Sprintf("budget too small: %d bytes is below the smallest file this model can give, %d bytes (unigrams only, %d-bit, %d words); raise the budget or lower --min-vocab",
		e.Budget, e.Smallest, e.Bits, e.Words)
}

// Is reports whether target is errBudgetTooSmall.
func (e *budgetError) Is(target error) bool { return target == errBudgetTooSmall }

// maxTrials bounds the threshold search of one budget.
const maxTrials = 40

// pruneReport is one pruned model in the JSON of `keyloom prune`.
type pruneReport struct {
	Budget            int64   `json:"budget"`
	Bytes             int     `json:"bytes"`
	OriginalBytes     int     `json:"original_bytes"`
	QuantBits         int     `json:"quant_bits"`
	Vocab             int     `json:"vocab"`
	NGrams            []int   `json:"ngrams"`
	OriginalNGrams    []int   `json:"original_ngrams"`
	Kept              float64 `json:"kept"` // fraction of the n-grams above unigrams kept
	Threshold         float64 `json:"threshold"`
	Trials            int     `json:"trials"`
	Seconds           float64 `json:"seconds"`
	Perplexity        float64 `json:"perplexity,omitempty"`
	PerplexityWithOOV float64 `json:"perplexity_with_oov,omitempty"`
	OOVRate           float64 `json:"oov_rate,omitempty"`
	KSR               float64 `json:"ksr,omitempty"`
	Out               string  `json:"out,omitempty"`

	data []byte
}

// pruneSearch holds what every budget of one run shares.
type pruneSearch struct {
	ctx      context.Context
	base     *lm.Backoff
	scores   *lm.Scores
	meta     bundle.Meta
	origSize int
	minBits  int
	maxBits  int
	minVocab int
	keep     []string
	sorted   []float64 // every finite criterion, in increasing order
}

func runPrune(ctx context.Context, e *env, args []string) error {
	fs := newFlags(e, "prune", "--model M (--max-bytes SIZE --out FILE | --sweep SIZE,SIZE,...)",
		"Shrinks a model file to a byte budget. n-grams are removed by relative entropy (Stolcke 1998:\n"+
			"those whose removal least changes the model's distribution go first, the back-off weights\n"+
			"are recomputed so every context still sums to one; each context is weighted by how often\n"+
			"the model itself expects it, from its marginal word distribution, rather than by its\n"+
			"unigram, which for Kneser-Ney models measures diversity, not frequency); the threshold\n"+
			"is found by bisection on its logarithm so that the whole written file is at most the\n"+
			"budget and as close to it as the search allows. If pruning alone cannot fit, fewer\n"+
			"quantization bits are tried (from --max-bits down to --min-bits), then a smaller\n"+
			"vocabulary (the rarest words by unigram probability go first, their probability moves\n"+
			"to <unk>; words in --keep always stay).\n"+
			"A budget below the unigrams of --min-vocab words at --min-bits is an error that names the\n"+
			"smallest size this model can reach. With --counts (the merged count shards the model was\n"+
			"built from, as 'keyloom count' writes them), contexts are weighted by their counted\n"+
			"frequency and n-grams seen once go first, which keeps held-out perplexity lower.\n"+
			"With --test, reports perplexity and keystroke savings\n"+
			"on held-out text; --sweep measures several budgets and --plot draws the size curve.")
	model := fs.String("model", "", "model file to prune (default: the bundled default model)")
	out := fs.String("out", "", "pruned model file to write (with --max-bytes)")
	maxBytes := fs.String("max-bytes", "", "byte budget of the written file, e.g. 5MB, 800KB, 1.5MiB")
	sweep := fs.String("sweep", "", "comma-separated budgets to measure, e.g. 1MB,2MB,5MB (no file is written)")
	test := fs.String("test", "", "held-out text to measure perplexity and keystroke savings on")
	tokenized := fs.Bool("tokenized", false, "--test is one sentence per line, tokens separated by spaces")
	plotPath := fs.String("plot", "", "with --sweep: draw perplexity and KSR against file size into this .svg or .png")
	asJSON := fs.Bool("json", false, "print JSON")
	countsDir := fs.String("counts", "", "directory of the merged count shards the model was built from (see lm/SHARDS.md): weight contexts by their counts")
	keepPath := fs.String("keep", "", "file of words (one per line) that vocabulary pruning must keep")
	minVocab := fs.Int("min-vocab", 1000, "smallest vocabulary the search may cut down to (special tokens and --keep words are added)")
	maxBits := fs.Int("max-bits", 8, "quantization bits to start from (4-16)")
	minBits := fs.Int("min-bits", 4, "fewest quantization bits the search may use (4-16)")
	k := fs.Int("k", 3, "suggestions shown per keystroke when measuring KSR (1-5)")
	workers := fs.Int("workers", runtime.NumCPU(), "parallel typists when measuring KSR")
	pos, err := parse(fs, args)
	if err != nil {
		return err
	}
	if len(pos) > 0 {
		return fmt.Errorf("%w: unexpected argument %q", errUsage, pos[0])
	}
	var budgets []int64
	switch {
	case *maxBytes != "" && *sweep != "":
		return fmt.Errorf("%w: give --max-bytes or --sweep, not both", errUsage)
	case *maxBytes != "":
		v, err := parseSize(*maxBytes)
		if err != nil || v <= 0 {
			return fmt.Errorf("%w: --max-bytes %q: want a size such as 5MB", errUsage, *maxBytes)
		}
		if *out == "" {
			return fmt.Errorf("%w: --max-bytes needs --out", errUsage)
		}
		budgets = []int64{v}
	case *sweep != "":
		for _, f := range strings.Split(*sweep, ",") {
			v, err := parseSize(f)
			if err != nil || v <= 0 {
				return fmt.Errorf("%w: --sweep %q: want sizes such as 1MB,2MB", errUsage, f)
			}
			budgets = append(budgets, v)
		}
		if *out != "" {
			return fmt.Errorf("%w: --sweep writes no model; drop --out", errUsage)
		}
	default:
		return fmt.Errorf("%w: give --max-bytes SIZE (with --out) or --sweep SIZES", errUsage)
	}
	if *plotPath != "" && *sweep == "" {
		return fmt.Errorf("%w: --plot goes with --sweep", errUsage)
	}
	if *minBits < 4 || *maxBits > 16 || *minBits > *maxBits {
		return fmt.Errorf("%w: --min-bits %d --max-bits %d: want 4 ≤ min ≤ max ≤ 16", errUsage, *minBits, *maxBits)
	}
	if *minVocab < 1 {
		return fmt.Errorf("%w: --min-vocab %d: want at least 1", errUsage, *minVocab)
	}
	if *k < 1 || *k > evaluate.MaxK {
		return fmt.Errorf("%w: --k %d: want 1..%d", errUsage, *k, evaluate.MaxK)
	}
	var keep []string
	if *keepPath != "" {
		if keep, err = readWordFile(*keepPath); err != nil {
			return err
		}
	}
	var testText []byte
	if *test != "" {
		if testText, err = os.ReadFile(*test); err != nil {
			return err
		}
	}
	path := *model
	if path == "" {
		if path, err = defaultModelPath(ctx, e); err != nil {
			return err
		}
	}
	raw, err := os.ReadFile(path)
	if err != nil {
		return err
	}
	s, err := newPruneSearch(ctx, e, raw, *countsDir)
	if err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	s.minBits, s.maxBits, s.minVocab, s.keep = *minBits, *maxBits, *minVocab, keep

	bar := newProgress(e.stderr, "pruning", int64(len(budgets)))
	var reps []pruneReport
	for i, budget := range budgets {
		start := time.Now()
		rep, err := s.fit(budget)
		if err != nil {
			bar.done()
			return err
		}
		rep.Seconds = time.Since(start).Seconds()
		if testText != nil {
			if err := measurePruned(ctx, &rep, testText, lm.ScanOptions{Pretokenized: *tokenized}, *k, *workers); err != nil {
				bar.done()
				return err
			}
		}
		reps = append(reps, rep)
		bar.set(int64(i + 1))
	}
	bar.done()
	if *out != "" {
		if err := format.WriteFileAtomic(*out, reps[0].data, 0o644); err != nil {
			return err
		}
		reps[0].Out = *out
	}
	if *plotPath != "" {
		if err := plotPrune(*plotPath, reps, testText != nil); err != nil {
			return err
		}
	}
	if *asJSON {
		if *sweep == "" {
			return writeJSON(e.stdout, reps[0])
		}
		return writeJSON(e.stdout, reps)
	}
	printPrune(e.stdout, reps, testText != nil)
	return nil
}

// newPruneSearch decodes a model file into an exact back-off model and
// scores its n-grams once for every budget to come.
// With countsDir (the shards the model was estimated from), contexts are
// weighted by their counted frequency (lm.ScoreOptions.Counts).
func newPruneSearch(ctx context.Context, e *env, raw []byte, countsDir string) (*pruneSearch, error) {
	m, err := bundle.Load(raw, bundle.LoadOptions{VerifyAll: true})
	if err != nil {
		return nil, err
	}
	vocab := make([]string, m.Lex.Len())
	surface := make([]string, m.Lex.Len())
	for i := range vocab {
		vocab[i] = m.Lex.Word(uint32(i))
		if sf := m.Lex.Surface(uint32(i)); sf != vocab[i] {
			surface[i] = sf
		}
	}
	b := m.LM.Backoff(vocab)
	if b == nil {
		return nil, fmt.Errorf("model tables and lexicon disagree")
	}
	b.Surface, b.Tokens, b.Discounts = surface, m.Meta.Tokens, m.Meta.Discounts
	var counts *lm.Counts
	if countsDir != "" {
		if counts, err = readCountsDir(ctx, countsDir, b.Order()); err != nil {
			return nil, err
		}
	}
	bar := newProgress(e.stderr, "scoring", 1)
	sc, err := lm.Score(ctx, b, lm.ScoreOptions{Counts: counts, Progress: func(done, total int) {
		bar.total = int64(total)
		bar.set(int64(done))
	}})
	bar.done()
	if err != nil {
		return nil, err
	}
	meta := m.Meta
	meta.Discounts = nil
	return &pruneSearch{ctx: ctx, base: b, scores: sc, meta: meta, origSize: len(raw), sorted: sortedFinite(sc)}, nil
}

// sortedFinite returns the finite criteria of s in increasing order.
func sortedFinite(s *lm.Scores) []float64 {
	var all []float64
	for _, d := range s.Delta {
		for _, x := range d {
			if !math.IsInf(x, 0) && !math.IsNaN(x) {
				all = append(all, x)
			}
		}
	}
	slices.Sort(all)
	return all
}

func (s *pruneSearch) encode(b *lm.Backoff, qbits int, params string) ([]byte, error) {
	meta := s.meta
	if params != "" && meta.Params != "" {
		params = meta.Params + "; " + params
	}
	if params != "" {
		meta.Params = params
	}
	return bundle.Encode(b, meta, qbits, nil)
}

// unigramsOnly returns b's unigrams alone: the smallest model of its vocabulary.
func unigramsOnly(b *lm.Backoff) *lm.Backoff {
	u := b.Levels[0]
	out := &lm.Backoff{Vocab: b.Vocab, Surface: b.Surface, Discounts: b.Discounts, Tokens: b.Tokens, Levels: make([]lm.Level, b.Order())}
	out.Levels[0] = lm.Level{N: 1, IDs: u.IDs, LogP: u.LogP, Bow: make([]float64, u.Len())}
	for n := 2; n <= b.Order(); n++ {
		out.Levels[n-1] = lm.Level{N: n}
	}
	return out
}

// fit finds the model whose written file is the largest that fits budget:
// bisection on ln θ at the widest quantization that can fit, then at the
// narrowest with a smaller vocabulary.
func (s *pruneSearch) fit(budget int64) (pruneReport, error) {
	rep := pruneReport{Budget: budget, OriginalBytes: s.origSize, OriginalNGrams: s.base.NGrams()}
	uni := unigramsOnly(s.base)
	for q := s.maxBits; q >= s.minBits; q-- {
		data, err := s.encode(uni, q, fmt.Sprintf("pruned to at most %d bytes by relative entropy, %d-bit, %d words", budget, q, len(uni.Vocab)))
		rep.Trials++
		if err != nil {
			return rep, err
		}
		if int64(len(data)) > budget {
			continue
		}
		return s.searchTheta(rep, s.base, s.scores, s.sorted, q, budget, len(data))
	}
	// Vocabulary: the largest size whose unigrams fit at the narrowest width.
	q := s.minBits
	unigramsAt := func(size int) (*lm.Backoff, int, error) {
		v, err := lm.PruneVocab(s.ctx, s.base, size, s.keep)
		if err != nil {
			return nil, 0, err
		}
		data, err := s.encode(unigramsOnly(v), q, fmt.Sprintf("pruned to at most %d bytes by relative entropy, %d-bit, %d words", budget, q, len(v.Vocab)))
		rep.Trials++
		return v, len(data), err
	}
	lo := min(s.minVocab, len(s.base.Vocab))
	smallest, size, err := unigramsAt(lo)
	if err != nil {
		return rep, err
	}
	if int64(size) > budget {
		return rep, &budgetError{Budget: budget, Smallest: int64(size), Bits: q, Words: len(smallest.Vocab)}
	}
	hi := len(s.base.Vocab) // unigrams of the whole vocabulary do not fit at q
	for hi-lo > 1 {
		mid := lo + (hi-lo)/2
		_, size, err := unigramsAt(mid)
		if err != nil {
			return rep, err
		}
		if int64(size) <= budget {
			lo = mid
		} else {
			hi = mid
		}
	}
	v, size, err := unigramsAt(lo)
	if err != nil {
		return rep, err
	}
	sc, err := lm.Score(s.ctx, v, lm.ScoreOptions{})
	if err != nil {
		return rep, err
	}
	return s.searchTheta(rep, v, sc, sortedFinite(sc), q, budget, size)
}

// searchTheta bisects ln θ for model b (whose unigrams alone fit budget at q
// bits) until no criterion lies between the bounds.
func (s *pruneSearch) searchTheta(rep pruneReport, b *lm.Backoff, sc *lm.Scores, sorted []float64, q int, budget int64, uniSize int) (pruneReport, error) {
	params := fmt.Sprintf("pruned to at most %d bytes by relative entropy, %d-bit, %d words", budget, q, len(b.Vocab))
	try := func(theta float64) (*lm.Backoff, []byte, error) {
		p := b
		if theta > 0 {
			var err error
			if p, err = lm.PruneScored(s.ctx, b, sc, theta); err != nil {
				return nil, nil, err
			}
		}
		data, err := s.encode(p, q, params)
		rep.Trials++
		return p, data, err
	}
	finish := func(p *lm.Backoff, data []byte, theta float64) (pruneReport, error) {
		rep.Bytes, rep.QuantBits, rep.Vocab, rep.NGrams, rep.Threshold, rep.data = len(data), q, len(p.Vocab), p.NGrams(), theta, data
		kept, all := 0, 0
		for n := 1; n < p.Order(); n++ {
			kept += rep.NGrams[n]
			all += rep.OriginalNGrams[n]
		}
		if all > 0 {
			rep.Kept = float64(kept) / float64(all)
		}
		return rep, nil
	}
	p, data, err := try(0)
	if err != nil {
		return rep, err
	}
	if int64(len(data)) <= budget {
		return finish(p, data, 0)
	}
	fullSize := len(data)
	if len(sorted) == 0 {
		p, data, err := try(math.Inf(1))
		if err != nil {
			return rep, err
		}
		return finish(p, data, math.Inf(1))
	}
	// lo never fits (it keeps everything), hi does (above every finite
	// criterion only unigrams and unprunable n-grams are left). Each step
	// first predicts θ from the n-grams it keeps, assuming the size grows
	// linearly with them between the bracket's ends; a prediction outside
	// the bracket, or every other step once one fails to shrink it by half,
	// is replaced by halving the bracket in ln θ.
	lo := math.Max(sorted[0], 1e-300) / 2
	hi := sorted[len(sorted)-1] * 2
	if hi <= 0 {
		hi = 1
	}
	kept := func(theta float64) int { // criteria ≥ θ
		i, _ := slices.BinarySearch(sorted, theta)
		return len(sorted) - i
	}
	sizeLo, sizeHi := float64(fullSize), float64(uniSize)
	tol := max(budget/1000, 64) // close enough: within 0.1 % of the budget
	var best *lm.Backoff
	var bestData []byte
	bestTheta := hi
	bisect := false
	for it := 0; it < maxTrials && kept(lo) > kept(hi); it++ {
		if err := s.ctx.Err(); err != nil {
			return rep, err
		}
		mid := math.Exp((math.Log(lo) + math.Log(hi)) / 2)
		if !bisect && sizeLo > sizeHi {
			kLo, kHi := float64(kept(lo)), float64(kept(hi))
			want := kHi + (float64(budget)-sizeHi)*(kLo-kHi)/(sizeLo-sizeHi)
			if i := len(sorted) - int(want); i > 0 && i < len(sorted) {
				if t := sorted[i]; t > lo && t < hi {
					mid = t
				}
			}
		}
		if !(mid > lo && mid < hi) {
			break
		}
		width := kept(lo) - kept(hi)
		p, data, err := try(mid)
		if err != nil {
			return rep, err
		}
		if int64(len(data)) <= budget {
			best, bestData, bestTheta, hi, sizeHi = p, data, mid, mid, float64(len(data))
			if budget-int64(len(data)) <= tol {
				break
			}
		} else {
			lo, sizeLo = mid, float64(len(data))
		}
		bisect = !bisect && 2*(kept(lo)-kept(hi)) > width
	}
	if best == nil {
		p, data, err := try(hi)
		if err != nil {
			return rep, err
		}
		if int64(len(data)) > budget { // n-grams that cannot be pruned (+Inf): drop all
			p = unigramsOnly(b)
			if data, err = s.encode(p, q, params); err != nil {
				return rep, err
			}
			hi = math.Inf(1)
		}
		best, bestData, bestTheta = p, data, hi
	}
	return finish(best, bestData, bestTheta)
}

// measurePruned fills the held-out figures of rep from its model bytes.
func measurePruned(ctx context.Context, rep *pruneReport, text []byte, opts lm.ScanOptions, k, workers int) error {
	eng, err := keyloom.OpenBytes(rep.data, engineOptions())
	if err != nil {
		return err
	}
	defer eng.Close()
	pr, err := eng.Perplexity(ctx, bytes.NewReader(text), opts)
	if err != nil {
		return err
	}
	if pr.Tokens == 0 {
		return fmt.Errorf("the test text holds no words")
	}
	rep.Perplexity, rep.PerplexityWithOOV, rep.OOVRate = pr.Perplexity, pr.PerplexityWithOOV, float64(pr.OOV)/float64(pr.Tokens)
	r, err := evaluate.Run(ctx, eng, splitSentences(text, opts), evaluate.Options{K: k, Workers: workers, NoLatency: true})
	if err != nil {
		return err
	}
	rep.KSR = r.KSR
	return nil
}

func printPrune(w io.Writer, reps []pruneReport, measured bool) {
	if len(reps) == 1 {
		r := reps[0]
		fmt.Fprintf(w, "%s%d bytes (budget %d, was %d): %d-bit, %d words, n-grams per order %v (was %v), %.1f%% of the n-grams above unigrams kept, θ=%.3g, %d trials in %.1fs\n",
			wrote(r.Out), r.Bytes, r.Budget, r.OriginalBytes, r.QuantBits, r.Vocab, r.NGrams, r.OriginalNGrams, 100*r.Kept, r.Threshold, r.Trials, r.Seconds)
		if measured {
			fmt.Fprintf(w, "held-out perplexity %.2f (with OOV %.2f, OOV rate %.2f%%), keystroke savings %.2f%%\n", r.Perplexity, r.PerplexityWithOOV, 100*r.OOVRate, 100*r.KSR)
		}
		return
	}
	fmt.Fprintf(w, "%12s %12s %5s %8s %7s %10s  %s\n", "budget", "bytes", "bits", "words", "kept", "θ", "n-grams")
	for _, r := range reps {
		fmt.Fprintf(w, "%12d %12d %5d %8d %6.1f%% %10.3g  %v", r.Budget, r.Bytes, r.QuantBits, r.Vocab, 100*r.Kept, r.Threshold, r.NGrams)
		if measured {
			fmt.Fprintf(w, "  perplexity %.2f  KSR %.2f%%", r.Perplexity, 100*r.KSR)
		}
		fmt.Fprintln(w)
	}
}

func wrote(path string) string {
	if path == "" {
		return ""
	}
	return "wrote " + path + ": "
}

func plotPrune(path string, reps []pruneReport, measured bool) error {
	var xs, kept, ppl, ksr []float64
	for _, r := range reps {
		xs = append(xs, float64(r.Bytes)/1e6)
		kept = append(kept, r.Kept)
		ppl = append(ppl, r.Perplexity)
		ksr = append(ksr, r.KSR)
	}
	if !measured {
		return writeFigure(path, []panel{{title: "n-grams kept by file size", xlabel: "file size (MB)", ylabel: "fraction of n-grams kept", lines: []series{{"", xs, kept}}}})
	}
	return writeFigure(path, []panel{
		{title: "Held-out perplexity by file size", xlabel: "file size (MB)", ylabel: "perplexity", lines: []series{{"", xs, ppl}}},
		{title: "Keystroke savings by file size", xlabel: "file size (MB)", ylabel: "KSR", lines: []series{{"", xs, ksr}}},
	})
}

// readWordFile reads one word per line (blank lines and # comments skipped), folded.
func readWordFile(path string) ([]string, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	var out []string
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		w := strings.TrimSpace(sc.Text())
		if w == "" || strings.HasPrefix(w, "#") {
			continue
		}
		out = append(out, lm.Fold(w))
	}
	return out, sc.Err()
}

// readCountsDir merges the count shards of dir into counts for pruning.
func readCountsDir(ctx context.Context, dir string, order int) (*lm.Counts, error) {
	r, files, err := openShardDir(dir)
	if err != nil {
		return nil, err
	}
	defer func() {
		for _, f := range files {
			f.Close()
		}
	}()
	t, err := lm.NewTally(lm.TallyOptions{Order: order})
	if err != nil {
		return nil, err
	}
	defer t.Close()
	if err := t.AddShards(ctx, r); err != nil {
		return nil, fmt.Errorf("%s: %w", dir, err)
	}
	return t.Counts(ctx)
}
