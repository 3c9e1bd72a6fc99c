package trie

// This file reads states of a vellum (v1 encoding) FST straight from its
// bytes, with every offset checked, so that walking a lexicon never
// allocates and never indexes out of range, whatever the bytes hold. The
// encoding is the one described in vellum's docs/format.md: states are
// written backwards from their top byte, and every transition points to a
// lower address, so the states form a DAG whose edges always go down.

// Sizes fixed by the vellum v1 encoding.
const (
	fstHeaderLen = 16 // version uint64, type uint64
	fstFooterLen = 16 // key count uint64, root address uint64
	fstVersion   = 1  // the only vellum encoding version
	emptyState   = 0  // address vellum uses for a final state with no transitions and no output
)

// Bits of a state's top byte in the vellum v1 encoding.
const (
	topSingle   = 1 << 7 // the state has exactly one transition and is not final
	topNext     = 1 << 6 // single: the target is the state written just before
	topFinal    = 1 << 6 // multi: the state is final
	topLowBits  = 1<<6 - 1
	maxPackSize = 8 // widest packed integer the loader accepts, in bytes
)

// stateView is one decoded state. All index fields have been checked to lie
// inside the FST bytes (between its header and footer).
type stateView struct {
	single bool
	final  bool
	n      int // number of transitions
	bottom int // lowest byte of the state; transition deltas count from here

	// Multiple-transition states: the keys are at d[keys:keys+n], the target
	// deltas at d[dests:dests+n*ts] and the outputs at d[outs:outs+n*os], all
	// three in reverse byte order (index n-1 is the smallest byte).
	keys, dests, outs int
	ts, os            int
	finalOut          uint64

	// Single-transition states.
	ch   byte
	next int // target address, already resolved
	out  uint64
}

// readPacked reads a little-endian unsigned integer of len(b) ≤ 8 bytes.
func readPacked(b []byte) uint64 {
	var v uint64
	for i, c := range b {
		v |= uint64(c) << (8 * uint(i))
	}
	return v
}

// fstBody reports whether [lo, hi) lies between the FST header and footer.
func fstBody(d []byte, lo, hi int) bool {
	return lo >= fstHeaderLen && lo <= hi && hi <= len(d)-fstFooterLen
}

// target turns a delta stored in a state whose lowest byte is bottom into
// an address, and reports false when the delta points outside the body.
func target(bottom int, delta uint64) (int, bool) {
	if delta == 0 {
		return emptyState, true
	}
	if delta > uint64(bottom-fstHeaderLen) {
		return 0, false
	}
	return bottom - int(delta), true
}

// decodeState decodes the state at addr of the FST bytes d. codes maps the
// 6-bit byte codes of single-transition states back to bytes. It reports
// false when any part of the state lies outside the body or a size field is
// impossible; it never panics.
func decodeState(d []byte, codes *[64]byte, addr int) (stateView, bool) {
	var s stateView
	if addr == emptyState {
		s.final = true
		return s, true
	}
	if !fstBody(d, addr, addr+1) {
		return s, false
	}
	top := d[addr]
	pos := addr
	if top&topSingle != 0 {
		s.single = true
		s.n = 1
		if code := top & topLowBits; code != 0 {
			s.ch = codes[code]
		} else {
			pos--
			if !fstBody(d, pos, pos+1) {
				return s, false
			}
			s.ch = d[pos]
		}
		if top&topNext != 0 {
			s.bottom = pos
			s.next = pos - 1
			if !fstBody(d, s.next, s.next+1) {
				return s, false
			}
			return s, true
		}
		pos--
		if !fstBody(d, pos, pos+1) {
			return s, false
		}
		ts, os := int(d[pos]>>4), int(d[pos]&0xf)
		if ts > maxPackSize || os > maxPackSize {
			return s, false
		}
		lo := pos - ts - os
		if !fstBody(d, lo, pos) {
			return s, false
		}
		s.out = readPacked(d[lo : lo+os])
		s.bottom = lo
		var ok bool
		s.next, ok = target(lo, readPacked(d[lo+os:pos]))
		return s, ok
	}
	s.final = top&topFinal != 0
	s.n = int(top & topLowBits)
	if s.n == 0 {
		pos--
		if !fstBody(d, pos, pos+1) {
			return s, false
		}
		s.n = int(d[pos])
		if s.n == 1 {
			s.n = 256
		}
	}
	pos--
	if !fstBody(d, pos, pos+1) {
		return s, false
	}
	s.ts, s.os = int(d[pos]>>4), int(d[pos]&0xf)
	if s.ts > maxPackSize || s.os > maxPackSize {
		return s, false
	}
	s.keys = pos - s.n
	s.dests = s.keys - s.n*s.ts
	s.outs = s.dests - s.n*s.os
	s.bottom = s.outs
	if s.final && s.os > 0 {
		s.bottom -= s.os
	}
	if !fstBody(d, s.bottom, pos) {
		return s, false
	}
	if s.final && s.os > 0 {
		s.finalOut = readPacked(d[s.bottom:s.outs])
	}
	return s, true
}

// transition returns the i-th transition of the state in increasing byte
// order. i must be in [0, s.n). It reports false when the target lies
// outside the FST body.
func (s *stateView) transition(d []byte, i int) (b byte, next int, out uint64, ok bool) {
	if s.single {
		return s.ch, s.next, s.out, true
	}
	j := s.n - 1 - i // stored in reverse order
	b = d[s.keys+j]
	next, ok = target(s.bottom, readPacked(d[s.dests+j*s.ts:s.dests+(j+1)*s.ts]))
	out = readPacked(d[s.outs+j*s.os : s.outs+(j+1)*s.os])
	return b, next, out, ok
}

// stepAt follows the transition on b from the state at addr without
// decoding the rest of the state: the hot path of Step and ID. It checks
// every index it uses and reports false for a missing transition or any
// bounds failure.
func stepAt(d []byte, codes *[64]byte, addr int, b byte) (next int, out uint64, ok bool) {
	lim := len(d) - fstFooterLen
	if addr < fstHeaderLen || addr >= lim {
		return 0, 0, false
	}
	top := d[addr]
	pos := addr
	if top&topSingle != 0 {
		c := codes[top&topLowBits]
		if top&topLowBits == 0 {
			pos--
			if pos < fstHeaderLen {
				return 0, 0, false
			}
			c = d[pos]
		}
		if c != b {
			return 0, 0, false
		}
		if top&topNext != 0 {
			if pos-1 < fstHeaderLen {
				return 0, 0, false
			}
			return pos - 1, 0, true
		}
		pos--
		if pos < fstHeaderLen {
			return 0, 0, false
		}
		ts, os := int(d[pos]>>4), int(d[pos]&0xf)
		lo := pos - ts - os
		if lo < fstHeaderLen || ts > maxPackSize || os > maxPackSize {
			return 0, 0, false
		}
		next, ok = target(lo, readPacked(d[lo+os:pos]))
		return next, readPacked(d[lo : lo+os]), ok
	}
	n := int(top & topLowBits)
	if n == 0 {
		pos--
		if pos < fstHeaderLen {
			return 0, 0, false
		}
		n = int(d[pos])
		if n == 1 {
			n = 256
		}
	}
	pos--
	keys := pos - n
	if keys < fstHeaderLen {
		return 0, 0, false
	}
	ts, os := int(d[pos]>>4), int(d[pos]&0xf)
	if ts > maxPackSize || os > maxPackSize {
		return 0, 0, false
	}
	j := -1
	for i, c := range d[keys:pos] {
		if c == b {
			j = i
			break
		}
	}
	if j < 0 {
		return 0, 0, false
	}
	dests := keys - n*ts
	outs := dests - n*os
	bottom := outs
	if top&topFinal != 0 {
		bottom -= os
	}
	if bottom < fstHeaderLen {
		return 0, 0, false
	}
	next, ok = target(bottom, readPacked(d[dests+j*ts:dests+(j+1)*ts]))
	return next, readPacked(d[outs+j*os : outs+(j+1)*os]), ok
}
