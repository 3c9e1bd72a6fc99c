package trie

// This file holds the front-coded word table: the words in rank order, cut
// into blocks of blockSize words. Each block starts with its first word in
// full (length byte, bytes); every later word is stored as a head byte
// holding the length of the prefix it shares with the word before it (high
// nibble) and the length of the rest (low nibble), then the rest. A nibble
// of 15 means the length did not fit and follows in a byte of its own
// (shared length first), so most words cost one byte plus their new
// suffix. An array of block offsets lets rank → word decode at most one
// block. Word → rank goes through the FST instead: it measured faster than
// a binary search over the first words of the blocks.

import (
	"encoding/binary"
	"slices"
	"unicode/utf8"
)

// wordTable is a read-only view of the block offsets and word bytes of a
// section. Its slices alias the section bytes.
type wordTable struct {
	n      uint32 // number of words
	bs     uint32 // words per block
	maxLen int    // length of the longest word
	blocks []byte // numBlocks(n, bs)+1 little-endian uint32 offsets into words
	words  []byte
}

// appendBlocks appends the front-coded words to dst and returns it with the
// block offsets (relative to the start of the appended bytes).
func appendWords(dst []byte, entries []Entry, bs int) ([]byte, []uint32) {
	base := len(dst)
	offs := make([]uint32, 0, (len(entries)+bs-1)/bs+1)
	prev := ""
	for i, e := range entries {
		w := e.Word
		if i%bs == 0 {
			offs = append(offs, uint32(len(dst)-base))
			dst = append(dst, byte(len(w)))
			dst = append(dst, w...)
		} else {
			p := commonPrefix(prev, w)
			dst = appendHead(dst, p, len(w)-p)
			dst = append(dst, w[p:]...)
		}
		prev = w
	}
	offs = append(offs, uint32(len(dst)-base))
	return dst, offs
}

// nibbleEscape in a head nibble means the length follows in its own byte.
const nibbleEscape = 15

// appendHead appends the head of a front-coded entry.
func appendHead(dst []byte, shared, rest int) []byte {
	h := byte(min(shared, nibbleEscape))<<4 | byte(min(rest, nibbleEscape))
	dst = append(dst, h)
	if shared >= nibbleEscape {
		dst = append(dst, byte(shared))
	}
	if rest >= nibbleEscape {
		dst = append(dst, byte(rest))
	}
	return dst
}

// readHead decodes the head of the front-coded entry at b[p:] and returns
// the shared length, the rest length and the offset of the rest, or false
// when the entry runs past b. canonical reports whether every escaped
// length is at least nibbleEscape, as appendHead writes it.
func readHead(b []byte, p int) (shared, rest, q int, canonical, ok bool) {
	if p >= len(b) {
		return 0, 0, 0, false, false
	}
	h := b[p]
	p++
	shared, rest = int(h>>4), int(h&0xf)
	canonical = true
	if shared == nibbleEscape {
		if p >= len(b) {
			return 0, 0, 0, false, false
		}
		shared = int(b[p])
		canonical = shared >= nibbleEscape
		p++
	}
	if rest == nibbleEscape {
		if p >= len(b) {
			return 0, 0, 0, false, false
		}
		rest = int(b[p])
		canonical = canonical && rest >= nibbleEscape
		p++
	}
	if rest > len(b)-p {
		return 0, 0, 0, false, false
	}
	return shared, rest, p, canonical, true
}

// commonPrefix returns the length in bytes of the longest common prefix of
// a and b.
func commonPrefix(a, b string) int {
	n := min(len(a), len(b))
	for i := 0; i < n; i++ {
		if a[i] != b[i] {
			return i
		}
	}
	return n
}

// block returns the bytes of block i, or false when its offsets are out of
// order or out of range.
func (t *wordTable) block(i uint32) ([]byte, bool) {
	o := int(i) * 4
	if o+8 > len(t.blocks) {
		return nil, false
	}
	lo := binary.LittleEndian.Uint32(t.blocks[o:])
	hi := binary.LittleEndian.Uint32(t.blocks[o+4:])
	if lo > hi || uint64(hi) > uint64(len(t.words)) {
		return nil, false
	}
	return t.words[lo:hi], true
}

// appendWord appends word id to dst. It does not allocate when
// cap(dst)-len(dst) is at least maxLen, the longest word of the lexicon.
// It returns dst unchanged when id is out of range or the block is
// damaged.
//
// Rather than rebuilding every word of the block up to the wanted one, it
// first reads the heads of the entries (no copying), then fills the word
// from its own new bytes backwards: each earlier entry supplies the bytes
// between its shared length and the shortest shared length seen after it,
// so every byte of the result is copied once.
func (t *wordTable) appendWord(dst []byte, id uint32) []byte {
	if id >= t.n {
		return dst
	}
	b, ok := t.block(id / t.bs)
	if !ok || len(b) == 0 {
		return dst
	}
	j := int(id % t.bs)
	if j >= fillMax {
		return t.appendWordForward(dst, b, j)
	}
	// Entry k's new bytes are b[qs[k]:qs[k]+rest], placed from ss[k] on;
	// entry 0 is the first word, with ss[0] = 0.
	var qs, ss [fillMax]int32
	p := 1 + int(b[0])
	if p > len(b) {
		return dst
	}
	qs[0], ss[0] = 1, 0
	length := p - 1 // length of the word decoded so far
	for k := 1; k <= j; k++ {
		if p >= len(b) {
			return dst
		}
		var shared, rest, q int
		if h := b[p]; h>>4 != nibbleEscape && h&0xf != nibbleEscape {
			shared, rest, q = int(h>>4), int(h&0xf), p+1 // the common case, inline
			if rest > len(b)-q {
				return dst
			}
		} else {
			var ok bool
			if shared, rest, q, _, ok = readHead(b, p); !ok {
				return dst
			}
		}
		if shared > length {
			return dst
		}
		qs[k], ss[k] = int32(q), int32(shared)
		length = shared + rest
		p = q + rest
	}
	if length > t.maxLen {
		return dst
	}
	base := len(dst)
	dst = slices.Grow(dst, length)[:base+length]
	w := dst[base:]
	need := length // bytes [0, need) of w are still to fill
	for k := j; need > 0; k-- {
		s := int(ss[k])
		if s < need {
			copy(w[s:need], b[qs[k]:])
			need = s
		}
	}
	return dst
}

// fillMax is the largest in-block position appendWord decodes with its
// backward fill; later positions (possible only with blocks larger than
// the writer makes) go through appendWordForward.
const fillMax = 32

// appendWordForward appends word j of block b by rebuilding every word of
// the block up to it in dst's spare room.
func (t *wordTable) appendWordForward(dst []byte, b []byte, j int) []byte {
	p := 1 + int(b[0])
	if p > len(b) || p-1 > t.maxLen {
		return dst
	}
	base := len(dst)
	dst = slices.Grow(dst, t.maxLen)
	w := dst[base : base+t.maxLen]
	n := copy(w, b[1:p])
	for ; j > 0; j-- {
		shared, rest, q, _, ok := readHead(b, p)
		if !ok || shared > n || shared+rest > len(w) {
			return dst[:base]
		}
		n = shared + copy(w[shared:], b[q:q+rest])
		p = q + rest
	}
	return dst[:base+n]
}

// validate checks every block of the table: offsets in order and in range,
// each block holding exactly its share of the words and nothing else, every
// word non-empty, valid UTF-8, at most maxLen bytes long, and every word
// strictly greater than the one before it. off is the offset of the words
// part within the section, for error reports.
func (t *wordTable) validate(maxLen int, blocksOff, wordsOff int) error {
	nb := numBlocks(t.n, t.bs)
	le := binary.LittleEndian
	if le.Uint32(t.blocks) != 0 {
		return corrupt("blocks", blocksOff, "first block offset is %d, want 0", le.Uint32(t.blocks))
	}
	if last := le.Uint32(t.blocks[nb*4:]); last != uint32(len(t.words)) {
		return corrupt("blocks", blocksOff+int(nb)*4, "last block offset is %d, want %d", last, len(t.words))
	}
	// cur is the last word decoded; next receives the word being decoded.
	var curBuf, nextBuf [MaxWordLen]byte
	cur, next := curBuf[:0], nextBuf[:0]
	longest := 0
	for blk := uint32(0); blk < nb; blk++ {
		b, ok := t.block(blk)
		if !ok {
			return corrupt("blocks", blocksOff+int(blk)*4, "block %d offsets out of order or range", blk)
		}
		at := wordsOff + int(le.Uint32(t.blocks[blk*4:]))
		p := 0
		end := min((blk+1)*t.bs, t.n)
		for rank := blk * t.bs; rank < end; rank++ {
			if rank == blk*t.bs {
				if p >= len(b) || 1+int(b[0]) > len(b) {
					return corrupt("words", at+p, "word %d runs past its block", rank)
				}
				next = append(next[:0], b[1:1+int(b[0])]...)
				p = 1 + int(b[0])
			} else {
				shared, rest, q, canonical, ok := readHead(b, p)
				switch {
				case !ok || shared+rest > MaxWordLen:
					return corrupt("words", at+p, "word %d runs past its block", rank)
				case !canonical:
					return corrupt("words", at+p, "word %d has an escaped length below %d", rank, nibbleEscape)
				case shared > len(cur):
					return corrupt("words", at+p, "word %d shares %d bytes of a %d-byte word", rank, shared, len(cur))
				}
				next = append(next[:0], cur[:shared]...)
				next = append(next, b[q:q+rest]...)
				p = q + rest
			}
			switch {
			case len(next) == 0:
				return corrupt("words", at+p, "word %d is empty", rank)
			case len(next) > maxLen:
				return corrupt("words", at+p, "word %d is %d bytes, longer than the recorded maximum %d", rank, len(next), maxLen)
			case !utf8.Valid(next):
				return corrupt("words", at+p, "word %d is not valid utf-8", rank)
			case rank > 0 && string(next) <= string(cur):
				return corrupt("words", at+p, "word %d is not greater than word %d", rank, rank-1)
			}
			longest = max(longest, len(next))
			cur, next = next, cur
		}
		if p != len(b) {
			return corrupt("words", at+p, "block %d has %d bytes after its last word", blk, len(b)-p)
		}
	}
	if longest != maxLen {
		return corrupt("header", hMaxWordLen, "recorded longest word %d bytes, table has %d", maxLen, longest)
	}
	return nil
}
