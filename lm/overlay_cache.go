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
// be rewritten; an entry whose weight fell below the floor (cacheFloor in
// effective units) counts as absent, and a weight added to it starts it
// afresh. It is immutable once published.
//
// The entries live in two sorted lists per order: the main lists, rebuilt
// only when the recent lists are folded into them, and the recent lists,
// which hold the whole current weight of every entry changed since that
// fold and are rebuilt by each add. An entry in a recent list replaces the
// main list's; readers skip weights below the floor in both. Each add
// follows exactly the steps of merging its weights into one list (the same
// drops, the same additions in the same order), so every weight and the
// heaviest list are bit for bit those of the single-list cache; the sum
// adds the same terms in another order (see uniSum).
type ovCache struct {
	uni   []cacheEnt          // main unigram list, sorted by tok
	bi    []cacheEnt          // main bigram list, sorted by (prev, tok)
	rUni  []cacheEnt          // recent unigram entries
	rBi   []cacheEnt          // recent bigram entries
	sum   float64             // Σ unigram weights at or above the floor, stored units
	nUni  int                 // unigram entries at or above the floor
	grow  float64             // stored units per effective unit
	floor float64             // grow·cacheFloor: smaller weights count as absent
	best  [cacheBest]cacheEnt // heaviest unigrams, heaviest first
	nbest int
	rSeen [recentBits / 64]uint64 // bit tok mod recentBits: some recent unigram may have tok
}

// cacheBest is the number of heaviest cache unigrams kept in order.
const cacheBest = 16

// cacheRecentMax is the number of recent entries past which an add folds
// them into the main lists. Project choice, no source: a 12-word sentence
// adds about two dozen.
const cacheRecentMax = 128

// recentBits is the size of the filter that lets a unigram lookup skip the
// recent list (a power of two).
const recentBits = 1024

// rank fills the heaviest list anew.
func (c *ovCache) rank() {
	var tb topBuf
	tb.k = cacheBest
	c.eachUni(func(e cacheEnt) {
		if tb.n == tb.k && e.w <= tb.buf[tb.n-1].LogP {
			return
		}
		tb.push(Scored{ID: e.tok, LogP: e.w})
	})
	c.nbest = tb.n
	for i, s := range tb.buf[:tb.n] {
		c.best[i] = cacheEnt{prev: noPrev, tok: s.ID, w: s.LogP}
	}
}

type cacheEnt struct {
	prev, tok uint32
	w         float64
}

// cacheFloor is the effective weight below which a cache entry counts as
// absent: e^-4 keeps about 4τ tokens. Project choice, no source.
var cacheFloor = math.Exp(-4)

const noPrev = ^uint32(0)

func cmpCache(a, b cacheEnt) int {
	if c := cmp.Compare(a.prev, b.prev); c != 0 {
		return c
	}
	return cmp.Compare(a.tok, b.tok)
}

// cacheIter walks a main list with a recent list in place, in order,
// skipping weights below floor.
type cacheIter struct {
	main, recent []cacheEnt
	floor        float64
}

func cacheKey(e *cacheEnt) uint64 { return uint64(e.prev)<<32 | uint64(e.tok) }

// next returns the next entry, or false at the end.
func (it *cacheIter) next() (cacheEnt, bool) {
	for {
		var e cacheEnt
		switch {
		case len(it.recent) > 0 && (len(it.main) == 0 || cacheKey(&it.recent[0]) <= cacheKey(&it.main[0])):
			if len(it.main) > 0 && cacheKey(&it.recent[0]) == cacheKey(&it.main[0]) {
				it.main = it.main[1:]
			}
			e, it.recent = it.recent[0], it.recent[1:]
		case len(it.main) > 0:
			e, it.main = it.main[0], it.main[1:]
		default:
			return cacheEnt{}, false
		}
		if e.w >= it.floor {
			return e, true
		}
	}
}

// mergedEach calls f for each entry of main (with recent entries in place)
// at or above floor, in order.
func mergedEach(main, recent []cacheEnt, floor float64, f func(cacheEnt)) {
	it := cacheIter{main, recent, floor}
	for e, ok := it.next(); ok; e, ok = it.next() {
		f(e)
	}
}

// eachUni calls f for every unigram entry, by tok.
func (c *ovCache) eachUni(f func(cacheEnt)) { mergedEach(c.uni, c.rUni, c.floor, f) }

// weight returns the stored weight of (prev, tok) in main with recent in
// place, ignoring the floor (0 when absent).
func weight(main, recent []cacheEnt, prev, tok uint32) float64 {
	if len(recent) > 0 {
		if i := lowerCache(recent, prev, tok); i < len(recent) && recent[i].prev == prev && recent[i].tok == tok {
			return recent[i].w
		}
	}
	if i := lowerCache(main, prev, tok); i < len(main) && main[i].prev == prev && main[i].tok == tok {
		return main[i].w
	}
	return 0
}

// find returns the weight of (prev, tok) in main with recent in place, or
// 0 when absent or below the floor.
func (c *ovCache) find(main, recent []cacheEnt, prev, tok uint32) float64 {
	if w := weight(main, recent, prev, tok); w >= c.floor {
		return w
	}
	return 0
}

// uniW returns the weight of tok as a unigram (0 when absent).
func (c *ovCache) uniW(tok uint32) float64 {
	recent := c.rUni
	if b := tok & (recentBits - 1); c.rSeen[b>>6]&(1<<(b&63)) == 0 {
		recent = nil
	}
	return c.find(c.uni, recent, noPrev, tok)
}

// markRecent fills the filter of the recent unigram list.
func (c *ovCache) markRecent() {
	c.rSeen = [recentBits / 64]uint64{}
	for _, e := range c.rUni {
		b := e.tok & (recentBits - 1)
		c.rSeen[b>>6] |= 1 << (b & 63)
	}
}

// biLists returns the main and recent bigram entries after prev.
func (c *ovCache) biLists(prev uint32) (main, recent []cacheEnt) {
	a, b := cacheRange(c.bi, prev, 0, math.MaxUint32)
	if len(c.rBi) == 0 {
		return c.bi[a:b], nil
	}
	ra, rb := cacheRange(c.rBi, prev, 0, math.MaxUint32)
	return c.bi[a:b], c.rBi[ra:rb]
}

// add returns the cache after seeing the tokens of a chain (prev = noPrev
// before the first). toks may start with <s>, which is context only. The
// scratch slice is reused by the caller. Cost: O(u + r log m) for u main
// unigram entries, r recent entries and m main entries, plus a fold into
// the main lists (O(m)) once the recent lists grow past cacheRecentMax.
func (c ovCache) add(toks []uint32, bos uint32, tau float64, scratch []cacheEnt) (ovCache, []cacheEnt) {
	if len(toks) == 0 {
		return c, scratch
	}
	if c.grow == 0 {
		c.grow = 1
	}
	step := math.Exp(1 / tau)
	g := c.grow
	ups, g := cacheUpdates(scratch[:0], toks, bos, g, step)
	if g > 1e150 { // rescale to keep weights finite
		c = c.folded()
		inv := 1 / g
		c.uni = scaleCache(c.uni, inv)
		c.bi = scaleCache(c.bi, inv)
		for i := range ups {
			ups[i].w *= inv
		}
		c.sum *= inv
		g = 1
	}
	sortCache(ups)
	floor := g * cacheFloor
	n := 0
	for _, u := range ups {
		if u.prev == noPrev {
			n++
		}
	}
	out := ovCache{uni: c.uni, bi: c.bi, grow: g, floor: floor}
	out.rUni = mergeRecent(c.uni, c.rUni, ups[len(ups)-n:], floor)
	out.rBi = mergeRecent(c.bi, c.rBi, ups[:len(ups)-n], floor)
	out.markRecent()
	adds := ups[len(ups)-n:]
	out.sum, out.nUni = out.uniSum()
	if len(out.rUni)+len(out.rBi) > cacheRecentMax {
		out = out.folded()
	}
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
	for _, u := range adds {
		out.noteBest(cacheEnt{prev: noPrev, tok: u.tok, w: out.uniW(u.tok)})
	}
	return out, ups
}

// uniSum returns the sum of the unigram weights at or above the floor and
// their number: the recent list's (which holds no weight below the floor),
// then the main list's that no recent entry replaces. It adds the terms in
// another order than one merge into a single list would, so the sum may
// differ from that list's in the last bits (the relative error of a sum of
// u positive terms is below u·2⁻⁵³; Higham, Accuracy and Stability of
// Numerical Algorithms, 2nd ed., §4.2, from memory).
func (c *ovCache) uniSum() (float64, int) {
	sum, n := 0.0, len(c.rUni)
	r := c.rUni
	for _, e := range r {
		sum += e.w
	}
	j := 0 // both lists are sorted by tok: walk them together
	for _, e := range c.uni {
		if e.w < c.floor {
			continue
		}
		for j < len(r) && r[j].tok < e.tok {
			j++
		}
		if j < len(r) && r[j].tok == e.tok {
			continue
		}
		sum += e.w
		n++
	}
	return sum, n
}

// mergeRecent returns the recent list after adding sorted weights: every
// old recent entry and every added key, with its whole weight as
// mergeCache (overlay_cache_test.go) computes it over main with recent in
// place (an old weight below floor is dropped first, so the add starts the
// entry afresh).
func mergeRecent(main, recent, add []cacheEnt, floor float64) []cacheEnt {
	out := make([]cacheEnt, 0, len(recent)+len(add))
	i := 0
	for j := 0; j < len(add); {
		a := add[j]
		for i < len(recent) && cmpCache(recent[i], a) < 0 {
			if recent[i].w >= floor {
				out = append(out, recent[i])
			}
			i++
		}
		var e cacheEnt
		have := false
		if i < len(recent) && cmpCache(recent[i], a) == 0 {
			e, have = recent[i], recent[i].w >= floor
			i++
		} else if w := weight(main, nil, a.prev, a.tok); w >= floor {
			e, have = cacheEnt{prev: a.prev, tok: a.tok, w: w}, true
		}
		for ; j < len(add) && add[j].prev == a.prev && add[j].tok == a.tok; j++ {
			if have {
				e.w += add[j].w
			} else if add[j].w >= floor {
				e, have = add[j], true
			}
		}
		if have {
			out = append(out, e)
		}
	}
	for _, e := range recent[i:] {
		if e.w >= floor {
			out = append(out, e)
		}
	}
	return out
}

// folded returns the cache with its recent entries moved into the main
// lists and entries below the floor dropped.
func (c ovCache) folded() ovCache {
	if len(c.rUni) == 0 && len(c.rBi) == 0 {
		return c
	}
	out := c
	out.uni = make([]cacheEnt, 0, len(c.uni)+len(c.rUni))
	mergedEach(c.uni, c.rUni, c.floor, func(e cacheEnt) { out.uni = append(out.uni, e) })
	out.bi = make([]cacheEnt, 0, len(c.bi)+len(c.rBi))
	mergedEach(c.bi, c.rBi, c.floor, func(e cacheEnt) { out.bi = append(out.bi, e) })
	out.rUni, out.rBi = nil, nil
	out.markRecent()
	return out
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

// sortCache sorts cache entries by (prev, tok), keeping entries of the
// same key in the order given (the order the tokens came in, so that their
// weights are added oldest first), with an insertion sort for a sentence's
// few dozen (see sortUpdates).
func sortCache(s []cacheEnt) {
	if len(s) > smallSort {
		slices.SortStableFunc(s, cmpCache)
		return
	}
	for i := 1; i < len(s); i++ {
		e := s[i]
		k := cacheKey(&e)
		j := i
		for j > 0 && k < cacheKey(&s[j-1]) {
			s[j] = s[j-1]
			j--
		}
		s[j] = e
	}
}

func scaleCache(s []cacheEnt, f float64) []cacheEnt {
	out := make([]cacheEnt, len(s))
	for i, e := range s {
		e.w *= f
		out[i] = e
	}
	return out
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
	c = c.folded()
	out := ovCache{grow: c.grow, floor: c.floor}
	for _, e := range c.uni {
		if !drop(noPrev, e.tok) {
			out.uni = append(out.uni, e)
			out.sum += e.w
		}
	}
	out.nUni = len(out.uni)
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

// cacheUpdates appends to ups the weighted entries a chain of tokens adds
// to the cache, a unigram and (after the first word) a bigram entry per
// token, the weight growing by step from g on; it returns them with the
// last weight. <s> is context only.
func cacheUpdates(ups []cacheEnt, toks []uint32, bos uint32, g, step float64) ([]cacheEnt, float64) {
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
	return ups, g
}
