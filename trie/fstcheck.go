package trie

import (
	"iter"
	"math"
	"math/bits"
)

// fstStates is the set of states reachable from the root of a checked FST,
// as a bitset over addresses.
type fstStates struct {
	root int
	set  []uint64
}

// all yields the addresses of the states in increasing order. Address 0
// (the shared final state with no transitions) is not in the set.
func (st fstStates) all() iter.Seq[int] {
	return func(yield func(int) bool) {
		for w, x := range st.set {
			for x != 0 {
				if !yield(w*64 + bits.TrailingZeros64(x)) {
					return
				}
				x &= x - 1
			}
		}
	}
}

// has reports whether the state at address a is in the set.
func (st fstStates) has(a int) bool {
	return a >= 0 && a/64 < len(st.set) && st.set[a/64]&(1<<(a%64)) != 0
}

// count returns the number of states in the set.
func (st fstStates) count() int {
	n := 0
	for _, x := range st.set {
		n += bits.OnesCount64(x)
	}
	return n
}

// checkFST walks the FST bytes d once, visiting every state reachable from
// the root, and checks that each state lies inside the FST body, that every
// multiple-transition state lists its bytes in strictly increasing order,
// that the smallest continuation from every state adds 0 to the output (a
// final state has final output 0, any other state's first transition has
// output 0: true of every FST whose values are the ranks of its keys),
// that every state leads to at least one word, that the FST holds exactly n
// words, that no path sums to an output of n or more and that the longest
// path is maxLen bytes long (the longest word). Every transition
// points to a lower address, so the walk always ends. base is the offset of
// the FST within the section, for error reports.
func checkFST(d []byte, codes *[64]byte, n uint32, maxLen int, base int) (fstStates, error) {
	root, err := fstRoot(d)
	if err != nil {
		return fstStates{}, corrupt("fst", base, "%v", err)
	}
	if c := readPacked(d[len(d)-16 : len(d)-8]); c != uint64(n) {
		return fstStates{}, corrupt("fst", base+len(d)-16, "fst records %d words, table has %d", c, n)
	}
	st := fstStates{root: root, set: make([]uint64, (len(d)+63)/64)}

	// Depth-first visit of every reachable state.
	stack := []int{root}
	for len(stack) > 0 {
		addr := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		if addr == emptyState || st.has(addr) {
			continue
		}
		s, ok := decodeState(d, codes, addr)
		if !ok {
			return st, corrupt("fst", base+addr, "state runs outside the fst")
		}
		st.set[addr/64] |= 1 << (addr % 64)
		if s.final && s.finalOut != 0 {
			return st, corrupt("fst", base+addr, "final output %d, want 0 for ids that are ranks", s.finalOut)
		}
		prev := -1
		for i := 0; i < s.n; i++ {
			c, next, out, ok := s.transition(d, i)
			if !ok {
				return st, corrupt("fst", base+addr, "transition %q points outside the fst", c)
			}
			if int(c) <= prev {
				return st, corrupt("fst", base+addr, "transition bytes out of order")
			}
			if i == 0 && !s.final && out != 0 {
				return st, corrupt("fst", base+addr, "first transition output %d, want 0 for ids that are ranks", out)
			}
			prev = int(c)
			if next != emptyState && !st.has(next) {
				stack = append(stack, next)
			}
		}
	}

	// Count the words and the largest output below each state, lowest
	// address first: every transition points lower, so the targets of a
	// state are done before it. rank maps an address to its index among
	// the reachable states.
	ranks := make([]uint32, len(st.set))
	var total uint32
	for w, x := range st.set {
		ranks[w] = total
		total += uint32(bits.OnesCount64(x))
	}
	rank := func(a int) uint32 {
		return ranks[a/64] + uint32(bits.OnesCount64(st.set[a/64]&(1<<(a%64)-1)))
	}
	count := make([]uint32, total)  // words below, saturating at math.MaxUint32
	maxOut := make([]uint64, total) // largest output sum below, saturating
	height := make([]uint16, total) // longest path below, saturating at MaxWordLen+1
	for addr := range st.all() {
		s, _ := decodeState(d, codes, addr) // checked above
		var cnt uint64
		var mx uint64
		var ht uint16
		if s.final {
			cnt, mx = 1, s.finalOut
		}
		for i := 0; i < s.n; i++ {
			_, next, out, _ := s.transition(d, i)
			nc, nm, nh := uint64(1), uint64(0), uint16(0) // the empty final state
			if next != emptyState {
				r := rank(next)
				nc, nm, nh = uint64(count[r]), maxOut[r], height[r]
			}
			ht = max(ht, min(nh+1, MaxWordLen+1))
			cnt = min(cnt+nc, math.MaxUint32)
			sum := out + nm
			if sum < out {
				sum = math.MaxUint64
			}
			mx = max(mx, sum)
		}
		if cnt == 0 && !(addr == root && n == 0) {
			return st, corrupt("fst", base+addr, "state leads to no word")
		}
		r := rank(addr)
		count[r], maxOut[r], height[r] = uint32(cnt), mx, ht
	}
	rootCount, rootMax, rootHeight := uint64(1), uint64(0), 0
	if root != emptyState {
		r := rank(root)
		rootCount, rootMax, rootHeight = uint64(count[r]), maxOut[r], int(height[r])
	}
	if rootHeight != maxLen {
		return st, corrupt("fst", base+root, "longest fst word is %d bytes, header says %d", rootHeight, maxLen)
	}
	if rootCount != uint64(n) {
		return st, corrupt("fst", base+root, "fst accepts %d words, table has %d", rootCount, n)
	}
	if n > 0 && rootMax >= uint64(n) {
		return st, corrupt("fst", base+root, "fst gives ids up to %d for %d words", rootMax, n)
	}
	return st, nil
}
