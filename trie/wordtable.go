package trie

// This file holds the front-coded word table: the words in rank order, cut
// into blocks of blockSize words. Each block starts with its first word in
// full (length byte, bytes); every later word is stored as the length of
// the prefix it shares with the word before it (one byte), the length of
// the rest (one byte) and the rest. An array of block offsets lets rank →
// word decode at most one block, and the first words of the blocks serve a
// binary search for word → rank.

import (
	"encoding/binary"
	"unicode/utf8"
)

// wordTable is a read-only view of the block offsets and word bytes of a
// section. Its slices alias the section bytes.
type wordTable struct {
	n      uint32 // number of words
	bs     uint32 // words per block
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
			dst = append(dst, byte(p), byte(len(w)-p))
			dst = append(dst, w[p:]...)
		}
		prev = w
	}
	offs = append(offs, uint32(len(dst)-base))
	return dst, offs
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

// first returns the first word of block i.
func (t *wordTable) first(i uint32) ([]byte, bool) {
	b, ok := t.block(i)
	if !ok || len(b) == 0 || 1+int(b[0]) > len(b) {
		return nil, false
	}
	return b[1 : 1+int(b[0])], true
}

// appendWord appends word id to dst. Intermediate words of the block are
// built in dst's spare room, so it does not allocate when cap(dst)-len(dst)
// is at least the longest word of the lexicon. It returns dst unchanged when
// id is out of range or the block is damaged.
func (t *wordTable) appendWord(dst []byte, id uint32) []byte {
	if id >= t.n {
		return dst
	}
	b, ok := t.block(id / t.bs)
	if !ok || len(b) == 0 {
		return dst
	}
	base := len(dst)
	p := 1 + int(b[0])
	if p > len(b) {
		return dst
	}
	dst = append(dst, b[1:p]...)
	for j := id % t.bs; j > 0; j-- {
		if p+2 > len(b) {
			return dst[:base]
		}
		shared, rest := int(b[p]), int(b[p+1])
		p += 2
		if shared > len(dst)-base || p+rest > len(b) {
			return dst[:base]
		}
		dst = append(dst[:base+shared], b[p:p+rest]...)
		p += rest
	}
	return dst
}

// search returns the smallest rank whose word w satisfies
// compare(w[:min(len(w), len(key))], key) > 0 when upper is true, or
// w >= key when upper is false. Over a sorted table both conditions hold
// for a suffix of the ranks, so the first gives the end of the range of
// words that start with key and the second gives its start. It costs a
// binary search over the first words of the blocks plus the decoding of one
// block, and does not allocate.
func (t *wordTable) search(key string, upper bool, from uint32) uint32 {
	nb := numBlocks(t.n, t.bs)
	// Find the first block, at or after from, whose first word satisfies
	// the condition; the answer lies in the block before it.
	lo, hi := from, nb
	for lo < hi {
		m := lo + (hi-lo)/2
		w, ok := t.first(m)
		if !ok {
			return t.n
		}
		if satisfies(w, key, upper) {
			hi = m
		} else {
			lo = m + 1
		}
	}
	if lo == from {
		return min(from*t.bs, t.n)
	}
	blk := lo - 1
	b, ok := t.block(blk)
	if !ok {
		return t.n
	}
	var buf [MaxWordLen]byte
	cur := buf[:0]
	p := 0
	rank := blk * t.bs
	end := min(rank+t.bs, t.n)
	for ; rank < end; rank++ {
		if rank == blk*t.bs {
			if len(b) == 0 || 1+int(b[0]) > len(b) {
				return t.n
			}
			cur = append(cur, b[1:1+int(b[0])]...)
			p = 1 + int(b[0])
		} else {
			if p+2 > len(b) {
				return t.n
			}
			shared, rest := int(b[p]), int(b[p+1])
			p += 2
			if shared > len(cur) || p+rest > len(b) || shared+rest > len(buf) {
				return t.n
			}
			cur = append(cur[:shared], b[p:p+rest]...)
			p += rest
		}
		if satisfies(cur, key, upper) {
			return rank
		}
	}
	return end
}

// satisfies is the search condition of [wordTable.search].
func satisfies(w []byte, key string, upper bool) bool {
	if upper {
		if len(w) > len(key) {
			w = w[:len(key)]
		}
		return string(w) > key
	}
	return string(w) >= key
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
				if p+2 > len(b) {
					return corrupt("words", at+p, "word %d runs past its block", rank)
				}
				shared, rest := int(b[p]), int(b[p+1])
				if shared > len(cur) {
					return corrupt("words", at+p, "word %d shares %d bytes of a %d-byte word", rank, shared, len(cur))
				}
				if p+2+rest > len(b) || shared+rest > MaxWordLen {
					return corrupt("words", at+p, "word %d runs past its block", rank)
				}
				next = append(next[:0], cur[:shared]...)
				next = append(next, b[p+2:p+2+rest]...)
				p += 2 + rest
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
