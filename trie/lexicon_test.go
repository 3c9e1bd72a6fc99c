package trie

import (
	"fmt"
	"sort"
	"strings"
	"sync"
	"testing"
)

// TestRoundTripSubtlex checks every SUBTLEX-US word, in the layout the
// writer uses (version 2, words rebuilt from the FST) and in version 1
// (front-coded word table): its id is its position in the list sorted by
// Go's sort.Strings (found with sort.SearchStrings, the reference for byte
// order), and AppendWord and Word give the word back.
func TestRoundTripSubtlex(t *testing.T) {
	c := loadCorpus(t, subtlexPath)
	v1, err := appendSection(nil, c.entries, blockSize)
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name string
		sec  []byte
	}{{"version=2", c.section}, {"version=1", v1}} {
		t.Run(tc.name, func(t *testing.T) {
			lex, err := LoadSection(tc.sec)
			if err != nil {
				t.Fatal(err)
			}
			if lex.Len() != len(c.words) {
				t.Fatalf("Len() = %d, want %d", lex.Len(), len(c.words))
			}
			buf := make([]byte, 0, MaxWordLen)
			for _, w := range c.words {
				id, ok := lex.ID(w)
				want := sort.SearchStrings(c.words, w) // Go stdlib: position in byte order
				if !ok || int(id) != want {
					t.Fatalf("ID(%q) = %d, %v, want %d, true", w, id, ok, want)
				}
				if got := lex.AppendWord(buf[:0], id); string(got) != w {
					t.Fatalf("AppendWord(%d) = %q, want %q", id, got, w)
				}
				if got := lex.Word(id); got != w {
					t.Fatalf("Word(%d) = %q, want %q", id, got, w)
				}
			}
			if err := lex.Check(); err != nil {
				t.Fatalf("Check() = %v", err)
			}
		})
	}
}

// TestIDAbsent checks words that are not in the SUBTLEX-US list (checked
// against the list itself with sort.SearchStrings).
func TestIDAbsent(t *testing.T) {
	c := loadCorpus(t, subtlexPath)
	for _, w := range []string{"", "zzzzzzzz", "qxj", "the ", "aaaaaaa", "\xff", "caf\u00e9x", strings.Repeat("a", 300)} {
		t.Run(w, func(t *testing.T) {
			if i := sort.SearchStrings(c.words, w); i < len(c.words) && c.words[i] == w {
				t.Fatalf("test word %q is in the list", w)
			}
			if id, ok := c.lex.ID(w); ok {
				t.Errorf("ID(%q) = %d, true, want false", w, id)
			}
		})
	}
}

// TestWordOutOfRange checks that ids at or past Len give nothing.
func TestWordOutOfRange(t *testing.T) {
	_, lex := build(t, "a", "b")
	for _, id := range []uint32{2, 3, 1 << 31, 1<<32 - 1} {
		if got := lex.AppendWord([]byte("x"), id); string(got) != "x" {
			t.Errorf("AppendWord(x, %d) = %q, want %q", id, got, "x")
		}
		if got := lex.Surface(id); got != "" {
			t.Errorf("Surface(%d) = %q, want empty", id, got)
		}
	}
}

// bruteRange returns the range of words (sorted) that start with prefix,
// by a linear scan with strings.HasPrefix and sort.SearchStrings (the
// reference).
func bruteRange(words []string, prefix string) (lo, hi int) {
	lo = sort.SearchStrings(words, prefix)
	hi = lo
	for hi < len(words) && strings.HasPrefix(words[hi], prefix) {
		hi++
	}
	return lo, hi
}

// TestPrefixRange compares PrefixRange with a brute-force scan over the
// SUBTLEX-US and SCOWL lists, for every prefix of up to 3 bytes that
// occurs, every whole word of a sample, and absent, non-ASCII, long and
// invalid prefixes.
func TestPrefixRange(t *testing.T) {
	for _, path := range []string{subtlexPath, scowlPath} {
		c := loadCorpus(t, path)
		prefixes := map[string]bool{"": true, "zzzz": true, "qx": true, "\xff": true, "a\xff": true,
			"\u00e9": true, "\xc3": true, "\x00": true, "~": true, strings.Repeat("a", 400): true}
		for i, w := range c.words {
			for n := 1; n <= 3 && n <= len(w); n++ {
				prefixes[w[:n]] = true
			}
			if i%97 == 0 {
				prefixes[w] = true
				prefixes[w+"a"] = true
				prefixes[w[:len(w)-1]+"\xff"] = true
			}
		}
		for p := range prefixes {
			lo, hi := c.lex.PrefixRange(p)
			wlo, whi := bruteRange(c.words, p)
			if int(lo) != wlo || int(hi) != whi {
				t.Fatalf("%s: PrefixRange(%q) = [%d,%d), want [%d,%d)", path, p, lo, hi, wlo, whi)
			}
		}
		t.Logf("%s: %d prefixes", path, len(prefixes))
	}
}

// TestPrefixRangeSmall spells out a few cases on a tiny lexicon where the
// answer can be read off the sorted list by eye.
func TestPrefixRangeSmall(t *testing.T) {
	words := []string{"a", "ab", "abc", "abd", "b", "ba", "\u00e9t\u00e9"}
	_, lex := build(t, words...)
	tests := []struct {
		prefix string
		lo, hi uint32
	}{
		{"", 0, 7},
		{"a", 0, 4},
		{"ab", 1, 4},
		{"abc", 2, 3},
		{"abe", 4, 4},
		{"aa", 1, 1},
		{"b", 4, 6},
		{"c", 6, 6},
		{"\u00e9", 6, 7},
		{"\xc3", 6, 7},
		{"z", 6, 6},
		{"\xff", 7, 7},
	}
	for _, tt := range tests {
		t.Run(tt.prefix, func(t *testing.T) {
			lo, hi := lex.PrefixRange(tt.prefix)
			if lo != tt.lo || hi != tt.hi {
				t.Errorf("PrefixRange(%q) = [%d,%d), want [%d,%d)", tt.prefix, lo, hi, tt.lo, tt.hi)
			}
		})
	}
}

// TestEmptyLexicon checks that a lexicon of no words builds, loads and
// answers every query with nothing.
func TestEmptyLexicon(t *testing.T) {
	_, lex := build(t)
	if lex.Len() != 0 {
		t.Errorf("Len() = %d, want 0", lex.Len())
	}
	if id, ok := lex.ID("a"); ok {
		t.Errorf("ID(a) = %d, true, want false", id)
	}
	if lo, hi := lex.PrefixRange(""); lo != 0 || hi != 0 {
		t.Errorf("PrefixRange(\"\") = [%d,%d), want [0,0)", lo, hi)
	}
	if lex.CanMatch(lex.Start()) {
		t.Errorf("CanMatch(Start()) = true, want false")
	}
	if err := lex.Check(); err != nil {
		t.Errorf("Check() = %v", err)
	}
}

// TestAppendWordAllocs checks that AppendWord does not allocate when dst has
// MaxWordLen bytes of room.
func TestAppendWordAllocs(t *testing.T) {
	c := loadCorpus(t, subtlexPath)
	buf := make([]byte, 0, c.lex.MaxWordLen())
	var id uint32
	allocs := testing.AllocsPerRun(1000, func() {
		buf = c.lex.AppendWord(buf[:0], id)
		id = (id + 7919) % uint32(c.lex.Len())
	})
	if allocs != 0 {
		t.Errorf("AppendWord allocates %v times per call, want 0", allocs)
	}
	sbuf := make([]byte, 0, 2*c.lex.MaxWordLen())
	allocs = testing.AllocsPerRun(1000, func() {
		sbuf = c.lex.AppendSurface(sbuf[:0], id)
		id = (id + 7919) % uint32(c.lex.Len())
	})
	if allocs != 0 {
		t.Errorf("AppendSurface allocates %v times per call, want 0", allocs)
	}
	allocs = testing.AllocsPerRun(1000, func() {
		_, _ = c.lex.ID("understand")
		_, _ = c.lex.PrefixRange("under")
	})
	if allocs != 0 {
		t.Errorf("ID and PrefixRange allocate %v times per call, want 0", allocs)
	}
}

// TestSizeBreakdown checks that the three parts and the header and padding
// add up to the section length.
func TestSizeBreakdown(t *testing.T) {
	c := loadCorpus(t, subtlexPath)
	f, tb, cs := c.lex.SizeBreakdown()
	rest := len(c.section) - f - tb - cs
	if rest < headerSize || rest > headerSize+4*(partAlign-1) {
		t.Errorf("SizeBreakdown() = %d+%d+%d, section %d: %d bytes unaccounted, want header plus padding", f, tb, cs, len(c.section), rest)
	}
	n := float64(c.lex.Len())
	t.Logf("%d words: fst %d B (%.2f B/word), table %d B (%.2f B/word), casing %d B (%.2f B/word), section %d B (%.2f B/word)",
		c.lex.Len(), f, float64(f)/n, tb, float64(tb)/n, cs, float64(cs)/n, len(c.section), float64(len(c.section))/n)
}

// TestConcurrentReads runs queries from several goroutines at once on one
// lexicon; under -race it shows that queries share no mutable state.
func TestConcurrentReads(t *testing.T) {
	c := loadCorpus(t, subtlexPath)
	var wg sync.WaitGroup
	errs := make(chan string, 8)
	for g := 0; g < 8; g++ {
		wg.Add(1)
		go func(g int) {
			defer wg.Done()
			buf := make([]byte, 0, 2*MaxWordLen)
			for i := g; i < len(c.words); i += 8 * 13 {
				w := c.words[i]
				id, ok := c.lex.ID(w)
				if !ok || int(id) != i {
					errs <- fmt.Sprintf("ID(%q) = %d, %v, want %d", w, id, ok, i)
					return
				}
				if got := c.lex.AppendWord(buf[:0], id); string(got) != w {
					errs <- fmt.Sprintf("AppendWord(%d) = %q, want %q", id, got, w)
					return
				}
				c.lex.AppendSurface(buf[:0], id)
				if lo, hi := c.lex.PrefixRange(w); int(lo) != i || hi <= lo {
					errs <- fmt.Sprintf("PrefixRange(%q) = [%d,%d), want to start at %d", w, lo, hi, i)
					return
				}
			}
		}(g)
	}
	wg.Wait()
	close(errs)
	for e := range errs {
		t.Error(e)
	}
}
