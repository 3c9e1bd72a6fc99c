// Package evaluate measures an engine the way a user would feel it: a
// simulated typist enters test text letter by letter and takes a suggestion
// as soon as the word it wants is offered.
//
// Definitions (shared with DESIGN.md, the CLI and the tests):
//   - Keystroke savings (KSR): before each letter of a word the engine shows k
//     suggestions for the sentence so far and the letters typed; picking one
//     costs one keystroke and inserts the space; otherwise the word costs its
//     letters plus one space. KSR = 1 − used / (letters + spaces).
//   - The ceiling is 1 − words / (letters + spaces): every word picked before
//     its first letter.
//   - Next-word top-1 / top-3: the word is the first / among the first three
//     suggestions before its first letter.
//   - Completion hit rate at prefix length L: the share of words longer than L
//     that are among the k suggestions once their first L letters are typed
//     (L = 3 gathers every L ≥ 3).
package evaluate

import (
	"context"
	"slices"
	"sync"
	"time"
)

// Predictor offers words. Predict appends to dst up to k suggested words
// (folded, as in the test text) for the word after history (the sentence so
// far, folded, oldest first) that start with prefix. It must be safe for
// concurrent use unless Options.Learn is set.
type Predictor interface {
	Predict(history []string, prefix string, k int, dst []string) []string
}

// PredictorFunc adapts a function to Predictor.
type PredictorFunc func(history []string, prefix string, k int, dst []string) []string

// Predict calls f.
func (f PredictorFunc) Predict(h []string, p string, k int, dst []string) []string {
	return f(h, p, k, dst)
}

// MaxK is the largest suggestion count measured.
const MaxK = 5

// Options controls Run. The zero value measures k = 3 on all cores.
type Options struct {
	K       int // suggestions shown (1..MaxK), default 3
	Workers int // parallel typists; default 1 per CPU given by the caller (0 = 1)
	// Learn, if not nil, is called with each sentence after it has been typed
	// (online personalisation). It forces one worker, in reading order.
	Learn func(sentence []string)
	// Progress, if not nil, is called with sentences done and total.
	Progress func(done, total int)
	// NoLatency skips timing calls (faster, for tests).
	NoLatency bool
}

// Report holds the measurements of one run.
type Report struct {
	K                  int       `json:"k"`
	Sentences          int       `json:"sentences"`
	Words              int64     `json:"words"`
	Letters            int64     `json:"letters"`
	Keystrokes         int64     `json:"keystrokes"`
	KeystrokesBaseline int64     `json:"keystrokes_baseline"`
	KSR                float64   `json:"ksr"`
	Ceiling            float64   `json:"ksr_ceiling"`
	KSRByK             []float64 `json:"ksr_by_k"` // k = 1..MaxK
	Top1               float64   `json:"top1"`
	Top3               float64   `json:"top3"`
	HitByPrefix        []float64 `json:"hit_by_prefix"` // prefix length 0, 1, 2, 3+
	LatencyP50us       float64   `json:"latency_p50_us"`
	LatencyP99us       float64   `json:"latency_p99_us"`
	Queries            int64     `json:"queries"`
	Partial            bool      `json:"partial,omitempty"` // stopped early (cancelled)
}

type tally struct {
	words, letters, top1, top3 int64
	used                       [MaxK + 1]int64 // keystrokes per k
	hit, seen                  [4]int64
	queries                    int64
	lat                        []time.Duration
	sentences                  int
}

func (t *tally) add(o *tally) {
	t.words += o.words
	t.letters += o.letters
	t.top1 += o.top1
	t.top3 += o.top3
	for i := range t.used {
		t.used[i] += o.used[i]
	}
	for i := range t.hit {
		t.hit[i] += o.hit[i]
		t.seen[i] += o.seen[i]
	}
	t.queries += o.queries
	t.lat = append(t.lat, o.lat...)
	t.sentences += o.sentences
}

// typeSentence simulates the typist on one sentence.
func typeSentence(p Predictor, sent []string, opts *Options, t *tally, buf []string) []string {
	var runes []int // byte offset after each rune
	for i, w := range sent {
		hist := sent[:i]
		runes = runes[:0]
		for j := range w {
			if j > 0 {
				runes = append(runes, j)
			}
		}
		runes = append(runes, len(w))
		n := len(runes) // letters
		t.words++
		t.letters += int64(n)
		// firstHit[k] = letters typed when the word first shows among k suggestions
		var firstHit [MaxK + 1]int
		for k := range firstHit {
			firstHit[k] = -1
		}
		for L := 0; L < n; L++ {
			prefix := ""
			if L > 0 {
				prefix = w[:runes[L-1]]
			}
			var start time.Time
			if !opts.NoLatency {
				start = time.Now()
			}
			buf = p.Predict(hist, prefix, MaxK, buf[:0])
			if !opts.NoLatency {
				t.lat = append(t.lat, time.Since(start))
			}
			t.queries++
			pos := slices.Index(buf, w) // rank of the word, -1 if absent
			if L == 0 {
				if pos == 0 {
					t.top1++
				}
				if pos >= 0 && pos < 3 {
					t.top3++
				}
			}
			b := min(L, 3)
			t.seen[b]++
			if pos >= 0 && pos < opts.K {
				t.hit[b]++
			}
			for k := 1; k <= MaxK; k++ {
				if firstHit[k] < 0 && pos >= 0 && pos < k {
					firstHit[k] = L
				}
			}
		}
		for k := 1; k <= MaxK; k++ {
			if firstHit[k] >= 0 {
				t.used[k] += int64(firstHit[k]) + 1
			} else {
				t.used[k] += int64(n) + 1
			}
		}
	}
	t.sentences++
	return buf
}

// Run types every sentence (folded words) with p and returns the measurements.
// Results other than latency do not depend on the number of workers. When ctx
// is cancelled Run returns what it measured so far with Partial set.
func Run(ctx context.Context, p Predictor, sentences [][]string, opts Options) (Report, error) {
	if opts.K <= 0 {
		opts.K = 3
	}
	opts.K = min(opts.K, MaxK)
	workers := max(1, opts.Workers)
	if opts.Learn != nil {
		workers = 1
	}
	var total tally
	var mu sync.Mutex
	done := 0
	partial := false
	if workers == 1 {
		var buf []string
		for i, s := range sentences {
			if ctx.Err() != nil {
				partial = true
				break
			}
			buf = typeSentence(p, s, &opts, &total, buf)
			if opts.Learn != nil {
				opts.Learn(s)
			}
			if opts.Progress != nil && (i&63 == 63 || i == len(sentences)-1) {
				opts.Progress(i+1, len(sentences))
			}
		}
	} else {
		var wg sync.WaitGroup
		next := 0
		for range workers {
			wg.Add(1)
			go func() {
				defer wg.Done()
				var t tally
				var buf []string
				for {
					mu.Lock()
					if next >= len(sentences) || ctx.Err() != nil {
						if next < len(sentences) {
							partial = true
						}
						mu.Unlock()
						break
					}
					lo := next
					hi := min(next+32, len(sentences))
					next = hi
					mu.Unlock()
					for _, s := range sentences[lo:hi] {
						buf = typeSentence(p, s, &opts, &t, buf)
					}
					mu.Lock()
					done += hi - lo
					if opts.Progress != nil {
						opts.Progress(done, len(sentences))
					}
					mu.Unlock()
				}
				mu.Lock()
				total.add(&t)
				mu.Unlock()
			}()
		}
		wg.Wait()
	}
	return report(&total, opts.K, partial), nil
}

func report(t *tally, k int, partial bool) Report {
	r := Report{K: k, Sentences: t.sentences, Words: t.words, Letters: t.letters, Queries: t.queries, Partial: partial}
	r.KeystrokesBaseline = t.letters + t.words
	r.Keystrokes = t.used[k]
	if r.KeystrokesBaseline > 0 {
		base := float64(r.KeystrokesBaseline)
		r.KSR = 1 - float64(r.Keystrokes)/base
		r.Ceiling = 1 - float64(t.words)/base
		for j := 1; j <= MaxK; j++ {
			r.KSRByK = append(r.KSRByK, 1-float64(t.used[j])/base)
		}
	}
	if t.words > 0 {
		r.Top1 = float64(t.top1) / float64(t.words)
		r.Top3 = float64(t.top3) / float64(t.words)
	}
	for b := range 4 {
		v := 0.0
		if t.seen[b] > 0 {
			v = float64(t.hit[b]) / float64(t.seen[b])
		}
		r.HitByPrefix = append(r.HitByPrefix, v)
	}
	if len(t.lat) > 0 {
		slices.Sort(t.lat)
		r.LatencyP50us = float64(t.lat[len(t.lat)/2].Nanoseconds()) / 1e3
		r.LatencyP99us = float64(t.lat[min(len(t.lat)-1, len(t.lat)*99/100)].Nanoseconds()) / 1e3
	}
	return r
}
