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
// The trie is also searched with the previous depth-first widest pass
// (trie-depthfirst), and both with the engine's state cap (-cap). Besides
// latency it reports the states visited and the DP rows computed per word,
// which do not depend on the machine's load.
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
		words      []string
		depthFirst bool
		cap        int
	}{
		{"flat", newFlatLex(d.subtlexLex), d.subtlexLex, false, 0},
		{"vellum", newVellumLex(b, d.subtlexLex), d.subtlexLex, false, 0},
		{"trie", newTrieLex(b, d.subtlexLex), d.subtlexLex, false, 0},
		{"trie-depthfirst", newTrieLex(b, d.subtlexLex), d.subtlexLex, true, 0},
		{"trie-cap", newTrieLex(b, d.subtlexLex), d.subtlexLex, false, benchCap},
		{"trie-depthfirst-cap", newTrieLex(b, d.subtlexLex), d.subtlexLex, true, benchCap},
	}
	for _, l := range lexicons {
		b.Run(l.name, func(b *testing.B) {
			c, err := New(l.lex, d.unigramScorer(l.words), Options{MaxStates: l.cap})
			if err != nil {
				b.Fatal(err)
			}
			c.depthFirst = l.depthFirst
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
			var states, rows []int
			for _, w := range typed {
				cands += len(c.lastHits(w))
				st, r := c.work(w)
				states = append(states, st)
				rows = append(rows, r)
			}
			slices.Sort(states)
			slices.Sort(rows)
			b.ReportMetric(float64(states[len(states)/2]), "states-median")
			b.ReportMetric(float64(states[len(states)*99/100]), "states-p99")
			b.ReportMetric(float64(rows[len(rows)/2]), "rows-median")
			b.ReportMetric(float64(rows[len(rows)*9/10]), "rows-p90")
			b.ReportMetric(float64(rows[len(rows)*99/100]), "rows-p99")
			slices.Sort(lat)
			b.ReportMetric(float64(lat[len(lat)/2].Nanoseconds()), "median-ns")
			b.ReportMetric(float64(lat[len(lat)*99/100].Nanoseconds()), "p99-ns")
			b.ReportMetric(float64(cands)/float64(len(typed)), "candidates/word")
		})
	}
}

// benchCap is the state cap of the -cap runs: the engine's default
// (keyloom.DefaultCorrectionStates, which this package cannot import).
const benchCap = 15000

// work returns the lexicon states one correction of w visits and the DP
// rows it computes (deterministic; not timed).
func (c *Corrector) work(w string) (states, rows int) {
	var sc scratch
	id, inLex := c.lex.ID(w)
	sc.rk.start(c, nil, id, inLex, 8, nil)
	states = c.searchPasses(&sc.s, &sc.rk, w, inLex, !c.depthFirst)
	return states, sc.s.rowsDone
}

// lastHits re-runs the widest search for w and returns the words found
// within budget (for the candidates/word metric; not timed).
func (c *Corrector) lastHits(w string) []hit {
	var s search
	s.reset(c.ch, c.lex, w, float32(c.opts.MaxCost), len(w)+maxExtra)
	s.run()
	return s.hits
}

// BenchmarkWidePass times the widest pass alone (13 nats, no cap) over
// the 8-letter misspellings of BenchmarkCorrect8 and the trie lexicon,
// walked depth-first and best-first, and reports the time per state each
// walk enters (best-first: per prefix queued) and the states per word.
func BenchmarkWidePass(b *testing.B) {
	d := corpus(b)
	var typed []string
	for _, p := range devPairs(b) {
		if len(p.Typed) == 8 && strings.ToLower(p.Typed) == p.Typed {
			typed = append(typed, p.Typed)
		}
	}
	lex := newTrieLex(b, d.subtlexLex)
	c, err := New(lex, d.unigramScorer(lex.words), Options{})
	if err != nil {
		b.Fatal(err)
	}
	for _, bestFirst := range []bool{false, true} {
		name := "depthfirst"
		if bestFirst {
			name = "bestfirst"
		}
		b.Run(name, func(b *testing.B) {
			var s search
			states, i := 0, 0
			b.ReportAllocs()
			for b.Loop() {
				w := typed[i%len(typed)]
				i++
				s.reset(c.ch, lex, w, float32(c.opts.MaxCost), len(w)+maxExtra)
				if bestFirst {
					s.runBest()
				} else {
					s.run()
				}
				states += s.visited
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(max(states, 1)), "ns/state")
			b.ReportMetric(float64(states)/float64(i), "states/word")
		})
	}
}
