package trie

import (
	"sync"
	"sync/atomic"

	"github.com/blevesearch/vellum"
)

// Lexicon is a loaded lexicon section: a read-only view of the bytes given
// to [LoadSection]. It is safe for use by any number of goroutines at once:
// its only state that changes is a small cache of recently spelled words,
// read and written with atomic operations. No method allocates unless its
// doc says so.
type Lexicon struct {
	version    int // the section layout version (FORMAT.md)
	n          uint32
	maxWordLen int
	root       int
	codes      [64]byte // vellum's single-transition byte codes, see byteCodes
	fst        []byte   // the vellum FST, aliasing the section
	words      wordTable
	casing     casingTable
	vfst       *vellum.FST
	lazy       *lazyFST                  // set when loaded with SkipWalk
	cache      atomic.Pointer[wordCache] // versions 2 and 3, made on first AppendWord
}

// lazyFST checks and loads the vellum FST on first use.
type lazyFST struct {
	once sync.Once
	base int
	f    *vellum.FST
}

// Len returns the number of words.
func (l *Lexicon) Len() int { return int(l.n) }

// MaxWordLen returns the length in bytes of the longest word. AppendWord and
// AppendSurface do not allocate when dst has at least this much spare
// capacity (twice as much for AppendSurface).
func (l *Lexicon) MaxWordLen() int { return l.maxWordLen }

// ID returns the id (the rank in byte order) of the folded word, and false
// when the lexicon does not hold it. It walks the FST one byte at a time:
// O(len(word)) state decodings, no allocation.
func (l *Lexicon) ID(word string) (uint32, bool) {
	state := l.root
	var sum uint64
	for i := 0; i < len(word); i++ {
		next, out, ok := stepAt(l.fst, &l.codes, state, word[i])
		if !ok {
			return 0, false
		}
		state, sum = next, sum+out
	}
	final, out := l.Final(state)
	if !final || sum+out >= uint64(l.n) {
		return 0, false
	}
	return uint32(sum + out), true
}

// LayoutVersion returns the version of the lexicon section layout the
// lexicon was loaded from (1 to 3, trie/FORMAT.md).
func (l *Lexicon) LayoutVersion() int { return l.version }

// AppendWord appends the folded word with the given id to dst and returns
// the extended slice; it returns dst unchanged when id is not below Len.
// In a version-2 or version-3 section it walks the FST from the root, at each state
// following the last transition whose output sum does not pass id
// (O(len(word)) state decodings, each with a binary search over the
// state's transitions); in a version-1 section it decodes one front-coded
// block (O(block size)). A lexicon without a word table keeps the last words it
// spelled (up to 24 bytes long) in a direct-mapped cache of 1,024 slots, so
// a word asked again is copied without the walk. It does not allocate when
// cap(dst)-len(dst) >= MaxWordLen, apart from the 32 KiB of that cache,
// allocated once by the first call on such a lexicon.
func (l *Lexicon) AppendWord(dst []byte, id uint32) []byte {
	if l.words.bs == 0 {
		return l.cachedWord(dst, id)
	}
	return l.words.appendWord(dst, id)
}

// Word returns the folded word with the given id, or "" when id is not
// below Len. It allocates the returned string.
func (l *Lexicon) Word(id uint32) string {
	var buf [MaxWordLen]byte
	return string(l.AppendWord(buf[:0], id))
}

// AppendSurface appends the display form of the word with the given id
// (for example "London" for "london") to dst and returns the extended
// slice; it returns dst unchanged when id is not below Len. It does not
// allocate when cap(dst)-len(dst) >= 2*MaxWordLen (or, for a word whose
// surface is stored in full as an exception, the length of that surface).
func (l *Lexicon) AppendSurface(dst []byte, id uint32) []byte {
	if id >= l.n {
		return dst
	}
	switch l.casing.code(id) {
	case caseCapital:
		var buf [MaxWordLen]byte
		return capitalise(dst, l.AppendWord(buf[:0], id))
	case caseUpper:
		var buf [MaxWordLen]byte
		return upperAll(dst, l.AppendWord(buf[:0], id))
	case caseExcept:
		if out, ok := l.appendException(dst, id); ok {
			return out
		}
	}
	return l.AppendWord(dst, id)
}

// Surface returns the display form of the word with the given id, or ""
// when id is not below Len. It allocates the returned string.
func (l *Lexicon) Surface(id uint32) string {
	var buf [2 * MaxWordLen]byte
	return string(l.AppendSurface(buf[:0], id))
}

// PrefixRange returns the ids [lo, hi) of all words that start with the
// bytes of prefix; the range is empty (lo == hi, at the place such words
// would sort) when there are none. The empty prefix gives [0, Len). It
// walks the FST along prefix and then down the largest transitions to the
// last word of the range: O(len(prefix) + MaxWordLen) state decodings, no
// allocation.
func (l *Lexicon) PrefixRange(prefix string) (lo, hi uint32) {
	return l.prefixRange(prefix)
}

// Start returns the FST state before any byte: the root. States are plain
// ints, meaningful only to the lexicon that returned them.
func (l *Lexicon) Start() int { return l.root }

// Step follows the transition on byte b from state. It returns the next
// state and the output of the transition, or ok == false when there is no
// such transition (or state is not a state of this lexicon). The id of a
// word is the sum of the outputs along its path plus the final output of
// the last state (see Final). It decodes one state and does not allocate.
func (l *Lexicon) Step(state int, b byte) (next int, out uint64, ok bool) {
	return stepAt(l.fst, &l.codes, state, b)
}

// Final reports whether state ends a word, and the output to add to the
// outputs of the path to get the word's id.
func (l *Lexicon) Final(state int) (ok bool, out uint64) {
	s, ok := decodeState(l.fst, &l.codes, state)
	if !ok || !s.final {
		return false, 0
	}
	return true, s.finalOut
}

// CanMatch reports whether some word can be reached from state. Every
// state returned by Start or Step of a non-empty lexicon can (LoadSection
// checks this), so it is false only for the start of an empty lexicon and
// for ints that are not states.
func (l *Lexicon) CanMatch(state int) bool {
	s, ok := decodeState(l.fst, &l.codes, state)
	return ok && (s.final || s.n > 0)
}

// Transition is one edge of the FST, as listed by [Lexicon.AppendTransitions].
type Transition struct {
	Byte byte   // input byte
	Next int    // state reached
	Out  uint64 // output added to the id
}

// AppendTransitions appends every transition leaving state, in increasing
// byte order, to dst and returns the extended slice. It lets a search visit
// the children of a state without trying all 256 bytes. It does not
// allocate when dst has room for 256 more transitions.
func (l *Lexicon) AppendTransitions(dst []Transition, state int) []Transition {
	s, ok := decodeState(l.fst, &l.codes, state)
	if !ok {
		return dst
	}
	for i := 0; i < s.n; i++ {
		c, next, out, ok := s.transition(l.fst, i)
		if !ok {
			return dst
		}
		dst = append(dst, Transition{Byte: c, Next: next, Out: out})
	}
	return dst
}

// FST returns the lexicon's FST as a *vellum.FST reading the section bytes
// in place, for cross-checks with vellum's own search (its Levenshtein
// automaton, say). It is valid as long as the section bytes are. Do not
// call its Close method.
//
// For a lexicon loaded with SkipWalk, the first call runs the checks and
// walks that LoadSection would have, and returns nil if they fail.
func (l *Lexicon) FST() *vellum.FST {
	if l.lazy == nil {
		return l.vfst
	}
	l.lazy.once.Do(func() {
		states, err := checkFST(l.fst, &l.codes, l.n, l.maxWordLen, l.lazy.base)
		if err != nil {
			return
		}
		l.lazy.f, _ = loadVellum(l.fst, &l.codes, states, l.lazy.base)
	})
	return l.lazy.f
}

// SizeBreakdown returns the bytes taken by the FST, by the front-coded word
// table (block offsets and words; 0 in versions 2 and 3) and by the casing codes and exceptions
// (version 3: the non-lower bitmap, codes, rank and record samples and records).
// The section also holds a 64-byte header and up to 7 bytes of alignment
// padding after each part, counted in none of them.
func (l *Lexicon) SizeBreakdown() (fstBytes, tableBytes, casingBytes int) {
	return len(l.fst), len(l.words.blocks) + len(l.words.words), l.casing.size()
}
