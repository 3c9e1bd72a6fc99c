package correct

import (
	"math/rand/v2"
	"testing"
)

// TestRuleStartsMatchRules checks the per-position first-byte tables of
// rulestart.go against the condition extend applies rule by rule: a rule
// may start after a prefix when one of the row entries its typed side can
// start from, plus its cost, fits the budget. For typed words from
// corpora/misspellings-dev.tsv, the built-in error model and rows drawn at
// random, the set addRuleStarts gives must be exactly the first intended
// bytes of the rules that pass that test (an equivalence check between two
// ways of computing one set; no outside reference applies).
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
				for i := range s.rules {
					r := &s.rules[i]
					v := inf
					for ends := r.ends; ends != 0; ends &= ends - 1 {
						v = min(v, row[bitIndex64(ends)-r.lb])
					}
					if v+r.cost <= tt.budget {
						c := r.alpha[0]
						want[c>>6] |= 1 << (c & 63)
					}
				}
				var got [4]uint64
				s.addRuleStarts(row, &got)
				if got != want {
					t.Fatalf("row %v: set %x, want %x", row, got, want)
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
