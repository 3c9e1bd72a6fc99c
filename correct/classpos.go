package correct

// This file holds the table that turns a set of byte classes (belowBit)
// into the typed positions of those classes in a few look-ups. The two
// bounds ask it for every child they price: the typed bytes no letter
// below the child can match (parentBound, childBound) and those on none of
// its edges (childBound). Replacing a loop over the set's classes, one
// look-up each, made the median 8-letter misspelling 3–5 % faster
// (measured, this project; BENCHMARKS.md, round 13).

// classChunk is the number of classes each part of classPos covers.
const classChunk = 5

// classChunks is the number of parts of classPos: enough for the 29
// classes of belowBit.
const classChunks = (29 + classChunk - 1) / classChunk

// of reads exactly six parts: this fails to compile if classChunks is
// not 6.
const _ = uint(classChunks-6) + uint(6-classChunks)

// classPos maps a set of byte classes to the typed positions of the
// classes in it: the set is cut into parts of classChunk classes, and part
// i of the table lists, for each subset of its classes, the union of their
// positions. Filled by fill for one typed word.
type classPos [classChunks][1 << classChunk]uint64

// fill fills p from pos, pos[b] being the typed positions of class b.
// Cost: classChunks × 2^classChunk entries, one OR each.
func (p *classPos) fill(pos *[29]uint64) {
	for i := range p {
		part := &p[i]
		part[0] = 0
		for sub := 1; sub < len(part); sub++ {
			low := sub & -sub
			b := i*classChunk + bitIndex(uint32(low))
			var at uint64
			if b < len(pos) {
				at = pos[b]
			}
			part[sub] = part[sub&(sub-1)] | at
		}
	}
}

// of returns the typed positions of the classes in set, as the union of
// pos[b] over the classes b in set that fill was given. Cost: classChunks
// look-ups, with no branch.
func (p *classPos) of(set uint32) uint64 {
	const m = 1<<classChunk - 1
	return p[0][set&m] | p[1][set>>classChunk&m] | p[2][set>>(2*classChunk)&m] |
		p[3][set>>(3*classChunk)&m] | p[4][set>>(4*classChunk)&m] | p[5][set>>(5*classChunk)&m]
}
