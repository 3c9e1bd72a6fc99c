package trie

import (
	"fmt"
	"strings"
	"testing"
)

// TestExceptMask checks the upper-case mask of hand-picked surfaces. The
// expected masks are worked out by hand from the rule in casemask.go (bit
// i for rune i, not byte i), with upper-casing by Unicode's simple mapping
// as Go's unicode.ToUpper applies it: ß has no single-rune upper case, and
// ǅ is the title case of ǆ, not its upper case Ǆ, so neither surface
// below is a mask.
func TestExceptMask(t *testing.T) {
	tests := []struct {
		name, word, surface string
		mask                uint64
		ok                  bool
	}{
		{"second-letter", "iphone", "iPhone", 0b10, true},
		{"first-and-third", "mcdonald", "McDonald", 0b101, true},
		{"last-two", "macos", "macOS", 0b11000, true},
		{"rune-not-byte", "été", "éTé", 0b10, true}, // é is two bytes, one rune
		{"non-ascii-upper", "aéb", "aÉb", 0b10, true},
		{"same", "word", "word", 0, true},
		{"no-single-rune-upper", "straße", "STRASSE", 0, false},
		{"title-case", "ǆemal", "ǅemal", 0, false},
		{"other-letter", "colour", "Color", 0, false},
		{"lower-in-surface", "Ab", "ab", 0, false},
		{"longer-surface", "ab", "abc", 0, false},
		{"rune-64", strings.Repeat("a", 64) + "b", strings.Repeat("a", 64) + "B", 0, false},
		{"rune-63", strings.Repeat("a", 63) + "b", strings.Repeat("a", 63) + "B", 1 << 63, true},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			mask, ok := exceptMask(tt.word, tt.surface)
			if mask != tt.mask || ok != tt.ok {
				t.Fatalf("exceptMask(%q, %q) = %#x, %v, want %#x, %v", tt.word, tt.surface, mask, ok, tt.mask, tt.ok)
			}
			if ok {
				if got := string(appendMasked(nil, []byte(tt.word), mask)); got != tt.surface {
					t.Fatalf("appendMasked(%q, %#x) = %q, want %q", tt.word, mask, got, tt.surface)
				}
			}
		})
	}
}

// manyExceptions returns n sorted entries, every third of them with a
// mixed-case surface (a mask), every 50th with a surface no mask gives
// (stored in full), the rest lower case or capitalised: enough exceptions
// to span several rank samples and record samples. The surfaces given are
// the reference Surface must return.
func manyExceptions(n int) []Entry {
	entries := make([]Entry, n)
	for i := range entries {
		w := fmt.Sprintf("w%05dxyz", i)
		e := Entry{Word: w}
		switch {
		case i%50 == 0:
			e.Surface = "W" + w[1:] + "!" // not a casing of the word
		case i%3 == 0:
			e.Surface = w[:len(w)-2] + "YZ" // last two runes upper-cased
		case i%7 == 0:
			e.Surface = "W" + w[1:]
		}
		entries[i] = e
	}
	return entries
}

// TestSurfaceVersions checks that versions 1, 2 and 3 give, for every
// word of the SUBTLEX-US and SCOWL lists and of a synthetic list with
// thousands of exceptions, the surface the list itself spells (the
// reference), and so the same answers in every version.
func TestSurfaceVersions(t *testing.T) {
	lists := []struct {
		name    string
		entries []Entry
	}{
		{"subtlex", loadCorpus(t, subtlexPath).entries},
		{"scowl", loadCorpus(t, scowlPath).entries},
		{"synthetic", manyExceptions(5000)},
	}
	versions := []struct {
		version uint16
		bs      int
	}{{tableVersion, blockSize}, {listVersion, 0}, {SectionVersion, 0}}
	for _, list := range lists {
		for _, v := range versions {
			t.Run(fmt.Sprintf("%s/version=%d", list.name, v.version), func(t *testing.T) {
				sec, err := appendSectionVersion(nil, list.entries, v.version, v.bs)
				if err != nil {
					t.Fatal(err)
				}
				lex, err := LoadSection(sec)
				if err != nil {
					t.Fatal(err)
				}
				buf := make([]byte, 0, 2*MaxWordLen)
				for i, e := range list.entries {
					want := e.Surface
					if want == "" {
						want = e.Word
					}
					if got := lex.AppendSurface(buf[:0], uint32(i)); string(got) != want {
						t.Fatalf("AppendSurface(%d) = %q, want %q", i, got, want)
					}
				}
				_, _, cs := lex.SizeBreakdown()
				t.Logf("%d words, %d section bytes (%.3f/word), %d casing bytes (%.3f/word)",
					len(list.entries), len(sec), float64(len(sec))/float64(len(list.entries)), cs, float64(cs)/float64(len(list.entries)))
			})
		}
	}
}

// TestCasingRank checks the two rank directories of a version-3 section
// against counts made from how manyExceptions builds its surfaces: word i
// is not lower case when i is a multiple of 3, 7 or 50, and an exception
// when it is a multiple of 3 or 50.
func TestCasingRank(t *testing.T) {
	_, lex := buildEntries(t, manyExceptions(3000))
	nonLower, excepts := 0, 0
	for i := 0; i < lex.Len(); i++ {
		except := i%3 == 0 || i%50 == 0
		marked := except || i%7 == 0
		j, ok := lex.casing.nonLowerRank(uint32(i))
		if ok != marked || (ok && j != nonLower) {
			t.Fatalf("nonLowerRank(%d) = %d, %v, want %d, %v", i, j, ok, nonLower, marked)
		}
		if marked {
			if k := lex.casing.exceptRank(j); k != excepts {
				t.Fatalf("exceptRank(%d) (word %d) = %d, want %d", j, i, k, excepts)
			}
			nonLower++
		}
		if except {
			excepts++
		}
	}
	if lex.Len() < 2*bitRankStep || nonLower < 2*rankStep || excepts < 2*recordStep {
		t.Fatalf("only %d non-lower words and %d exceptions; the test needs several samples", nonLower, excepts)
	}
}

// TestSurfaceNoAlloc checks that the surface of a mask exception and of a
// full one is spelled without allocating (after xxhash's zero-allocation
// tests).
func TestSurfaceNoAlloc(t *testing.T) {
	_, lex := buildEntries(t, manyExceptions(300))
	buf := make([]byte, 0, 2*MaxWordLen)
	for _, id := range []uint32{3, 150, 7} { // mask, full, capitalised
		if a := testing.AllocsPerRun(200, func() { buf = lex.AppendSurface(buf[:0], id) }); a != 0 {
			t.Errorf("AppendSurface(%d) allocates %.1f times", id, a)
		}
	}
}

// TestSkipWalkCasingDamage flips every byte of the casing parts of a
// version-3 section with many exceptions and opens it without the
// load-time checks (SkipWalk): Surface must answer every id without
// panicking, whatever the bytes (the project's rule that bad bytes never
// panic). The undamaged section must give the surfaces it was built from.
func TestSkipWalkCasingDamage(t *testing.T) {
	entries := manyExceptions(600)
	sec, _ := buildEntries(t, entries)
	var h header
	h.get(sec)
	fast, err := LoadSectionWith(sec, LoadOptions{SkipWalk: true})
	if err != nil {
		t.Fatal(err)
	}
	for i, e := range entries {
		want := e.Surface
		if want == "" {
			want = e.Word
		}
		if got := fast.Surface(uint32(i)); got != want {
			t.Fatalf("Surface(%d) = %q, want %q", i, got, want)
		}
	}
	for i := int(h.caseOff); i < len(sec); i++ {
		for _, x := range []byte{0x01, 0x80, 0xff} {
			b := append([]byte(nil), sec...)
			b[i] ^= x
			l, err := LoadSectionWith(b, LoadOptions{SkipWalk: true})
			if err != nil {
				continue
			}
			for id := range uint32(l.Len() + 1) {
				l.Surface(id)
			}
		}
	}
}
