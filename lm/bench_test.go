package lm

import (
	"context"
	"encoding/binary"
	"flag"
	"fmt"
	"path/filepath"
	"runtime"
	"sort"
	"strings"
	"testing"
)

// BenchmarkBuild counts and estimates an order-3 model from the Opticks
// training text repeated to the given number of tokens, on one goroutine.
func BenchmarkBuild(b *testing.B) {
	text := readFile(b, filepath.Join("testdata", "opticks-train.txt"))
	perCopy := len(strings.Fields(text))
	for _, tokens := range []int{1_000_000, 10_000_000} {
		reps := max(1, tokens/perCopy)
		corpus := strings.Repeat(text, reps)
		b.Run(fmt.Sprintf("tokens=%dM", tokens/1_000_000), func(b *testing.B) {
			b.SetBytes(int64(len(corpus)))
			b.ReportAllocs()
			var ms runtime.MemStats
			var peak uint64
			for b.Loop() {
				c, _ := NewCounter(3)
				if err := c.AddText(context.Background(), strings.NewReader(corpus), ScanOptions{Pretokenized: true}, nil); err != nil {
					b.Fatal(err)
				}
				m, err := Estimate(context.Background(), c, EstimateOptions{})
				if err != nil {
					b.Fatal(err)
				}
				runtime.ReadMemStats(&ms)
				peak = max(peak, ms.HeapInuse)
				_ = m
			}
			b.ReportMetric(float64(perCopy*reps)*float64(b.N)/b.Elapsed().Seconds()/1e6, "Mtokens/s")
			b.ReportMetric(float64(peak)/(1<<20), "heapMB")
		})
	}
}

func benchModel(b *testing.B, qbits int) built {
	return buildText(b, readFile(b, filepath.Join("testdata", "opticks-train.txt")), 3, ScanOptions{Pretokenized: true}, qbits)
}

// BenchmarkTopK measures next-word prediction for 2-word contexts taken
// from the test text, with and without a typed-prefix restriction, and a
// bigram-context LogProb, for the version-2 layout (plain word IDs, the
// baseline), version 3 (ranked records at the highest order), version 4
// (and Elias-Fano word groups), version 5 (and coded ranks) and the
// current one (counts instead of probability codes at the highest order).
func BenchmarkTopK(b *testing.B) {
	x := benchModel(b, 8)
	test := strings.Fields(readFile(b, filepath.Join("testdata", "opticks-test.txt")))
	var ctxs [][]uint32
	var nexts []uint32
	var prefixes [][2]uint32
	for i := 2; i < len(test) && len(ctxs) < 512; i++ {
		ctxs = append(ctxs, x.ids(b, test[i-2:i]))
		nexts = append(nexts, x.ids(b, test[i:i+1])[0])
		p := test[i][:min(2, len(test[i]))]
		lo := sort.SearchStrings(x.b.Vocab, p)
		hi := sort.Search(len(x.b.Vocab), func(j int) bool {
			return x.b.Vocab[j] >= p && !strings.HasPrefix(x.b.Vocab[j], p)
		})
		prefixes = append(prefixes, [2]uint32{uint32(lo), uint32(hi)})
	}
	for _, ver := range []int{2, 3, 4, 5, sectionVersion} {
		sec, err := AppendSection(nil, x.b, LayoutOptions{QuantBits: 8, Version: ver})
		if err != nil {
			b.Fatal(err)
		}
		m, err := LoadSection(sec)
		if err != nil {
			b.Fatal(err)
		}
		V := uint32(m.VocabSize())
		dst := make([]Scored, 0, MaxK)
		b.Run(fmt.Sprintf("v%d/next-word/k=3", ver), func(b *testing.B) {
			defer threadCPUPerOp(b)()
			i := 0
			for b.Loop() {
				dst = m.TopK(ctxs[i%len(ctxs)], 0, V, 3, dst[:0])
				i++
			}
		})
		b.Run(fmt.Sprintf("v%d/prefix2/k=3", ver), func(b *testing.B) {
			defer threadCPUPerOp(b)()
			i := 0
			for b.Loop() {
				r := prefixes[i%len(prefixes)]
				dst = m.TopK(ctxs[i%len(ctxs)], r[0], r[1], 3, dst[:0])
				i++
			}
		})
		b.Run(fmt.Sprintf("v%d/logprob", ver), func(b *testing.B) {
			defer threadCPUPerOp(b)()
			i := 0
			for b.Loop() {
				c := ctxs[i%len(ctxs)]
				m.LogProb(c[:1], c[1])
				i++
			}
		})
		b.Run(fmt.Sprintf("v%d/logprob-trigram", ver), func(b *testing.B) {
			defer threadCPUPerOp(b)()
			i := 0
			for b.Loop() {
				j := i % len(ctxs)
				m.LogProb(ctxs[j], nexts[j])
				i++
			}
		})
	}
}

// threadCPUPerOp locks the benchmark to its thread, turns on allocation
// reports and returns a function that reports the thread's CPU time per
// operation ("cpu-ns/op", where the platform has a thread clock): on a
// shared machine it moves less than wall time, which counts the time the
// thread waits for a core.
func threadCPUPerOp(b *testing.B) func() {
	b.Helper()
	runtime.LockOSThread()
	b.ReportAllocs()
	c0 := threadClock()
	return func() {
		if threadClockOK && b.N > 0 {
			b.ReportMetric(float64(threadClock()-c0)/float64(b.N), "cpu-ns/op")
		}
		runtime.UnlockOSThread()
	}
}

// layoutText is a text file for BenchmarkLayout's large case: running
// text (one sentence or paragraph per line, tokenized as the build tool
// does), such as the ~10 M-token dictionary and documentation text of
// BENCHMARKS.md, which is not shipped (its licence). Without it only the
// Opticks model is measured.
var layoutText = flag.String("layout-text", "", "text file for BenchmarkLayout's order-3 model of real text (optional)")

// BenchmarkLayout reports the size of the n-gram section per stored n-gram,
// in all and for each kind of array (codebooks, words, probabilities, ...):
// on the Opticks order-3 model at 8 bits and lossless, and, with
// -layout-text, on an order-3 model of that text at 8 bits; each in the
// current layout, in version 5 (probability codes at the highest order),
// version 4 (ranks of fixed width) and version 3 (plain bigram words), for
// comparison.
func BenchmarkLayout(b *testing.B) {
	x := benchModel(b, 0)
	for _, q := range []int{8, 0} {
		for _, v := range []int{sectionVersion, 5, 4, 3} {
			b.Run(fmt.Sprintf("opticks/v%d/qbits=%d", v, q), func(b *testing.B) { benchLayout(b, x.b, q, v) })
		}
	}
	if *layoutText == "" {
		return
	}
	text := readFile(b, *layoutText)
	c, err := NewCounter(3)
	if err != nil {
		b.Fatal(err)
	}
	if err := c.AddText(context.Background(), strings.NewReader(text), ScanOptions{}, nil); err != nil {
		b.Fatal(err)
	}
	m, err := Estimate(context.Background(), c, EstimateOptions{})
	if err != nil {
		b.Fatal(err)
	}
	for _, v := range []int{sectionVersion, 5, 4, 3} {
		b.Run(fmt.Sprintf("text/v%d/qbits=8", v), func(b *testing.B) { benchLayout(b, m, 8, v) })
	}
}

// benchLayout lays m out at q bits in layout version v and reports bytes
// per n-gram, in all and per array kind.
func benchLayout(b *testing.B, m *Backoff, q, v int) {
	b.Helper()
	var sec []byte
	for b.Loop() {
		var err error
		if sec, err = AppendSection(sec[:0], m, LayoutOptions{QuantBits: q, Version: v}); err != nil {
			b.Fatal(err)
		}
	}
	total := 0
	for _, n := range m.NGrams() {
		total += n
	}
	b.ReportMetric(float64(len(sec))/float64(total), "bytes/ngram")
	for kind, bytes := range arrayBytes(b, sec) {
		b.ReportMetric(float64(bytes)/float64(total), kind+"-bytes/ngram")
	}
}

// arrayBytes returns the bytes of a section's arrays by kind, read from
// its directory (FORMAT.md): the tree levels together as "tree".
func arrayBytes(b *testing.B, sec []byte) map[string]int {
	b.Helper()
	names := map[uint32]string{
		tagProbBook: "codebook", tagBowBook: "codebook", tagWords: "words", tagProbs: "probs",
		tagHas: "context-bits", tagHasRank: "context-bits", tagStart: "starts", tagStartLow: "starts",
		tagStartHigh: "starts", tagStartSel: "starts", tagBow: "bows", tagBig: "top-lists",
		tagBigRank: "top-lists", tagTop: "top-lists", tagRecords: "records", tagRecCount: "records",
		tagGroups: "words", tagGroupLow: "group-offsets", tagGroupHigh: "group-offsets", tagGroupSel: "group-offsets",
		tagDiscounts: "records",
	}
	le := binary.LittleEndian
	out := map[string]int{}
	nd := int(le.Uint32(sec[32:]))
	for i := range nd {
		d := sec[headerSize+i*dirEntrySize:]
		kind := le.Uint32(d) >> 8
		name, ok := names[kind]
		if !ok && kind >= tagTree && kind < tagRecords { // kinds 16..39
			name, ok = "tree", true
		}
		if !ok {
			b.Fatalf("array kind %d has no name", kind)
		}
		out[name] += 8 * int(le.Uint64(d[24:]))
	}
	return out
}
