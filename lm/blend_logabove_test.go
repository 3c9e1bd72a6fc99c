package lm

import (
	"math"
	"testing"
)

// logAbove must order two probabilities exactly as comparing their
// math.Log values does, including pairs a few ulps apart, where it takes
// the logarithms, and pairs that share a logarithm. The reference is the
// standard library's math.Log itself.
func TestLogAbove(t *testing.T) {
	cases := []struct {
		name    string
		p, last float64
	}{
		{"clearly above", 0.2, 0.1},
		{"clearly below", 0.1, 0.2},
		{"equal", 0.125, 0.125},
		{"one ulp above", math.Nextafter(0.3, 1), 0.3},
		{"one ulp below", math.Nextafter(0.3, 0), 0.3},
		{"just inside the margin", 0.3 * (1 + 5e-13), 0.3},
		{"just past the margin", 0.3 * (1 + 2e-12), 0.3},
		{"tiny probabilities", 3e-17, math.Nextafter(3e-17, 0)},
		{"last zero", 1e-300, 0},
		{"both zero", 0, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			want := math.Log(c.p) > math.Log(c.last)
			if got := logAbove(c.p, c.last); got != want {
				t.Errorf("logAbove(%v, %v) = %v, want %v (math.Log: %v, %v)", c.p, c.last, got, want, math.Log(c.p), math.Log(c.last))
			}
		})
	}
	// Near-equal pairs at many scales: every one must agree with math.Log.
	for e := -40; e <= 0; e++ {
		base := math.Exp(float64(e)) * 0.7
		x := base
		for range 64 {
			for _, y := range []float64{math.Nextafter(base, 0), base, x} {
				if got, want := logAbove(x, y), math.Log(x) > math.Log(y); got != want {
					t.Fatalf("logAbove(%v, %v) = %v, want %v", x, y, got, want)
				}
			}
			x = math.Nextafter(x, 1)
		}
	}
}
