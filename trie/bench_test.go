package trie

import (
	"fmt"
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

// BenchmarkAppendWord measures id → word over random-looking ids: block=0
// is the version-2 layout the writer uses (no word table, a walk down the
// FST), the others version-1 word tables of several block sizes (the trade
// of table size against decoding time).
func BenchmarkAppendWord(b *testing.B) {
	c := loadCorpus(b, subtlexPath)
	for _, bs := range []int{0, 4, 8, blockSize, 32} {
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
			n := uint32(lex.Len())
			b.ReportAllocs()
			var id uint32
			for b.Loop() {
				buf = lex.AppendWord(buf[:0], id)
				id = (id + 7919) % n
			}
			_, tb, _ := lex.SizeBreakdown()
			b.ReportMetric(float64(tb)/float64(n), "table-bytes/word")
		})
	}
}

// BenchmarkAppendSurface measures id → display form.
func BenchmarkAppendSurface(b *testing.B) {
	c := loadCorpus(b, subtlexPath)
	buf := make([]byte, 0, 2*MaxWordLen)
	n := uint32(c.lex.Len())
	b.ReportAllocs()
	var id uint32
	for b.Loop() {
		buf = c.lex.AppendSurface(buf[:0], id)
		id = (id + 7919) % n
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
