package lm

import (
	"cmp"
	"math"
	"slices"
)

// ovCache is the recency cache: unigram and bigram counts of the most recent
// tokens, each token's weight decaying as exp(−age/τ) with age counted in
// tokens. Weights are stored in growing units (a new token weighs grow, and
// grow is multiplied by exp(1/τ) per token), so older weights never have to
// be rewritten; entries whose weight fell below cacheFloor are dropped when
// the cache is next merged. It is immutable once published.
type ovCache struct {
	uni   []cacheEnt          // sorted by tok
	bi    []cacheEnt          // sorted by (prev, tok)
	sum   float64             // Σ uni weights, stored units
	grow  float64             // stored units per effective unit
	best  [cacheBest]cacheEnt // heaviest unigrams, heaviest first
	nbest int
}

// cacheBest is the number of heaviest cache unigrams kept in order.
const cacheBest = 16

func (c *ovCache) rank() {
	var tb topBuf
	tb.k = cacheBest
	for i, e := range c.uni {
		if tb.n == tb.k && e.w <= tb.buf[tb.n-1].LogP {
			continue
		}
		tb.push(Scored{ID: uint32(i), LogP: e.w})
	}
	c.nbest = tb.n
	for i, s := range tb.buf[:tb.n] {
		c.best[i] = c.uni[s.ID]
	}
}

type cacheEnt struct {
	prev, tok uint32
	w         float64
}

// cacheFloor is the effective weight below which a cache entry is dropped:
// e^-4 keeps about 4τ tokens. Project choice, no source.
var cacheFloor = math.Exp(-4)

const noPrev = ^uint32(0)

func cmpCache(a, b cacheEnt) int {
	if c := cmp.Compare(a.prev, b.prev); c != 0 {
		return c
	}
	return cmp.Compare(a.tok, b.tok)
}

// add returns the cache after seeing the tokens of a chain (prev = noPrev
// before the first). toks may start with <s>, which is context only. The
// scratch slice is reused by the caller.
func (c ovCache) add(toks []uint32, bos uint32, tau float64, scratch []cacheEnt) (ovCache, []cacheEnt) {
	if len(toks) == 0 {
		return c, scratch
	}
	if c.grow == 0 {
		c.grow = 1
	}
	step := math.Exp(1 / tau)
	g := c.grow
	ups := scratch[:0]
	prev := noPrev
	for _, t := range toks {
		if t == bos {
			prev = t
			continue
		}
		g *= step
		ups = append(ups, cacheEnt{prev: noPrev, tok: t, w: g})
		if prev != noPrev {
			ups = append(ups, cacheEnt{prev: prev, tok: t, w: g})
		}
		prev = t
	}
	if g > 1e150 { // rescale to keep weights finite
		inv := 1 / g
		c.uni = scaleCache(c.uni, inv)
		c.bi = scaleCache(c.bi, inv)
		for i := range ups {
			ups[i].w *= inv
		}
		c.sum *= inv
		g = 1
	}
	slices.SortFunc(ups, cmpCache)
	floor := g * cacheFloor
	n := 0
	for _, u := range ups {
		if u.prev == noPrev {
			n++
		}
	}
	var out ovCache
	out.grow = g
	out.uni, out.sum = mergeCache(c.uni, ups[len(ups)-n:], floor)
	out.bi, _ = mergeCache(c.bi, ups[:len(ups)-n], floor)
	out.rank()
	return out, ups
}

func scaleCache(s []cacheEnt, f float64) []cacheEnt {
	out := make([]cacheEnt, len(s))
	for i, e := range s {
		e.w *= f
		out[i] = e
	}
	return out
}

// mergeCache merges sorted new weights into a sorted list, dropping entries
// below floor. It returns the new list and the sum of its weights.
func mergeCache(old, add []cacheEnt, floor float64) ([]cacheEnt, float64) {
	out := make([]cacheEnt, 0, len(old)+len(add))
	sum := 0.0
	push := func(e cacheEnt) {
		if n := len(out); n > 0 && out[n-1].prev == e.prev && out[n-1].tok == e.tok {
			out[n-1].w += e.w
			sum += e.w
			return
		}
		if e.w < floor {
			return
		}
		out = append(out, e)
		sum += e.w
	}
	i, j := 0, 0
	for i < len(old) || j < len(add) {
		if j == len(add) || i < len(old) && cmpCache(old[i], add[j]) <= 0 {
			push(old[i])
			i++
		} else {
			push(add[j])
			j++
		}
	}
	return out, sum
}

// find returns the stored weight of (prev, tok), or 0.
func cacheFind(s []cacheEnt, prev, tok uint32) float64 {
	lo, hi := 0, len(s)
	for lo < hi {
		m := int(uint(lo+hi) >> 1)
		if s[m].prev < prev || s[m].prev == prev && s[m].tok < tok {
			lo = m + 1
		} else {
			hi = m
		}
	}
	if lo < len(s) && s[lo].prev == prev && s[lo].tok == tok {
		return s[lo].w
	}
	return 0
}

// cacheRange returns the bounds of the entries with the given prev and tok in [lo, hi).
func cacheRange(s []cacheEnt, prev, lo, hi uint32) (int, int) {
	a := lowerCache(s, prev, lo)
	b := lowerCache(s[a:], prev, hi) + a
	return a, b
}

func lowerCache(s []cacheEnt, prev, tok uint32) int {
	lo, hi := 0, len(s)
	for lo < hi {
		m := int(uint(lo+hi) >> 1)
		if s[m].prev < prev || s[m].prev == prev && s[m].tok < tok {
			lo = m + 1
		} else {
			hi = m
		}
	}
	return lo
}

// without returns the cache minus every entry that involves a token for
// which drop returns true.
func (c ovCache) without(drop func(prev, tok uint32) bool) ovCache {
	out := ovCache{grow: c.grow}
	for _, e := range c.uni {
		if !drop(noPrev, e.tok) {
			out.uni = append(out.uni, e)
			out.sum += e.w
		}
	}
	for _, e := range c.bi {
		if !drop(e.prev, e.tok) {
			out.bi = append(out.bi, e)
		}
	}
	out.rank()
	return out
}

// remap renumbers tokens at or above V through m (entries whose token maps
// to noPrev are dropped) and re-sorts.
func (c ovCache) remap(V uint32, m func(uint32) uint32) ovCache {
	f := func(t uint32) uint32 {
		if t == noPrev || t < V {
			return t
		}
		return m(t)
	}
	dropped := c.without(func(prev, tok uint32) bool {
		return (prev != noPrev && f(prev) == noPrev) || f(tok) == noPrev
	})
	for i := range dropped.uni {
		dropped.uni[i].tok = f(dropped.uni[i].tok)
	}
	for i := range dropped.bi {
		dropped.bi[i].prev, dropped.bi[i].tok = f(dropped.bi[i].prev), f(dropped.bi[i].tok)
	}
	slices.SortFunc(dropped.uni, cmpCache)
	slices.SortFunc(dropped.bi, cmpCache)
	dropped.rank()
	return dropped
}
