package correct

import (
	"slices"
	"strings"
	"testing"
	"time"
)

// BenchmarkCorrect8 corrects 8-letter misspellings from misspellings-dev.tsv
// against the SUBTLEX-US word list (74k words, about the 75k of the
// project's performance target) and reports median and p99 latency. The
// lexicons: flat (an in-memory trie that lists a state's edges), vellum
// (the vellum library's FST, probed one byte at a time through its public
// API, which decodes and allocates a state per call) and trie (the same
// FST bytes read by the trie package's decoder, as the engine does).
func BenchmarkCorrect8(b *testing.B) {
	d := corpus(b)
	var typed []string
	for _, p := range devPairs(b) {
		if len(p.Typed) == 8 && strings.ToLower(p.Typed) == p.Typed {
			typed = append(typed, p.Typed)
		}
	}
	if len(typed) == 0 {
		b.Fatal("no 8-letter misspellings")
	}
	lexicons := []struct {
		name string
		lex  interface {
			Lexicon
			AppendWord([]byte, uint32) []byte
		}
		words []string
	}{
		{"flat", newFlatLex(d.subtlexLex), d.subtlexLex},
		{"vellum", newVellumLex(b, d.subtlexLex), d.subtlexLex},
		{"trie", newTrieLex(b, d.subtlexLex), d.subtlexLex},
	}
	for _, l := range lexicons {
		b.Run(l.name, func(b *testing.B) {
			c, err := New(l.lex, d.unigramScorer(l.words), Options{})
			if err != nil {
				b.Fatal(err)
			}
			var buf []Candidate
			var lat []time.Duration
			cands, i := 0, 0
			b.ReportAllocs()
			for b.Loop() {
				w := typed[i%len(typed)]
				i++
				start := time.Now()
				buf, _ = c.Correct(w, nil, 3, buf)
				lat = append(lat, time.Since(start))
			}
			for _, w := range typed {
				cands += len(c.lastHits(w))
			}
			slices.Sort(lat)
			b.ReportMetric(float64(lat[len(lat)/2].Nanoseconds()), "median-ns")
			b.ReportMetric(float64(lat[len(lat)*99/100].Nanoseconds()), "p99-ns")
			b.ReportMetric(float64(cands)/float64(len(typed)), "candidates/word")
		})
	}
}

// lastHits re-runs the widest search for w and returns the words found
// within budget (for the candidates/word metric; not timed).
func (c *Corrector) lastHits(w string) []hit {
	var s search
	s.reset(c.ch, c.lex, w, float32(c.opts.MaxCost), len(w)+maxExtra)
	s.run()
	return s.hits
}
