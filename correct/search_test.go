package correct

import (
	"fmt"
	"sort"
	"testing"

	"github.com/blevesearch/vellum"
	"github.com/blevesearch/vellum/levenshtein"
)

// TestSearchMatchesVellumLevenshtein checks the lexicon walk against
// vellum's Levenshtein automaton (github.com/blevesearch/vellum/levenshtein,
// a reference implementation): with unit costs, the words found within
// distance 1 and 2 are the same set, with and without transpositions.
func TestSearchMatchesVellumLevenshtein(t *testing.T) {
	d := corpus(t)
	var words []string
	for _, w := range d.subtlex {
		ascii := true
		for i := 0; i < len(w); i++ {
			if !isAlpha(w[i]) {
				ascii = false
			}
		}
		if ascii {
			words = append(words, w)
		}
		if len(words) == 20000 {
			break
		}
	}
	lex := newVellumLex(t, words)
	queries := []string{"teh", "recieve", "wierd", "becuase", "definately", "a", "xq", "seperate", "thier", "freind"}
	for _, transpose := range []bool{false, true} {
		ch := unitChannel(transpose)
		for _, dist := range []uint8{1, 2} {
			total := 0
			builder, err := levenshtein.NewLevenshteinAutomatonBuilder(dist, transpose)
			if err != nil {
				t.Fatal(err)
			}
			for _, q := range queries {
				t.Run(fmt.Sprintf("%s/d%d/swap=%v", q, dist, transpose), func(t *testing.T) {
					dfa, err := builder.BuildDfa(q, dist)
					if err != nil {
						t.Fatal(err)
					}
					var want []string
					it, err := lex.fst.Search(dfa, nil, nil)
					for err == nil {
						k, _ := it.Current()
						want = append(want, string(k))
						err = it.Next()
					}
					if err != vellum.ErrIteratorDone {
						t.Fatalf("vellum search: %v", err)
					}
					var s search
					s.reset(ch, lex, q, float32(dist), len(q)+int(dist))
					s.run()
					var got []string
					for _, h := range s.hits {
						got = append(got, string(lex.AppendWord(nil, h.id)))
					}
					sort.Strings(got)
					sort.Strings(want)
					if fmt.Sprint(got) != fmt.Sprint(want) {
						t.Errorf("search(%q, %d) = %v\nwant %v", q, dist, got, want)
					}
					total += len(want)
				})
			}
			if total < 20 {
				t.Errorf("reference found only %d words at distance %d; the check is too thin", total, dist)
			}
		}
	}
}

// TestFlatLexIDs checks the test lexicon's output convention against the
// sorted word list (IDs are lexicographic ranks).
func TestFlatLexIDs(t *testing.T) {
	words := []string{"a", "ab", "abc", "b", "ba", "c"}
	l := newFlatLex(words)
	for want, w := range words {
		s, acc := l.Start(), uint64(0)
		for i := 0; i < len(w); i++ {
			n, out, ok := l.Step(s, w[i])
			if !ok {
				t.Fatalf("Step(%q) failed", w[:i+1])
			}
			s, acc = n, acc+out
		}
		ok, fo := l.Final(s)
		if !ok || acc+fo != uint64(want) {
			t.Errorf("walk(%q) = %d,%v, want %d", w, acc+fo, ok, want)
		}
	}
}
