package trie

import (
	"errors"
	"sort"
	"strings"
	"testing"
)

// FuzzLoadSection feeds arbitrary bytes to LoadSection, seeded from real
// sections (the worked example, 40 and 200 SUBTLEX-US words, 120 words
// with many casing exceptions, the empty lexicon; versions 3, 2 and 1) and
// damaged copies of them. Properties: no panic; an error is
// ErrCorrupt or ErrVersion; a section that loads answers every query
// without panicking; if Check also passes, the words and surfaces read back
// build a section that loads and reads back the same (read → write → read).
func FuzzLoadSection(f *testing.F) {
	for _, entries := range [][]Entry{smallEntries, midEntries(f)[:40], midEntries(f), manyExceptions(120), nil} {
		for _, v := range []struct {
			version uint16
			bs      int
		}{{SectionVersion, 0}, {listVersion, 0}, {tableVersion, blockSize}} {
			sec, err := appendSectionVersion(nil, entries, v.version, v.bs)
			if err != nil {
				f.Fatal(err)
			}
			f.Add(sec)
			f.Add(sec[:len(sec)/2])
			flipped := append([]byte(nil), sec...)
			flipped[headerSize+20] ^= 0x40
			f.Add(flipped)
		}
	}
	f.Fuzz(func(t *testing.T, b []byte) {
		lex, err := LoadSection(b)
		if err != nil {
			if !errors.Is(err, ErrCorrupt) && !errors.Is(err, ErrVersion) {
				t.Fatalf("LoadSection error %v is neither ErrCorrupt nor ErrVersion", err)
			}
			return
		}
		if err := exercise(lex); err != nil {
			if !errors.Is(err, ErrCorrupt) {
				t.Fatalf("Check error %v is not ErrCorrupt", err)
			}
			return
		}
		entries := make([]Entry, lex.Len())
		for i := range entries {
			entries[i] = Entry{Word: lex.Word(uint32(i)), Surface: lex.Surface(uint32(i))}
		}
		sec, err := AppendSection(nil, entries)
		if err != nil {
			t.Fatalf("rebuilding a checked lexicon: %v", err)
		}
		again, err := LoadSection(sec)
		if err != nil {
			t.Fatalf("loading the rebuilt lexicon: %v", err)
		}
		for i, e := range entries {
			if w, s := again.Word(uint32(i)), again.Surface(uint32(i)); w != e.Word || s != e.Surface {
				t.Fatalf("rebuilt word %d = %q/%q, want %q/%q", i, w, s, e.Word, e.Surface)
			}
		}
	})
}

// FuzzAppendSection builds a lexicon of the newline-separated words of the
// input (invalid, empty and over-long ones dropped, the rest sorted with
// sort.Strings and deduplicated) and checks ID, Word and PrefixRange
// against the sorted list (sort.SearchStrings and strings.HasPrefix, the
// reference), for every word and every prefix of every word.
func FuzzAppendSection(f *testing.F) {
	f.Add("a\nab\nabc\nb")
	f.Add("\u00e9t\u00e9\n\u00e9\nz\n\x00\n\x7f")
	f.Add(strings.Repeat("x", 300) + "\nxx\nxy")
	f.Add("the\nthen\nthere\nthese\nthey\nthis\nthose\nthough\nthrough\nthus\nto\ntoo\ntook\ntoward\ntown\ntrade\ntrain\ntree\ntrue\ntry")
	f.Fuzz(func(t *testing.T, in string) {
		seen := map[string]bool{}
		var words []string
		for _, w := range strings.Split(in, "\n") {
			if w != "" && len(w) <= MaxWordLen && !seen[w] && validUTF8(w) {
				seen[w] = true
				words = append(words, w)
			}
		}
		sort.Strings(words)
		_, lex := build(t, words...)
		if err := lex.Check(); err != nil {
			t.Fatalf("Check() = %v", err)
		}
		for i, w := range words {
			if id, ok := lex.ID(w); !ok || int(id) != i {
				t.Fatalf("ID(%q) = %d, %v, want %d", w, id, ok, i)
			}
			if got := lex.Word(uint32(i)); got != w {
				t.Fatalf("Word(%d) = %q, want %q", i, got, w)
			}
			for n := 0; n <= len(w)+1; n++ {
				p := w[:min(n, len(w))]
				if n > len(w) {
					p += "\xff"
				}
				lo, hi := lex.PrefixRange(p)
				wlo, whi := bruteRange(words, p)
				if int(lo) != wlo || int(hi) != whi {
					t.Fatalf("PrefixRange(%q) = [%d,%d), want [%d,%d)", p, lo, hi, wlo, whi)
				}
			}
		}
	})
}
