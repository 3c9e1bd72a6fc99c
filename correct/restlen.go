package correct

// restLens bounds the lengths of the rests of the words below a state of
// belowTable (the bytes after the state's prefix): at least min and at
// most max bytes, and at most skel bytes of the consonant skeleton
// (inSkeleton, repeats counted; the skeleton's repeat rule only drops
// bytes). The plain and skeleton keys of skelFilter bound a prefix by
// the letters below it; the lengths add that a typed tail longer or
// shorter than every rest below costs the difference in insertions or
// deletions. Entries saturate at 255 (a max of 255 is no bound).
//
// lead tells the keys' walk below a dead plain key (keyTrie.skelWalk)
// which skeletons can start below the state: the letters (belowBit) that
// are the first skeleton byte of some rest, that is the first byte of
// the rest that inSkeleton keeps, and leadEnd when some rest holds no
// such byte at all (a word ends below with the skeleton as it is).
type restLens struct {
	min, max, skel uint8
	lead           uint32
}

// leadEnd is the bit of restLens.lead for a rest without a skeleton
// byte; belowBit uses bits 0 to 28.
const leadEnd = 1 << 31

// noRest is the entry that bounds nothing: a state deeper than the walk
// that fills the table goes, or a search without the table.
var noRest = restLens{min: 0, max: 255, skel: 255, lead: belowAll | leadEnd}

// fillRest fills t.rest, the restLens of every node, by one depth-first
// walk that visits each node once. Cost: one pass over the edges; 8 bytes
// per node.
func fillRest(t *belowTable) {
	n := len(t.nodes) - 1
	t.rest = make([]restLens, n)
	done := make([]bool, n)
	var walk func(i, depth int) restLens
	walk = func(i, depth int) restLens {
		if done[i] {
			return t.rest[i]
		}
		r := restLens{min: 255}
		if ok, _ := t.final(i); ok {
			r.min = 0
			r.lead = leadEnd
		}
		lo, hi := t.edges(i)
		for k := lo; k < hi; k++ {
			var c restLens
			if depth < 4*maxTyped {
				c = walk(int(t.en[k]), depth+1)
			} else {
				c = noRest // deeper than any search goes: no bound
			}
			s := uint8(0)
			if inSkeleton(t.eb[k]) {
				s = 1
				r.lead |= belowBit(t.eb[k])
			} else {
				r.lead |= c.lead
			}
			r.min = min(r.min, sat8(int(c.min)+1))
			r.max = max(r.max, sat8(int(c.max)+1))
			r.skel = max(r.skel, sat8(int(c.skel)+int(s)))
		}
		if depth < 4*maxTyped {
			t.rest[i] = r
			done[i] = true
		}
		return r
	}
	walk(0, 0)
}

// sat8 returns x capped at 255.
func sat8(x int) uint8 {
	return uint8(min(x, 255))
}

// restOf returns the restLens of state (noRest without the letters-below
// table).
func (s *search) restOf(state int) restLens {
	if s.below == nil || s.below.rest == nil {
		return noRest
	}
	return s.below.rest[state]
}
