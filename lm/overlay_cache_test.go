package lm

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// The recency cache before the write-side delta kept one sorted list per
// order and merged every add into it (refCache below, the previous
// implementation kept as the reference, except that the adds of one key now
// go in the order their tokens came, oldest first, where the earlier code
// left them to an unstable sort). The two-list cache must give the
// same weights and heaviest list bit for bit after any sequence of adds: it
// is a faster layout of the same cache, not a new estimate (the project's
// own earlier code, no outside source). Its sum adds the same terms in
// another order, so it must agree within sumTol relative.

// sumTol bounds the relative difference of two sums of the same u ≤ 1000
// positive terms in different orders: each is within about u·2⁻⁵³ ≈ 1.1e-13
// of the exact sum (Higham, Accuracy and Stability of Numerical Algorithms,
// 2nd ed., §4.2, from memory).
const sumTol = 1e-12

// refCache is the single-list recency cache.
type refCache struct {
	uni, bi []cacheEnt
	sum     float64
	grow    float64
}

// add is the single-list add: the same token weights, one merge per list.
func (c refCache) add(toks []uint32, bos uint32, tau float64) refCache {
	if c.grow == 0 {
		c.grow = 1
	}
	step := math.Exp(1 / tau)
	g := c.grow
	ups, g := cacheUpdates(nil, toks, bos, g, step)
	if g > 1e150 {
		inv := 1 / g
		c.uni = scaleCache(c.uni, inv)
		c.bi = scaleCache(c.bi, inv)
		for i := range ups {
			ups[i].w *= inv
		}
		g = 1
	}
	// The weights of one key are added oldest first, as the tokens came.
	slices.SortStableFunc(ups, cmpCache)
	n := 0
	for _, u := range ups {
		if u.prev == noPrev {
			n++
		}
	}
	floor := g * cacheFloor
	out := refCache{grow: g}
	out.uni, out.sum = mergeCache(c.uni, ups[len(ups)-n:], floor)
	out.bi, _ = mergeCache(c.bi, ups[:len(ups)-n], floor)
	return out
}

// mergeCache merges sorted new weights into a sorted list, dropping entries
// below floor. It returns the new list and the sum of its weights. An old
// entry comes before a new one with the same key; the new weight is added
// to it, or starts the entry afresh when the old one was dropped. The sum
// adds the weights in output order. Runs of old entries between two new
// ones are found by binary search and copied in a tight loop.
func mergeCache(old, add []cacheEnt, floor float64) ([]cacheEnt, float64) {
	out := make([]cacheEnt, 0, len(old)+len(add))
	sum := 0.0
	i := 0
	for j := 0; j <= len(add); j++ {
		end := len(old)
		if j < len(add) { // old entries up to and including add[j]'s key
			a := add[j]
			lo, hi := i, len(old)
			for lo < hi {
				m := int(uint(lo+hi) >> 1)
				if cmpCache(old[m], a) <= 0 {
					lo = m + 1
				} else {
					hi = m
				}
			}
			end = lo
		}
		for _, e := range old[i:end] { // distinct keys, none equal to out's last
			if e.w >= floor {
				out = append(out, e)
				sum += e.w
			}
		}
		i = end
		if j == len(add) {
			break
		}
		a := add[j]
		if n := len(out); n > 0 && out[n-1].prev == a.prev && out[n-1].tok == a.tok {
			out[n-1].w += a.w
			sum += a.w
		} else if a.w >= floor {
			out = append(out, a)
			sum += a.w
		}
	}
	return out, sum
}

// cacheFind returns the stored weight of (prev, tok), or 0.
func cacheFind(s []cacheEnt, prev, tok uint32) float64 {
	lo := lowerCache(s, prev, tok)
	if lo < len(s) && s[lo].prev == prev && s[lo].tok == tok {
		return s[lo].w
	}
	return 0
}

func TestOverlayCacheMatchesSingleList(t *testing.T) {
	for _, c := range []struct {
		name  string
		vocab int
		tau   float64
		chain int
	}{
		{"defaults", 300, DefaultCacheTokens, 14},
		{"small-vocab", 12, DefaultCacheTokens, 14},
		{"fast-decay", 60, 3, 9},      // entries fall below the floor within a chain
		{"rescale", 40, 1, 40},        // weights pass 1e150 often
		{"long-chains", 500, 20, 300}, // adds inside one chain fall below the floor
	} {
		t.Run(c.name, func(t *testing.T) {
			rng := rand.New(rand.NewPCG(1, uint64(c.vocab)))
			const bos = 0
			var got ovCache
			got.grow = 1
			ref := refCache{grow: 1}
			var scratch []cacheEnt
			for step := range 600 {
				toks := []uint32{bos}
				for range 1 + rng.IntN(c.chain) {
					toks = append(toks, 1+uint32(rng.IntN(c.vocab)))
				}
				got, scratch = got.add(toks, bos, c.tau, scratch)
				ref = ref.add(toks, bos, c.tau)
				if math.Abs(got.sum-ref.sum) > sumTol*ref.sum || got.nUni != len(ref.uni) || got.grow != ref.grow {
					t.Fatalf("step %d: sum %v, %d unigrams, grow %v; single list %v, %d, %v",
						step, got.sum, got.nUni, got.grow, ref.sum, len(ref.uni), ref.grow)
				}
				for tok := range uint32(c.vocab + 1) {
					if w, want := got.uniW(tok), cacheFind(ref.uni, noPrev, tok); w != want {
						t.Fatalf("step %d: unigram %d weighs %v, single list %v", step, tok, w, want)
					}
				}
				for _, e := range ref.bi {
					m, r := got.biLists(e.prev)
					if w := got.find(m, r, e.prev, e.tok); w != e.w {
						t.Fatalf("step %d: bigram %d %d weighs %v, single list %v", step, e.prev, e.tok, w, e.w)
					}
				}
				n := 0
				mergedEach(got.bi, got.rBi, got.floor, func(cacheEnt) { n++ })
				if n != len(ref.bi) {
					t.Fatalf("step %d: %d bigrams, single list %d", step, n, len(ref.bi))
				}
				fresh := got
				fresh.rank()
				if fresh.best != got.best || fresh.nbest != got.nbest {
					t.Fatalf("step %d: heaviest %v, ranked anew %v", step, got.best[:got.nbest], fresh.best[:fresh.nbest])
				}
			}
		})
	}
}
