package correct

import (
	"math"
	"slices"
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
			got := correctedWords(c, tc.typed)
			if tc.want != "" && !slices.Contains(got, tc.want) {
				t.Errorf("Correct(%q) = %v, want %q among them", tc.typed, got, tc.want)
			}
			if tc.absent != "" && slices.Contains(got, tc.absent) {
				t.Errorf("Correct(%q) = %v, want no %q", tc.typed, got, tc.absent)
			}
		})
	}
}
