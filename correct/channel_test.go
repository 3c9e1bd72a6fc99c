package correct

import (
	"math/rand/v2"
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
