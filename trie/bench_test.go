package trie

import (
	"bufio"
	"fmt"
	"math/rand/v2"
	"os"
	"sort"
	"strconv"
	"strings"
	"testing"
)

// benchWords returns every 37th SUBTLEX-US word, a spread over the
// alphabet, in a fixed order.
func benchWords(b *testing.B, c *corpusLexicon) []string {
	b.Helper()
	var ws []string
	for i := 0; i < len(c.words); i += 37 {
		ws = append(ws, c.words[i])
	}
	return ws
}

// BenchmarkID measures word → id over the SUBTLEX-US lexicon, with vellum's
// own Get on the same FST as a reference point.
func BenchmarkID(b *testing.B) {
	c := loadCorpus(b, subtlexPath)
	ws := benchWords(b, c)
	b.Run("lexicon", func(b *testing.B) {
		b.ReportAllocs()
		i := 0
		for b.Loop() {
			if _, ok := c.lex.ID(ws[i]); !ok {
				b.Fatalf("ID(%q) not found", ws[i])
			}
			i = (i + 1) % len(ws)
		}
	})
	b.Run("vellum-get", func(b *testing.B) {
		b.ReportAllocs()
		f := c.lex.FST()
		keys := make([][]byte, len(ws))
		for i, w := range ws {
			keys[i] = []byte(w)
		}
		i := 0
		for b.Loop() {
			if _, ok, err := f.Get(keys[i]); !ok || err != nil {
				b.Fatalf("Get(%q) = %v, %v", keys[i], ok, err)
			}
			i = (i + 1) % len(keys)
		}
	})
}

// BenchmarkAppendWord measures id → word. The version-2 layout the writer
// uses (no word table) is run three ways on two id streams: "fst" is the
// uncached walk down the FST (the code before the word cache, kept as the
// baseline), "cache" is AppendWord with its word cache on a lexicon loaded
// for the run; "zipf" draws ids in proportion to their SUBTLEX-US counts
// (the words a keyboard shows again and again), "uniform" steps through all
// ids. block=N are version-1 word tables of several block sizes (the trade
// of table size against decoding time), on the uniform stream.
func BenchmarkAppendWord(b *testing.B) {
	c := loadCorpus(b, subtlexPath)
	streams := []struct {
		name string
		ids  []uint32
	}{{"zipf", zipfIDs(b, c, 1<<16)}, {"uniform", uniformIDs(uint32(len(c.words)), 1<<16)}}
	for _, st := range streams {
		for _, mode := range []string{"fst", "cache"} {
			b.Run(fmt.Sprintf("v2-%s/%s", mode, st.name), func(b *testing.B) {
				lex, err := LoadSection(c.section)
				if err != nil {
					b.Fatal(err)
				}
				buf := make([]byte, 0, MaxWordLen)
				ids := st.ids
				b.ReportAllocs()
				i := 0
				for b.Loop() {
					if mode == "fst" {
						buf = lex.fstWord(buf[:0], ids[i])
					} else {
						buf = lex.AppendWord(buf[:0], ids[i])
					}
					i = (i + 1) & (len(ids) - 1)
				}
				if mode == "cache" {
					hits := 0
					for _, id := range ids {
						if _, ok := lex.cache.Load().appendWord(buf[:0], id); ok {
							hits++
						}
					}
					b.ReportMetric(float64(hits)/float64(len(ids)), "hit-ratio")
				}
			})
		}
	}
	ids := uniformIDs(uint32(len(c.words)), 1<<16)
	for _, bs := range []int{4, 8, blockSize, 32} {
		sec, err := appendSection(nil, c.entries, bs)
		if err != nil {
			b.Fatal(err)
		}
		lex, err := LoadSection(sec)
		if err != nil {
			b.Fatal(err)
		}
		b.Run(fmt.Sprintf("block=%d", bs), func(b *testing.B) {
			buf := make([]byte, 0, MaxWordLen)
			b.ReportAllocs()
			i := 0
			for b.Loop() {
				buf = lex.AppendWord(buf[:0], ids[i])
				i = (i + 1) & (len(ids) - 1)
			}
			_, tb, _ := lex.SizeBreakdown()
			b.ReportMetric(float64(tb)/float64(lex.Len()), "table-bytes/word")
		})
	}
}

// uniformIDs returns k ids below n, stepping by a prime so that every id
// comes up.
func uniformIDs(n uint32, k int) []uint32 {
	ids := make([]uint32, k)
	var id uint32
	for i := range ids {
		ids[i] = id
		id = (id + 7919) % n
	}
	return ids
}

// zipfIDs returns k ids drawn (with a fixed seed) in proportion to the
// SUBTLEX-US counts of their words: real word frequencies, which follow
// Zipf's law.
func zipfIDs(b *testing.B, c *corpusLexicon, k int) []uint32 {
	b.Helper()
	f, err := os.Open(subtlexPath)
	if err != nil {
		b.Fatal(err)
	}
	defer f.Close()
	var ids []uint32
	var cum []float64
	total := 0.0
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		w, cnt, ok := strings.Cut(sc.Text(), "\t")
		if !ok || strings.HasPrefix(w, "#") {
			continue
		}
		n, err := strconv.ParseFloat(cnt, 64)
		if err != nil {
			continue
		}
		id, ok := c.lex.ID(strings.ToLower(w))
		if !ok {
			b.Fatalf("SUBTLEX-US word %q not in its lexicon", w)
		}
		total += n
		ids = append(ids, id)
		cum = append(cum, total)
	}
	if err := sc.Err(); err != nil {
		b.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(1, 2))
	out := make([]uint32, k)
	for i := range out {
		out[i] = ids[sort.SearchFloat64s(cum, rng.Float64()*total)]
	}
	return out
}

// BenchmarkAppendSurface measures id → display form, in version 2 (the
// list of exception ids and whole surfaces, kept as the baseline) and
// version 3 (the non-lower bitmap and exception records the writer uses),
// on the same words: every SUBTLEX-US id in a spread order (no
// exceptions); the 605 SCOWL words whose surface is an exception (few
// enough to stay in the word cache, which a mask record uses to spell
// the word); and the 1,800 exceptions of 5,000 synthetic words, more than
// the cache holds. It reports the casing bytes per word of each section.
func BenchmarkAppendSurface(b *testing.B) {
	scowl := loadCorpus(b, scowlPath)
	var scowlExc []uint32
	for id := uint32(0); id < uint32(scowl.lex.Len()); id++ {
		if scowl.lex.casing.code(id) == caseExcept {
			scowlExc = append(scowlExc, id)
		}
	}
	synth := manyExceptions(5000)
	var synthExc []uint32
	for i := range synth {
		if i%3 == 0 || i%50 == 0 {
			synthExc = append(synthExc, uint32(i))
		}
	}
	subtlex := loadCorpus(b, subtlexPath)
	sets := []struct {
		name    string
		entries []Entry
		ids     []uint32
	}{
		{"subtlex-all", subtlex.entries, uniformIDs(uint32(len(subtlex.entries)), 4096)},
		{"scowl-exceptions", scowl.entries, scowlExc},
		{"synthetic-exceptions", synth, synthExc},
	}
	for _, set := range sets {
		for _, version := range []uint16{listVersion, SectionVersion} {
			b.Run(fmt.Sprintf("%s/version=%d", set.name, version), func(b *testing.B) {
				sec, err := appendSectionVersion(nil, set.entries, version, 0)
				if err != nil {
					b.Fatal(err)
				}
				lex, err := LoadSection(sec)
				if err != nil {
					b.Fatal(err)
				}
				buf := make([]byte, 0, 2*MaxWordLen)
				b.ReportAllocs()
				i := 0
				for b.Loop() {
					buf = lex.AppendSurface(buf[:0], set.ids[i])
					if i++; i == len(set.ids) {
						i = 0
					}
				}
				_, _, cs := lex.SizeBreakdown()
				b.ReportMetric(float64(cs)/float64(lex.Len()), "casing-bytes/word")
			})
		}
	}
}

// BenchmarkPrefixRange measures prefix → id range for prefixes of 1 to 4
// bytes taken from SUBTLEX-US words.
func BenchmarkPrefixRange(b *testing.B) {
	c := loadCorpus(b, subtlexPath)
	ws := benchWords(b, c)
	for _, n := range []int{1, 2, 4} {
		var ps []string
		for _, w := range ws {
			if len(w) >= n {
				ps = append(ps, w[:n])
			}
		}
		b.Run(fmt.Sprintf("len=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			i := 0
			for b.Loop() {
				c.lex.PrefixRange(ps[i])
				i = (i + 1) % len(ps)
			}
		})
	}
}

// BenchmarkStep measures one FST transition, walking whole words.
func BenchmarkStep(b *testing.B) {
	c := loadCorpus(b, subtlexPath)
	ws := benchWords(b, c)
	b.Run("lexicon", func(b *testing.B) {
		b.ReportAllocs()
		i, steps := 0, 0
		for b.Loop() {
			w := ws[i]
			s := c.lex.Start()
			for j := 0; j < len(w); j++ {
				s, _, _ = c.lex.Step(s, w[j])
			}
			steps += len(w)
			i = (i + 1) % len(ws)
		}
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(steps), "ns/step")
	})
	b.Run("vellum-accept", func(b *testing.B) {
		b.ReportAllocs()
		f := c.lex.FST()
		i, steps := 0, 0
		for b.Loop() {
			w := ws[i]
			s := f.Start()
			for j := 0; j < len(w); j++ {
				s, _ = f.AcceptWithVal(s, w[j])
			}
			steps += len(w)
			i = (i + 1) % len(ws)
		}
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(steps), "ns/step")
	})
}

// BenchmarkBuild measures building the SUBTLEX-US section and reports its
// size per word, whole and for the FST alone.
func BenchmarkBuild(b *testing.B) {
	c := loadCorpus(b, subtlexPath)
	b.ReportAllocs()
	var sec []byte
	for b.Loop() {
		var err error
		if sec, err = AppendSection(sec[:0], c.entries); err != nil {
			b.Fatal(err)
		}
	}
	n := float64(len(c.entries))
	b.ReportMetric(float64(len(sec))/n, "bytes/word")
	lex, err := LoadSection(sec)
	if err != nil {
		b.Fatal(err)
	}
	f, _, _ := lex.SizeBreakdown()
	b.ReportMetric(float64(f)/n, "fst-bytes/word")
}

// BenchmarkLoad measures LoadSection (the checks and vellum's walk) and
// Check on the SUBTLEX-US section.
func BenchmarkLoad(b *testing.B) {
	c := loadCorpus(b, subtlexPath)
	b.Run("LoadSection", func(b *testing.B) {
		b.ReportAllocs()
		b.SetBytes(int64(len(c.section)))
		for b.Loop() {
			if _, err := LoadSection(c.section); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("Check", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			if err := c.lex.Check(); err != nil {
				b.Fatal(err)
			}
		}
	})
}
