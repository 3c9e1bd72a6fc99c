package lm

import (
	"context"
	"fmt"
	"math/rand/v2"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
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
// Counter's maps, the figure behind spillEntryBytes (which adds the 24-byte
// sort-buffer entry a spill needs). Words are drawn at random so that almost
// every trigram is new.
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

// BenchmarkTallyGrowing counts 2M tokens of Zipf-distributed random words
// over the Opticks vocabulary (fixed seed), where — unlike repeated text —
// every chunk brings new n-grams, so workers do not each hold all of them.
// Compare workers=2 with workers=1 for the scaling across cores.
func BenchmarkTallyGrowing(b *testing.B) {
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
	const tokens = 2_000_000
	for i := range tokens {
		sb.WriteString(vocab[z.Uint64()])
		if i%15 == 14 {
			sb.WriteByte('\n')
		} else {
			sb.WriteByte(' ')
		}
	}
	corpus := sb.String()
	for _, workers := range []int{1, 2} {
		b.Run(fmt.Sprintf("workers=%d", workers), func(b *testing.B) {
			b.SetBytes(int64(len(corpus)))
			for b.Loop() {
				tl, err := NewTally(TallyOptions{Order: 3, Workers: workers, TempDir: b.TempDir()})
				if err != nil {
					b.Fatal(err)
				}
				if err := tl.AddText(context.Background(), strings.NewReader(corpus), ScanOptions{Pretokenized: true}, nil); err != nil {
					b.Fatal(err)
				}
				if _, err := tl.Counts(context.Background()); err != nil {
					b.Fatal(err)
				}
				tl.Close()
			}
			b.ReportMetric(float64(tokens)*float64(b.N)/b.Elapsed().Seconds()/1e6, "Mtokens/s")
		})
	}
}
