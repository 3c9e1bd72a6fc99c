package correct

import (
	"cmp"
	"math/rand/v2"
	"slices"
	"testing"
	"time"

	"github.com/agnivade/levenshtein"
)

// hasSwap reports whether the transposition branch of the recurrence can
// ever fire for a and b.
func hasSwap(a, b string) bool {
	for i := 1; i < len(a); i++ {
		for j := 1; j < len(b); j++ {
			if a[i] == b[j-1] && a[i-1] == b[j] && a[i] != a[i-1] {
				return true
			}
		}
	}
	return false
}

func TestUnitDistanceMatchesLevenshtein(t *testing.T) {
	seed := uint64(time.Now().UnixNano())
	t.Logf("seed %d", seed)
	rng := rand.New(rand.NewPCG(seed, 1))
	word := func() string {
		b := make([]byte, rng.IntN(9))
		for i := range b {
			b[i] = "abcde"[rng.IntN(5)]
		}
		return string(b)
	}
	plain, swap := unitChannel(false), unitChannel(true)
	compared := 0
	for range 3000 {
		a, b := word(), word()
		// Reference: github.com/agnivade/levenshtein (plain edit distance).
		want := levenshtein.ComputeDistance(a, b)
		if got := plain.distance(b, a); int(got) != want {
			t.Fatalf("plain distance(%q,%q) = %v, want %d (seed %d)", b, a, got, want, seed)
		}
		got := swap.distance(b, a)
		if int(got) > want {
			t.Fatalf("distance with swaps(%q,%q) = %v above Levenshtein %d (seed %d)", b, a, got, want, seed)
		}
		if !hasSwap(a, b) {
			compared++
			if int(got) != want {
				t.Fatalf("distance with swaps(%q,%q) = %v, want %d (seed %d)", b, a, got, want, seed)
			}
		}
	}
	if compared < 500 {
		t.Fatalf("only %d swap-free pairs compared", compared)
	}
	// Damerau's adjacent transposition counts one (Damerau 1964).
	if got := swap.distance("hte", "the"); got != 1 {
		t.Errorf("distance(hte, the) = %v, want 1", got)
	}
}

func TestChannelCosts(t *testing.T) {
	ch := qwertyChannel(t)
	// Neighbouring keys are cheaper slips than far ones (Azenkot & Zhai
	// 2012: substitutions cluster around the intended key).
	if near, far := ch.distance("cat", "cst"), ch.distance("cpt", "cst"); !(near < far) {
		t.Errorf("s for a costs %v, not below p for a %v", near, far)
	}
	// Doubled letters: leaving one out is among the commonest spelling
	// errors (Wikipedia list: "occured", "accomodate").
	if dbl, other := ch.distance("ocured", "occured"), ch.distance("ourred", "occured"); !(dbl < other) {
		t.Errorf("dropping a doubled c costs %v, not below a lone c %v", dbl, other)
	}
	// Costs are non-negative and zero only for equal strings.
	if got := ch.distance("word", "word"); got != 0 {
		t.Errorf("distance(word, word) = %v", got)
	}
	if got := ch.distance("wrod", "word"); got <= 0 {
		t.Errorf("distance(wrod, word) = %v", got)
	}
	// A digit typed for a letter is an ordinary slip of a neighbouring
	// key ("3" borders "e" on the number row; layouts/qwerty.txt).
	if got, other := ch.distance("s3cond", "second"), ch.distance("sdcond", "second"); got >= inf || got < other {
		t.Errorf("a 3 typed for e costs %v, want finite and no cheaper than a d (%v)", got, other)
	}
}

// qwertyChannel is the channel of the QWERTY layout and the built-in error model.
func qwertyChannel(t *testing.T) *channel {
	t.Helper()
	kb, err := LayoutQWERTY.Keyboard()
	if err != nil {
		t.Fatal(err)
	}
	em, err := BuiltinErrorModel()
	if err != nil {
		t.Fatal(err)
	}
	return newChannel(kb, em)
}

// TestChannelRulesByCost checks the order newChannel stores its
// multi-letter rules in, which the search's setup relies on to list a
// typed word's rules by cost (search.gatherRules): the error model's rules
// and then the accent pairs, in the order they are added, with the ones
// the channel keeps as single-letter costs left out, sorted stably by
// cost (rules of equal cost stay in the order added). The expected list
// is built here directly from the error model (an equivalence check
// between two ways of computing one order; no outside reference applies).
func TestChannelRulesByCost(t *testing.T) {
	kb, err := LayoutQWERTY.Keyboard()
	if err != nil {
		t.Fatalf("Keyboard: %v", err)
	}
	builtin, err := BuiltinErrorModel()
	if err != nil {
		t.Fatalf("BuiltinErrorModel: %v", err)
	}
	half, _ := SplitPairs(devPairs(t), 0, 2)
	for _, m := range []struct {
		name string
		em   *ErrorModel
	}{{"builtin", builtin}, {"trained-half", TrainErrorModel(half, TrainOptions{})}} {
		t.Run(m.name, func(t *testing.T) {
			type rule struct {
				alpha, beta string
				cost        float32
			}
			var want []rule
			add := func(a, b string, cost float32) {
				if len(a) == 1 && (len(b) == 1 || b == "") {
					return // a substitution or deletion cost, not a rule
				}
				want = append(want, rule{a, b, cost})
			}
			for _, r := range m.em.rules {
				add(r.Intended, r.Typed, float32(r.Cost))
			}
			for _, p := range accentPairs {
				add(p[0], p[1], accentCost)
				add(p[1], p[0], accentCost+1)
			}
			slices.SortStableFunc(want, func(a, b rule) int { return cmp.Compare(a.cost, b.cost) })
			ch := newChannel(kb, m.em)
			if len(ch.rules) != len(want) {
				t.Fatalf("newChannel keeps %d rules, want %d", len(ch.rules), len(want))
			}
			if len(want) < 100 {
				t.Fatalf("only %d rules: the check would test little", len(want))
			}
			for i, r := range ch.rules {
				if got := (rule{r.alpha, r.beta, r.cost}); got != want[i] {
					t.Fatalf("rule %d = %+v, want %+v", i, got, want[i])
				}
			}
			for b, l := range ch.byBeta {
				if len(b) == 1 && !slices.Equal(ch.byByte[b[0]], l) {
					t.Errorf("byByte[%q] = %v, want byBeta's %v", b, ch.byByte[b[0]], l)
				}
			}
			for c, l := range ch.byByte {
				if l != nil && ch.byBeta[string([]byte{byte(c)})] == nil {
					t.Errorf("byByte[%d] lists rules byBeta does not", c)
				}
			}
		})
	}
}
