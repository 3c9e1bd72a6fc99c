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
	// The heaviest unigrams: weights only grow between merges, so the old
	// list stays exact with the changed words noted, unless a listed word
	// fell below the floor or the weights were rescaled.
	fresh := c.nbest == 0 || g == 1
	for _, e := range c.best[:c.nbest] {
		if e.w < floor {
			fresh = true
		}
	}
	if fresh {
		out.rank()
		return out, ups
	}
	out.best, out.nbest = c.best, c.nbest
	for _, u := range ups[len(ups)-n:] {
		out.noteBest(cacheEnt{prev: noPrev, tok: u.tok, w: cacheFind(out.uni, noPrev, u.tok)})
	}
	return out, ups
}

// noteBest keeps the heaviest list exact after the weight of e.tok grew to e.w.
func (c *ovCache) noteBest(e cacheEnt) {
	heavier := func(a, b cacheEnt) bool { return a.w > b.w || a.w == b.w && a.tok < b.tok }
	nb := c.nbest
	i := 0
	for i < nb && c.best[i].tok != e.tok {
		i++
	}
	if i == nb {
		if nb == cacheBest {
			if !heavier(e, c.best[nb-1]) {
				return
			}
			i = nb - 1
		} else {
			c.nbest++
		}
	}
	for i > 0 && heavier(e, c.best[i-1]) {
		c.best[i] = c.best[i-1]
		i--
	}
	c.best[i] = e
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
