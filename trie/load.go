package trie

import (
	"fmt"

	"github.com/blevesearch/vellum"
)

// LoadSection returns a lexicon that reads the section b, as written by
// [AppendSection]. The lexicon keeps b and reads it in place (no copy):
// b stays owned by the caller, must not be changed, and the lexicon is
// valid only while b is (for a memory-mapped file, until it is unmapped).
//
// LoadSection checks, in this order: the header (magic, then version, then
// that every recorded offset and length matches the layout of FORMAT.md and
// len(b)), the zero padding, the word table of a version-1 section (every
// word decodes within its block, is valid UTF-8 and sorts strictly after
// the one before it), the
// casing codes and exception table (version 3: the non-lower bitmap, the
// codes and both sets of rank samples agree, and every exception record is
// well formed and where its offset sample says), and the FST: one walk over every state
// reachable from the root, checking that each lies in bounds, that the FST
// accepts exactly as many words as the header records, that its longest
// path is the recorded longest word, that no path can give
// an id outside [0, Len()) and that outputs are placed as ranks need. Then
// vellum itself walks the same states once, inside the project's single
// recover, and must read each one as this package does, so the *vellum.FST
// returned by [Lexicon.FST] is known not to panic. It does not enumerate
// every FST word; [Lexicon.Check] does.
//
// Errors wrap [ErrVersion] for a section of another layout version and
// [ErrCorrupt] (as a [*FormatError]) for anything else; bad bytes never
// cause a panic. It costs O(len(b)) time; it allocates O(states) temporary
// memory, most of it one small object per FST state in vellum's walk.
func LoadSection(b []byte) (*Lexicon, error) {
	return LoadSectionWith(b, LoadOptions{})
}

// LoadOptions controls LoadSectionWith. The zero value checks everything.
type LoadOptions struct {
	// SkipWalk skips the O(len(b)) checks of the word table and the FST walks,
	// keeping only the header and layout checks, so that opening costs
	// microseconds and touches only the header's page. Queries stay safe on
	// damaged bytes — every state decoding and table read is bounds-checked —
	// but may give wrong answers, including IDs ≥ Len() that callers must
	// range-check. Use it for files whose checksum was verified or that the
	// application wrote itself. Lexicon.FST then checks the FST on first call.
	SkipWalk bool
}

// LoadSectionWith is LoadSection with options.
func LoadSectionWith(b []byte, opts LoadOptions) (*Lexicon, error) {
	h, err := parseHeader(b)
	if err != nil {
		return nil, err
	}
	codes, err := byteCodes()
	if err != nil {
		return nil, err
	}
	l := &Lexicon{
		version:    int(h.version),
		n:          h.count,
		maxWordLen: int(h.maxWordLen),
		codes:      *codes,
		fst:        b[h.fstOff : h.fstOff+h.fstLen],
		words: wordTable{
			n:      h.count,
			bs:     h.blockSize,
			maxLen: int(h.maxWordLen),
			blocks: b[h.blocksOff:h.wordsOff],
			words:  b[h.wordsOff : h.wordsOff+h.wordsLen],
		},
	}
	if h.version >= SectionVersion {
		lay := layoutFor(h.version, h.count, 0, uint64(h.fstLen), 0, uint64(h.nonLower), uint64(h.excCount), uint64(h.excDataLen))
		bitRankEnd := h.excIDOff
		if h.nonLower > 0 {
			bitRankEnd += 4 * ((h.count + bitRankStep - 1) / bitRankStep)
		}
		l.casing = casingTable{
			compact:  true,
			nonLower: h.nonLower,
			bitmap:   b[h.caseOff:lay.codesOff],
			codes:    b[lay.codesOff:h.excIDOff],
			bitRank:  b[h.excIDOff:bitRankEnd],
			rank:     b[bitRankEnd:h.excEndOff],
			samples:  b[h.excEndOff:h.excDataOff],
			records:  b[h.excDataOff : h.excDataOff+h.excDataLen],
		}
	} else {
		l.casing = casingTable{
			codes:   b[h.caseOff : h.caseOff+(h.count+3)/4],
			excIDs:  b[h.excIDOff:h.excEndOff],
			excEnds: b[h.excEndOff:h.excDataOff],
			excData: b[h.excDataOff : h.excDataOff+h.excDataLen],
		}
	}
	if opts.SkipWalk {
		root, err := fstRoot(l.fst)
		if err != nil {
			return nil, corrupt("fst", int(h.fstOff), "%v", err)
		}
		l.root = root
		l.lazy = &lazyFST{base: int(h.fstOff)}
		return l, nil
	}
	if h.blockSize > 0 {
		if err := l.words.validate(l.maxWordLen, int(h.blocksOff), int(h.wordsOff)); err != nil {
			return nil, err
		}
	}
	if l.casing.compact {
		err = l.casing.validateCompact(h.count, h.excCount, int(h.caseOff), int(h.excIDOff), int(h.excEndOff), int(h.excDataOff))
	} else {
		err = l.casing.validate(h.count, int(h.caseOff), int(h.excIDOff), int(h.excEndOff), int(h.excDataOff))
	}
	if err != nil {
		return nil, err
	}
	states, err := checkFST(l.fst, &l.codes, h.count, l.maxWordLen, int(h.fstOff))
	if err != nil {
		return nil, err
	}
	l.root = states.root
	if l.vfst, err = loadVellum(l.fst, &l.codes, states, int(h.fstOff)); err != nil {
		return nil, err
	}
	return l, nil
}

// parseHeader checks the header of b and the placement of every part.
func parseHeader(b []byte) (header, error) {
	var h header
	if len(b) < headerSize {
		return h, corrupt("header", len(b), "section of %d bytes is shorter than its %d-byte header", len(b), headerSize)
	}
	if string(b[hMagic:hMagic+4]) != SectionMagic {
		return h, corrupt("header", hMagic, "magic %q, want %q", b[hMagic:hMagic+4], SectionMagic)
	}
	if v := uint16(b[hVersion]) | uint16(b[hVersion+1])<<8; v < tableVersion || v > SectionVersion {
		return h, fmt.Errorf("%w: section version %d, this package reads %d to %d", ErrVersion, v, tableVersion, SectionVersion)
	}
	if f := uint16(b[hFlags]) | uint16(b[hFlags+1])<<8; f != 0 {
		return h, fmt.Errorf("%w: unknown section flags %#x", ErrVersion, f)
	}
	h.get(b)
	if uint64(h.totalLen) != uint64(len(b)) {
		return h, corrupt("header", hTotalLen, "recorded length %d, section has %d bytes", h.totalLen, len(b))
	}
	if h.count > MaxWords {
		return h, corrupt("header", hCount, "word count %d above the limit %d", h.count, MaxWords)
	}
	switch {
	case h.version == tableVersion && (h.blockSize < 1 || h.blockSize > maxBlockSize):
		return h, corrupt("header", hBlockSize, "block size %d outside 1..%d", h.blockSize, maxBlockSize)
	case h.version != tableVersion && h.blockSize != 0:
		return h, corrupt("header", hBlockSize, "block size %d in a section without a word table", h.blockSize)
	case h.version != tableVersion && h.wordsLen != 0:
		return h, corrupt("header", hWordsLen, "%d bytes of words in a section without a word table", h.wordsLen)
	}
	if h.maxWordLen > MaxWordLen {
		return h, corrupt("header", hMaxWordLen, "longest word %d bytes above the limit %d", h.maxWordLen, MaxWordLen)
	}
	if h.nonLower > h.count || h.excCount > h.nonLower && h.version >= SectionVersion {
		return h, corrupt("header", hNonLower, "%d non-lower words and %d exceptions among %d words", h.nonLower, h.excCount, h.count)
	}
	want := layoutFor(h.version, h.count, h.blockSize, uint64(h.fstLen), uint64(h.wordsLen), uint64(h.nonLower), uint64(h.excCount), uint64(h.excDataLen))
	fields := []struct {
		at        int
		got, want uint64
		name      string
	}{
		{hFSTOff, uint64(h.fstOff), want.fstOff, "fst offset"},
		{hBlocksOff, uint64(h.blocksOff), want.blocksOff, "block offsets offset"},
		{hWordsOff, uint64(h.wordsOff), want.wordsOff, "words offset"},
		{hCaseOff, uint64(h.caseOff), want.caseOff, "casing offset"},
		{hExcIDOff, uint64(h.excIDOff), want.excIDOff, "exception ids offset"},
		{hExcEndOff, uint64(h.excEndOff), want.excEndOff, "exception ends offset"},
		{hExcDataOff, uint64(h.excDataOff), want.excDataOff, "exception data offset"},
		{hTotalLen, uint64(h.totalLen), want.total, "section length"},
	}
	for _, f := range fields {
		if f.got != f.want {
			return h, corrupt("header", f.at, "%s is %d, the layout puts it at %d", f.name, f.got, f.want)
		}
	}
	for _, gap := range want.padding() {
		for i := gap[0]; i < gap[1]; i++ {
			if b[i] != 0 {
				return h, corrupt("header", int(i), "padding byte is %#x, want 0", b[i])
			}
		}
	}
	return h, nil
}

// vellumState is the part of vellum's decoded state that [vellum.FST.Debug]
// hands to its callback (as an empty interface).
type vellumState interface {
	Address() int
	Final() bool
	FinalOutput() uint64
	NumTransitions() int
	TransitionAt(i int) byte
	TransitionFor(b byte) (int, int, uint64)
}

// loadVellum loads the FST bytes d into vellum and lets vellum walk every
// state reachable from the root once (vellum's Debug walk), comparing each
// state, its final output and every transition with what this package
// decoded. vellum does not check offsets before it indexes, so the walk is
// wrapped in the project's single recover: a panic inside vellum becomes
// ErrCorrupt. checkFST must have accepted d first, so that every address
// vellum meets is in bounds. base is the offset of the FST within the
// section, for error reports.
func loadVellum(d []byte, codes *[64]byte, st fstStates, base int) (f *vellum.FST, err error) {
	at := base
	defer func() {
		if r := recover(); r != nil {
			f, err = nil, corrupt("fst", at, "vellum cannot read the state: %v", r)
		}
	}()
	f, err = vellum.Load(d)
	if err != nil {
		return nil, corrupt("fst", base, "vellum refuses the fst: %v", err)
	}
	if f.Start() != st.root {
		return nil, corrupt("fst", base+len(d)-8, "vellum reads root %d, want %d", f.Start(), st.root)
	}
	visited := 0 // states other than the empty final state
	err = f.Debug(func(_ int, v any) error {
		vs, ok := v.(vellumState)
		if !ok {
			return corrupt("fst", base, "vellum state of unexpected type %T", v)
		}
		addr := vs.Address()
		at = base + addr
		s, ok := decodeState(d, codes, addr)
		if !ok || (addr != emptyState && !st.has(addr)) {
			return corrupt("fst", at, "vellum reaches state %d, which is not a checked state", addr)
		}
		if addr != emptyState {
			visited++
		}
		if vs.Final() != s.final || vs.FinalOutput() != s.finalOut || vs.NumTransitions() != s.n {
			return corrupt("fst", at, "vellum reads the state differently")
		}
		for i := 0; i < s.n; i++ {
			c, next, out, _ := s.transition(d, i)
			if vc := vs.TransitionAt(i); vc != c {
				return corrupt("fst", at, "vellum reads transition %d as %q, want %q", i, vc, c)
			}
			if _, vnext, vout := vs.TransitionFor(c); vnext != next || vout != out {
				return corrupt("fst", at, "vellum reads transition %q as %d/%d, want %d/%d", c, vnext, vout, next, out)
			}
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	if visited != st.count() {
		return nil, corrupt("fst", base, "vellum walks %d states, want %d", visited, st.count())
	}
	return f, nil
}
