package correct

import (
	"math"
	"math/rand/v2"
	"unicode/utf8"
)

// Typist corrupts text the way a hurried touch typist does, for measuring
// the corrector on keyboard slips. Each intended letter is touched at a
// point drawn from a round Gaussian around its key centre, and the key
// nearest that point is typed; on top of that a letter may be doubled,
// dropped, or swapped with the next one. A Typist is not safe for
// concurrent use; create one per goroutine.
type Typist struct {
	kb    *Keyboard
	rng   *rand.Rand
	sigma float64
	// Double, Drop and Swap are per-letter probabilities of those slips.
	Double, Drop, Swap float64
}

// NewTypist returns a Typist on kb seeded with seed whose touch spread is
// chosen so that about rate of the letters come out wrong in all (rate in
// (0, 0.5]; Azenkot and Zhai (2012) report about 0.08 for touch typing).
// A fifth of the rate goes to doubled, dropped and swapped letters, the
// rest to neighbouring keys.
func NewTypist(kb *Keyboard, seed uint64, rate float64) *Typist {
	rate = min(max(rate, 0), 0.5)
	t := &Typist{kb: kb, rng: rand.New(rand.NewPCG(seed, seed^0x9e3779b97f4a7c15))}
	t.Double, t.Drop, t.Swap = rate*0.06, rate*0.08, rate*0.06
	t.sigma = t.fitSigma(rate * 0.8)
	return t
}

// fitSigma finds by bisection the touch spread at which a letter key is
// missed with probability miss, estimated on a fixed grid.
func (t *Typist) fitSigma(miss float64) float64 {
	lo, hi := 0.01, 2.0
	for range 30 {
		mid := (lo + hi) / 2
		if t.missRate(mid) < miss {
			lo = mid
		} else {
			hi = mid
		}
	}
	return (lo + hi) / 2
}

// missRate estimates, with a deterministic quadrature over a grid, how
// often a touch with spread sigma lands nearer another key, averaged over
// the letters a–z present on the keyboard.
func (t *Typist) missRate(sigma float64) float64 {
	const steps = 24
	total, n := 0.0, 0
	for c := 'a'; c <= 'z'; c++ {
		x, y, ok := t.kb.Position(c)
		if !ok {
			continue
		}
		miss, wsum := 0.0, 0.0
		for i := range steps {
			for j := range steps {
				dx := (float64(i)/(steps-1)*2 - 1) * 3 * sigma
				dy := (float64(j)/(steps-1)*2 - 1) * 3 * sigma
				w := math.Exp(-(dx*dx + dy*dy) / (2 * sigma * sigma))
				wsum += w
				if t.nearest(x+dx, y+dy) != c {
					miss += w
				}
			}
		}
		total += miss / wsum
		n++
	}
	if n == 0 {
		return 0
	}
	return total / float64(n)
}

// nearest returns the character whose key centre is nearest (x, y).
func (t *Typist) nearest(x, y float64) rune {
	best, bd := rune(0), math.Inf(1)
	for _, k := range t.kb.keys {
		if d := (k.X-x)*(k.X-x) + (k.Y-y)*(k.Y-y); d < bd {
			best, bd = k.Char, d
		}
	}
	return best
}

// Type returns word as typed. Characters not on the keyboard are typed
// as they are.
func (t *Typist) Type(word string) string {
	out := make([]rune, 0, utf8.RuneCountInString(word)+2)
	rs := []rune(word)
	for i := 0; i < len(rs); i++ {
		r := rs[i]
		switch u := t.rng.Float64(); {
		case u < t.Drop:
			continue
		case u < t.Drop+t.Swap && i+1 < len(rs):
			out = append(out, t.touch(rs[i+1]), t.touch(r))
			i++
			continue
		case u < t.Drop+t.Swap+t.Double:
			out = append(out, t.touch(r))
		}
		out = append(out, t.touch(r))
	}
	return string(out)
}

// touch types one intended character with spatial noise.
func (t *Typist) touch(r rune) rune {
	x, y, ok := t.kb.Position(r)
	if !ok {
		return r
	}
	return t.nearest(x+t.rng.NormFloat64()*t.sigma, y+t.rng.NormFloat64()*t.sigma)
}
