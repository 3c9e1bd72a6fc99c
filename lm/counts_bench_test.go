package lm

import (
	"context"
	"fmt"
	"math/rand/v2"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
	"time"
	"unicode"
	"unicode/utf8"
)

// BenchmarkTally counts (without estimating) the Opticks training text
// repeated to about 1M tokens, pretokenized, order 3, with 1 and 2 workers,
// with and without a memory budget that forces spills. Mtokens/s is the
// throughput; compare workers=2 with workers=1 for the scaling.
func BenchmarkTally(b *testing.B) {
	text := readFile(b, filepath.Join("testdata", "opticks-train.txt"))
	perCopy := len(strings.Fields(text))
	reps := max(1, 1_000_000/perCopy)
	corpus := strings.Repeat(text, reps)
	for _, workers := range []int{1, 2} {
		for _, mem := range []int64{0, 8 << 20} {
			b.Run(fmt.Sprintf("workers=%d/mem=%dMB", workers, mem>>20), func(b *testing.B) {
				b.SetBytes(int64(len(corpus)))
				b.ReportAllocs()
				spills := 0
				for b.Loop() {
					tl, err := NewTally(TallyOptions{Order: 3, Workers: workers, MemBudget: mem, TempDir: b.TempDir()})
					if err != nil {
						b.Fatal(err)
					}
					if err := tl.AddText(context.Background(), strings.NewReader(corpus), ScanOptions{Pretokenized: true}, nil); err != nil {
						b.Fatal(err)
					}
					if _, err := tl.Counts(context.Background()); err != nil {
						b.Fatal(err)
					}
					spills += tl.Spills()
					tl.Close()
				}
				b.ReportMetric(float64(perCopy*reps)*float64(b.N)/b.Elapsed().Seconds()/1e6, "Mtokens/s")
				b.ReportMetric(float64(spills)/float64(b.N), "runs/op")
			})
		}
	}
}

// BenchmarkMapEntryBytes measures the heap bytes an n-gram takes in a
// Counter's tables, the figure behind spillEntryBytes (which adds the
// 16-byte sort buffers a spill needs and slack for a table doubling). Words
// are drawn at random so that almost every trigram is new.
func BenchmarkMapEntryBytes(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 2))
	words := make([][]byte, 5000)
	for i := range words {
		words[i] = fmt.Appendf(nil, "w%d", i)
	}
	sent := make([][]byte, 20)
	var perEntry float64
	for b.Loop() {
		var before, after runtime.MemStats
		runtime.GC()
		runtime.ReadMemStats(&before)
		c, _ := NewCounter(3)
		for range 20000 {
			for i := range sent {
				sent[i] = words[rng.IntN(len(words))]
			}
			if err := c.AddSentence(sent, nil); err != nil {
				b.Fatal(err)
			}
		}
		runtime.GC()
		runtime.ReadMemStats(&after)
		perEntry = float64(after.HeapAlloc-before.HeapAlloc) / float64(c.entries())
		runtime.KeepAlive(c)
	}
	b.ReportMetric(perEntry, "bytes/entry")
}

// growingText returns tokens Zipf-distributed random words over the
// Opticks vocabulary (fixed seed), 15 to a sentence: unlike repeated text,
// every chunk brings new n-grams. Pretokenized, a sentence is a line of
// white-space separated words; as running text, the same words with the
// first capitalized and a full stop at the end, so that the running-text
// scanner (normalization, punctuation, folding, casing) does its whole job.
func growingText(b *testing.B, tokens int, running bool) string {
	b.Helper()
	words := strings.Fields(readFile(b, filepath.Join("testdata", "opticks-train.txt")))
	seen := map[string]bool{}
	var vocab []string
	for _, w := range words {
		if !seen[w] {
			seen[w] = true
			vocab = append(vocab, w)
		}
	}
	rng := rand.New(rand.NewPCG(3, 4))
	z := rand.NewZipf(rng, 1.1, 2, uint64(len(vocab)-1))
	var sb strings.Builder
	for i := range tokens {
		w := vocab[z.Uint64()]
		if running && i%15 == 0 {
			r, size := utf8.DecodeRuneInString(w)
			w = string(unicode.ToUpper(r)) + w[size:]
		}
		sb.WriteString(w)
		switch {
		case i%15 != 14:
			sb.WriteByte(' ')
		case running:
			sb.WriteString(".\n")
		default:
			sb.WriteByte('\n')
		}
	}
	return sb.String()
}

// BenchmarkTallyGrowing counts 2M tokens of growingText, order 3, the way
// a build sees them: tokenizing, counting with 1 and 2 workers, and making
// the final-ID tables (Counts). Metrics: Mtokens/s over wall time (compare
// workers=2 with workers=1 for the scaling across cores, on a quiet
// machine), Mtokens/cpu-s over the CPU time of the whole process (the
// per-core throughput, which other jobs on the machine disturb less), and
// counts-ms, the wall time of Counts alone.
func BenchmarkTallyGrowing(b *testing.B) {
	const tokens = 2_000_000
	for _, running := range []bool{false, true} {
		corpus := growingText(b, tokens, running)
		name := "tokenized"
		if running {
			name = "running"
		}
		for _, workers := range []int{1, 2} {
			b.Run(fmt.Sprintf("%s/workers=%d", name, workers), func(b *testing.B) {
				b.SetBytes(int64(len(corpus)))
				var counted int64
				var inCounts time.Duration
				cpu0 := cpuTime()
				for b.Loop() {
					tl, err := NewTally(TallyOptions{Order: 3, Workers: workers, TempDir: b.TempDir()})
					if err != nil {
						b.Fatal(err)
					}
					if err := tl.AddText(context.Background(), strings.NewReader(corpus), ScanOptions{Pretokenized: !running}, nil); err != nil {
						b.Fatal(err)
					}
					start := time.Now()
					if _, err := tl.Counts(context.Background()); err != nil {
						b.Fatal(err)
					}
					inCounts += time.Since(start)
					counted += tl.Tokens()
					tl.Close()
				}
				cpu := cpuTime() - cpu0
				b.ReportMetric(float64(counted)/b.Elapsed().Seconds()/1e6, "Mtokens/s")
				if cpu > 0 {
					b.ReportMetric(float64(counted)/cpu.Seconds()/1e6, "Mtokens/cpu-s")
				}
				b.ReportMetric(float64(inCounts.Milliseconds())/float64(b.N), "counts-ms")
			})
		}
	}
}

// BenchmarkCounterAddSentence counts the sentences of 2M tokens of
// growingText, already split into tokens, with one Counter (order 3): the
// cost of the n-gram tables alone, without tokenizing, merging or sorting.
func BenchmarkCounterAddSentence(b *testing.B) {
	var sents [][][]byte
	for line := range strings.Lines(growingText(b, 2_000_000, false)) {
		var sent [][]byte
		for _, w := range strings.Fields(line) {
			sent = append(sent, []byte(w))
		}
		sents = append(sents, sent)
	}
	tokens := 0
	cpu0 := cpuTime()
	for b.Loop() {
		c, _ := NewCounter(3)
		for _, s := range sents {
			if err := c.AddSentence(s, nil); err != nil {
				b.Fatal(err)
			}
		}
		tokens += int(c.Tokens())
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(tokens), "ns/token")
	if cpu := cpuTime() - cpu0; cpu > 0 {
		b.ReportMetric(float64(cpu.Nanoseconds())/float64(tokens), "cpu-ns/token")
	}
}
