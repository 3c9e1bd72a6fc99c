package trie

// fstWord appends the word with the given id to dst by walking the FST
// from the root: the id of a word is the sum of the outputs along its path,
// and outputs are ranks, so they rise with the transition bytes of every
// state and the outputs along a prefix sum to the first id below it
// (LoadSection checks both). At each state the walk stops if the state is
// final and its sum is id, and otherwise follows the last transition whose
// sum does not pass id (a binary search over the state's transitions).
// This is the reverse lookup of an automaton numbered by ranks (Lucchesi &
// Kowaltowski 1993, "Applications of finite automata representing large
// vocabularies").
//
// It returns dst unchanged when id is not below Len or the walk finds no
// word (only a damaged FST loaded with SkipWalk does that). It appends at
// most MaxWordLen bytes, so it does not allocate when cap(dst)-len(dst) is
// at least that much.
func (l *Lexicon) fstWord(dst []byte, id uint32) []byte {
	if id >= l.n {
		return dst
	}
	base := len(dst)
	want := uint64(id)
	state, sum := l.root, uint64(0)
	for depth := 0; ; depth++ {
		s, ok := decodeState(l.fst, &l.codes, state)
		if !ok {
			return dst[:base]
		}
		if s.final && sum+s.finalOut == want {
			return dst
		}
		if depth == l.maxWordLen || s.n == 0 {
			return dst[:base]
		}
		// The first transition whose sum passes want; the one before it
		// leads to the word.
		lo, hi := 0, s.n
		for lo < hi {
			mid := int(uint(lo+hi) >> 1)
			if sum+s.outAt(l.fst, mid) > want {
				hi = mid
			} else {
				lo = mid + 1
			}
		}
		if lo == 0 {
			return dst[:base]
		}
		c, next, out, ok := s.transition(l.fst, lo-1)
		if !ok {
			return dst[:base]
		}
		dst = append(dst, c)
		state, sum = next, sum+out
	}
}

// outAt returns the output of the i-th transition of the state in increasing
// byte order, without decoding its target. i must be in [0, s.n), and the
// state must come from decodeState, which checked its bounds.
func (s *stateView) outAt(d []byte, i int) uint64 {
	if s.single {
		return s.out
	}
	j := s.n - 1 - i // stored in reverse order
	return readPacked(d[s.outs+j*s.os : s.outs+(j+1)*s.os])
}
