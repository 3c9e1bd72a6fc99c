package trie

import (
	"unicode"
	"unicode/utf8"
)

// Check enumerates every word of the FST in order and compares it, and the
// id its path gives, with AppendWord (the word table of a version-1
// section, the reverse walk of the FST in versions 2 and 3): the i-th word of the
// FST must be what AppendWord gives for i and its outputs must sum to i, and the outputs along
// every prefix must sum to the first id below it (which PrefixRange uses). LoadSection does not do
// this (it costs a walk over every word, not every state); a model checker
// or a test can. It returns nil or an error wrapping [ErrCorrupt]. It costs
// O(total bytes of the words) time and O(MaxWordLen) memory.
func (l *Lexicon) Check() error {
	type frame struct {
		trans []Transition
		i     int    // next transition to follow
		sum   uint64 // outputs up to this state
	}
	// frames[d] is the state reached after path[:d]; the buffers are reused
	// from word to word.
	frames := make([]frame, l.maxWordLen+1)
	depth := 0
	path := make([]byte, 0, l.maxWordLen)
	want := make([]byte, 0, l.maxWordLen)
	var next uint32 // id of the next word expected
	enter := func(state int, sum uint64) error {
		// The words below state come next, so the smallest is word next:
		// PrefixRange relies on the path sum being its id.
		if sum != uint64(next) {
			return corrupt("fst", headerSize, "path %q sums to %d, want the first id below it, %d", path, sum, next)
		}
		if final, out := l.Final(state); final {
			want = l.AppendWord(want[:0], next)
			switch {
			case next >= l.n:
				return corrupt("fst", headerSize, "fst holds more than %d words", l.n)
			case string(path) != string(want):
				return corrupt("fst", headerSize, "fst word %d is %q, table has %q", next, path, want)
			case sum+out != uint64(next):
				return corrupt("fst", headerSize, "fst gives %q id %d, want %d", path, sum+out, next)
			}
			next++
		}
		if depth == len(frames) {
			return corrupt("fst", headerSize, "fst path longer than the longest word (%d bytes)", l.maxWordLen)
		}
		f := &frames[depth]
		f.trans = l.AppendTransitions(f.trans[:0], state)
		f.i, f.sum = 0, sum
		depth++
		return nil
	}
	if err := enter(l.root, 0); err != nil {
		return err
	}
	for depth > 0 {
		f := &frames[depth-1]
		if f.i == len(f.trans) {
			depth--
			if depth > 0 {
				path = path[:len(path)-1]
			}
			continue
		}
		t := f.trans[f.i]
		f.i++
		path = append(path, t.Byte)
		if err := enter(t.Next, f.sum+t.Out); err != nil {
			return err
		}
	}
	if next != l.n {
		return corrupt("fst", headerSize, "fst holds %d words, table has %d", next, l.n)
	}
	if l.casing.compact {
		return l.checkRecords(want)
	}
	return nil
}

// checkRecords checks every exception record of a version-3 section
// against its word, which LoadSection cannot do without spelling every
// exception: a mask has no bit past the word's last rune and none on a
// rune that upper-casing leaves as it is, and no record, mask or full,
// gives a surface that codes 0 to 2 describe or, when full, that a mask
// could give. buf is reused for the words.
func (l *Lexicon) checkRecords(buf []byte) error {
	c := &l.casing
	for id := uint32(0); id < l.n; id++ {
		if c.code(id) != caseExcept {
			continue
		}
		rec, ok := c.compactRecord(id)
		if !ok {
			return corrupt("exceptions", headerSize, "no exception record for word %d", id)
		}
		buf = l.AppendWord(buf[:0], id)
		surface := string(rec.surface)
		if rec.mask != 0 {
			runes := 0
			for w := buf; len(w) > 0; runes++ {
				r, size := utf8.DecodeRune(w)
				if rec.mask>>runes&1 != 0 && unicode.ToUpper(r) == r {
					return corrupt("exceptions", headerSize, "mask of word %d upper-cases rune %d, which has no upper case", id, runes)
				}
				w = w[size:]
			}
			if runes < maxMaskRunes && rec.mask>>runes != 0 {
				return corrupt("exceptions", headerSize, "mask %#x of word %d reaches past its %d runes", rec.mask, id, runes)
			}
			var sb [2 * MaxWordLen]byte
			surface = string(appendMasked(sb[:0], buf, rec.mask))
		} else if m, ok := exceptMask(string(buf), surface); ok && m != 0 {
			return corrupt("exceptions", headerSize, "full surface %q of word %d is a mask of it", surface, id)
		}
		if casingCode(string(buf), surface) != caseExcept {
			return corrupt("exceptions", headerSize, "surface %q of word %d has a casing code", surface, id)
		}
	}
	return nil
}
