package correct

import (
	"math/rand/v2"
	"slices"
	"strings"
	"testing"
)

// TestRuleStartsMatchRules checks the per-position first-byte tables of
// rulestart.go against the condition extend applies rule by rule: a rule
// may start after a prefix when one of the row entries its typed side can
// start from, plus its cost, fits the budget. For typed words from
// corpora/misspellings-dev.tsv, the built-in error model and rows drawn at
// random, the set addRuleStarts gives must be exactly the first intended
// bytes of the rules that pass that test, and its start positions exactly
// the typed positions from which one of them can start within budget (an
// equivalence check between two ways of computing one set; no outside
// reference applies).
func TestRuleStartsMatchRules(t *testing.T) {
	ch := qwertyChannel(t)
	tests := []struct {
		name   string
		typed  string
		budget float32
	}{
		{"ie swapped, narrow pass", "recieve", 6},
		{"doubled consonant, middle pass", "occurence", 9},
		{"vowel confusion, widest pass", "seperate", 13},
		{"long word, widest pass", "definately", 13},
		{"one letter", "u", 6},
		{"apostrophe", "dont'", 9},
	}
	rng := rand.New(rand.NewPCG(4, 13))
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var s search
			s.reset(ch, nil, tt.typed, tt.budget, len(tt.typed)+maxExtra)
			if len(s.rules) == 0 {
				t.Fatalf("no rule applies to %q; the check would be empty", tt.typed)
			}
			row := make([]float32, s.n+1)
			nonEmpty := 0
			for trial := 0; trial < 200; trial++ {
				for j := range row {
					row[j] = rng.Float32() * (tt.budget + 2)
				}
				var want [4]uint64
				var wantAt uint64
				for i := range s.rules {
					r := &s.rules[i]
					v := inf
					for ends := r.ends; ends != 0; ends &= ends - 1 {
						x := bitIndex64(ends) - r.lb
						v = min(v, row[x])
						if row[x]+r.cost <= tt.budget {
							wantAt |= 1 << x
						}
					}
					if v+r.cost <= tt.budget {
						c := r.alpha[0]
						want[c>>6] |= 1 << (c & 63)
					}
				}
				var got startSet
				s.addRuleStarts(row, &got)
				if got.first != want {
					t.Fatalf("row %v: set %x, want %x", row, got.first, want)
				}
				if got.at != wantAt {
					t.Fatalf("row %v: start positions %b, want %b", row, got.at, wantAt)
				}
				if want != [4]uint64{} {
					nonEmpty++
				}
			}
			if nonEmpty == 0 {
				t.Errorf("every drawn row gave an empty set; the check is vacuous")
			}
		})
	}
}

// TestPrepareStartsMatchRuleScan checks the per-position steps
// prepareStarts builds (from the cheapest start of each first byte, put
// in order of position by a counting sort) against steps built rule by
// rule and position by position: for each rule by cost and each typed
// position its typed side starts at, a first byte new at that position
// adds a step at the rule's cost, or joins the last step when that has
// the same cost. Words: every typed word of corpora/misspellings-dev.tsv
// under the built-in error model (an equivalence check between two ways
// of computing one table; no outside reference applies).
func TestPrepareStartsMatchRuleScan(t *testing.T) {
	ch := qwertyChannel(t)
	var s search
	steps := 0
	for _, p := range devPairs(t) {
		w := strings.ToLower(p.Typed)
		if len(w) > maxTyped {
			continue
		}
		s.reset(ch, nil, w, inf, len(w)+maxExtra)
		want := make([][]startStep, s.n+1)
		var seen [maxTyped + 1][4]uint64
		for i := range s.rules {
			r := &s.rules[i]
			c := r.alpha[0]
			for ends := r.ends; ends != 0; ends &= ends - 1 {
				x := bitIndex64(ends) - r.lb
				m := &seen[x]
				if m[c>>6]&(1<<(c&63)) != 0 {
					continue
				}
				m[c>>6] |= 1 << (c & 63)
				if k := len(want[x]); k > 0 && want[x][k-1].cost == r.cost {
					want[x][k-1].mask = *m
				} else {
					want[x] = append(want[x], startStep{cost: r.cost, mask: *m})
				}
			}
		}
		if len(s.startOff) != s.n+2 {
			t.Fatalf("%q: %d start offsets, want %d", w, len(s.startOff), s.n+2)
		}
		for x := 0; x <= s.n; x++ {
			got := s.startTab[s.startOff[x]:s.startOff[x+1]]
			if !slices.Equal(got, want[x]) {
				t.Fatalf("%q: steps at %d = %v, want %v", w, x, got, want[x])
			}
			steps += len(got)
		}
		for c, m := range s.startSeen {
			if m != 0 {
				t.Fatalf("%q: prepareStarts left scratch for byte %d set", w, c)
			}
		}
	}
	if steps == 0 {
		t.Fatal("no steps at all: the check is vacuous")
	}
}

// TestSetMask checks setMask against an array assignment (the Go
// language's copy semantics, the reference) on masks with one bit set in
// each of the four words in turn and on random masks.
func TestSetMask(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	var cases [][4]uint64
	for w := range 4 {
		var m [4]uint64
		m[w] = 1 << (17 * w % 64)
		cases = append(cases, m)
	}
	for range 50 {
		cases = append(cases, [4]uint64{rng.Uint64(), rng.Uint64(), rng.Uint64(), rng.Uint64()})
	}
	for _, src := range cases {
		var dst [4]uint64
		setMask(&dst, &src)
		want := src
		if dst != want {
			t.Errorf("setMask(%x) = %x", src, dst)
		}
	}
}
