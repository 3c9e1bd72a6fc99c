package correct

import (
	"fmt"
	"strings"
	"testing"
)

// TestInSkeleton checks inSkeleton, a shift on a constant since round 17,
// against the letters its definition (skeleton.go) leaves out, a e i o u
// y h w, for every byte value, named cases first.
func TestInSkeleton(t *testing.T) {
	tests := []struct {
		name string
		c    byte
		want bool
	}{
		{"a left out", 'a', false},
		{"y left out", 'y', false},
		{"w left out", 'w', false},
		{"z kept", 'z', true},
		{"b kept", 'b', true},
		{"apostrophe kept", '\'', true},
		{"byte below a kept", '`', true},
		{"byte above z kept", '{', true},
		{"upper-case A kept", 'A', true},
		{"byte 0xff kept", 0xff, true},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := inSkeleton(tt.c); got != tt.want {
				t.Errorf("inSkeleton(%q) = %v, want %v", tt.c, got, tt.want)
			}
		})
	}
	for c := range 256 {
		if want := strings.IndexByte("aeiouyhw", byte(c)) < 0; inSkeleton(byte(c)) != want {
			t.Errorf("inSkeleton(%#x) = %v, want %v", c, !want, want)
		}
	}
}

// TestAppendSkeleton checks the consonant skeleton on words worked by
// hand from its definition in skeleton.go (this package's own key, no
// outside source).
func TestAppendSkeleton(t *testing.T) {
	tests := []struct{ word, want string }{
		{"restaurant", "rstrnt"},
		{"resteraunt", "rstrnt"},
		{"banana", "bn"},        // a byte equal to the previous skeleton byte is left out, vowels between or not
		{"whey", ""},            // w, h, e, y: none is in a skeleton
		{"co-operate", "c-prt"}, // the hyphen is kept
		{"don't", "dn't"},       // the apostrophe too
		{"committee", "cmt"},    // doubled letters once
		{"rhythm", "rtm"},       // h and y left out
		{"", ""},
	}
	for _, tt := range tests {
		t.Run(tt.word, func(t *testing.T) {
			if got := string(appendSkeleton(nil, tt.word)); got != tt.want {
				t.Errorf("appendSkeleton(%q) = %q, want %q", tt.word, got, tt.want)
			}
		})
	}
}

// skelKeeps is what skelFilter should keep, computed directly with the
// optimal-string-alignment distance of unitChannel (whose distances
// TestUnitDistanceMatchesLevenshtein checks against
// github.com/agnivade/levenshtein): the words whose skeleton is within
// skelEditsFor (by its length) of the typed word's, or that are within
// plainEdits of it.
func skelKeeps(typed, word string) bool {
	unit := unitChannel(true)
	ts, ws := appendSkeleton(nil, typed), appendSkeleton(nil, word)
	return unit.distance(string(ts), string(ws)) <= float32(skelEditsFor(len(ts))) || unit.distance(typed, word) <= plainEdits
}

// TestSkeletonPassKeepsWords checks that the widest pass restricted by
// skelFilter finds exactly the words of the whole lexicon's walk at the
// same budget that skelKeeps keeps, at exactly the same channel costs:
// for words of the development misspellings list
// (corpora/misspellings-dev.tsv, a public list of real misspellings) and
// random letter strings over the SUBTLEX-US lexicon, with the
// letters-below table (the filter's bound then charges typed letters on
// no path below) and without it. The whole lexicon's walk is checked
// word by word against the row recurrence in TestBelowBoundKeepsWords.
// It also checks that the filter prunes: fewer rows computed in all.
func TestSkeletonPassKeepsWords(t *testing.T) {
	c, lex := subtlexTrieCorrector(t)
	typed := typedSample(t, 7, 0, 16, 30, 3, 10)
	tests := []struct {
		name  string
		below *belowTable
		every int // test every n-th typed word (the walk without the table is slower)
	}{
		{"letters-below", c.below, 1},
		{"row-only", nil, 4},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			kept, rowsWhole, rowsSkel := 0, 0, 0
			walk := func(w string, filter bool) map[uint32]float32 {
				t.Helper()
				s := &search{below: tt.below}
				s.reset(c.ch, lex, w, float32(c.opts.MaxCost), len(w)+maxExtra)
				if filter {
					s.skel = &s.skf
					s.skel.reset(w, s.maxDepth)
				}
				s.run()
				got := map[uint32]float32{}
				for _, h := range s.hits {
					if old, dup := got[h.id]; dup {
						t.Errorf("%q: word %d found twice (costs %v and %v)", w, h.id, old, h.cost)
					}
					got[h.id] = h.cost
				}
				if filter {
					rowsSkel += s.rowsDone
				} else {
					rowsWhole += s.rowsDone
				}
				return got
			}
			for k, w := range typed {
				if k%tt.every != 0 {
					continue
				}
				whole, skel := walk(w, false), walk(w, true)
				want := map[uint32]float32{}
				for id, cost := range whole {
					if skelKeeps(w, lex.words[id]) {
						want[id] = cost
					}
				}
				kept += len(want)
				if fmt.Sprint(skel) != fmt.Sprint(want) {
					t.Errorf("%q: skeleton pass found %v, want %v", w, skel, want)
				}
			}
			t.Logf("%d words kept; rows %d with the filter, %d without", kept, rowsSkel, rowsWhole)
			if kept == 0 || rowsSkel >= rowsWhole {
				t.Errorf("kept %d words, rows %d with the filter and %d without: want some words and fewer rows", kept, rowsSkel, rowsWhole)
			}
		})
	}
}

// TestSkeletonEditsByLength checks the skeleton key's edit allowance by
// the typed skeleton's length (skelEditsFor): none for a skeleton of at
// most shortSkeleton bytes, skelEdits above. The skeletons are worked out
// by hand from the definition (vowels, h, w and y dropped, repeats
// merged).
func TestSkeletonEditsByLength(t *testing.T) {
	tests := []struct {
		name, typed, skel string
		edits             uint8
	}{
		{"h and repeats dropped", "harrases", "rs", 0},
		{"two consonants", "athenean", "tn", 0},
		{"no consonant", "ayeee", "", 0},
		{"three consonants", "paralely", "prl", 0},
		{"four consonants", "tornadoe", "trnd", 1},
		{"six consonants", "restarant", "rstrnt", 1},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var f skelFilter
			f.reset(tt.typed, 20)
			if string(f.buf) != tt.skel || f.skel.maxd != tt.edits {
				t.Errorf("%q: skeleton %q with %d edits, want %q with %d", tt.typed, f.buf, f.skel.maxd, tt.skel, tt.edits)
			}
		})
	}
}
