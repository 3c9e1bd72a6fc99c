package correct

import (
	"math"
	"slices"
	"testing"
	"time"
)

// The class: one letter typed two places from where it belongs, across two
// others, a transposition of letters that are not adjacent (metathesis at
// a distance, or "letters transposed across one"; the terms are cited
// from memory). Damerau (1964) counts only the adjacent swap as one error,
// so a move is two of his edits. The expected words below are worked by
// hand from that definition.

func TestMovedWindow(t *testing.T) {
	tests := []struct {
		name   string
		w      string
		i, dir int
		want   string
		wantOK bool
	}{
		{"first letter to the end", "abc", 0, 0, "bca", true},
		{"last letter to the front", "abc", 0, 1, "cab", true},
		{"window inside the word", "tath", 1, 1, "hat", true},
		{"across a copy of itself is an adjacent swap", "tat", 0, 0, "att", false},
		{"onto a copy of itself is an adjacent swap", "aab", 0, 0, "aba", false},
		{"three equal letters do not change", "aaa", 0, 1, "aaa", false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, ok := movedWindow(tc.w, tc.i, tc.dir)
			if string(got[:]) != tc.want || ok != tc.wantOK {
				t.Errorf("movedWindow(%q, %d, %d) = %q, %v; want %q, %v", tc.w, tc.i, tc.dir, got[:], ok, tc.want, tc.wantOK)
			}
		})
	}
}

func TestIsMovedError(t *testing.T) {
	tests := []struct {
		name, typed, intended string
		want                  bool
	}{
		{"letter typed two places early", "tath", "that", true},          // h moved left across "at"
		{"letter typed two places late", "tyhe", "they", true},           // y moved right across "he"
		{"inside the word", "yrea", "year", true},                        // r moved right across "ea"
		{"at the end", "abcdfge", "abcdefg", true},                       // e moved right across "fg"
		{"adjacent swap is not a move", "teh", "the", false},             // Damerau's transposition
		{"swap across one is not a move", "profilic", "prolific", false}, // f and l exchanged, i stays
		{"two edits apart", "acress", "across", false},
		{"different lengths", "wich", "which", false},
		{"same word", "that", "that", false},
		{"too short", "ab", "ba", false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := isMovedError(tc.typed, tc.intended); got != tc.want {
				t.Errorf("isMovedError(%q, %q) = %v, want %v", tc.typed, tc.intended, got, tc.want)
			}
		})
	}
}

func TestAddMoved(t *testing.T) {
	words := []string{"are", "ear", "hat", "than", "that", "the", "they", "year", "yare", "yeah"}
	flat := func([]uint32, uint32) float64 { return math.Log(1.0 / 10) }
	tests := []struct {
		name, typed string
		want        []string // sorted
	}{
		// tath: the moves of "ath" give "ttha" and "that"; those of "tat"
		// are adjacent swaps (worked by hand).
		{"one move is a word", "tath", []string{"that"}},
		// yrea: reya, eyra, year, yare.
		{"two moves are words", "yrea", []string{"yare", "year"}},
		// tyhe: yhte, htye, they, teyh.
		{"move to the end", "tyhe", []string{"they"}},
		{"too short", "ht", nil},
		{"no prefix in the lexicon", "qxzw", nil},
	}
	for _, lexName := range []string{"flat", "without the table"} {
		c, err := New(newFlatLex(words), flat, Options{})
		if err != nil {
			t.Fatal(err)
		}
		if lexName != "flat" {
			c.below = nil // the walk through the Lexicon interface
		}
		for _, tc := range tests {
			t.Run(lexName+"/"+tc.name, func(t *testing.T) {
				var rk ranker
				rk.start(c, nil, 0, false, 8, nil)
				c.addMoved(&rk, tc.typed, 4)
				var got []string
				for _, cand := range rk.top {
					if cand.Cost != 4 {
						t.Errorf("cost %v, want 4", cand.Cost)
					}
					got = append(got, string(c.lex.AppendWord(nil, cand.ID)))
				}
				slices.Sort(got)
				if !slices.Equal(got, tc.want) {
					t.Errorf("addMoved(%q) = %v, want %v", tc.typed, got, tc.want)
				}
			})
		}
	}
}

func TestMovedOffInUnitChannel(t *testing.T) {
	if ch := unitChannel(true); ch.moved < inf {
		t.Errorf("unit channel moved cost %v, want off (inf)", ch.moved)
	}
}

// BenchmarkAddMoved times the moved-letter offers alone (addMoved) for
// the 8-letter misspellings of BenchmarkCorrect8 over the SUBTLEX-US
// lexicon as the engine reads it, with the corrector's copy of the
// automaton (trie) and through the Lexicon interface (trie-notable).
func BenchmarkAddMoved(b *testing.B) {
	d := corpus(b)
	typed := eightLetterTyped(b)
	for _, name := range []string{"trie", "trie-notable"} {
		b.Run(name, func(b *testing.B) {
			lex := newTrieLex(b, d.subtlexLex)
			c, err := New(lex, d.unigramScorer(lex.words), Options{})
			if err != nil {
				b.Fatal(err)
			}
			if name == "trie-notable" {
				c.below = nil
			}
			var rk ranker
			found, i := 0, 0
			b.ReportAllocs()
			start := time.Now()
			for b.Loop() {
				rk.start(c, nil, 0, false, 8, rk.top)
				c.addMoved(&rk, typed[i%len(typed)], 5)
				found += len(rk.top)
				i++
			}
			b.ReportMetric(float64(time.Since(start).Nanoseconds())/float64(i), "ns/word")
			b.ReportMetric(float64(found)/float64(i), "words/word")
		})
	}
}
