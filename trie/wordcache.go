package trie

import (
	"encoding/binary"
	"sync/atomic"
)

// Sizes of the word cache of a lexicon without a word table (versions 2 and 3).
const (
	// cacheBits is log2 of the number of slots.
	cacheBits = 10
	// cacheSlots is the number of slots: 1024 slots of 32 bytes, 32 KiB a
	// lexicon, allocated on the first AppendWord.
	cacheSlots = 1 << cacheBits
	// cacheWords is the number of 8-byte words of text a slot holds.
	cacheWords = 3
	// cacheMaxLen is the longest word a slot holds; longer words are
	// always spelled from the FST.
	cacheMaxLen = 8 * cacheWords
)

// Layout of a slot's tag: the id in the high 32 bits, the word's length in
// the next 8 (0 for an empty slot: words are never empty), and a 24-bit
// sequence number in the low bits, odd while a writer fills the slot.
const (
	tagIDShift  = 32
	tagLenShift = 24
	tagSeqMask  = 1<<tagLenShift - 1
)

// wordCache maps recently spelled ids to their folded words for a
// lexicon without a word table, whose AppendWord otherwise walks the FST. It is a
// direct-mapped table of seqlock slots: every field is read and written
// through sync/atomic, so any number of goroutines may use it at once
// without locks and without allocating. A reader that meets a slot being
// written, or whose slot changed while it read, simply falls back to the
// FST; a writer that finds its slot busy does not cache.
type wordCache struct {
	slots [cacheSlots]cacheSlot
}

// cacheSlot is one entry of a wordCache: 32 bytes, two to a cache line.
type cacheSlot struct {
	tag  atomic.Uint64
	text [cacheWords]atomic.Uint64 // the word's bytes, little-endian, zero-padded
}

// slotFor returns the slot of id: Fibonacci hashing (Knuth, The Art of
// Computer Programming vol. 3, §6.4, multiplicative hashing by 2^32/φ),
// which spreads runs of neighbouring ids over the table.
func (c *wordCache) slotFor(id uint32) *cacheSlot {
	return &c.slots[(id*0x9E3779B9)>>(32-cacheBits)]
}

// appendWord appends the cached word of id to dst and returns it with true,
// or returns dst and false when the slot holds another id, is being
// written, or changed while it was read.
func (c *wordCache) appendWord(dst []byte, id uint32) ([]byte, bool) {
	s := c.slotFor(id)
	t := s.tag.Load()
	n := int(t>>tagLenShift) & 0xff
	if uint32(t>>tagIDShift) != id || n == 0 || t&1 != 0 {
		return dst, false
	}
	var buf [cacheMaxLen]byte
	for i := 0; i*8 < n; i++ {
		binary.LittleEndian.PutUint64(buf[8*i:], s.text[i].Load())
	}
	if s.tag.Load() != t {
		return dst, false
	}
	return append(dst, buf[:n]...), true
}

// store caches word as the word of id, unless the word is empty or longer
// than a slot holds, or another writer holds the slot.
func (c *wordCache) store(id uint32, word []byte) {
	n := len(word)
	if n == 0 || n > cacheMaxLen {
		return
	}
	s := c.slotFor(id)
	t := s.tag.Load()
	if t&1 != 0 || !s.tag.CompareAndSwap(t, t+1) {
		return
	}
	var buf [cacheMaxLen]byte
	copy(buf[:], word)
	for i := 0; i*8 < n; i++ {
		s.text[i].Store(binary.LittleEndian.Uint64(buf[8*i:]))
	}
	s.tag.Store(uint64(id)<<tagIDShift | uint64(n)<<tagLenShift | (t+2)&tagSeqMask)
}

// cachedWord is AppendWord for a lexicon without a word table: the cache first, then
// the FST walk, whose result it caches. The first call allocates the cache.
func (l *Lexicon) cachedWord(dst []byte, id uint32) []byte {
	if id >= l.n {
		return dst
	}
	c := l.cache.Load()
	if c == nil {
		// Racing first calls may each build a cache; one of them is kept.
		l.cache.CompareAndSwap(nil, new(wordCache))
		c = l.cache.Load()
	}
	if out, ok := c.appendWord(dst, id); ok {
		return out
	}
	base := len(dst)
	dst = l.fstWord(dst, id)
	c.store(id, dst[base:])
	return dst
}
