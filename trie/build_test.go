package trie

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"strings"
	"testing"

	"github.com/blevesearch/vellum"
)

// TestAppendSectionErrors checks that every broken rule of AppendSection
// gives its own sentinel and leaves dst unchanged.
func TestAppendSectionErrors(t *testing.T) {
	tests := []struct {
		name    string
		entries []Entry
		want    error
	}{
		{"empty-word", []Entry{{Word: "a"}, {Word: ""}}, ErrEmptyWord},
		{"unsorted", []Entry{{Word: "b"}, {Word: "a"}}, ErrUnsorted},
		{"unsorted-bytes", []Entry{{Word: "\u00e9"}, {Word: "z"}}, ErrUnsorted}, // é is 0xC3 0xA9 > 'z' in byte order
		{"prefix-after-word", []Entry{{Word: "ab"}, {Word: "a"}}, ErrUnsorted},
		{"duplicate", []Entry{{Word: "a"}, {Word: "b"}, {Word: "b"}}, ErrDuplicate},
		{"invalid-word", []Entry{{Word: "a\xff"}}, ErrInvalidUTF8},
		{"invalid-surface", []Entry{{Word: "a", Surface: "\xc3"}}, ErrInvalidUTF8},
		{"long-word", []Entry{{Word: strings.Repeat("x", MaxWordLen+1)}}, ErrWordTooLong},
		{"long-surface", []Entry{{Word: "x", Surface: strings.Repeat("X", MaxSurfaceLen+1)}}, ErrWordTooLong},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			dst := []byte("keep")
			got, err := AppendSection(dst, tt.entries)
			if !errors.Is(err, tt.want) {
				t.Errorf("AppendSection(%q) error = %v, want %v", tt.entries, err, tt.want)
			}
			if string(got) != "keep" {
				t.Errorf("AppendSection(%q) changed dst to %q", tt.entries, got)
			}
		})
	}
}

// TestAppendSectionLimits checks that words of exactly the size limits are
// accepted and come back whole.
func TestAppendSectionLimits(t *testing.T) {
	long := strings.Repeat("\u00e9", MaxWordLen/2) + "a" // 255 bytes, valid UTF-8
	entries := []Entry{{Word: "a", Surface: strings.Repeat("A", MaxSurfaceLen)}, {Word: long}}
	_, lex := buildEntries(t, entries)
	if got := lex.Word(1); got != long {
		t.Errorf("Word(1) = %q, want the %d-byte word", got, len(long))
	}
	if got := lex.Surface(0); got != entries[0].Surface {
		t.Errorf("Surface(0) has %d bytes, want %d", len(got), MaxSurfaceLen)
	}
	if lex.MaxWordLen() != MaxWordLen {
		t.Errorf("MaxWordLen() = %d, want %d", lex.MaxWordLen(), MaxWordLen)
	}
}

// TestDeterministic checks that building the same entries twice, and
// building after other bytes in dst, gives identical section bytes, and
// that write → read → write is byte-identical: a section rebuilt from what
// a loaded lexicon returns equals the original.
func TestDeterministic(t *testing.T) {
	c := loadCorpus(t, scowlPath)
	again, err := AppendSection(nil, c.entries)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(again, c.section) {
		t.Fatalf("second build differs from the first")
	}
	prefixed, err := AppendSection([]byte("8 bytes!"), c.entries)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(prefixed[8:], c.section) {
		t.Fatalf("build after 8 bytes of dst differs")
	}
	if len(c.section)%partAlign != 0 {
		t.Errorf("section length %d is not a multiple of %d", len(c.section), partAlign)
	}
	rebuilt := make([]Entry, c.lex.Len())
	for i := range rebuilt {
		w, s := c.lex.Word(uint32(i)), c.lex.Surface(uint32(i))
		if s == w {
			s = ""
		}
		rebuilt[i] = Entry{Word: w, Surface: s}
	}
	third, err := AppendSection(nil, rebuilt)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(third, c.section) {
		t.Fatalf("write → read → write differs")
	}
}

// TestSmallSectionLayout builds a four-word section and checks every byte
// against the layout in FORMAT.md, worked out by hand there (the worked
// example); the FST bytes are compared with what vellum's builder, the
// reference for that part, writes for the same keys and values.
func TestSmallSectionLayout(t *testing.T) {
	for _, v := range []struct {
		version uint16
		bs      int
	}{{tableVersion, blockSize}, {listVersion, 0}, {SectionVersion, 0}} {
		t.Run(fmt.Sprintf("version=%d", v.version), func(t *testing.T) {
			sec, err := appendSectionVersion(nil, smallEntries, v.version, v.bs)
			if err != nil {
				t.Fatal(err)
			}
			if _, err := LoadSection(sec); err != nil {
				t.Fatal(err)
			}
			checkSmallLayout(t, sec, v.version, v.bs)
		})
	}
}

// checkSmallLayout compares sec, the section of smallEntries, with the bytes
// FORMAT.md works out by hand for the given version and block size.
func checkSmallLayout(t *testing.T, sec []byte, version uint16, bs int) {
	t.Helper()

	var fb bytes.Buffer
	vb, err := vellum.New(&fb, &vellum.BuilderOpts{Encoder: 1, RegistryTableSize: min(fstRegistryRows, 2*len(smallEntries)+64), RegistryMRUSize: fstRegistryCells})
	if err != nil {
		t.Fatal(err)
	}
	for i, e := range smallEntries {
		if err := vb.Insert([]byte(e.Word), uint64(i)); err != nil {
			t.Fatal(err)
		}
	}
	if err := vb.Close(); err != nil {
		t.Fatal(err)
	}
	fst := fb.Bytes()
	F := len(fst)
	al := func(x int) int { return (x + 7) / 8 * 8 }

	// Hand-derived parts (FORMAT.md, "Worked example").
	blocks := []byte{0, 0, 0, 0, 15, 0, 0, 0}
	words := []byte{
		0x01, 'i', // block 0, word 0: length 1, "i"
		0x15, 'p', 'h', 'o', 'n', 'e', // shares 1 byte, 5 new: "iphone"
		0x11, 't', // shares 1, 1 new: "it"
		0x04, 'n', 'a', 's', 'a', // shares 0, 4 new: "nasa"
	}
	if bs == 0 { // version 2: no word table
		blocks, words = nil, nil
	}
	casing := []byte{0x8d} // codes 1 (I), 3 (iPhone), 0 (it), 2 (NASA): 1 | 3<<2 | 0<<4 | 2<<6
	excIDs := []byte{1, 0, 0, 0}
	excEnds := []byte{6, 0, 0, 0}
	excData := []byte("iPhone")

	wordsField := len(words) // header field 36
	if version == SectionVersion {
		// Version 3: the bitmap marks I, iPhone and NASA (words 0, 1, 3:
		// 0b1011) in one uint64; their codes 1, 3, 2 (1 | 3<<2 | 2<<4)
		// fill another; field 36 holds their number, 3. One bitmap rank
		// sample and one exception rank sample (0: nothing before the
		// first word or code); one record offset sample (record 0 at 0);
		// the record of iPhone is its mask over "iphone", bit 1 (p), as
		// the one-byte uvarint 0x02.
		casing = []byte{0x0b, 0, 0, 0, 0, 0, 0, 0, 0x2d, 0, 0, 0, 0, 0, 0, 0}
		excIDs = []byte{0, 0, 0, 0, 0, 0, 0, 0}
		excEnds = []byte{0, 0, 0, 0}
		excData = []byte{0x02}
		wordsField = 3
	}

	blocksOff := al(64 + F)
	wordsOff := blocksOff + len(blocks)
	caseOff := al(wordsOff + len(words))
	excIDOff := al(caseOff + len(casing))
	excEndOff := excIDOff + len(excIDs)
	excDataOff := excEndOff + len(excEnds)
	total := al(excDataOff + len(excData))

	want := make([]byte, total)
	le := binary.LittleEndian
	copy(want, "KLXw")
	le.PutUint16(want[4:], version)
	le.PutUint16(want[6:], 0) // flags
	for _, f := range []struct{ at, v int }{
		{8, total}, {12, len(smallEntries)}, {20, 64}, {24, F}, {28, blocksOff},
		{32, wordsOff}, {36, wordsField}, {40, caseOff}, {44, 1}, {48, excIDOff},
		{52, excEndOff}, {56, excDataOff}, {60, len(excData)},
	} {
		le.PutUint32(want[f.at:], uint32(f.v))
	}
	le.PutUint16(want[16:], uint16(bs)) // block size
	le.PutUint16(want[18:], 6)          // longest word, "iphone"
	copy(want[64:], fst)
	copy(want[blocksOff:], blocks)
	copy(want[wordsOff:], words)
	copy(want[caseOff:], casing)
	copy(want[excIDOff:], excIDs)
	copy(want[excEndOff:], excEnds)
	copy(want[excDataOff:], excData)
	if !bytes.Equal(sec, want) {
		t.Errorf("section bytes:\n%x\nwant:\n%x", sec, want)
	}
}
