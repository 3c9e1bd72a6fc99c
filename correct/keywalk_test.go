package correct

import (
	"fmt"
	"slices"
	"testing"
)

// widestHits runs the widest pass of c for w as runPass does, with the
// keys' walk first or (oneWalk) the keys as a filter of one walk, and
// returns the words found and their costs, sorted by ID.
func widestHits(t *testing.T, c *Corrector, w string, oneWalk bool) []hit {
	t.Helper()
	s := &search{below: c.below}
	s.reset(c.ch, c.lex, w, float32(c.opts.MaxCost), min(len(w)+maxExtra, 2*maxTyped))
	old := c.oneWalk
	c.oneWalk = oneWalk
	c.runPass(s, w, 2, c.opts.MaxCost, true)
	c.oneWalk = old
	h := slices.Clone(s.hits)
	slices.SortFunc(h, func(a, b hit) int { return int(a.id) - int(b.id) })
	return h
}

// TestKeyWalkSameWords checks that the widest pass walked in two (the
// keys alone, then the weighted rows along the words they keep) finds
// exactly the words, at exactly the costs, of the one walk with the keys
// as a filter, which TestSkeletonPassKeepsWords checks against the whole
// lexicon's walk and plain edit distances (the Damerau-Levenshtein
// distance restricted to optimal string alignment, Damerau 1964; the
// reference is this package's unitChannel). Words: every development
// misspelling and random strings, some short (a short typed skeleton lets
// the keys through much of the lexicon).
func TestKeyWalkSameWords(t *testing.T) {
	c, _ := subtlexTrieCorrector(t)
	typed := typedSample(t, 1, 0, 4, 60, 1, 12)
	tests := []struct {
		name  string
		words []string
	}{
		{"development", typed[:len(typed)-60]},
		{"random", typed[len(typed)-60:]},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			found := 0
			for _, w := range tt.words {
				one, two := widestHits(t, c, w, true), widestHits(t, c, w, false)
				found += len(one)
				if fmt.Sprint(one) != fmt.Sprint(two) {
					t.Errorf("%q: the two walks found %v, the one walk %v", w, two, one)
				}
			}
			if found == 0 {
				t.Error("no word found at all: the comparison tests nothing")
			}
		})
	}
}

// TestKeyWalkSameCandidates checks that Correct gives every development
// misspelling the same eight candidates (word, ID, kind, cost, score) and
// the same decision with the widest pass walked in two as in one walk
// with the keys as a filter: over the SUBTLEX-US trie with the engine's
// cap (benchCap) and over the SUBTLEX-US ∪ SCOWL flat lexicon with no cap.
// (The pass's words themselves are checked by TestKeyWalkSameWords.)
func TestKeyWalkSameCandidates(t *testing.T) {
	d := corpus(t)
	trie := newTrieLex(t, d.subtlexLex)
	capped, err := New(trie, d.unigramScorer(trie.words), Options{MaxStates: benchCap})
	if err != nil {
		t.Fatal(err)
	}
	flat, _, _ := devCorrector(t, Options{})
	tests := []struct {
		name string
		c    *Corrector
	}{
		{"trie-cap", capped},
		{"flat-nocap", flat},
	}
	pairs := devPairs(t)
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			wide := 0
			for _, p := range pairs {
				tt.c.oneWalk = true
				one, dOne := tt.c.Correct(p.Typed, nil, 8, nil)
				tt.c.oneWalk = false
				two, dTwo := tt.c.Correct(p.Typed, nil, 8, nil)
				if fmt.Sprint(one, dOne) != fmt.Sprint(two, dTwo) {
					t.Errorf("%q: two walks gave %v %v, one walk %v %v", p.Typed, two, dTwo, one, dOne)
				}
				if len(one) > 0 && one[0].Cost > secondPass {
					wide++
				}
			}
			if wide == 0 {
				t.Error("no best candidate from the widest pass: the comparison tests nothing")
			}
			t.Logf("%d words whose best candidate costs over %d nats", wide, secondPass)
		})
	}
}

// trieWords returns the words the keys' trie t records over table g: the
// paths from node 0 to its accepting nodes, spelled by the table's edge
// bytes.
func trieWords(t *keyTrie, g *belowTable) []string {
	var out []string
	var walk func(n int32, path []byte)
	walk = func(n int32, path []byte) {
		nd := t.nodes[n]
		if nd.accept {
			out = append(out, string(path))
		}
		for _, e := range t.edges[nd.lo:nd.hi] {
			walk(e.child, append(path, g.eb[e.k]))
		}
	}
	if len(t.nodes) > 0 {
		walk(0, nil)
	}
	return out
}

// TestKeyWalkRepeatedSkeletonByte checks the keys' trie on small
// hand-made lexicons against skelKeeps (direct OSA distances): the words
// it records are exactly those skelKeeps keeps. The cases are the ones
// setSkMask's cut must not lose: a word whose skeleton goes on with the
// skeleton's last byte again (left out of the skeleton) after the edit
// is spent, so that the next skeleton byte is out of the mask
// ("saaixxes" for "sonos": skeleton sxs, one substitution from sns; the
// plain key out of reach from "saai" on), a word ending with vowels once the skeleton is
// in reach, and words below the cut point that no key keeps.
func TestKeyWalkRepeatedSkeletonByte(t *testing.T) {
	tests := []struct {
		name  string
		typed string
		words []string
	}{
		{"last byte again after the edit", "sonos", []string{"saaixxes", "saaixxed", "sixxes", "sixtus", "sax", "sanas"}},
		{"vowels after the skeleton", "sonos", []string{"sinsaeiou", "sinsy", "sinst", "sinsx"}},
		{"no key keeps the rest", "petition", []string{"pattern", "potion", "petitions", "xylophone", "pitta"}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			lex := newTrieLex(t, tt.words)
			g := newBelowTable(lex, lex)
			if g == nil || g.rest == nil {
				t.Fatal("no letters-below table")
			}
			maxDepth := min(len(tt.typed)+maxExtra, 2*maxTyped)
			var f skelFilter
			f.reset(tt.typed, maxDepth)
			var kt keyTrie
			if !kt.build(&f, g, maxDepth) {
				t.Fatal("the keys' walk gave up")
			}
			got := trieWords(&kt, g)
			var want []string
			for _, w := range lex.words {
				if skelKeeps(tt.typed, w) {
					want = append(want, w)
				}
			}
			if fmt.Sprint(got) != fmt.Sprint(want) {
				t.Errorf("%q: trie words %q, want %q (skelKeeps)", tt.typed, got, want)
			}
		})
	}
}

// TestMaskLetters checks maskLetters on every one-byte mask and on the
// full mask against belowBit, the letters' own definition (below.go).
func TestMaskLetters(t *testing.T) {
	tests := []struct {
		name  string
		bytes string
	}{
		{"one letter", "s"},
		{"letters and vowels", "nsaeiou"},
		{"apostrophe and hyphen", "'-"},
		{"upper case counts as other", "A"},
		{"empty", ""},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var m [4]uint64
			var want uint32
			for i := 0; i < len(tt.bytes); i++ {
				c := tt.bytes[i]
				m[c>>6] |= 1 << (c & 63)
				want |= belowBit(c)
			}
			if got := maskLetters(&m); got != want {
				t.Errorf("maskLetters(%q) = %#x, want %#x", tt.bytes, got, want)
			}
		})
	}
	all := [4]uint64{^uint64(0), ^uint64(0), ^uint64(0), ^uint64(0)}
	if got := maskLetters(&all); got != belowAll {
		t.Errorf("maskLetters(all) = %#x, want %#x", got, uint32(belowAll))
	}
	for c := range 256 {
		var m [4]uint64
		m[c>>6] |= 1 << (c & 63)
		if got := maskLetters(&m); got != belowBit(byte(c)) {
			t.Errorf("maskLetters(%#x) = %#x, want %#x", c, got, belowBit(byte(c)))
		}
	}
}
