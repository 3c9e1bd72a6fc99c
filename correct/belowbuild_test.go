package correct

import (
	"slices"
	"testing"
)

// refBelowTable is a plain build of the letters-below table kept as the
// reference for newBelowTable: one breadth-first walk that numbers states
// through a Go map and appends nodes and edges as it goes, then the same
// fillSets. newBelowTable must give the same arrays.
func refBelowTable(lex Lexicon, el EdgeLister) *belowTable {
	t := &belowTable{}
	index := map[int]uint32{lex.Start(): 0}
	states := []int{lex.Start()}
	for i := 0; i < len(states); i++ {
		st := states[i]
		nd := belowNode{lo: uint32(len(t.eb)), sets: unknownSets}
		if ok, fo := lex.Final(st); ok {
			nd.lo |= finalBit
			nd.fin = uint32(fo)
		}
		t.nodes = append(t.nodes, nd)
		for _, e := range el.AppendEdges(nil, st) {
			k, seen := index[e.Next]
			if !seen {
				k = uint32(len(states))
				index[e.Next] = k
				states = append(states, e.Next)
			}
			t.eb = append(t.eb, e.Byte)
			t.en = append(t.en, k)
			t.eo = append(t.eo, uint32(e.Out))
		}
	}
	t.nodes = append(t.nodes, belowNode{lo: uint32(len(t.eb))})
	fillSets(t, states)
	return t
}

// edgeLexicon is a lexicon that lists edges, as newBelowTable takes it.
type edgeLexicon interface {
	Lexicon
	EdgeLister
}

// TestBelowTableMatchesReference checks that newBelowTable, which sizes
// its arrays in a first walk, builds exactly the arrays of the plain
// appending build (refBelowTable), on the SUBTLEX-US word list
// (corpora/subtlex-us-word-counts.tsv) through both test lexicons and on
// small hand-made lists, and that each array is allocated at its final
// size. A cross-check of two code paths of the project, no external
// source; TestBelowTableMatchesWordList checks the table against the word
// list itself.
func TestBelowTableMatchesReference(t *testing.T) {
	d := corpus(t)
	tests := []struct {
		name string
		lex  func(t *testing.T) edgeLexicon
	}{
		{"subtlex trie", func(t *testing.T) edgeLexicon { return newTrieLex(t, d.subtlexLex) }},
		{"subtlex flat", func(t *testing.T) edgeLexicon { return newFlatLex(d.subtlexLex) }},
		{"one word", func(t *testing.T) edgeLexicon { return newTrieLex(t, []string{"loom"}) }},
		{"shared suffixes", func(t *testing.T) edgeLexicon {
			return newTrieLex(t, []string{"bring", "brings", "ring", "rings", "sing", "sings", "sting"})
		}},
		{"prefix words", func(t *testing.T) edgeLexicon {
			return newFlatLex([]string{"a", "an", "and", "android", "ant", "can't", "x-ray"})
		}},
		{"negative states", func(t *testing.T) edgeLexicon { return negLex{newFlatLex(d.subtlexLex[:5000])} }},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			lex := tt.lex(t)
			got, want := newBelowTable(lex, lex), refBelowTable(lex, lex)
			if got == nil {
				t.Fatal("newBelowTable returned nil")
			}
			checkSameTable(t, got, want)
		})
	}
}

// negLex renumbers the odd states of a lexicon as negative numbers
// (state s as -s-2), which no 32-bit list of states can hold.
type negLex struct{ edgeLexicon }

// negState returns the renumbered state s; innerState undoes it.
func negState(s int) int {
	if s%2 != 0 {
		return -s - 2
	}
	return s
}

func innerState(s int) int {
	if s < 0 {
		return -s - 2
	}
	return s
}

func (l negLex) Start() int { return negState(l.edgeLexicon.Start()) }

func (l negLex) Step(s int, b byte) (int, uint64, bool) {
	n, out, ok := l.edgeLexicon.Step(innerState(s), b)
	return negState(n), out, ok
}

func (l negLex) Final(s int) (bool, uint64) { return l.edgeLexicon.Final(innerState(s)) }
func (l negLex) CanMatch(s int) bool        { return l.edgeLexicon.CanMatch(innerState(s)) }

// AppendEdges implements EdgeLister.
func (l negLex) AppendEdges(dst []Edge, s int) []Edge {
	n := len(dst)
	dst = l.edgeLexicon.AppendEdges(dst, innerState(s))
	for i := n; i < len(dst); i++ {
		dst[i].Next = negState(dst[i].Next)
	}
	return dst
}

// checkSameTable reports where got differs from want, and any array of
// got with spare capacity.
func checkSameTable(t *testing.T, got, want *belowTable) {
	t.Helper()
	if !slices.Equal(got.nodes, want.nodes) {
		t.Errorf("nodes differ: %d nodes, want %d", len(got.nodes), len(want.nodes))
		for i := range min(len(got.nodes), len(want.nodes)) {
			if got.nodes[i] != want.nodes[i] {
				t.Errorf("first difference at node %d: %+v, want %+v", i, got.nodes[i], want.nodes[i])
				break
			}
		}
	}
	if !slices.Equal(got.eb, want.eb) {
		t.Errorf("edge bytes differ (%d, want %d)", len(got.eb), len(want.eb))
	}
	if !slices.Equal(got.en, want.en) {
		t.Errorf("edge targets differ (%d, want %d)", len(got.en), len(want.en))
	}
	if !slices.Equal(got.eo, want.eo) {
		t.Errorf("edge outputs differ (%d, want %d)", len(got.eo), len(want.eo))
	}
	// The set parentBound prices an edge's child with, by its definition
	// from the reference's nodes and edges.
	if len(got.ebp) != len(want.eb) || cap(got.ebp) != len(got.ebp) {
		t.Errorf("ebp: %d entries (cap %d), want %d", len(got.ebp), cap(got.ebp), len(want.eb))
	} else {
		for k, b := range want.eb {
			if v := want.nodes[want.en[k]].sets.below() | belowBit(b); got.ebp[k] != v {
				t.Errorf("ebp[%d] = %b, want %b (the letters below node %d and %q)", k, got.ebp[k], v, want.en[k], b)
				break
			}
		}
	}
	if cap(got.nodes) != len(got.nodes) || cap(got.eb) != len(got.eb) || cap(got.en) != len(got.en) || cap(got.eo) != len(got.eo) {
		t.Errorf("spare capacity: nodes %d/%d, eb %d/%d, en %d/%d, eo %d/%d", len(got.nodes), cap(got.nodes),
			len(got.eb), cap(got.eb), len(got.en), cap(got.en), len(got.eo), cap(got.eo))
	}
}

// shiftyLexicon lists, from its second listing of the start state on,
// edges other than the first listing's: a lexicon that changes while the
// table is built.
type shiftyLexicon struct {
	edgeLexicon
	mode   string
	starts int
}

// AppendEdges implements EdgeLister.
func (l *shiftyLexicon) AppendEdges(dst []Edge, state int) []Edge {
	n := len(dst)
	dst = l.edgeLexicon.AppendEdges(dst, state)
	if state != l.Start() {
		return dst
	}
	l.starts++
	if l.starts < 2 {
		return dst
	}
	switch l.mode {
	case "more":
		dst = append(dst, Edge{Byte: 'q', Next: dst[n].Next})
	case "fewer":
		dst = dst[:len(dst)-1]
	case "unknown state":
		dst[n].Next = -12345
	}
	return dst
}

// TestBelowTableShiftingLexicon checks that a lexicon whose listings
// change between newBelowTable's two walks gets no table (nil, so no
// bound) instead of a wrong one or a panic.
func TestBelowTableShiftingLexicon(t *testing.T) {
	for _, mode := range []string{"more", "fewer", "unknown state"} {
		t.Run(mode, func(t *testing.T) {
			lex := &shiftyLexicon{edgeLexicon: newFlatLex([]string{"bad", "bed", "bid", "cod"}), mode: mode}
			if tab := newBelowTable(lex, lex); tab != nil {
				t.Errorf("got a table of %d nodes, want nil", len(tab.nodes))
			}
		})
	}
}

// BenchmarkNewBelowTable measures building the letters-below table for
// the 74k-word SUBTLEX-US lexicon (as the engine's lexicon section), on
// its own and within New, with its allocations; it reports the table's
// size.
func BenchmarkNewBelowTable(b *testing.B) {
	d := corpus(b)
	lex := newTrieLex(b, d.subtlexLex)
	sc := d.unigramScorer(lex.words)
	b.Run("table", func(b *testing.B) {
		b.ReportAllocs()
		var tab *belowTable
		for b.Loop() {
			tab = newBelowTable(lex, lex)
		}
		size := 16*len(tab.nodes) + 9*len(tab.eb)
		b.ReportMetric(float64(size), "table-B")
		b.ReportMetric(float64(len(tab.nodes)-1), "states")
		b.ReportMetric(float64(len(tab.eb)), "edges")
	})
	b.Run("New", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			if _, err := New(lex, sc, Options{}); err != nil {
				b.Fatal(err)
			}
		}
	})
}
