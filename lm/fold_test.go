package lm

import (
	"math/rand/v2"
	"strings"
	"testing"
)

// TestFold checks Fold against the standard library's strings.ToLower (a
// general-purpose reference: per-rune unicode.ToLower, invalid bytes as
// U+FFFD) on named cases and random strings, and that an already folded
// ASCII word costs no allocation.
func TestFold(t *testing.T) {
	tests := []struct{ name, in string }{
		{"empty", ""},
		{"folded", "the"},
		{"capitalised", "The"},
		{"caps", "NASA"},
		{"digits", "b2b"},
		{"accents", "Ÿpsilon École"},
		{"greek", "ΣΟΦΙΑ"},
		{"invalid", "ab\xffC"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got, want := Fold(tc.in), strings.ToLower(tc.in); got != want {
				t.Errorf("Fold(%q) = %q, want %q", tc.in, got, want)
			}
		})
	}
	rng := rand.New(rand.NewPCG(1, 2))
	alphabet := []rune("aZzA09-'éÉßΣσ\u0130")
	for range 2000 {
		var b strings.Builder
		for range rng.IntN(12) {
			if rng.IntN(20) == 0 {
				b.WriteByte(byte(0x80 + rng.IntN(0x40))) // a stray continuation byte
				continue
			}
			b.WriteRune(alphabet[rng.IntN(len(alphabet))])
		}
		if got, want := Fold(b.String()), strings.ToLower(b.String()); got != want {
			t.Fatalf("Fold(%q) = %q, want %q", b.String(), got, want)
		}
	}
	if n := testing.AllocsPerRun(100, func() { _ = Fold("already") }); n != 0 {
		t.Errorf("Fold of a folded ASCII word allocates %v times, want 0", n)
	}
}
