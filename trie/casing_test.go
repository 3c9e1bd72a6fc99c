package trie

import (
	"testing"
)

// TestCasingCases builds a small lexicon of hand-picked words and checks
// the code each surface gets and that Surface gives the surface back. The
// expected codes follow the rule in layout.go (first match of: same,
// first rune upper-cased, all runes upper-cased; else stored), with
// upper-casing by Unicode's simple mapping as Go's unicode.ToUpper applies
// it (ß has no single-rune upper case there; the title case of ǆ is ǅ, not
// its upper case Ǆ).
func TestCasingCases(t *testing.T) {
	tests := []struct {
		word, surface string
		code          byte
	}{
		{"ampere", "", caseSame},
		{"and", "and", caseSame},
		{"i", "I", caseCapital},
		{"iphone", "iPhone", caseExcept},
		{"london", "London", caseCapital},
		{"mcdonald", "McDonald", caseExcept},
		{"nasa", "NASA", caseUpper},
		{"straße", "STRASSE", caseExcept},
		{"straßen", "STRAßEN", caseUpper},
		{"ångström", "Ångström", caseCapital},
		{"été", "ÉTÉ", caseUpper},
		{"ǆemal", "ǅemal", caseExcept},
	}
	// The words are listed in byte order, as AppendSection requires.
	entries := make([]Entry, len(tests))
	for i, tt := range tests {
		entries[i] = Entry{Word: tt.word, Surface: tt.surface}
	}
	_, lex := buildEntries(t, entries)
	for i, tt := range tests {
		t.Run(tt.word, func(t *testing.T) {
			if got := casingCode(tt.word, tt.surface); got != tt.code {
				t.Errorf("casingCode(%q, %q) = %d, want %d", tt.word, tt.surface, got, tt.code)
			}
			want := tt.surface
			if want == "" {
				want = tt.word
			}
			if got := lex.Surface(uint32(i)); got != want {
				t.Errorf("Surface(%d) = %q, want %q", i, got, want)
			}
			if got := lex.Word(uint32(i)); got != tt.word {
				t.Errorf("Word(%d) = %q, want %q", i, got, tt.word)
			}
		})
	}
}

// TestCasingCorpora checks, for every word of the SUBTLEX-US and SCOWL
// lists, that Surface gives back the spelling the list uses (the source
// spelling, not this package's output, is the reference; when SCOWL has a
// word in several casings the lower-case one, else the first, is the one
// stored).
func TestCasingCorpora(t *testing.T) {
	for _, path := range []string{subtlexPath, scowlPath} {
		c := loadCorpus(t, path)
		buf := make([]byte, 0, 2*MaxWordLen)
		excepts := 0
		for _, e := range c.entries {
			id, ok := c.lex.ID(e.Word)
			if !ok {
				t.Fatalf("%s: ID(%q) not found", path, e.Word)
			}
			if got := c.lex.AppendSurface(buf[:0], id); string(got) != e.Surface {
				t.Fatalf("%s: AppendSurface(%d) = %q, want %q", path, id, got, e.Surface)
			}
			if c.lex.casing.code(id) == caseExcept {
				excepts++
			}
		}
		_, _, cs := c.lex.SizeBreakdown()
		t.Logf("%s: %d words, %d casing exceptions, %d casing bytes", path, len(c.entries), excepts, cs)
	}
}
