package trie

import (
	"encoding/binary"
	"errors"
	"fmt"
	"testing"
)

// midEntries returns the first 200 SUBTLEX-US words (sorted), enough for
// several word-table blocks.
func midEntries(t testing.TB) []Entry {
	t.Helper()
	return loadCorpus(t, subtlexPath).entries[:200]
}

// exercise calls every query of lex over all its ids and a few strings, to
// show that a lexicon that loaded answers without panicking. It returns
// the result of Check.
func exercise(lex *Lexicon) error {
	buf := make([]byte, 0, 2*MaxWordLen)
	var ts []Transition
	for id := uint32(0); id <= uint32(lex.Len()); id++ {
		w := lex.AppendWord(buf[:0], id)
		lex.AppendSurface(buf[:0], id)
		lex.ID(string(w))
		lex.PrefixRange(string(w))
		s := lex.Start()
		for _, c := range w {
			lex.CanMatch(s)
			ts = lex.AppendTransitions(ts[:0], s)
			s, _, _ = lex.Step(s, c)
		}
		lex.Final(s)
	}
	for _, p := range []string{"", "a", "\xff", "zz"} {
		lex.PrefixRange(p)
		lex.ID(p)
	}
	lex.SizeBreakdown()
	return lex.Check()
}

// TestLoadTruncated loads every proper prefix of a valid section, and the
// section with a byte added, and expects ErrCorrupt each time (after
// compress/flate's TestTruncatedStreams).
func TestLoadTruncated(t *testing.T) {
	for name, entries := range map[string][]Entry{"small": smallEntries, "mid": midEntries(t), "empty": nil} {
		t.Run(name, func(t *testing.T) {
			sec, _ := buildEntries(t, entries)
			for n := 0; n < len(sec); n++ {
				if _, err := LoadSection(sec[:n]); !errors.Is(err, ErrCorrupt) {
					t.Fatalf("LoadSection(first %d of %d bytes) error = %v, want ErrCorrupt", n, len(sec), err)
				}
			}
			if _, err := LoadSection(append(sec[:len(sec):len(sec)], 0)); !errors.Is(err, ErrCorrupt) {
				t.Fatalf("LoadSection(section plus a byte) error = %v, want ErrCorrupt", err)
			}
		})
	}
}

// TestLoadByteFlips flips bits of every byte of small sections. Each damaged
// section must either give ErrCorrupt or ErrVersion, or load and answer
// every query without panicking (a flip inside a stored surface, say, still
// makes a valid section).
func TestLoadByteFlips(t *testing.T) {
	for name, entries := range map[string][]Entry{"small": smallEntries, "mid": midEntries(t)[:40]} {
		sec, _ := buildEntries(t, entries)
		loaded := 0
		for i := range sec {
			for _, mask := range []byte{0x01, 0x10, 0x80, 0xff} {
				b := append([]byte(nil), sec...)
				b[i] ^= mask
				lex, err := LoadSection(b)
				if err != nil {
					if !errors.Is(err, ErrCorrupt) && !errors.Is(err, ErrVersion) {
						t.Fatalf("%s: flip %#x at %d: error %v is neither ErrCorrupt nor ErrVersion", name, mask, i, err)
					}
					continue
				}
				loaded++
				if err := exercise(lex); err != nil && !errors.Is(err, ErrCorrupt) {
					t.Fatalf("%s: flip %#x at %d: Check error %v is not ErrCorrupt", name, mask, i, err)
				}
			}
		}
		t.Logf("%s: %d bytes × 4 flips, %d still loaded", name, len(sec), loaded)
	}
}

// reFST returns a copy of the section sec with its FST replaced by fst and
// every later part moved to where the layout puts it, so that the loader
// gets past the header and meets the given FST bytes.
func reFST(t testing.TB, sec, fst []byte) []byte {
	t.Helper()
	var h header
	h.get(sec)
	old := layoutFor(h.version, h.count, h.blockSize, uint64(h.fstLen), uint64(h.wordsLen), uint64(h.nonLower), uint64(h.excCount), uint64(h.excDataLen))
	nl := layoutFor(h.version, h.count, h.blockSize, uint64(len(fst)), uint64(h.wordsLen), uint64(h.nonLower), uint64(h.excCount), uint64(h.excDataLen))
	out := make([]byte, nl.total)
	copy(out, sec[:headerSize])
	copy(out[headerSize:], fst)
	copy(out[nl.blocksOff:], sec[old.blocksOff:old.wordsEnd])
	copy(out[nl.caseOff:], sec[old.caseOff:old.caseEnd])
	copy(out[nl.excIDOff:], sec[old.excIDOff:old.excDataEnd])
	h.fstLen = uint32(len(fst))
	h.totalLen = uint32(nl.total)
	h.blocksOff, h.wordsOff = uint32(nl.blocksOff), uint32(nl.wordsOff)
	h.caseOff, h.excIDOff = uint32(nl.caseOff), uint32(nl.excIDOff)
	h.excEndOff, h.excDataOff = uint32(nl.excEndOff), uint32(nl.excDataOff)
	h.put(out)
	return out
}

// TestLoadCorruption damages one thing at a time in a valid section and
// checks the sentinel each gives (after bbolt's TestOpen_Err* tests).
// Cases marked check load (the damage keeps the structure sound) and must
// be caught by Check.
func TestLoadCorruption(t *testing.T) {
	for _, v := range []struct {
		version uint16
		bs      int
	}{{tableVersion, blockSize}, {listVersion, 0}, {SectionVersion, 0}} {
		sec, err := appendSectionVersion(nil, smallEntries, v.version, v.bs)
		if err != nil {
			t.Fatal(err)
		}
		t.Run(fmt.Sprintf("version=%d", v.version), func(t *testing.T) { testLoadCorruption(t, sec) })
	}
}

// testLoadCorruption runs the damage table of TestLoadCorruption on sec.
// Cases that need a word table are left out for a version-2 section. There
// the FST is the only copy of the words: an FST byte changed so that the
// order of words is kept gives another word list that loads and checks,
// which only the container's CRC-32C can catch.
func testLoadCorruption(t *testing.T, sec []byte) {
	var h header
	h.get(sec)
	le := binary.LittleEndian
	fstAt := func(i int) int { return int(h.fstOff) + i }
	fstEnd := int(h.fstOff + h.fstLen)
	vellumHeader := func(extra ...byte) []byte {
		b := make([]byte, 16, 64)
		b[0] = 1 // vellum encoding version 1
		return append(b, extra...)
	}
	footer := func(b []byte, count, root uint64) []byte {
		b = le.AppendUint64(b, count)
		return le.AppendUint64(b, root)
	}
	// Another version whose layout differs from this section's: 1 and 3
	// differ in the word table, 2 and 3 in the casing parts.
	swapped := tableVersion
	if h.version == tableVersion {
		swapped = SectionVersion
	}
	// compact selects the cases of the version-3 casing parts, where
	// exception ids hold the rank samples and exception ends the record
	// offset samples.
	compact := h.version >= SectionVersion
	tests := []struct {
		name   string
		damage func(t testing.TB, b []byte) []byte
		want   error
		check  bool // loads; Check must report ErrCorrupt
		table  bool // needs the word table of a version-1 section
	}{
		{"magic", func(t testing.TB, b []byte) []byte { b[0] = 'x'; return b }, ErrCorrupt, false, false},
		{"version", func(t testing.TB, b []byte) []byte { le.PutUint16(b[hVersion:], SectionVersion+1); return b }, ErrVersion, false, false},
		{"version-0", func(t testing.TB, b []byte) []byte { le.PutUint16(b[hVersion:], 0); return b }, ErrVersion, false, false},
		{"version-swapped", func(t testing.TB, b []byte) []byte { le.PutUint16(b[hVersion:], swapped); return b }, ErrCorrupt, false, false},
		{"flags", func(t testing.TB, b []byte) []byte { le.PutUint16(b[hFlags:], 1); return b }, ErrVersion, false, false},
		{"total-length", func(t testing.TB, b []byte) []byte { le.PutUint32(b[hTotalLen:], h.totalLen+8); return b }, ErrCorrupt, false, false},
		{"count", func(t testing.TB, b []byte) []byte { le.PutUint32(b[hCount:], h.count+1); return b }, ErrCorrupt, false, false},
		{"block-size-zero", func(t testing.TB, b []byte) []byte { le.PutUint16(b[hBlockSize:], 0); return b }, ErrCorrupt, false, true},
		{"block-size-2", func(t testing.TB, b []byte) []byte { le.PutUint16(b[hBlockSize:], 2); return b }, ErrCorrupt, false, true},
		{"max-word-len", func(t testing.TB, b []byte) []byte { le.PutUint16(b[hMaxWordLen:], 5); return b }, ErrCorrupt, false, false},
		{"fst-offset", func(t testing.TB, b []byte) []byte { le.PutUint32(b[hFSTOff:], 72); return b }, ErrCorrupt, false, false},
		{"words-offset-huge", func(t testing.TB, b []byte) []byte { le.PutUint32(b[hWordsOff:], 1<<32-1); return b }, ErrCorrupt, false, true},
		{"exc-count-huge", func(t testing.TB, b []byte) []byte { le.PutUint32(b[hExcCount:], 1<<30); return b }, ErrCorrupt, false, false},
		{"padding", func(t testing.TB, b []byte) []byte { b[len(b)-1] = 1; return b }, ErrCorrupt, false, false},
		{"word-order", func(t testing.TB, b []byte) []byte { b[h.wordsOff+10] = 0x14; return b }, ErrCorrupt, false, true},          // "nasa" shares "i" of "it": "inasa" sorts before "it"
		{"word-shares-too-much", func(t testing.TB, b []byte) []byte { b[h.wordsOff+8] = 0x71; return b }, ErrCorrupt, false, true}, // "it" claims 7 shared bytes of "iphone"
		{"word-invalid-utf8", func(t testing.TB, b []byte) []byte { b[h.wordsOff+11] = 0xff; return b }, ErrCorrupt, false, true},
		{"casing-code", func(t testing.TB, b []byte) []byte { b[h.caseOff] &^= 0x0c; return b }, ErrCorrupt, false, false},
		{"exception-id", func(t testing.TB, b []byte) []byte { le.PutUint32(b[h.excIDOff:], 2); return b }, ErrCorrupt, false, false},
		{"exception-end", func(t testing.TB, b []byte) []byte { le.PutUint32(b[h.excEndOff:], 5); return b }, ErrCorrupt, false, false},
		{"exception-data-length", func(t testing.TB, b []byte) []byte { le.PutUint32(b[hExcDataLen:], h.excDataLen-1); return b }, ErrCorrupt, false, false},
		{"exception-count", func(t testing.TB, b []byte) []byte { le.PutUint32(b[hExcCount:], 0); return b }, ErrCorrupt, false, false},
		{"fst-version", func(t testing.TB, b []byte) []byte { b[fstAt(0)] = 2; return b }, ErrCorrupt, false, false},
		{"fst-word-count", func(t testing.TB, b []byte) []byte { b[fstEnd-16]++; return b }, ErrCorrupt, false, false},
		{"fst-root-at-end", func(t testing.TB, b []byte) []byte { le.PutUint64(b[fstEnd-8:], uint64(h.fstLen)); return b }, ErrCorrupt, false, false},
		{"fst-root-in-footer", func(t testing.TB, b []byte) []byte { le.PutUint64(b[fstEnd-8:], uint64(h.fstLen-10)); return b }, ErrCorrupt, false, false},
		{"fst-root-in-header", func(t testing.TB, b []byte) []byte { le.PutUint64(b[fstEnd-8:], 5); return b }, ErrCorrupt, false, false},
		// A 16-byte vellum FST passes vellum.Load and makes Get panic
		// (STYLE.md); here it is too short for a header and a footer.
		{"fst-16-bytes", func(t testing.TB, b []byte) []byte { return reFST(t, b, vellumHeader()) }, ErrCorrupt, false, false},
		{"fst-no-states", func(t testing.TB, b []byte) []byte { return reFST(t, b, footer(vellumHeader(), 4, 16)) }, ErrCorrupt, false, false},
		// One multi-transition state claiming 63 transitions in 3 bytes.
		{"fst-state-overrun", func(t testing.TB, b []byte) []byte { return reFST(t, b, footer(vellumHeader(0x11, 0x00, 0x3f), 4, 18)) }, ErrCorrupt, false, false},
		// A single-transition state whose target delta points below the header.
		{"fst-target-below", func(t testing.TB, b []byte) []byte {
			return reFST(t, b, footer(vellumHeader(0x40, 0x10, 0x80|0x01), 4, 18))
		}, ErrCorrupt, false, false},
		{"fst-byte-changed", func(t testing.TB, b []byte) []byte { return swapFSTByte(t, b, 'o', 'u') }, nil, true, true},
	}
	if compact {
		// The worked example's one record is the mask 0x02 (iPhone); the
		// byte after it is padding.
		tests = append(tests, []struct {
			name   string
			damage func(t testing.TB, b []byte) []byte
			want   error
			check  bool
			table  bool
		}{
			{"record-mask-zero", func(t testing.TB, b []byte) []byte { b[h.excDataOff] = 0; return b }, ErrCorrupt, false, false},
			{"record-unfinished", func(t testing.TB, b []byte) []byte { b[h.excDataOff] = 0x82; return b }, ErrCorrupt, false, false},
			// The bitmap is the uint64 at caseOff (0x0b), the codes the
			// next one (0x2d).
			{"bitmap-past-last-word", func(t testing.TB, b []byte) []byte { b[h.caseOff+7] = 0x40; return b }, ErrCorrupt, false, false},
			{"bitmap-extra-word", func(t testing.TB, b []byte) []byte { b[h.caseOff] |= 0x04; return b }, ErrCorrupt, false, false},
			{"code-zero", func(t testing.TB, b []byte) []byte { b[h.caseOff+8] = 0x2c; return b }, ErrCorrupt, false, false},
			{"unused-code-bits", func(t testing.TB, b []byte) []byte { b[h.caseOff+9] = 0x01; return b }, ErrCorrupt, false, false},
			{"non-lower-count", func(t testing.TB, b []byte) []byte { le.PutUint32(b[hNonLower:], 5); return b }, ErrCorrupt, false, false},
			{"bitmap-rank", func(t testing.TB, b []byte) []byte { b[h.excIDOff] = 1; return b }, ErrCorrupt, false, false},
			{"exception-rank", func(t testing.TB, b []byte) []byte { b[h.excIDOff+4] = 1; return b }, ErrCorrupt, false, false},
			// A mask over a rune the word lacks (bit 6 of the six-rune
			// "iphone", still a well-formed record) loads; Check finds it.
			{"record-mask-past-word", func(t testing.TB, b []byte) []byte { b[h.excDataOff] = 0x40; return b }, nil, true, false},
			// A mask that gives a surface code 2 describes ("IPHONE").
			{"record-mask-not-canonical", func(t testing.TB, b []byte) []byte { b[h.excDataOff] = 0x3f; return b }, nil, true, false},
		}...)
	}
	for _, tt := range tests {
		if tt.table && h.blockSize == 0 {
			continue
		}
		t.Run(tt.name, func(t *testing.T) {
			b := tt.damage(t, append([]byte(nil), sec...))
			lex, err := LoadSection(b)
			if tt.check {
				if err != nil {
					t.Fatalf("LoadSection error = %v, want a load", err)
				}
				if err := lex.Check(); !errors.Is(err, ErrCorrupt) {
					t.Fatalf("Check() = %v, want ErrCorrupt", err)
				}
				return
			}
			if !errors.Is(err, tt.want) {
				t.Fatalf("LoadSection error = %v, want %v", err, tt.want)
			}
			t.Log(err)
			var fe *FormatError
			if errors.Is(tt.want, ErrCorrupt) && !errors.As(err, &fe) {
				t.Fatalf("LoadSection error %v is not a *FormatError", err)
			}
		})
	}
}

// swapFSTByte replaces the single-transition byte from with to in the FST
// of sec (the code vellum uses for it in the top byte of a
// single-transition state), leaving the structure intact.
func swapFSTByte(t testing.TB, sec []byte, from, to byte) []byte {
	t.Helper()
	codes, err := byteCodes()
	if err != nil {
		t.Fatal(err)
	}
	var cf, ct byte
	for c := 1; c < 64; c++ {
		switch codes[c] {
		case from:
			cf = byte(c)
		case to:
			ct = byte(c)
		}
	}
	if cf == 0 || ct == 0 {
		t.Fatalf("bytes %q and %q have no 6-bit codes", from, to)
	}
	var h header
	h.get(sec)
	for i := h.fstOff + fstHeaderLen; i < h.fstOff+h.fstLen-fstFooterLen; i++ {
		if sec[i]&topSingle != 0 && sec[i]&topLowBits == cf {
			sec[i] = sec[i]&^topLowBits | ct
			return sec
		}
	}
	t.Fatalf("no single-transition state on %q", from)
	return nil
}

// TestFormatError checks the message and matching of FormatError.
func TestFormatError(t *testing.T) {
	err := error(&FormatError{Part: "words", Offset: 12, Reason: "word 3 is empty"})
	if !errors.Is(err, ErrCorrupt) {
		t.Errorf("errors.Is(%v, ErrCorrupt) = false", err)
	}
	if errors.Is(err, ErrVersion) {
		t.Errorf("errors.Is(%v, ErrVersion) = true", err)
	}
	wrapped := fmt.Errorf("open model: %w", err)
	var fe *FormatError
	if !errors.As(wrapped, &fe) || fe.Offset != 12 || fe.Part != "words" {
		t.Errorf("errors.As(%v) = %+v", wrapped, fe)
	}
}
