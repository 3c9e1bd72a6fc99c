package correct

// The widest pass in two walks. The widest pass keeps the words within
// the budget whose keys (skelFilter) are in reach. Walked at once, the
// weighted rows and the keys prune each other only prefix by prefix: on
// the slowest 5 % of the 8-letter misspellings of BenchmarkCorrect8 that
// walk computed about 2,100 weighted rows a word, of which about 26 were
// prefixes of words it kept (measured, this project; BENCHMARKS.md). So
// the keys walk first, alone and cheaply (keyWalk: unit-cost rows only),
// and record the words they keep as a small trie of the lexicon's paths
// (keyTrie); then the weighted walk follows only that trie, pricing the
// same words at the same costs: the filter is the same, only the order
// of work changes. The keys' walk is not counted by the cap
// (Options.MaxStates; it is bounded by keyWalkMax instead). The weighted
// walk then examines some of the prefixes the one walk would, in the same
// order (fewer since its bounds read the trie's own letter sets,
// keysets.go), so under the cap it finds the same words whenever the one walk
// would have finished, and more when the cap would have stopped that.

// keyTrie is the set of paths of the lexicon's automaton (belowTable)
// that lead to a word the keys keep, recorded by keyWalk: node 0 is the
// start; each node lists, in the automaton's edge order, the edges
// (by index into belowTable's edge arrays) to its children that lead to
// such a word, and whether its own path is a word the keys keep.
type keyTrie struct {
	nodes   []keyNode
	edges   []keyEdge
	pending []keyEdge // keyWalk's children lists, stacked by depth
	steps   int       // children keyWalk stepped into (skelFilter.step)
}

// keyNode is one node of keyTrie: its children are edges[lo:hi].
type keyNode struct {
	lo, hi int32
	accept bool
}

// keyEdge is one edge of keyTrie: edge k of belowTable, to trie node
// child.
type keyEdge struct {
	k, child int32
}

// keyWalkMax is the number of children keyWalk steps into before it gives
// up, leaving the widest pass to the one walk with the keys as a filter
// (same words, same costs), so that no input costs much more than before:
// the keys alone follow every vowel below a prefix whose skeleton is in
// reach. Over all 2,173 development misspellings the keys' walk stepped
// into median 6,603, p99 14,366 and at most 15,265 children (before
// round 17 left out the states whose rests start no kept skeleton:
// setSkMask), and for
// one- and two-letter words and long runs of one letter 300 to 8,700
// (74 k-word SUBTLEX-US lexicon; measured, this project).
const keyWalkMax = 20000

// keyWalk walks the letters-below table s.below from node g at depth d
// under the keys of f alone and records in t the paths to the words they
// keep, returning the trie node of the path to g, or -1 when no word
// below is kept or the walk gave up (t.steps over keyWalkMax). Below a
// child whose plain key is out of reach it walks on with skelWalk.
func (t *keyTrie) keyWalk(f *skelFilter, g *belowTable, node, d, maxDepth int) int32 {
	ok, _ := g.final(node)
	accept := ok && f.accepts(d)
	idx := int32(len(t.nodes))
	t.nodes = append(t.nodes, keyNode{accept: accept})
	base := len(t.pending)
	if d < maxDepth {
		m := f.mask(d)
		pm, pAll := f.plainMask(d)
		lo, hi := g.edges(node)
		for k := lo; k < hi; k++ {
			c := g.eb[k]
			if m[c>>6]&(1<<(c&63)) == 0 {
				continue
			}
			t.steps++
			if t.steps > keyWalkMax {
				return -1
			}
			next := int(g.en[k])
			p := pAll || pm[c>>6]&(1<<(c&63)) != 0
			if !f.stepPlain(d, c, g.nodes[next].sets.below(), g.rest[next], p) {
				continue
			}
			var ch int32
			if f.plainOK[d+1] {
				ch = t.keyWalk(f, g, next, d+1, maxDepth)
			} else {
				// Only the skeleton key is left below: skelWalk.
				sl := int(f.k[d+1])
				f.setSkMask(sl, d+1)
				ch = t.skelWalk(f, g, next, d+1, maxDepth, f.skel.final(sl))
			}
			if ch >= 0 {
				t.pending = append(t.pending, keyEdge{k: int32(k), child: ch})
			} else if t.steps > keyWalkMax {
				return -1
			}
		}
	}
	return t.close(idx, base, accept)
}

// skelWalk is keyWalk below a prefix (of depth d) whose plain key is out
// of reach, so that only the skeleton key decides, with fin whether the
// prefix's skeleton is within reach (unitRows.final) and its byte mask
// (skelFilter.mask) in f.skMask at its skeleton's length. Its steps are
// skelFilter.step's for that case, with less work and the same outcome: a
// byte that leaves the skeleton as it is moves no row, so the child's
// mask and fin are the prefix's and are not computed again; and the plain
// key is not looked at.
func (t *keyTrie) skelWalk(f *skelFilter, g *belowTable, node, d, maxDepth int, fin bool) int32 {
	ok, _ := g.final(node)
	accept := ok && fin
	if lead := g.rest[node].lead; !accept && lead&f.skLead[f.k[d]] == 0 && (!fin || lead&leadEnd == 0) {
		// No word below is kept (see setSkMask): nothing to record.
		return -1
	}
	idx := int32(len(t.nodes))
	t.nodes = append(t.nodes, keyNode{accept: accept})
	base := len(t.pending)
	if d < maxDepth {
		sk := &f.skel
		k := int(f.k[d])
		var last byte
		if k > 0 {
			last = sk.path[k-1]
		}
		miss0, rest0 := f.skMiss[d], f.skRest[d]
		m, skLead := &f.skMask[k], f.skLead[k]
		lo, hi := g.edges(node)
		for x := lo; x < hi; x++ {
			c := g.eb[x]
			if m[c>>6]&(1<<(c&63)) == 0 {
				continue
			}
			t.steps++
			if t.steps > keyWalkMax {
				return -1
			}
			next := int(g.en[x])
			below := g.nodes[next].sets.below()
			rs := g.rest[next].skel
			miss := sk.tall &^ below
			k2 := k
			if inSkeleton(c) && (k == 0 || last != c) && k+1 < sk.nrows {
				sk.push(k, c)
				k2 = k + 1
				if !sk.reach(k2, below, 0, rs) {
					continue
				}
			} else if lead := g.rest[next].lead; lead&skLead == 0 && (!fin || lead&leadEnd == 0) {
				continue // skelWalk's first test, for the child, at no call
			} else if (miss != miss0 || rs != rest0) && !sk.reach(k, below, 0, rs) {
				// The parent's test (reach), which passed, holds unless
				// the letters missing below or the longest tail changed.
				continue
			}
			f.k[d+1] = int32(k2)
			f.plainOK[d+1], f.skelOK[d+1] = false, true
			f.skMiss[d+1], f.skRest[d+1] = miss, rs
			var ch int32
			if k2 == k {
				ch = t.skelWalk(f, g, next, d+1, maxDepth, fin)
			} else {
				f.setSkMask(k2, d+1)
				ch = t.skelWalk(f, g, next, d+1, maxDepth, sk.final(k2))
			}
			if ch >= 0 {
				t.pending = append(t.pending, keyEdge{k: int32(x), child: ch})
			} else if t.steps > keyWalkMax {
				return -1
			}
		}
	}
	return t.close(idx, base, accept)
}

// setSkMask puts in f.skMask[k] the byte mask (mask) at depth d, whose
// path has k skeleton bytes, for keyTrie.skelWalk, and in f.skLead[k]
// the letters (belowBit) of the bytes of that mask, which holds the
// path's last skeleton byte. Below a prefix whose plain key is out of reach,
// the skeleton key keeps a word only when the word's skeleton goes on
// with a byte of the mask (skelWalk steps into no other byte that moves
// the skeleton; all the bytes it steps into until then leave the
// skeleton as it is, mask or not) or repeats the last byte, or when it
// has no more skeleton bytes and the prefix's skeleton is in reach. So
// skelWalk walks no further below a state whose rests start their
// skeletons (restLens.lead) with none of the letters of skLead, unless a
// rest without skeleton bytes ends a kept word: every such walk would
// record nothing. The test is exact: the trie is the same, only the
// steps below such states are saved.
func (f *skelFilter) setSkMask(k, d int) {
	m := f.mask(d)
	f.skMask[k] = m
	f.skLead[k] = maskLetters(&m) // the mask holds the last skeleton byte
}

// maskLetters returns the letters (belowBit) of the bytes of m.
func maskLetters(m *[4]uint64) uint32 {
	const az = 1<<26 - 1 // the bits of 'a' to 'z' in m[1], from bit 'a'-64
	lead := uint32(m[1]>>('a'-64)) & az
	lead |= uint32(m[0]>>'\'') & 1 << 26
	lead |= uint32(m[0]>>'-') & 1 << 27
	other := m[0]&^(1<<'\''|1<<'-') | m[1]&^(az<<('a'-64)) | m[2] | m[3]
	if other != 0 {
		lead |= 1 << 28
	}
	return lead
}

// close ends trie node idx, whose children keyWalk or skelWalk stacked
// in t.pending from base on: it moves them to t.edges and returns idx,
// or drops the node and returns -1 when it has no child and its own path
// is no word the keys keep (accept).
func (t *keyTrie) close(idx int32, base int, accept bool) int32 {
	kids := t.pending[base:]
	if len(kids) == 0 && !accept {
		t.nodes = t.nodes[:idx]
		t.pending = t.pending[:base]
		return -1
	}
	lo := int32(len(t.edges))
	t.edges = append(t.edges, kids...)
	t.pending = t.pending[:base]
	t.nodes[idx].lo, t.nodes[idx].hi = lo, int32(len(t.edges))
	return idx
}

// build records the words the keys of f keep below the table's start,
// walking at most maxDepth bytes deep. It reports false when the walk
// gave up (keyWalkMax) and true otherwise, with an empty trie when no
// word is kept.
func (t *keyTrie) build(f *skelFilter, g *belowTable, maxDepth int) bool {
	t.nodes, t.edges, t.pending, t.steps = t.nodes[:0], t.edges[:0], t.pending[:0], 0
	if t.keyWalk(f, g, 0, 0, maxDepth) < 0 {
		t.nodes = t.nodes[:0]
		return t.steps <= keyWalkMax
	}
	return true
}
