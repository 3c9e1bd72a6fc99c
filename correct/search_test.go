package correct

import (
	"fmt"
	"math"
	"math/bits"
	"math/rand/v2"
	"slices"
	"sort"
	"strings"
	"testing"

	"github.com/blevesearch/vellum"
	"github.com/blevesearch/vellum/levenshtein"
)

// TestSearchMatchesVellumLevenshtein checks the lexicon walk against
// vellum's Levenshtein automaton (github.com/blevesearch/vellum/levenshtein,
// a reference implementation): with unit costs, the words found within
// distance 1 and 2 are the same set, with and without transpositions,
// whether the walk probes bytes one at a time (vellum's own FST) or lists
// each state's edges (the trie package's reader and the flat test trie).
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
	walks := []struct {
		name string
		lex  Lexicon
		word func([]byte, uint32) []byte
	}{
		{"vellum", lex, lex.AppendWord},
		{"trie", newTrieLex(t, words), newTrieLex(t, words).AppendWord},
		{"flat", newFlatLex(words), newFlatLex(words).AppendWord},
	}
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
					sort.Strings(want)
					for _, wk := range walks {
						var s search
						s.reset(ch, wk.lex, q, float32(dist), len(q)+int(dist))
						s.run()
						var got []string
						for _, h := range s.hits {
							got = append(got, string(wk.word(nil, h.id)))
						}
						sort.Strings(got)
						if fmt.Sprint(got) != fmt.Sprint(want) {
							t.Errorf("%s search(%q, %d) = %v\nwant %v", wk.name, q, dist, got, want)
						}
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

// TestLeadCost checks the first-letter surcharge (leadCost, derived in
// channel.go from the misspellings list and the first-letter finding of
// Pollock and Zamora 1983, from memory): a spelling edit of the first
// letter costs leadCost more than the same edit further in, while a swap
// of the first two letters and a slip to a neighbouring key cost the same
// wherever they are.
func TestLeadCost(t *testing.T) {
	ch := qwertyChannel(t)
	// k and l are neighbours on QWERTY, z and p far apart: the slip
	// explains k for l best, and z for p worse than a spelling error.
	if ch.slipSub['k']['l'] > ch.sub['k']['l'] || ch.slipSub['z']['p'] < ch.sub['z']['p']+leadCost {
		t.Fatalf("slip costs k-l %v, z-p %v; want the first cheapest, the second dearer than %v", ch.slipSub['k']['l'], ch.slipSub['z']['p'], ch.sub['z']['p']+leadCost)
	}
	tests := []struct {
		name                 string
		first, firstIntended string // edit at the first letter
		mid, midIntended     string // the same edit further in
		extra                float32
	}{
		{"far substitution", "zat", "pat", "azt", "apt", leadCost},
		{"neighbour slip", "kove", "love", "okve", "olve", 0},
		{"swap", "wvab", "vwab", "awvb", "avwb", 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			a := ch.distance(tc.first, tc.firstIntended)
			b := ch.distance(tc.mid, tc.midIntended)
			if diff := a - b; math.Abs(float64(diff-tc.extra)) > 1e-4 {
				t.Errorf("distance(%q,%q) − distance(%q,%q) = %v, want %v", tc.first, tc.firstIntended, tc.mid, tc.midIntended, diff, tc.extra)
			}
		})
	}
}

// TestPrepareRules checks the multi-letter rules prepare lists for a typed
// word against a direct scan of the error model (every rule whose typed
// side occurs in the word, at every position where it ends), on words of
// the development misspellings list (corpora/misspellings-dev.tsv), and
// that the list is ordered by cost, as the search's early exits assume.
func TestPrepareRules(t *testing.T) {
	c, _, _ := devCorrector(t, Options{})
	ch := c.ch
	pairs := devPairs(t)
	for i := 0; i < len(pairs); i += 97 {
		typed := strings.ToLower(pairs[i].Typed)
		if len(typed) > maxTyped || !latinOnly(typed) {
			continue
		}
		t.Run(typed, func(t *testing.T) {
			want := map[int32]uint64{}
			for ri, r := range ch.rules {
				for e := len(r.beta); e <= len(typed); e++ {
					if typed[e-len(r.beta):e] == r.beta {
						want[int32(ri)] |= 1 << e
					}
				}
			}
			var s search
			s.reset(ch, c.lex, typed, 13, len(typed)+maxExtra)
			if len(s.rules) != len(want) {
				t.Errorf("%d rules listed, scan finds %d", len(s.rules), len(want))
			}
			for k, r := range s.rules {
				if want[r.src] != r.ends {
					t.Errorf("rule %q→%q: ends %b, scan %b", ch.rules[r.src].alpha, ch.rules[r.src].beta, r.ends, want[r.src])
				}
				if k > 0 && r.cost < s.rules[k-1].cost {
					t.Errorf("rule %d costs %v, less than the one before (%v)", k, r.cost, s.rules[k-1].cost)
				}
			}
		})
	}
}

// reversedEdges lists a lexicon's edges in falling byte order.
type reversedEdges struct{ edgeLexicon }

// AppendEdges implements EdgeLister.
func (l reversedEdges) AppendEdges(dst []Edge, state int) []Edge {
	n := len(dst)
	dst = l.edgeLexicon.AppendEdges(dst, state)
	slices.Reverse(dst[n:])
	return dst
}

// TestPickLettersMatchesEdgeScan checks the walk's direct pick of a
// state's letter edges (pickLetters, search.go) against reading every edge
// and keeping those whose byte is in the set, on the letters-below table
// of the SUBTLEX-US word list (corpora/subtlex-us-word-counts.tsv) through
// both test lexicons: for every state and sets drawn at random, the same
// edges in the same order; a state pickLetters declines has an edge on a
// byte other than a–z. A table built from edges listed in falling order
// must not claim rising order (the walk then reads every edge). A
// cross-check of two code paths of the project, no external source.
func TestPickLettersMatchesEdgeScan(t *testing.T) {
	d := corpus(t)
	tests := []struct {
		name          string
		lex           edgeLexicon
		wantAscending bool
		wantDeclined  bool // some state has an edge on a byte other than a–z
	}{
		{"trie", newTrieLex(t, d.subtlexLex), true, false},
		{"flat", newFlatLex(d.subtlexLex), true, false},
		{"flat, edges reversed", reversedEdges{newFlatLex(d.subtlexLex)}, false, false},
		{"apostrophe, hyphen and accent", newFlatLex(sortedUnique([]string{"cafe", "café", "can't", "cant", "e-mail", "email", "émigré"})), true, true},
	}
	rng := rand.New(rand.NewPCG(12, 4))
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			tab := newBelowTable(tt.lex, tt.lex)
			if tab == nil {
				t.Fatal("no table")
			}
			if tab.ascending != tt.wantAscending {
				t.Fatalf("ascending = %v, want %v", tab.ascending, tt.wantAscending)
			}
			if !tab.ascending {
				return
			}
			picked, declined := 0, 0
			for i := 0; i+1 < len(tab.nodes); i++ {
				lo, hi := tab.edges(i)
				for trial := 0; trial < 4; trial++ {
					set := [4]uint64{rng.Uint64(), rng.Uint64(), rng.Uint64(), rng.Uint64()}
					if trial == 0 {
						set = [4]uint64{^uint64(0), ^uint64(0), ^uint64(0), ^uint64(0)}
					}
					pick, nx, ok := pickLetters(tab.nodes[i].sets.next(), &set)
					if !ok {
						declined++
						letters := true
						for k := lo; k < hi; k++ {
							letters = letters && tab.eb[k] >= 'a' && tab.eb[k] <= 'z'
						}
						if letters {
							t.Fatalf("node %d: declined, but its edges %q are all letters", i, tab.eb[lo:hi])
						}
						break
					}
					var want, got []int
					for k := lo; k < hi; k++ {
						if c := tab.eb[k]; set[c>>6]&(1<<(c&63)) != 0 {
							want = append(want, k)
						}
					}
					for ; pick != 0; pick &= pick - 1 {
						b := bitIndex(pick)
						got = append(got, lo+bits.OnesCount32(nx&(1<<b-1)))
					}
					if !slices.Equal(got, want) {
						t.Fatalf("node %d (edges %q), set %x: picked edges %v, want %v", i, tab.eb[lo:hi], set, got, want)
					}
					picked += len(got)
				}
			}
			if picked == 0 {
				t.Errorf("no edge picked: the check is vacuous")
			}
			if tt.wantDeclined != (declined > 0) {
				t.Errorf("declined %d states; want some: %v", declined, tt.wantDeclined)
			}
		})
	}
}

// TestAllowedMatchesByteScan checks the set of bytes worth trying
// (allowed), whose deletions are taken as one union per budget
// (channel.delUpTo) and whose transpositions are found through the typed
// byte positions, against the same set built byte by byte as its
// definition reads: every typed byte whose entry fits the budget and the
// substitutions for it that fit, every deletion that fits after the row
// minimum, the doubled last byte, each transposition of the last byte
// with a typed neighbour that fits from the parent's row, the partial
// rules' next bytes, and the rule starts (addRuleStarts, checked rule by
// rule in TestRuleStartsMatchRules). Typed words: every one of
// corpora/misspellings-dev.tsv, under the built-in error model and the
// unit-cost channel, with rows, minima and last bytes drawn at random. A
// cross-check of two code paths of the project, no external source.
func TestAllowedMatchesByteScan(t *testing.T) {
	tests := []struct {
		name string
		ch   *channel
	}{
		{"built-in model", qwertyChannel(t)},
		{"unit costs with transpositions", unitChannel(true)},
	}
	rng := rand.New(rand.NewPCG(16, 4))
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			ch := tt.ch
			checked, dels, swaps := 0, 0, 0
			devSearches(t, ch, func(s *search, w string) {
				if s.n == 0 {
					return
				}
				s.below = &belowTable{}
				defer func() { s.below = nil }()
				s.prepare(ch) // the letters-below tables, for the rule starts
				for trial := 0; trial < 4; trial++ {
					s.budget = []float32{firstPass, secondPass, 13, 2}[trial]
					row := make([]float32, s.n+1)
					prev := make([]float32, s.n+1)
					for j := range row {
						row[j] = rng.Float32() * (s.budget + 3)
						prev[j] = rng.Float32() * (s.budget + 3)
					}
					m := slices.Min(row)
					last := s.t[rng.IntN(s.n)]
					if trial == 3 {
						last = byte('a' + rng.IntN(26))
					}
					got := s.allowed(row, prev, m, last, nil)
					var want [4]uint64
					add := func(c byte) { want[c>>6] |= 1 << (c & 63) }
					for j := 0; j < s.n; j++ {
						if row[j] > s.budget {
							continue
						}
						add(s.t[j])
						for c := 0; c < 256; c++ {
							if byte(c) != s.t[j] && slices.ContainsFunc(ch.cheapSub[s.t[j]], func(o costOpt) bool { return o.c == byte(c) }) && row[j]+ch.sub[s.t[j]][c] <= s.budget {
								add(byte(c))
							}
						}
					}
					for _, o := range ch.cheapDel {
						if m+o.cost <= s.budget {
							add(o.c)
							dels++
						}
					}
					if m+ch.delDbl <= s.budget {
						add(last)
					}
					if ch.trans < inf {
						for j := 2; j <= s.n; j++ {
							if last == s.t[j-1] && prev[j-2]+ch.trans <= s.budget {
								add(s.t[j-2])
								swaps++
							}
						}
					}
					var rs startSet
					s.addRuleStarts(row, &rs)
					for i := range want {
						want[i] |= rs.first[i]
					}
					if got != want {
						t.Fatalf("%q, budget %v, row %v, prev %v, last %q: set %x, want %x", w, s.budget, row, prev, last, got, want)
					}
					checked++
				}
			})
			if checked == 0 || dels == 0 || swaps == 0 {
				t.Fatalf("%d sets checked, %d deletions and %d transpositions taken: the check is too weak", checked, dels, swaps)
			}
		})
	}
}

// TestRowEditsMatchExtraRow checks the rows computeRow computes when rules
// complete or a transposition applies (computeRowEdits: each such entry
// lowered after the substitutions and deletions) against the recurrence
// with the rule and transposition terms gathered in a row of their own
// first and taken in one minimum per entry, bit for bit, along the
// intended word of every pair of corpora/misspellings-dev.tsv under the
// built-in error model, where rules complete on most words. A cross-check
// of two ways of computing one row, no external source; the row itself
// is checked against plain edit distance (github.com/agnivade/levenshtein)
// in TestUnitDistanceMatchesLevenshtein.
func TestRowEditsMatchExtraRow(t *testing.T) {
	ch := qwertyChannel(t)
	var s search
	withRules, withSwaps := 0, 0
	for _, p := range devPairs(t) {
		typed := strings.ToLower(p.Typed)
		for _, intended := range p.Intended {
			intended = strings.ToLower(intended)
			if len(typed) > maxTyped || len(intended) > maxTyped {
				continue
			}
			s.reset(ch, nil, typed, inf, len(intended))
			for d := 0; d < len(intended); d++ {
				s.path[d] = intended[d]
				s.advance(d, intended[d])
				want, wantMin := extraRowRef(&s, d+1)
				if len(s.done) > 0 {
					withRules++
				}
				if d >= 1 && intended[d] != intended[d-1] && (s.pos[intended[d]]<<2)&(s.pos[intended[d-1]]<<1) != 0 {
					withSwaps++
				}
				gotMin := s.computeRowDepth(d + 1)
				got := s.rows[(d+1)*s.w : (d+2)*s.w]
				for j := range got {
					if math.Float32bits(got[j]) != math.Float32bits(want[j]) {
						t.Fatalf("%q for %q, depth %d: row %v, want %v", typed, intended, d+1, got, want)
					}
				}
				if math.Float32bits(gotMin) != math.Float32bits(wantMin) {
					t.Fatalf("%q for %q, depth %d: minimum %v, want %v", typed, intended, d+1, gotMin, wantMin)
				}
			}
		}
	}
	if withRules < 1000 || withSwaps < 20 {
		t.Fatalf("%d rows with rules completed, %d with a transposition: the check is too weak", withRules, withSwaps)
	}
	t.Logf("%d rows with rules completed, %d with a transposition", withRules, withSwaps)
}

// extraRowRef returns row d of s's walk along s.path, with the rules in
// s.done, and its minimum, computed with the rule terms in an extra row:
// the form computeRow had before computeRowEdits (round 16).
func extraRowRef(s *search, d int) ([]float32, float32) {
	w, n, ch := s.w, s.n, s.ch
	c := s.path[d-1]
	var pc byte
	if d >= 2 {
		pc = s.path[d-2]
	}
	P := s.rows[(d-1)*w : d*w]
	R := make([]float32, w)
	sub := s.subRow(c)
	dc := ch.del[c]
	if d >= 2 && pc == c {
		dc = min(dc, ch.delDbl)
	}
	if d == 1 && ch.lead > 0 {
		dc = min(ch.slipDel, dc+ch.lead)
	}
	E := make([]float32, w)
	for j := range E {
		E[j] = inf
	}
	for _, p := range s.done {
		r := &s.rules[p.rule]
		base := s.rows[int(p.from)*w : (int(p.from)+1)*w]
		for ends := r.ends; ends != 0; ends &= ends - 1 {
			e := bits.TrailingZeros64(ends)
			v := base[e-r.lb] + r.cost
			if p.from == 0 && e == r.lb && (r.lb == 0 || r.alpha[0] != s.t[0]) {
				v += ch.lead
			}
			if v < E[e] {
				E[e] = v
			}
		}
	}
	R[0] = min(P[0]+dc, E[0])
	for j := 1; j <= n; j++ {
		R[j] = min(P[j-1]+sub[j-1], P[j]+dc, E[j])
	}
	if d >= 2 && c != pc {
		T := s.rows[(d-2)*w : (d-1)*w]
		for tm := (s.pos[c] << 2) & (s.pos[pc] << 1); tm != 0; tm &= tm - 1 {
			j := bits.TrailingZeros64(tm)
			R[j] = min(R[j], T[j-2]+ch.trans)
		}
	}
	v := R[0]
	m := v
	for j := 1; j <= n; j++ {
		v = min(R[j], v+s.ins[j-1])
		R[j] = v
		m = min(m, v)
	}
	return R, m
}
