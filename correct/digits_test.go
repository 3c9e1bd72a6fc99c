package correct

import (
	"strings"
	"testing"
)

// TestSameDigits checks which candidates keep the typed digits: a digit
// slip is never undone, a digit typed for a letter may be (common
// practice, no source).
func TestSameDigits(t *testing.T) {
	tests := []struct {
		typed string
		cands []string
		want  []string
		apply bool
	}{
		{"17th", []string{"11th", "17th's"}, nil, false},
		{"s3cond", []string{"second", "4rd"}, []string{"second"}, true},
		{"9thh", []string{"9th", "8th"}, []string{"9th"}, true},
		{"yth", []string{"6th", "the"}, []string{"6th", "the"}, true},
		{"gello", []string{"hello", "jello"}, []string{"hello", "jello"}, true},
	}
	for _, tc := range tests {
		t.Run(tc.typed, func(t *testing.T) {
			var cands []Candidate
			for _, w := range tc.cands {
				cands = append(cands, Candidate{Word: w})
			}
			got, dec := sameDigits(tc.typed, cands, Decision{Apply: true, Confidence: 0.9})
			var words []string
			for _, c := range got {
				words = append(words, c.Word)
			}
			if strings.Join(words, " ") != strings.Join(tc.want, " ") || dec.Apply != tc.apply {
				t.Errorf("sameDigits(%q, %v) = %v %+v, want %v apply %v", tc.typed, tc.cands, words, dec, tc.want, tc.apply)
			}
		})
	}
}
