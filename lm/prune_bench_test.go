package lm

import (
	"context"
	"flag"
	"fmt"
	"math/rand/v2"
	"strings"
	"testing"
)

// pruneBenchTokens sets the size of BenchmarkPrune's training text. The
// default keeps the once-per-benchmark CI run short; the figure in
// BENCHMARKS.md was taken with -prune-bench-tokens=10000000.
var pruneBenchTokens = flag.Int("prune-bench-tokens", 300_000, "tokens of synthetic text for BenchmarkPrune")

// syntheticText returns about tokens words of made-up pretokenized text:
// sentences of 3 to 24 words over a 50,000-word vocabulary, where each word
// is, with probability 0.6, one of its predecessor's 200 favourite followers
// (Zipf-ranked) and otherwise a Zipf-distributed word, so that n-grams recur
// the way they do in text (few frequent, many seen once). Fixed seed.
func syntheticText(tokens int) string {
	rng := rand.New(rand.NewPCG(7, 11))
	const vocab = 50_000
	global := rand.NewZipf(rng, 1.1, 2, vocab-1)
	follower := rand.NewZipf(rng, 1.3, 1, 199)
	var sb strings.Builder
	sb.Grow(tokens * 7)
	prev := uint64(0)
	for n := 0; n < tokens; {
		length := 3 + rng.IntN(22)
		for i := range length {
			var w uint64
			if i > 0 && rng.Float64() < 0.6 {
				w = (prev*2654435761 + follower.Uint64()*40503) % vocab
			} else {
				w = global.Uint64()
			}
			if i > 0 {
				sb.WriteByte(' ')
			}
			fmt.Fprintf(&sb, "w%d", w)
			prev = w
		}
		sb.WriteByte('\n')
		n += length
	}
	return sb.String()
}

// BenchmarkPrune measures Score plus PruneScored at one threshold on an
// order-3 Kneser-Ney model of synthetic text, for each choice of history
// weights, and reports the cost per scored n-gram.
func BenchmarkPrune(b *testing.B) {
	ctx := context.Background()
	c, err := NewCounter(3)
	if err != nil {
		b.Fatal(err)
	}
	if err := c.AddText(ctx, strings.NewReader(syntheticText(*pruneBenchTokens)), ScanOptions{Pretokenized: true}, nil); err != nil {
		b.Fatal(err)
	}
	m, err := Estimate(ctx, c, EstimateOptions{})
	if err != nil {
		b.Fatal(err)
	}
	cs := c.counts()
	scored := higherNGrams(m)
	for _, mode := range []struct {
		name string
		opts ScoreOptions
	}{
		{"history=chain", ScoreOptions{ChainHistory: true}},
		{"history=marginal", ScoreOptions{}},
		{"history=counts", ScoreOptions{Counts: cs}},
	} {
		b.Run(fmt.Sprintf("tokens=%d/%s", *pruneBenchTokens, mode.name), func(b *testing.B) {
			b.ReportAllocs()
			kept := 0
			for b.Loop() {
				s, err := Score(ctx, m, mode.opts)
				if err != nil {
					b.Fatal(err)
				}
				p, err := PruneScored(ctx, m, s, 1e-7)
				if err != nil {
					b.Fatal(err)
				}
				kept = higherNGrams(p)
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(scored), "ns/ngram")
			b.ReportMetric(float64(kept)/float64(scored), "kept")
		})
	}
}
