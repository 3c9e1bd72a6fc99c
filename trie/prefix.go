package trie

// prefixRange computes PrefixRange by walking the FST. It relies on how
// vellum places outputs when values grow with the keys (as ranks do): the
// outputs summed along any path give the smallest id below the state
// reached (LoadSection checks the local form of this rule: from every
// state, the smallest continuation adds 0), so after walking prefix the
// sum is the first id of the range, and following the largest transitions
// down to a word gives its last id. Ids are clamped to [0, Len] so that
// bytes which pass the load checks but break the rule elsewhere give wrong
// ranges, never out-of-range ids.
func (l *Lexicon) prefixRange(prefix string) (lo, hi uint32) {
	if l.n == 0 {
		return 0, 0
	}
	state, sum := l.root, uint64(0)
	for i := 0; i < len(prefix); i++ {
		next, out, ok := stepAt(l.fst, &l.codes, state, prefix[i])
		if !ok {
			p := l.insertionPoint(state, sum, prefix[i])
			return p, p
		}
		state, sum = next, sum+out
	}
	return l.clamp(sum), l.clamp(l.lastBelow(state, sum) + 1)
}

// insertionPoint returns the id a word would get if it left state (reached
// with output sum) on byte b, which state has no transition for.
func (l *Lexicon) insertionPoint(state int, sum uint64, b byte) uint32 {
	s, ok := decodeState(l.fst, &l.codes, state)
	if !ok {
		return l.n
	}
	for i := 0; i < s.n; i++ {
		c, _, out, ok := s.transition(l.fst, i)
		if !ok {
			return l.n
		}
		if c > b {
			return l.clamp(sum + out)
		}
	}
	return l.clamp(l.lastBelow(state, sum) + 1)
}

// lastBelow returns the largest id below state, reached with output sum,
// by following the largest transition until a state has none.
func (l *Lexicon) lastBelow(state int, sum uint64) uint64 {
	for range l.maxWordLen + 1 {
		s, ok := decodeState(l.fst, &l.codes, state)
		if !ok {
			break
		}
		if s.n == 0 {
			return sum + s.finalOut
		}
		_, next, out, ok := s.transition(l.fst, s.n-1)
		if !ok {
			break
		}
		state, sum = next, sum+out
	}
	return uint64(l.n) - 1 // only for bytes that passed the checks yet break the rule
}

// clamp limits an id computed from FST outputs to [0, Len].
func (l *Lexicon) clamp(id uint64) uint32 {
	return uint32(min(id, uint64(l.n)))
}
