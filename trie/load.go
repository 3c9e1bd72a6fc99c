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
// len(b)), the zero padding, the word table (every word decodes within its
// block, is valid UTF-8 and sorts strictly after the one before it), the
// casing codes and exception table, and the FST (one walk over every state
// reachable from the root, checking that each lies in bounds, that the FST
// accepts exactly as many words as the table holds and that no path can
// give an id outside [0, Len())). It then loads the FST into vellum and
// replays every transition through it inside a recover, so that the
// *vellum.FST returned by [Lexicon.FST] is known to read the same states
// without panicking. It does not compare every FST word with the table;
// [Lexicon.Check] does.
//
// Errors wrap [ErrVersion] for a section of another layout version and
// [ErrCorrupt] (as a [*FormatError]) for anything else; bad bytes never
// cause a panic. It costs O(len(b)) time and O(states) temporary memory.
func LoadSection(b []byte) (*Lexicon, error) {
	h, err := parseHeader(b)
	if err != nil {
		return nil, err
	}
	codes, err := byteCodes()
	if err != nil {
		return nil, err
	}
	l := &Lexicon{
		n:          h.count,
		maxWordLen: int(h.maxWordLen),
		codes:      *codes,
		fst:        b[h.fstOff : h.fstOff+h.fstLen],
		words: wordTable{
			n:      h.count,
			bs:     h.blockSize,
			blocks: b[h.blocksOff:h.wordsOff],
			words:  b[h.wordsOff : h.wordsOff+h.wordsLen],
		},
		casing: casingTable{
			codes:   b[h.caseOff : h.caseOff+(h.count+3)/4],
			excIDs:  b[h.excIDOff:h.excEndOff],
			excEnds: b[h.excEndOff:h.excDataOff],
			excData: b[h.excDataOff : h.excDataOff+h.excDataLen],
		},
	}
	if err := l.words.validate(l.maxWordLen, int(h.blocksOff), int(h.wordsOff)); err != nil {
		return nil, err
	}
	if err := l.casing.validate(h.count, int(h.caseOff), int(h.excIDOff), int(h.excEndOff), int(h.excDataOff)); err != nil {
		return nil, err
	}
	states, err := checkFST(l.fst, &l.codes, h.count, int(h.fstOff))
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
	if v := uint16(b[hVersion]) | uint16(b[hVersion+1])<<8; v != SectionVersion {
		return h, fmt.Errorf("%w: section version %d, this package reads %d", ErrVersion, v, SectionVersion)
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
	if h.blockSize < 1 || h.blockSize > maxBlockSize {
		return h, corrupt("header", hBlockSize, "block size %d outside 1..%d", h.blockSize, maxBlockSize)
	}
	if h.maxWordLen > MaxWordLen {
		return h, corrupt("header", hMaxWordLen, "longest word %d bytes above the limit %d", h.maxWordLen, MaxWordLen)
	}
	want := layoutFor(h.count, h.blockSize, uint64(h.fstLen), uint64(h.wordsLen), uint64(h.excCount), uint64(h.excDataLen))
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

// layout is where every part of a section goes, computed in uint64 so that
// no recorded size can overflow it.
type layout struct {
	fstOff, fstEnd       uint64
	blocksOff, wordsOff  uint64
	wordsEnd, caseOff    uint64
	caseEnd, excIDOff    uint64
	excEndOff, excDataOff uint64
	excDataEnd, total    uint64
}

// layoutFor returns the placement of the parts of a section of n words in
// blocks of bs words, an FST of fstLen bytes, wordsLen bytes of front-coded
// words and e exceptions with excDataLen bytes of surfaces.
func layoutFor(n, bs uint32, fstLen, wordsLen, e, excDataLen uint64) layout {
	al := func(x uint64) uint64 { return (x + partAlign - 1) &^ (partAlign - 1) }
	var l layout
	l.fstOff = headerSize
	l.fstEnd = l.fstOff + fstLen
	l.blocksOff = al(l.fstEnd)
	l.wordsOff = l.blocksOff + 4*(uint64(numBlocks(n, bs))+1)
	l.wordsEnd = l.wordsOff + wordsLen
	l.caseOff = al(l.wordsEnd)
	l.caseEnd = l.caseOff + (uint64(n)+3)/4
	l.excIDOff = al(l.caseEnd)
	l.excEndOff = l.excIDOff + 4*e
	l.excDataOff = l.excEndOff + 4*e
	l.excDataEnd = l.excDataOff + excDataLen
	l.total = al(l.excDataEnd)
	return l
}

// padding returns the [start, end) byte ranges of a section that hold
// alignment padding.
func (l layout) padding() [][2]uint64 {
	return [][2]uint64{
		{l.fstEnd, l.blocksOff},
		{l.wordsEnd, l.caseOff},
		{l.caseEnd, l.excIDOff},
		{l.excDataEnd, l.total},
	}
}

// loadVellum loads the FST bytes d into vellum and replays every transition
// and final output of the reachable states through vellum's own decoder,
// comparing with what this package decoded. vellum does not check offsets
// before it indexes, so this replay is wrapped in the project's single
// recover: a panic inside vellum becomes ErrCorrupt. base is the offset of
// the FST within the section, for error reports.
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
	for addr := range st.all() {
		at = base + addr
		s, _ := decodeState(d, codes, addr) // checked by checkFST
		final, fout := f.IsMatchWithVal(addr)
		if final != s.final || fout != s.finalOut {
			return nil, corrupt("fst", at, "vellum reads final=%v/%d, want %v/%d", final, fout, s.final, s.finalOut)
		}
		for i := 0; i < s.n; i++ {
			c, next, out, _ := s.transition(d, i)
			vnext, vout := f.AcceptWithVal(addr, c)
			if vnext != next || vout != out {
				return nil, corrupt("fst", at, "vellum reads transition %q as %d/%d, want %d/%d", c, vnext, vout, next, out)
			}
		}
	}
	return f, nil
}
