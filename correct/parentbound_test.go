package correct

import (
	"fmt"
	"testing"
)

// TestParentBoundKeepsWords checks that pruning children on parentBound
// (parentbound.go) before their rows are computed keeps every word: both
// walks find exactly the words, at exactly the channel costs, that they
// find without it, at each pass budget, for words of the development
// misspellings list (corpora/misspellings-dev.tsv, a public list of real
// misspellings) and random letter strings over the SUBTLEX-US lexicon.
// The walks without it are checked word by word against the row
// recurrence in TestBelowBoundKeepsWords. It also checks that the bound
// prunes: fewer rows computed in all.
func TestParentBoundKeepsWords(t *testing.T) {
	c, lex := subtlexTrieCorrector(t)
	typed := typedSample(t, 11, 150, 15, 20, 3, 10)
	tests := []struct {
		name      string
		budget    float32
		bestFirst bool
	}{
		{"narrow/depth-first", firstPass, false},
		{"middle/depth-first", secondPass, false},
		{"full/depth-first", 13, false},
		{"full/best-first", 13, true},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			found, rowsWith, rowsWithout := 0, 0, 0
			walk := func(noParent bool, w string) *search {
				t.Helper()
				s := &search{below: c.below, noParent: noParent}
				s.reset(c.ch, lex, w, tt.budget, len(w)+maxExtra)
				if tt.bestFirst {
					s.runBest()
				} else {
					s.run()
				}
				return s
			}
			for _, w := range typed {
				without, with := walk(true, w), walk(false, w)
				want, got := hitList(without.hits), hitList(with.hits)
				if fmt.Sprint(got) != fmt.Sprint(want) {
					t.Errorf("%q: found %d words with parentBound, %d without\n got %v\nwant %v", w, len(got), len(want), got, want)
				}
				found += len(want)
				rowsWith += with.rowsDone
				rowsWithout += without.rowsDone
			}
			if found < 300 {
				t.Errorf("%d words found in all; the comparison is too thin", found)
			}
			if rowsWith >= rowsWithout {
				t.Errorf("rows computed: %d with parentBound, %d without; it should prune", rowsWith, rowsWithout)
			}
			t.Logf("%d words found; rows %d without parentBound, %d with", found, rowsWithout, rowsWith)
		})
	}
}

// TestVisitPickedMatchesScan checks the depth-first walk's loop over the
// picked letter edges of a state (visitPicked, with extendBelow and the
// sets read beside the edges, belowTable.ebp) against its general loop,
// which reads every edge and takes the child's sets from its node: the
// same words at the same costs, in the same order, and the same work
// (states entered, rows computed, children examined), at each pass
// budget, for words of the development misspellings list
// (corpora/misspellings-dev.tsv) and random letter strings over the
// SUBTLEX-US lexicon (corpora/subtlex-us-word-counts.tsv). A cross-check
// of two code paths of the project, no external source; the general loop
// is checked against the row recurrence by TestBelowBoundKeepsWords and
// TestParentBoundKeepsWords.
func TestVisitPickedMatchesScan(t *testing.T) {
	c, lex := subtlexTrieCorrector(t)
	if !c.below.ascending {
		t.Fatal("the SUBTLEX-US table does not list edges by rising byte: visitPicked would not run")
	}
	typed := typedSample(t, 7, 250, 16, 30, 3, 10)
	tests := []struct {
		name     string
		budget   float32
		noParent bool
	}{
		{"narrow", firstPass, false},
		{"middle", secondPass, false},
		{"full", 13, false},
		{"narrow, no parentBound", firstPass, true},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			found, rows := 0, 0
			walk := func(scan bool, w string) *search {
				t.Helper()
				s := &search{below: c.below, scanEdges: scan, noParent: tt.noParent}
				s.reset(c.ch, lex, w, tt.budget, len(w)+maxExtra)
				s.run()
				return s
			}
			for _, w := range typed {
				scan, picked := walk(true, w), walk(false, w)
				if fmt.Sprint(picked.hits) != fmt.Sprint(scan.hits) {
					t.Errorf("%q: found %d words with visitPicked, %d reading every edge\n got %v\nwant %v", w, len(picked.hits), len(scan.hits), picked.hits, scan.hits)
				}
				if picked.visited != scan.visited || picked.rowsDone != scan.rowsDone || picked.examined != scan.examined {
					t.Errorf("%q: states, rows, examined %d, %d, %d with visitPicked; %d, %d, %d reading every edge", w,
						picked.visited, picked.rowsDone, picked.examined, scan.visited, scan.rowsDone, scan.examined)
				}
				found += len(scan.hits)
				rows += scan.rowsDone
			}
			if found < 300 {
				t.Errorf("%d words found in all; the comparison is too thin", found)
			}
			t.Logf("%d words found, %d rows", found, rows)
		})
	}
}
