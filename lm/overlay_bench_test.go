package lm

import (
	"runtime"
	"slices"
	"strings"
	"testing"
	"time"
)

// benchOverlay returns the demo-80/20 base model and an overlay that has
// learned the first 80 % of the demo corpus, plus the typed part.
func benchOverlay(b testing.TB) (ksrData, *Overlay, [][]string) {
	b.Helper()
	d := ksrSetup(b)
	ov, err := NewOverlay(d.base.m, bvocab{d.base.b}, OverlayOptions{})
	if err != nil {
		b.Fatal(err)
	}
	cut := len(d.sentences) * 8 / 10
	learnAll(ov, d.sentences[:cut])
	return d, ov, d.sentences[cut:]
}

// BenchmarkOverlayLearn learns 12-word sentences into a warm overlay
// (target: median ≤ 20 µs). It reports the median wall time alongside the
// mean, and (on Linux) the median CPU time of the benchmark's thread, which
// other jobs on a shared machine do not inflate. The overlay has learned
// the first 80 % of the demo corpus; the timed sentences are the 12-word
// openings of the last 20 %, taken in turn.
func BenchmarkOverlayLearn(b *testing.B) {
	_, ov, test := benchOverlay(b)
	var texts []string
	for _, s := range test {
		if len(s) >= 12 {
			texts = append(texts, strings.Join(s[:12], " ")+".")
		}
	}
	runtime.LockOSThread()
	defer runtime.UnlockOSThread()
	b.ReportAllocs()
	var wall, cpu []time.Duration
	i := 0
	for b.Loop() {
		c0, t0 := threadClock(), time.Now()
		ov.Learn(texts[i%len(texts)], 100)
		wall = append(wall, time.Since(t0))
		cpu = append(cpu, threadClock()-c0)
		i++
	}
	slices.Sort(wall)
	slices.Sort(cpu)
	b.ReportMetric(float64(wall[len(wall)/2].Nanoseconds()), "median-ns")
	if threadClockOK {
		b.ReportMetric(float64(cpu[len(cpu)/2].Nanoseconds()), "median-cpu-ns")
	}
	b.ReportMetric(float64(ov.Entries()), "entries")
}

// BenchmarkOverlayAppendSection saves an overlay of about 10k n-grams
// (target: ≤ 20 ms).
func BenchmarkOverlayAppendSection(b *testing.B) {
	d := ksrSetup(b)
	ov, err := NewOverlay(d.base.m, bvocab{d.base.b}, OverlayOptions{MaxEntries: 10000})
	if err != nil {
		b.Fatal(err)
	}
	learnAll(ov, d.sentences)
	var buf []byte
	b.ReportAllocs()
	for b.Loop() {
		buf = ov.AppendSection(buf[:0])
	}
	b.SetBytes(int64(len(buf)))
	b.ReportMetric(float64(ov.Entries()), "ngrams")
	b.ReportMetric(float64(len(buf))/float64(ov.Entries()), "bytes/ngram")
}

// BenchmarkOverlayLoad reads the section saved above back.
func BenchmarkOverlayLoad(b *testing.B) {
	d := ksrSetup(b)
	ov, err := NewOverlay(d.base.m, bvocab{d.base.b}, OverlayOptions{MaxEntries: 10000})
	if err != nil {
		b.Fatal(err)
	}
	learnAll(ov, d.sentences)
	buf := ov.AppendSection(nil)
	b.ReportAllocs()
	b.SetBytes(int64(len(buf)))
	for b.Loop() {
		if _, err := LoadOverlay(buf, d.base.m, bvocab{d.base.b}, OverlayOptions{}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkOverlayTopK compares next-word and prefix queries (k = 3) of the
// base model alone with the same queries through a warm overlay's blend
// (target: blend ≤ 1.5 × base).
func BenchmarkOverlayTopK(b *testing.B) {
	d, ov, test := benchOverlay(b)
	v := ov.View()
	type q struct {
		ctx    []uint32
		prefix string
		lo, hi uint32
	}
	var next, pre, pre1, pre3 []q
	for _, s := range test {
		ctx := []uint32{v.bos}
		for _, w := range s {
			c := ctx[max(0, len(ctx)-2):]
			lo, hi := prefixRange(d.base.b.Vocab, "")
			next = append(next, q{c, "", lo, hi})
			p := w[:min(2, len(w))]
			lo, hi = prefixRange(d.base.b.Vocab, p)
			pre = append(pre, q{c, p, lo, hi})
			p = w[:min(1, len(w))]
			lo, hi = prefixRange(d.base.b.Vocab, p)
			pre1 = append(pre1, q{c, p, lo, hi})
			p = w[:min(3, len(w))]
			lo, hi = prefixRange(d.base.b.Vocab, p)
			pre3 = append(pre3, q{c, p, lo, hi})
			id, ok := v.ID(w)
			if !ok {
				id = v.unk
			}
			ctx = append(ctx, id)
		}
		if len(next) > 2048 {
			break
		}
	}
	baseCtx := func(c []uint32) []uint32 {
		out := make([]uint32, len(c))
		for i, t := range c {
			if t >= v.V {
				t = v.unk
			}
			out[i] = t
		}
		return out
	}
	dst := make([]Scored, 0, MaxK)
	for _, set := range []struct {
		name string
		qs   []q
	}{{"next-word", next}, {"prefix1", pre1}, {"prefix2", pre}, {"prefix3", pre3}} {
		based := make([][]uint32, len(set.qs))
		for i, x := range set.qs {
			based[i] = baseCtx(x.ctx)
		}
		b.Run(set.name+"/base", func(b *testing.B) {
			b.ReportAllocs()
			i := 0
			for b.Loop() {
				x := set.qs[i%len(set.qs)]
				dst = d.base.m.TopK(based[i%len(set.qs)], x.lo, x.hi, 3, dst[:0])
				i++
			}
		})
		b.Run(set.name+"/blend", func(b *testing.B) {
			b.ReportAllocs()
			i := 0
			for b.Loop() {
				x := set.qs[i%len(set.qs)]
				dst = ov.View().TopK(x.ctx, x.prefix, x.lo, x.hi, 3, dst[:0])
				i++
			}
		})
	}
}
