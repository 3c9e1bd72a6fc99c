package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"runtime/debug"
	"time"

	"github.com/keyloom/keyloom/internal/bundle"
	"github.com/keyloom/keyloom/internal/format"
)

func runBuild(ctx context.Context, e *env, args []string) error {
	fs := newFlags(e, "build", "[TEXT...]",
		"Counts running text (or pre-tokenized text with --tokenized) and word lists, estimates an\n"+
			"interpolated modified Kneser-Ney model and writes one model file. Use - for standard input.")
	out := fs.String("out", "", "model file to write (required)")
	order := fs.Int("order", 3, "highest n-gram order (1-5)")
	qbits := fs.Int("qbits", 8, "bits per stored probability and back-off weight (4-16), or 0 for lossless")
	tokenized := fs.Bool("tokenized", false, "TEXT is one sentence per line, tokens separated by spaces, no normalization")
	var counts, words listFlag
	fs.Var(&counts, "counts", "word-count list (word<TAB>count per line); repeatable")
	fs.Var(&words, "words", "word list (one word per line), added with a small pseudo-count; repeatable")
	corpus := fs.String("describe", "", "description of the training data stored in the file")
	fromARPA := fs.String("from-arpa", "", "read the model from this ARPA file instead of counting text")
	mem := fs.String("mem", "", "bound the memory of the n-gram counts (e.g. 512MB); past it sorted runs spill to a temporary directory")
	workers := fs.Int("workers", runtime.NumCPU(), "goroutines counting text (the model is the same for any number)")
	fromCounts := fs.String("from-counts", "", "directory of merged count shards (n-gram<TAB>count lines, see lm/SHARDS.md) to estimate from")
	tmpDir := fs.String("tmp", "", "directory for spilled runs (default: the system temporary directory)")
	pos, err := parse(fs, args)
	if err != nil {
		return err
	}
	if *out == "" {
		return fmt.Errorf("%w: --out is required", errUsage)
	}
	if *qbits != 0 && (*qbits < 4 || *qbits > 16) {
		return fmt.Errorf("%w: --qbits %d: want 0 or 4..16", errUsage, *qbits)
	}
	if *fromARPA != "" {
		if len(pos) > 0 || len(counts) > 0 || len(words) > 0 {
			return fmt.Errorf("%w: --from-arpa takes no TEXT, --counts or --words", errUsage)
		}
		b, err := readARPAFile(ctx, *fromARPA)
		if err != nil {
			return err
		}
		desc := *corpus
		if desc == "" {
			desc = "imported from ARPA " + filepath.Base(*fromARPA)
		}
		data, err := bundle.Encode(b, bundle.Meta{Corpus: desc, Sources: []string{*fromARPA}}, *qbits, nil)
		if err != nil {
			return err
		}
		if err := format.WriteFileAtomic(*out, data, 0o644); err != nil {
			return err
		}
		fmt.Fprintf(e.stdout, "wrote %s: %d bytes, order %d, %d words, n-grams per order %v (from ARPA)\n", *out, len(data), b.Order(), len(b.Vocab), b.NGrams())
		return nil
	}
	if len(pos) == 0 && len(counts) == 0 && len(words) == 0 && *fromCounts == "" {
		return fmt.Errorf("%w: give TEXT files, --from-counts, --counts or --words", errUsage)
	}
	var memBytes int64
	if *mem != "" {
		if memBytes, err = parseSize(*mem); err != nil || memBytes == 0 {
			return fmt.Errorf("%w: --mem %q: want a size such as 512MB", errUsage, *mem)
		}
	}
	if memBytes > 0 && os.Getenv("GOMEMLIMIT") == "" {
		// Make the collector keep the heap near the budget; estimation may
		// still need more (it holds every distinct n-gram), which this
		// soft limit allows.
		debug.SetMemoryLimit(memBytes + memBytes/4)
	}
	if *workers < 1 {
		return fmt.Errorf("%w: --workers %d: want at least 1", errUsage, *workers)
	}
	if *qbits != 0 && (*qbits < 4 || *qbits > 16) {
		return fmt.Errorf("%w: --qbits %d: want 0 or 4..16", errUsage, *qbits)
	}
	q := *qbits
	if q == 0 {
		q = -1 // lossless
	}
	var sources []bundle.Source
	var total int64
	var closers []io.Closer
	defer func() {
		for _, c := range closers {
			c.Close()
		}
	}()
	add := func(name string, kind bundle.SourceKind, weight float64) error {
		if name == "-" {
			sources = append(sources, bundle.Source{Name: "stdin", R: e.stdin, Kind: kind, Weight: weight})
			return nil
		}
		f, err := os.Open(name)
		if err != nil {
			return err
		}
		closers = append(closers, f)
		if st, err := f.Stat(); err == nil {
			total += st.Size()
		}
		sources = append(sources, bundle.Source{Name: name, R: f, Kind: kind, Weight: weight})
		return nil
	}
	kind := bundle.SourceText
	if *tokenized {
		kind = bundle.SourceTokenized
	}
	for _, p := range pos {
		if err := add(p, kind, 0); err != nil {
			return err
		}
	}
	if *fromCounts != "" {
		r, files, err := openShardDir(*fromCounts)
		closers = append(closers, files...)
		if err != nil {
			return err
		}
		sources = append(sources, bundle.Source{Name: *fromCounts, R: r, Kind: bundle.SourceShards})
	}
	for _, p := range counts {
		if err := add(p, bundle.SourceWordCounts, 0); err != nil {
			return err
		}
	}
	for _, p := range words {
		if err := add(p, bundle.SourceWordList, 0.5); err != nil {
			return err
		}
	}
	bar := newProgress(e.stderr, "counting", total)
	var doneBefore int64
	last := ""
	var lastN int64
	start := time.Now()
	b, data, err := bundle.Build(ctx, sources, bundle.BuildOptions{
		Order: *order, QuantBits: q, Corpus: *corpus,
		Mem: memBytes, Workers: *workers, TempDir: *tmpDir,
		Tokens: func(n int64) { bar.setRate("counting", n) },
		Progress: func(name string, n int64) {
			if name != last {
				doneBefore += lastN
				last = name
			}
			lastN = n
			bar.set(doneBefore + n)
		},
	})
	bar.done()
	if err != nil {
		return err
	}
	if err := format.WriteFileAtomic(*out, data, 0o644); err != nil {
		return err
	}
	ng := b.NGrams()
	sum := 0
	for _, n := range ng {
		sum += n
	}
	fmt.Fprintf(e.stdout, "wrote %s: %d bytes, order %d, %d words, n-grams per order %v, %.2f bytes/n-gram, %d tokens in %s\n",
		*out, len(data), b.Order(), len(b.Vocab), ng, float64(len(data))/float64(sum), b.Tokens, time.Since(start).Round(time.Millisecond))
	return nil
}
