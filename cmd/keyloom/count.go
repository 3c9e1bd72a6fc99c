package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"time"

	"github.com/keyloom/keyloom/lm"
)

// runCount runs the two halves of a map/reduce count: "count map" turns text
// into shard lines, "count reduce" sums the counts of adjacent equal keys.
// Both read standard input and write standard output, so they serve as the
// mapper and reducer of a streaming map/reduce job unchanged.
func runCount(ctx context.Context, e *env, args []string) error {
	if len(args) == 0 {
		return fmt.Errorf("%w: want 'count map' or 'count reduce'", errUsage)
	}
	switch args[0] {
	case "map":
		fs := newFlags(e, "count map", "< TEXT > SHARD",
			"Counts the n-grams of the text on standard input and writes n-gram<TAB>count lines (see\n"+
				"lm/SHARDS.md), unsorted. Each input piece must end where a sentence ends: at a blank line or a\n"+
				"line ending in . ! ? or …, or at any line end with --tokenized.")
		tokenized := fs.Bool("tokenized", false, "input is one sentence per line, tokens separated by spaces, no normalization")
		order := fs.Int("order", 3, "highest n-gram order (1-5)")
		mem := fs.String("mem", "256MB", "write out and restart the pre-aggregated counts past this size")
		pos, err := parse(fs, args[1:])
		if err != nil {
			return err
		}
		if len(pos) > 0 {
			return fmt.Errorf("%w: count map reads standard input only", errUsage)
		}
		if *order < 1 || *order > lm.MaxOrder {
			return fmt.Errorf("%w: --order %d: want 1..%d", errUsage, *order, lm.MaxOrder)
		}
		budget, err := parseSize(*mem)
		if err != nil || budget == 0 {
			return fmt.Errorf("%w: --mem %q: want a size such as 256MB", errUsage, *mem)
		}
		return lm.MapShard(ctx, e.stdin, e.stdout, lm.MapOptions{
			Order: *order, Scan: lm.ScanOptions{Pretokenized: *tokenized}, MemBudget: budget,
		})
	case "reduce":
		fs := newFlags(e, "count reduce", "< SORTED > SHARD",
			"Reads n-gram<TAB>count lines sorted by key (byte order; LC_ALL=C for sort) and writes each\n"+
				"key once with the sum of its counts.")
		pos, err := parse(fs, args[1:])
		if err != nil {
			return err
		}
		if len(pos) > 0 {
			return fmt.Errorf("%w: count reduce reads standard input only", errUsage)
		}
		return lm.ReduceShard(ctx, e.stdin, e.stdout)
	case "-h", "--help", "help":
		fmt.Fprintln(e.stdout, "usage: keyloom count map [--tokenized] [--order N] [--mem SIZE] < TEXT > SHARD\n"+
			"       keyloom count reduce < SORTED > SHARD\n\n"+
			"The mapper and reducer of a map/reduce count; build the model with 'keyloom build --from-counts DIR'.")
		return errHelp
	}
	return fmt.Errorf("%w: unknown count step %q (want map or reduce)", errUsage, args[0])
}

// openShardDir opens every shard file of dir (names starting with '_' or
// '.' are skipped, as are subdirectories) in name order as one stream.
func openShardDir(dir string) (io.Reader, []io.Closer, error) {
	ents, err := os.ReadDir(dir)
	if err != nil {
		return nil, nil, err
	}
	var rs []io.Reader
	var closers []io.Closer
	for _, de := range ents {
		name := de.Name()
		if de.IsDir() || strings.HasPrefix(name, "_") || strings.HasPrefix(name, ".") {
			continue
		}
		f, err := os.Open(filepath.Join(dir, name))
		if err != nil {
			return nil, closers, err
		}
		closers = append(closers, f)
		rs = append(rs, f, strings.NewReader("\n")) // a file may lack its last line end
	}
	if len(rs) == 0 {
		return nil, closers, fmt.Errorf("%s: no count shards", dir)
	}
	return io.MultiReader(rs...), closers, nil
}

// setRate shows the counting speed in the bar's label.
func (p *progress) setRate(label string, tokens int64) {
	if p == nil || !p.on {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	if el := time.Since(p.start).Seconds(); el > 0 {
		p.label = fmt.Sprintf("%s %.2fM tok/s", label, float64(tokens)/el/1e6)
	}
}
