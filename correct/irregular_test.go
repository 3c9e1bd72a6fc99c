package correct

import (
	"errors"
	"math"
	"slices"
	"strings"
	"testing"
)

func TestIrregularOf(t *testing.T) {
	// Irregular forms from English grammar (from memory); a form counts if
	// it is among those returned.
	tests := []struct {
		typed, want string // want "" for none
	}{
		{"teached", "taught"},  // base + ed
		{"arised", "arose"},    // base in e + d
		{"runned", "ran"},      // doubled consonant + ed
		{"flied", "flew"},      // y → ied
		{"payed", "paid"},      // base + ed
		{"shrinked", "shrunk"}, // past participle
		{"shrinked", "shrank"}, // simple past
		{"sitted", "sat"},      // doubled consonant + ed
		{"sited", ""},          // site + d: sit doubles its t
		{"wined", ""},          // wine + d: win doubles its n
		{"beated", "beat"},     // a vowel pair: no doubling
		{"walked", ""},         // a regular verb
		{"burned", ""},         // a regular past that is also standard
		{"seed", ""},           // a word of its own, not see + d
		{"teach", ""},          // no past ending
		{"ed", ""},             // too short
	}
	for _, tc := range tests {
		t.Run(tc.typed+"/"+tc.want, func(t *testing.T) {
			got := irregularOf(tc.typed)
			if tc.want == "" {
				if got != "" {
					t.Errorf("irregularOf(%q) = %q, want none", tc.typed, got)
				}
				return
			}
			if !isIrregularError(tc.typed, tc.want) {
				t.Errorf("irregularOf(%q) = %q, want %q among them", tc.typed, got, tc.want)
			}
		})
	}
}

func TestIrregularOfAllocs(t *testing.T) {
	for _, w := range []string{"flied", "teached", "walked"} {
		if n := testing.AllocsPerRun(100, func() { irregularOf(w) }); n != 0 {
			t.Errorf("irregularOf(%q) allocates %v times, want 0", w, n)
		}
	}
}

func TestTrainIrregularCost(t *testing.T) {
	// One over-regularised verb among four pairs: the Laplace estimate
	// (n+1)/(N+2) that TrainErrorModel documents for its class costs gives
	// 2/6, a cost of ln 3 (worked by hand).
	pairs := []Pair{
		{Typed: "teached", Intended: []string{"taught"}},
		{Typed: "teh", Intended: []string{"the"}},
		{Typed: "recieve", Intended: []string{"receive"}},
		{Typed: "wich", Intended: []string{"which"}},
	}
	m := TrainErrorModel(pairs, TrainOptions{})
	if got, want := m.Backoff().Irregular, math.Log(3); math.Abs(got-want) > 1e-9 {
		t.Errorf("Irregular = %v, want ln 3 = %v", got, want)
	}
}

func TestParseErrorModelIrregular(t *testing.T) {
	base := "@sub-vowel\t1\n@sub\t1\n@del\t1\n@del-double\t1\n@ins\t1\n@ins-double\t1\n@trans\t1\n@affix\t1\n"
	tests := []struct {
		name, table string
		wantErr     bool
		want        float64
	}{
		{"irregular given", base + "@irregular\t4.5\n", false, 4.5},
		{"irregular missing: a table older than the line", base, false, DefaultIrregularCost},
		{"irregular negative", base + "@irregular\t-1\n", true, 0},
		{"irregular with a rule's fields", base + "@irregular\tx\t1\n", true, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			m, err := ParseErrorModel(strings.NewReader(tc.table))
			if tc.wantErr {
				if !errors.Is(err, ErrErrorModel) {
					t.Fatalf("err = %v, want ErrErrorModel", err)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if got := m.Backoff().Irregular; got != tc.want {
				t.Errorf("Irregular = %v, want %v", got, tc.want)
			}
		})
	}
}

// A Corrector built without an error model uses DefaultIrregularCost, which
// must be the built-in table's value.
func TestDefaultIrregularCostIsBuiltin(t *testing.T) {
	em, err := BuiltinErrorModel()
	if err != nil {
		t.Fatal(err)
	}
	if got := em.Backoff().Irregular; got != DefaultIrregularCost {
		t.Errorf("built-in Irregular = %v, DefaultIrregularCost = %v: regenerate or update the constant", got, DefaultIrregularCost)
	}
}

func TestIrregularCandidates(t *testing.T) {
	words := []string{"reached", "saw", "see", "seed", "seek", "seen", "shrink", "shrunk", "sought", "taught", "teach"}
	lex := newFlatLex(words)
	flat := func([]uint32, uint32) float64 { return math.Log(1.0 / 11) }
	c, err := New(lex, flat, Options{})
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name, typed string
		want        string // among the candidates, "" for none
		absent      string // not among them, "" for none
	}{
		{"unknown typed word", "shrinked", "shrunk", ""},
		{"casing kept", "Seeked", "Sought", ""},
		{"known typed word", "teached", "taught", ""},
		{"a word of its own", "seed", "", "saw"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			cands, _ := c.Correct(tc.typed, nil, 5, nil)
			var got []string
			for _, cand := range cands {
				got = append(got, cand.Word)
			}
			if tc.want != "" && !slices.Contains(got, tc.want) {
				t.Errorf("Correct(%q) = %v, want %q among them", tc.typed, got, tc.want)
			}
			if tc.absent != "" && slices.Contains(got, tc.absent) {
				t.Errorf("Correct(%q) = %v, want no %q", tc.typed, got, tc.absent)
			}
		})
	}
}
