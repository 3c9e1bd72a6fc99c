package correct

import (
	"fmt"
	"testing"
)

// TestKeySetsMatchTriePaths checks prepareKeySets against the definition
// of the sets, walked from the root down: a node's next set holds the
// byte classes (belowBit) of its trie edges, its below set those of
// every byte on a trie path below it, and an edge's parentBound set the
// child's below set with the edge's own class; for keys' tries of
// development misspellings (corpora/misspellings-dev.tsv) and random
// strings over the SUBTLEX-US table. A check against the definition, no
// external source.
func TestKeySetsMatchTriePaths(t *testing.T) {
	c, lex := subtlexTrieCorrector(t)
	typed := typedSample(t, 17, 120, 18, 20, 3, 10)
	nodes := 0
	for _, w := range typed {
		s := &search{below: c.below}
		s.reset(c.ch, lex, w, float32(c.opts.MaxCost), len(w)+maxExtra)
		s.skf.reset(w, s.maxDepth)
		if !s.kwt.build(&s.skf, s.below, s.maxDepth) || len(s.kwt.nodes) == 0 {
			continue
		}
		s.kt = &s.kwt
		s.prepareKeySets()
		// want: the sets by their definition, each node from its own
		// paths (exponential in nothing: each node is walked from every
		// ancestor, fine for these tries).
		var below func(i int32) uint32
		below = func(i int32) uint32 {
			kn := s.kt.nodes[i]
			var b uint32
			for _, e := range s.kt.edges[kn.lo:kn.hi] {
				b |= belowBit(c.below.eb[e.k]) | below(e.child)
			}
			return b
		}
		for i, kn := range s.kt.nodes {
			var next uint32
			for x := kn.lo; x < kn.hi; x++ {
				e := s.kt.edges[x]
				cb := belowBit(c.below.eb[e.k])
				next |= cb
				if got, want := s.ktEbp[x], below(e.child)|cb; got != want {
					t.Fatalf("%q: edge %d: parentBound set %#x, want %#x", w, x, got, want)
				}
			}
			want := belowSets(below(int32(i))) | belowSets(next)<<32
			if got := s.ktSets[i]; got != want {
				t.Fatalf("%q: node %d: sets %#x, want %#x", w, i, got, want)
			}
			nodes++
		}
	}
	if nodes < 10000 {
		t.Errorf("%d trie nodes checked; the comparison is too thin", nodes)
	}
	t.Logf("%d trie nodes checked", nodes)
}

// TestVisitKeysMatchesScan checks the walk along the keys' trie with the
// trie's own sets (visitKeys) against visit's general loop, which prices
// the same trie's children with the sets of the whole lexicon's table:
// the same words at the same costs in the same order, no more states
// entered (the trie's sets can only be tighter, so the bounds prune as
// much or more, and a child tried without a byte set is kept only if it
// is in the set), and fewer rows computed in all (a word may compute a
// few more: the children of trie nodes with fewer than setMinEdges
// edges are tried without the set, visitKeysAt), at the keys'
// pass's full budget and at secondPass, with and without parentBound,
// for words of the development misspellings list
// (corpora/misspellings-dev.tsv) and random letter strings over the
// SUBTLEX-US lexicon. A cross-check of two code paths of the project, no
// external source; the general loop is checked against the row
// recurrence by TestBelowBoundKeepsWords and TestParentBoundKeepsWords,
// and the keys' pass against whole-lexicon walks by
// TestKeysPassMiddleWords.
func TestVisitKeysMatchesScan(t *testing.T) {
	c, lex := subtlexTrieCorrector(t)
	typed := typedSample(t, 7, 250, 19, 30, 3, 10)
	tests := []struct {
		name     string
		budget   float32
		noParent bool
	}{
		{"full", float32(c.opts.MaxCost), false},
		{"middle", secondPass, false},
		{"full, no parentBound", float32(c.opts.MaxCost), true},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			found, fewer, more := 0, 0, 0
			var rows [2]int
			walk := func(scan bool, w string) *search {
				t.Helper()
				s := &search{below: c.below, scanEdges: scan, noParent: tt.noParent}
				s.reset(c.ch, lex, w, tt.budget, len(w)+maxExtra)
				c.walkKeys(s, w)
				return s
			}
			for _, w := range typed {
				scan, keys := walk(true, w), walk(false, w)
				if fmt.Sprint(keys.hits) != fmt.Sprint(scan.hits) {
					t.Errorf("%q: found %d words with visitKeys, %d with the general loop\n got %v\nwant %v", w, len(keys.hits), len(scan.hits), keys.hits, scan.hits)
				}
				if keys.visited > scan.visited {
					t.Errorf("%q: %d states entered with visitKeys, %d with the general loop", w, keys.visited, scan.visited)
				}
				switch {
				case keys.rowsDone < scan.rowsDone:
					fewer++
				case keys.rowsDone > scan.rowsDone:
					more++
				}
				found += len(scan.hits)
				rows[0] += scan.rowsDone
				rows[1] += keys.rowsDone
			}
			if found < 300 {
				t.Errorf("%d words found in all; the comparison is too thin", found)
			}
			if rows[1] >= rows[0] {
				t.Errorf("%d rows in all with visitKeys, %d with the general loop", rows[1], rows[0])
			}
			t.Logf("%d words found; rows %d with the general loop, %d with visitKeys (fewer for %d of %d words, more for %d)", found, rows[0], rows[1], fewer, len(typed), more)
		})
	}
}
