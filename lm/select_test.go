package lm

import (
	"math/bits"
	"math/rand/v2"
	"testing"
)

// TestSelect64 checks the broadword select against its definition: clear
// the lowest set bit k times, then count trailing zeros.
func TestSelect64(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 8))
	words := []uint64{1, 1 << 63, ^uint64(0), 0x8000000000000001, 0x00ff00ff00ff00ff, 0xf0f0f0f0f0f0f0f0}
	for range 2000 {
		words = append(words, rng.Uint64(), rng.Uint64()&rng.Uint64()&rng.Uint64())
	}
	for _, x := range words {
		y := x
		for k := range uint(bits.OnesCount64(x)) {
			want := uint(bits.TrailingZeros64(y))
			if got := select64(x, k); got != want {
				t.Fatalf("select64(%#x, %d) = %d, want %d", x, k, got, want)
			}
			y &= y - 1
		}
	}
}
