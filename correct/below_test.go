package correct

import (
	"math"
	"math/rand/v2"
	"sort"
	"strings"
	"testing"
)

// TestBelowBit checks the byte classes of the letters-below sets: one bit
// per letter a–z, the apostrophe and the hyphen, one shared by every other
// byte (the layout documented in below.go).
func TestBelowBit(t *testing.T) {
	tests := []struct {
		name string
		c    byte
		want uint32
	}{
		{"first letter", 'a', 1},
		{"last letter", 'z', 1 << 25},
		{"apostrophe", '\'', 1 << 26},
		{"hyphen", '-', 1 << 27},
		{"upper case is other", 'A', 1 << 28},
		{"digit is other", '7', 1 << 28},
		{"UTF-8 lead byte is other", 0xc3, 1 << 28},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := belowBit(tt.c); got != tt.want {
				t.Errorf("belowBit(%q) = %#x, want %#x", tt.c, got, tt.want)
			}
		})
	}
}

// TestBelowTableMatchesWordList checks the table built from the lexicon
// automaton against the word list it was built from (SUBTLEX-US words,
// corpora/subtlex-us-word-counts.tsv): for every prefix of 3,000 words,
// the bytes below the prefix's state are the bytes that follow the prefix
// in some listed word, and the bytes of its edges are the bytes right
// after the prefix. Both lexicons stand for the same list, so the table
// (walked through the automaton's shared states) must agree with the
// plain listing.
func TestBelowTableMatchesWordList(t *testing.T) {
	d := corpus(t)
	for _, lexName := range []string{"trie", "flat"} {
		t.Run(lexName, func(t *testing.T) {
			var lex interface {
				Lexicon
				EdgeLister
			}
			var words []string
			if lexName == "trie" {
				l := newTrieLex(t, d.subtlexLex)
				lex, words = l, l.words
			} else {
				l := newFlatLex(d.subtlexLex)
				lex, words = l, l.words
			}
			tab := newBelowTable(lex, lex)
			checked := 0
			cache := map[string][2]uint32{}
			for i := 0; i < len(words); i += len(words) / 3000 {
				w := words[i]
				node := 0 // the table's copy of the start state
				var acc uint32
				for k := 0; k <= len(w); k++ {
					if k > 0 {
						var ok bool
						var out uint32
						if node, out, ok = tableStep(tab, node, w[k-1]); !ok {
							t.Fatalf("%q: no transition on %q", w, w[:k])
						}
						acc += out
					}
					prefix := w[:k]
					want, seen := cache[prefix]
					if !seen {
						// Words sharing the prefix are consecutive in the
						// sorted list.
						lo := sort.SearchStrings(words, prefix)
						for j := lo; j < len(words) && strings.HasPrefix(words[j], prefix); j++ {
							want[0] |= classBits(words[j][k:])
							if len(words[j]) > k {
								want[1] |= belowBit(words[j][k])
							}
						}
						cache[prefix] = want
					}
					wantBelow, wantNext := want[0], want[1]
					sets := tab.nodes[node].sets
					if sets.below() != wantBelow || sets.next() != wantNext {
						t.Errorf("%q: prefix %q: below %#x next %#x, want %#x %#x", w, prefix, sets.below(), sets.next(), wantBelow, wantNext)
					}
					checked++
				}
				// The copy ends the word where the list does, with the
				// word's ID (its rank in the sorted list) as the sum of
				// the outputs on the way.
				if fin, out := tab.final(node); !fin || int(acc+out) != i {
					t.Errorf("%q: final %v ID %d, want true %d", w, fin, acc+out, i)
				}
			}
			if checked < 10000 {
				t.Errorf("checked %d prefixes; too few", checked)
			}
		})
	}
}

// tableStep follows node's edge on byte c in the table's copy of the
// automaton.
func tableStep(tab *belowTable, node int, c byte) (int, uint32, bool) {
	lo, hi := tab.edges(node)
	for k := lo; k < hi; k++ {
		if tab.eb[k] == c {
			return int(tab.en[k]), tab.eo[k], true
		}
	}
	return 0, 0, false
}

// TestFloorSumsMatchBitTest checks the floor sums of parentBound and
// floorBound, which add missSel[2k + bit k of missPos] at every typed
// position k, against their definition, missLow[k] added only where bit k
// of missPos is set: bit for bit (IEEE 754 addition of +0 leaves a sum
// unchanged), at every suffix, for every typed word of
// corpora/misspellings-dev.tsv under the built-in error model and sets
// of positions drawn at random, with the empty and the full set.
func TestFloorSumsMatchBitTest(t *testing.T) {
	ch := qwertyChannel(t)
	rng := rand.New(rand.NewPCG(13, 7))
	devSearches(t, ch, func(s *search, w string) {
		n := s.n
		all := uint64(1)<<n - 1
		for _, missPos := range []uint64{0, all, rng.Uint64() & all, rng.Uint64() & all, rng.Uint64() & all} {
			var got, want float32
			for k := n - 1; k >= 0; k-- {
				got += s.missSel[2*k|int(missPos>>k&1)]
				if missPos&(1<<k) != 0 {
					want += s.missLow[k]
				}
				if math.Float32bits(got) != math.Float32bits(want) {
					t.Fatalf("%q, positions %#x: floor sum from %d = %v, want %v", w, missPos, k, got, want)
				}
			}
		}
	})
}

// TestLeftOverMatchesBitTest checks leftOver, which prices only the typed
// positions in missPos and then sums from the end with no test per
// position, against its definition: hs[j] the sum, taken from the last
// typed position down, of missCost(k, below) over the positions k >= j in
// missPos (bit k set), and hs[n] zero; bit for bit (IEEE 754 addition of
// +0 leaves a sum unchanged). Words: every typed word of
// corpora/misspellings-dev.tsv under the built-in error model; below
// sets drawn at random, with the empty and the full set, missPos as
// parentBound and childBound make it (the typed positions of the classes
// not below) and also drawn at random; each set is asked twice, so that
// the answer kept in the cache is read as well as computed. An
// equivalence check between two ways of computing one table: no outside
// reference applies.
func TestLeftOverMatchesBitTest(t *testing.T) {
	ch := qwertyChannel(t)
	rng := rand.New(rand.NewPCG(17, 5))
	devSearches(t, ch, func(s *search, w string) {
		n := s.n
		all := uint64(1)<<n - 1
		for _, below := range []uint32{0, belowAll, rng.Uint32() & belowAll, rng.Uint32() & belowAll, rng.Uint32() & belowAll} {
			for _, missPos := range []uint64{s.clsPos.of(s.tbits &^ below), rng.Uint64() & all} {
				clear(s.hsKeys[:]) // missPos is part of the question, not of the cache's key
				for range 2 {
					got := s.leftOver(missPos, below)
					if len(got) != n+1 {
						t.Fatalf("%q, below %#x: %d prices, want %d", w, below, len(got), n+1)
					}
					var want float32
					if math.Float32bits(got[n]) != 0 {
						t.Fatalf("%q, below %#x, positions %#x: price from %d = %v, want 0", w, below, missPos, n, got[n])
					}
					for k := n - 1; k >= 0; k-- {
						if missPos&(1<<k) != 0 {
							want += s.missCost(k, below)
						}
						if math.Float32bits(got[k]) != math.Float32bits(want) {
							t.Fatalf("%q, below %#x, positions %#x: price from %d = %v, want %v", w, below, missPos, k, got[k], want)
						}
					}
				}
			}
		}
	})
}

// TestMissCostMatchesTwoLists checks missCost, which reads one list per
// typed byte (missOpt, prepareMissOpts), against its definition from the
// two lists it merges: the first substitution group of the typed byte
// (subG, by cost) with a class below cheaper than the typed-extra price
// ins[k], else that price, lowered to the first rule share of the
// position (ruleMiss, by cost) whose intended classes are all below, when
// cheaper (firstAny, then firstRule with no edge letters needed); bit for
// bit. Words: every typed word of corpora/misspellings-dev.tsv under the
// built-in error model, at every typed position, for below sets drawn at
// random, single classes, the empty and the full set. An equivalence
// check between two ways of computing one price: no outside reference
// applies.
func TestMissCostMatchesTwoLists(t *testing.T) {
	ch := qwertyChannel(t)
	rng := rand.New(rand.NewPCG(23, 11))
	sets := []uint32{0, belowAll}
	for b := range 29 {
		sets = append(sets, 1<<b)
	}
	shares := 0
	devSearches(t, ch, func(s *search, w string) {
		for k := 0; k < s.n; k++ {
			shares += len(s.ruleMiss[k])
			for _, below := range append(sets, rng.Uint32()&belowAll, rng.Uint32()&belowAll, rng.Uint32()&belowAll) {
				want := firstRule(s.ruleMiss[k], 0, below, firstAny(s.subG[s.t[k]], below, s.ins[k]))
				if got := s.missCost(k, below); math.Float32bits(got) != math.Float32bits(want) {
					t.Fatalf("%q, typed byte %d, below %#x: missCost = %v, want %v", w, k, below, got, want)
				}
			}
		}
	})
	if shares == 0 {
		t.Fatal("no rule shares in any typed word: the check of the merge is empty")
	}
}

// firstAny (the reference of TestMissCostMatchesTwoLists, missCost's
// earlier first half) returns the cost of the first option of g (sorted by cost)
// that has a class in set, or bound if none is cheaper than bound.
func firstAny(g []hopt, set uint32, bound float32) float32 {
	for i := range g {
		if g[i].cost >= bound {
			break
		}
		if g[i].any&set != 0 {
			return g[i].cost
		}
	}
	return bound
}

// firstRule (the reference of TestMissCostMatchesTwoLists, missCost's
// earlier second half) returns the cost of the first rule option of g (sorted by
// cost) that a state with the given sets allows, or bound if none is
// cheaper than bound.
func firstRule(g []hopt, next, below uint32, bound float32) float32 {
	for i := range g {
		if g[i].cost >= bound {
			break
		}
		if g[i].needNext&^next == 0 && g[i].needBelow&^below == 0 {
			return g[i].cost
		}
	}
	return bound
}

// TestStepClassesMatchChannel checks the first-step prices prepareBelow
// fills per typed position and letter class (stepCls, read by stepCost)
// against the channel's costs read directly: for typed position k and
// class b, the least of a substitution of t[k] by a byte of class b, a
// deletion of a byte of class b (spelling or keyboard slip), a rule with
// an empty typed side whose intended side starts with class b, and the
// share (cost over typed length) of a rule starting with class b whose
// typed side starts at k; bit for bit. Words: every typed word of
// corpora/misspellings-dev.tsv, twice per channel, so that the tables
// cached per channel are read as well as built (an equivalence check between two
// ways of computing one table; no outside reference applies).
func TestStepClassesMatchChannel(t *testing.T) {
	base := qwertyChannel(t)
	// With the built-in model a multi-letter rule with an empty typed
	// side is never cheaper than a deletion of its first letter; a copy
	// with dear deletions makes those rules count too.
	dear := *base
	for c := range dear.del {
		dear.del[c] = 30
	}
	dear.slipDel = 30
	var s search
	s.below = &belowTable{}
	checked, byRule := 0, 0
	for round, ch := range []*channel{base, base, &dear, &dear} {
		for _, p := range devPairs(t) {
			w := strings.ToLower(p.Typed)
			if len(w) > maxTyped || w == "" {
				continue
			}
			s.reset(ch, nil, w, inf, len(w)+maxExtra)
			for k := 0; k < s.n; k++ {
				var want [29]float32
				for i := range want {
					want[i] = inf
				}
				for c := 0; c < 256; c++ {
					b := bitIndex(belowBit(byte(c)))
					if c != int(w[k]) {
						want[b] = min(want[b], ch.sub[w[k]][c])
					}
					want[b] = min(want[b], ch.del[c], ch.slipDel)
				}
				for i := range s.rules {
					r := &s.rules[i]
					b := bitIndex(belowBit(r.alpha[0]))
					if r.lb == 0 {
						if r.cost < want[b] && round >= 2 {
							byRule++
						}
						want[b] = min(want[b], r.cost)
					} else if r.ends&(1<<(k+r.lb)) != 0 {
						want[b] = min(want[b], r.cost/float32(r.lb))
					}
				}
				if s.stepCls[k] != want {
					t.Fatalf("%q: stepCls[%d] = %v, want %v", w, k, s.stepCls[k], want)
				}
				checked++
			}
		}
	}
	if checked == 0 || byRule == 0 {
		t.Fatalf("%d typed positions checked, %d prices set by a rule with an empty typed side: the check is too weak", checked, byRule)
	}
}

// devSearches resets s for every typed word of corpora/misspellings-dev.tsv
// (lower-cased, at most maxTyped bytes) with channel ch, no lexicon and an
// unlimited budget, and calls f with it.
func devSearches(t *testing.T, ch *channel, f func(s *search, w string)) {
	t.Helper()
	var s search
	for _, p := range devPairs(t) {
		w := strings.ToLower(p.Typed)
		if len(w) > maxTyped {
			continue
		}
		s.reset(ch, nil, w, inf, len(w)+maxExtra)
		f(&s, w)
	}
}
