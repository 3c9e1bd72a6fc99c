package correct

import (
	"fmt"
	"slices"
	"strings"
	"testing"
)

// TestBestFirstMatchesDepthFirst checks that, with no state cap and no
// stop rule, the best-first walk finds exactly the words (and channel
// costs) of the depth-first walk at the full budget, for 300 words of the
// development misspellings list (corpora/misspellings-dev.tsv, a public
// list of real misspellings) over the SUBTLEX-US lexicon: expanding
// prefixes in another order must not change what is within budget.
func TestBestFirstMatchesDepthFirst(t *testing.T) {
	c, _ := subtlexTrieCorrector(t)
	pairs := devPairs(t)
	checked, found := 0, 0
	for i := 0; i < len(pairs) && checked < 300; i += 7 {
		typed := strings.ToLower(pairs[i].Typed)
		if len(typed) > maxTyped || !latinOnly(typed) {
			continue
		}
		checked++
		var dfs, bfs search
		dfs.reset(c.ch, c.lex, typed, float32(c.opts.MaxCost), len(typed)+maxExtra)
		dfs.run()
		bfs.reset(c.ch, c.lex, typed, float32(c.opts.MaxCost), len(typed)+maxExtra)
		bfs.runBest()
		want, got := hitList(dfs.hits), hitList(bfs.hits)
		if fmt.Sprint(got) != fmt.Sprint(want) {
			t.Errorf("%q: best-first found %d words, depth-first %d\n got %v\nwant %v", typed, len(got), len(want), got, want)
		}
		if bfs.visited > dfs.visited {
			t.Errorf("%q: best-first expanded %d prefixes, depth-first %d; the lower bound should prune at least as much", typed, bfs.visited, dfs.visited)
		}
		found += len(want)
	}
	if checked < 250 || found < 1000 {
		t.Errorf("checked %d words, %d hits; the comparison is too thin", checked, found)
	}
}

// hitList returns hits sorted by word ID.
func hitList(h []hit) []hit {
	h = slices.Clone(h)
	slices.SortFunc(h, func(a, b hit) int { return int(a.id) - int(b.id) })
	return h
}

// TestBelowBoundKeepsWords checks that the letters-below lower bound
// (below.go) prunes only prefixes with no word within budget: with the
// bound, both walks find exactly the words and costs of the depth-first
// walk without it, for 150 words of the development misspellings list
// (corpora/misspellings-dev.tsv, a public list of real misspellings) over
// the SUBTLEX-US lexicon and each pass budget; and for 12 of them the
// words found are exactly the lexicon words whose channel cost, computed
// one by one by the row recurrence, is within budget.
func TestBelowBoundKeepsWords(t *testing.T) {
	c, lex := subtlexTrieCorrector(t)
	if c.below == nil {
		t.Fatal("no letters-below table for a lexicon that lists edges")
	}
	pairs := devPairs(t)
	checked, found, brute := 0, 0, 0
	var one search
	for i := 3; i < len(pairs) && checked < 150; i += 13 {
		typed := strings.ToLower(pairs[i].Typed)
		if len(typed) > maxTyped || !latinOnly(typed) {
			continue
		}
		checked++
		for _, budget := range []float32{firstPass, secondPass, float32(c.opts.MaxCost)} {
			var ref, dfs, bfs search
			ref.reset(c.ch, lex, typed, budget, len(typed)+maxExtra)
			ref.run()
			dfs.below, bfs.below = c.below, c.below
			dfs.reset(c.ch, lex, typed, budget, len(typed)+maxExtra)
			dfs.run()
			bfs.reset(c.ch, lex, typed, budget, len(typed)+maxExtra)
			bfs.runBest()
			want := fmt.Sprint(hitList(ref.hits))
			if got := fmt.Sprint(hitList(dfs.hits)); got != want {
				t.Errorf("%q at %v nats: depth-first with the bound found\n %v\nwithout\n %v", typed, budget, got, want)
			}
			if got := fmt.Sprint(hitList(bfs.hits)); got != want {
				t.Errorf("%q at %v nats: best-first with the bound found\n %v\nwithout\n %v", typed, budget, got, want)
			}
			if bfs.examined > ref.examined {
				t.Errorf("%q at %v nats: %d rows with the bound, %d without", typed, budget, bfs.examined, ref.examined)
			}
			found += len(ref.hits)
			if checked <= 12 && budget == float32(c.opts.MaxCost) {
				var all []hit
				for id, w := range lex.words {
					if len(w) > len(typed)+maxExtra {
						continue
					}
					if v := one.cost(c.ch, typed, w); v <= budget {
						all = append(all, hit{id: uint32(id), cost: v})
					}
				}
				brute++
				if got, want := fmt.Sprint(hitList(bfs.hits)), fmt.Sprint(all); got != want {
					t.Errorf("%q: best-first with the bound found\n %v\nword by word\n %v", typed, got, want)
				}
			}
		}
	}
	if checked < 150 || found < 1000 || brute < 12 {
		t.Errorf("checked %d words, %d hits, %d word by word; the comparison is too thin", checked, found, brute)
	}
}
