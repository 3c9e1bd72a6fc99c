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
	d := corpus(t)
	lex := newTrieLex(t, d.subtlexLex)
	c, err := New(lex, d.unigramScorer(lex.words), Options{})
	if err != nil {
		t.Fatal(err)
	}
	pairs := devPairs(t)
	checked, found := 0, 0
	for i := 0; i < len(pairs) && checked < 300; i += 7 {
		typed := strings.ToLower(pairs[i].Typed)
		if len(typed) > maxTyped || !latinOnly(typed) {
			continue
		}
		checked++
		var dfs, bfs search
		dfs.reset(c.ch, lex, typed, float32(c.opts.MaxCost), len(typed)+maxExtra)
		dfs.run()
		bfs.reset(c.ch, lex, typed, float32(c.opts.MaxCost), len(typed)+maxExtra)
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
