package keyloom

import (
	"bufio"
	"context"
	"slices"
	"strings"
	"testing"
	"time"

	"github.com/keyloom/keyloom/corpora"
	"github.com/keyloom/keyloom/internal/bundle"
)

// BenchmarkCorrect corrects 8-letter misspellings from the development
// misspellings list (corpora/misspellings-dev.tsv) against a lexicon of the
// SUBTLEX-US and SCOWL word lists (~177k words), through the engine with
// its default state cap, and reports the median and p99 time per word.
func BenchmarkCorrect(b *testing.B) {
	_, data, err := bundle.Build(context.Background(), []bundle.Source{
		{Name: "subtlex", R: corpora.WordCounts(), Kind: bundle.SourceWordCounts},
		{Name: "scowl", R: corpora.WordList(), Kind: bundle.SourceWordList, Weight: 0.5},
	}, bundle.BuildOptions{Order: 1})
	if err != nil {
		b.Fatal(err)
	}
	e, err := OpenBytes(data, Options{})
	if err != nil {
		b.Fatal(err)
	}
	var words []string
	sc := bufio.NewScanner(corpora.Misspellings())
	for sc.Scan() {
		typed, _, ok := strings.Cut(sc.Text(), "\t")
		if ok && len(typed) == 8 && !strings.HasPrefix(typed, "#") {
			words = append(words, typed)
		}
	}
	if len(words) == 0 {
		b.Fatal("no 8-letter misspellings")
	}
	var times []time.Duration
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		t0 := time.Now()
		if _, err := e.Correct(words[i%len(words)]); err != nil {
			b.Fatal(err)
		}
		times = append(times, time.Since(t0))
		i++
	}
	slices.Sort(times)
	b.ReportMetric(float64(times[len(times)/2].Microseconds()), "median-µs")
	b.ReportMetric(float64(times[len(times)*99/100].Microseconds()), "p99-µs")
	b.ReportMetric(float64(len(words)), "words")
}
