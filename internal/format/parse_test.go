package format

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

func TestParseValid(t *testing.T) {
	in := sampleSections()
	b := mustAppend(t, in)
	f, err := Parse(b)
	if err != nil {
		t.Fatalf("Parse: %v", err)
	}
	if f.Major() != MajorVersion || f.Minor() != MinorVersion || f.Flags() != 0 {
		t.Errorf("version %d.%d flags %x, want %d.%d flags 0", f.Major(), f.Minor(), f.Flags(), MajorVersion, MinorVersion)
	}
	for _, s := range in {
		got, ok := f.Section(s.Kind)
		if !ok || !bytes.Equal(got, s.Data) {
			t.Errorf("Section(%s) = %q, %v, want %q, true", s.Kind, got, ok, s.Data)
		}
		if err := f.Verify(s.Kind); err != nil {
			t.Errorf("Verify(%s) = %v, want nil", s.Kind, err)
		}
	}
	if err := f.VerifyAll(); err != nil {
		t.Errorf("VerifyAll = %v, want nil", err)
	}
	if _, ok := f.Section(Kind(99)); ok {
		t.Errorf("Section(kind 99) found in a file without it")
	}
	if err := f.Verify(Kind(99)); !errors.Is(err, ErrNoSection) {
		t.Errorf("Verify(kind 99) = %v, want ErrNoSection", err)
	}
}

// TestParseSpecFields decodes a written file with the offsets FORMAT.md
// gives, independently of the package's reader.
func TestParseSpecFields(t *testing.T) {
	in := sampleSections()
	b := mustAppend(t, in)
	le := binary.LittleEndian
	// FORMAT.md: magic at 0..8, major at 8, minor at 10, flags at 12, count at 16, header CRC at 20.
	if string(b[:8]) != "\xabKLOOM\r\n" {
		t.Errorf("magic = % x", b[:8])
	}
	if got := le.Uint32(b[16:]); got != uint32(len(in)) {
		t.Fatalf("count = %d, want %d", got, len(in))
	}
	// Table entries (24 bytes each) in ascending kind order: kind, crc, offset, length.
	prevEnd := uint64(24 + 24*len(in))
	for i := range in {
		e := b[24+24*i:]
		kind, crc, off, n := Kind(le.Uint32(e)), le.Uint32(e[4:]), le.Uint64(e[8:]), le.Uint64(e[16:])
		if kind != Kind(i+1) {
			t.Errorf("entry %d kind = %d, want %d", i, kind, i+1)
		}
		if off%8 != 0 || off < prevEnd || off-prevEnd >= 8 {
			t.Errorf("entry %d offset %d: want the first multiple of 8 at or after %d", i, off, prevEnd)
		}
		body := b[off : off+n]
		if crc != refCRC(body) {
			t.Errorf("entry %d crc %08x, reference CRC-32C %08x", i, crc, refCRC(body))
		}
		for _, p := range b[prevEnd:off] {
			if p != 0 {
				t.Errorf("entry %d: non-zero padding before it", i)
			}
		}
		prevEnd = off + n
	}
	if prevEnd != uint64(len(b)) {
		t.Errorf("file is %d bytes, last section ends at %d", len(b), prevEnd)
	}
	covered := append(append([]byte{}, b[:20]...), b[24:24+24*len(in)]...)
	if got, want := le.Uint32(b[20:]), refCRC(covered); got != want {
		t.Errorf("header CRC = %08x, reference %08x", got, want)
	}
}

// TestCRC32CKnownAnswers checks that the checksum is CRC-32C (Castagnoli).
func TestCRC32CKnownAnswers(t *testing.T) {
	inc := make([]byte, 32)
	for i := range inc {
		inc[i] = byte(i)
	}
	tests := []struct {
		name string
		in   []byte
		want uint32
	}{
		// Check value of CRC-32C over "123456789" from the CRC catalogue
		// (Williams, "A Painless Guide to CRC Error Detection Algorithms";
		// also RFC 3720 iSCSI); from memory.
		{"check-string", []byte("123456789"), 0xE3069283},
		// RFC 3720 appendix B.4 test vectors (32 bytes of zeros, 0xFF,
		// 0x00..0x1F); from memory, stored there as the byte sequence of the
		// little-endian CRC.
		{"32-zeros", make([]byte, 32), 0x8A9136AA},
		{"32-ones", bytes.Repeat([]byte{0xFF}, 32), 0x62A8AB43},
		{"32-incrementing", inc, 0x46DD794E},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := checksum(tt.in); got != tt.want {
				t.Errorf("checksum(%q) = %08x, want %08x", tt.in, got, tt.want)
			}
		})
	}
}

func TestParseCorruption(t *testing.T) {
	valid := mustAppend(t, sampleSections())
	tableEnd := uint64(24 + 24*len(sampleSections()))
	mod := func(f func(b []byte)) func(t *testing.T) []byte {
		return func(t *testing.T) []byte {
			b := bytes.Clone(valid)
			f(b)
			return b
		}
	}
	le := binary.LittleEndian
	version := func(major, minor uint16) func(t *testing.T) []byte {
		return func(t *testing.T) []byte {
			b, err := appendFile(nil, fileHeader{major: major, minor: minor}, sampleSections())
			if err != nil {
				t.Fatal(err)
			}
			return b
		}
	}
	raw := func(entries []rawEntry, size int) func(t *testing.T) []byte {
		return func(t *testing.T) []byte { return rawFile(t, 1, 0, entries, size) }
	}
	// A PNG signature and IHDR chunk start (PNG spec, RFC 2083 section 3.1 / ISO 15948).
	png := []byte{0x89, 'P', 'N', 'G', '\r', '\n', 0x1a, '\n', 0, 0, 0, 13, 'I', 'H', 'D', 'R', 0, 0, 0, 1, 0, 0, 0, 1, 8, 2, 0, 0, 0}

	tests := []struct {
		name    string
		build   func(t *testing.T) []byte
		want    error
		message []string // substrings the message must contain, when set
	}{
		{"empty file", func(*testing.T) []byte { return []byte{} }, ErrNotModel, nil},
		{"nil", func(*testing.T) []byte { return nil }, ErrNotModel, nil},
		{"png", func(*testing.T) []byte { return png }, ErrNotModel, nil},
		{"short png", func(*testing.T) []byte { return png[:4] }, ErrNotModel, nil},
		{"text file", func(*testing.T) []byte { return []byte("the quick brown fox jumps over the lazy dog\n") }, ErrNotModel, nil},
		{"magic first byte flipped", mod(func(b []byte) { b[0] ^= 0x80 }), ErrNotModel, nil},
		{"magic last byte flipped", mod(func(b []byte) { b[7] ^= 0x01 }), ErrNotModel, nil},
		{"magic crlf converted to lf", func(*testing.T) []byte {
			return append([]byte("\xabKLOOM\n"), valid[8:]...)
		}, ErrNotModel, nil},
		{"only magic", func(*testing.T) []byte { return valid[:8] }, ErrCorrupt, nil},
		{"partial magic", func(*testing.T) []byte { return valid[:3] }, ErrCorrupt, nil},
		{"major 2", version(2, 0), ErrVersion, []string{"version 2.0", "reads version 1.x"}},
		{"major 0", version(0, 3), ErrVersion, []string{"version 0.3", "reads version 1.x"}},
		{"major 65535", version(math.MaxUint16, 0), ErrVersion, []string{"65535.0"}},
		{"major bumped without crc", mod(func(b []byte) { b[8]++ }), ErrVersion, []string{"2.0"}},
		{"minor changed without crc", mod(func(b []byte) { b[10]++ }), ErrChecksum, nil},
		{"flags changed without crc", mod(func(b []byte) { b[12] |= 1 }), ErrChecksum, nil},
		{"header crc flipped", mod(func(b []byte) { b[20] ^= 1 }), ErrChecksum, nil},
		{"table offset changed without crc", mod(func(b []byte) { b[24+8] += 8 }), ErrChecksum, nil},
		{"count max uint32", mod(func(b []byte) { le.PutUint32(b[16:], math.MaxUint32) }), ErrCorrupt, nil},
		{"count above MaxSections", mod(func(b []byte) { le.PutUint32(b[16:], MaxSections+1) }), ErrCorrupt, nil},
		{"count beyond bytes left", mod(func(b []byte) { le.PutUint32(b[16:], MaxSections) }), ErrCorrupt, nil},
		{"offset past end", raw([]rawEntry{{kind: 1, offset: 1 << 20, length: 0}}, 64), ErrCorrupt, nil},
		{"length past end", raw([]rawEntry{{kind: 1, offset: 48, length: 17}}, 64), ErrCorrupt, nil},
		{"offset max uint64", raw([]rawEntry{{kind: 1, offset: math.MaxUint64, length: 1}}, 64), ErrCorrupt, nil},
		{"offset plus length overflows", raw([]rawEntry{{kind: 1, offset: 48, length: math.MaxUint64 - 40}}, 64), ErrCorrupt, nil},
		{"length max uint64", raw([]rawEntry{{kind: 1, offset: 48, length: math.MaxUint64}}, 64), ErrCorrupt, nil},
		{"offset inside header", raw([]rawEntry{{kind: 1, offset: 40, length: 8}}, 64), ErrCorrupt, nil},
		{"offset zero", raw([]rawEntry{{kind: 1, offset: 0, length: 8}}, 64), ErrCorrupt, nil},
		{"misaligned section", raw([]rawEntry{{kind: 1, offset: 52, length: 4}}, 64), ErrCorrupt, nil},
		{"misaligned by one", raw([]rawEntry{{kind: 1, offset: 49, length: 4}}, 64), ErrCorrupt, nil},
		{"overlapping sections", raw([]rawEntry{
			{kind: 1, offset: 72, length: 16},
			{kind: 2, offset: 80, length: 16},
		}, 96), ErrCorrupt, nil},
		{"overlapping out of table order", raw([]rawEntry{
			{kind: 1, offset: 96, length: 8},
			{kind: 2, offset: 80, length: 24},
		}, 104), ErrCorrupt, nil},
		{"identical sections", raw([]rawEntry{
			{kind: 1, offset: 72, length: 8},
			{kind: 2, offset: 72, length: 8},
		}, 80), ErrCorrupt, nil},
		{"section contains another", raw([]rawEntry{
			{kind: 1, offset: 104, length: 32},
			{kind: 2, offset: 112, length: 8},
			{kind: 3, offset: 96, length: 8},
		}, 136), ErrCorrupt, nil},
		{"duplicate kind", raw([]rawEntry{
			{kind: 2, offset: 72, length: 0},
			{kind: 2, offset: 72, length: 0},
		}, 72), ErrCorrupt, nil},
		{"table not sorted", raw([]rawEntry{
			{kind: 3, offset: 72, length: 0},
			{kind: 2, offset: 72, length: 0},
		}, 72), ErrCorrupt, nil},
		{"kind zero", raw([]rawEntry{{kind: 0, offset: 48, length: 0}}, 48), ErrCorrupt, nil},
		{"last section cut", func(*testing.T) []byte { return valid[:len(valid)-1] }, ErrCorrupt, nil},
		{"table cut", func(*testing.T) []byte { return valid[:tableEnd-1] }, ErrCorrupt, nil},
	}
	// Where each FormatError must point (FORMAT.md: the count field is at
	// 16; entry i starts at 24+24i with kind at +0, offset at +8, length at
	// +16; overlaps point at the later body), which pins down that each case
	// fails on the check it names.
	wantOffset := map[string]uint64{
		"only magic": 8, "partial magic": 3,
		"count max uint32": 16, "count above MaxSections": 16, "count beyond bytes left": 16,
		"offset past end": 32, "length past end": 40, "offset max uint64": 32,
		"offset plus length overflows": 40, "length max uint64": 40,
		"offset inside header": 32, "offset zero": 32,
		"misaligned section": 32, "misaligned by one": 32,
		"overlapping sections": 80, "overlapping out of table order": 96,
		"identical sections": 72, "section contains another": 112,
		"duplicate kind": 48, "table not sorted": 48, "kind zero": 24,
		"last section cut": 24 + 24*3 + 16, "table cut": 16,
	}
	sentinels := []error{ErrNotModel, ErrVersion, ErrChecksum, ErrCorrupt}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			b := tt.build(t)
			f, err := Parse(b[:len(b):len(b)])
			if !errors.Is(err, tt.want) {
				t.Fatalf("Parse = %v, %v; want %v", f, err, tt.want)
			}
			for _, s := range sentinels {
				if s != tt.want && errors.Is(err, s) {
					t.Errorf("Parse error %v also matches %v", err, s)
				}
			}
			if !strings.HasPrefix(err.Error(), "format: ") {
				t.Errorf("message %q lacks the package prefix", err)
			}
			for _, m := range tt.message {
				if !strings.Contains(err.Error(), m) {
					t.Errorf("message %q does not mention %q", err, m)
				}
			}
			var fe *FormatError
			if errors.As(err, &fe) != (tt.want == ErrCorrupt) {
				t.Errorf("errors.As(%v, *FormatError) = %v, want %v", err, !(tt.want == ErrCorrupt), tt.want == ErrCorrupt)
			}
			if fe != nil {
				want, ok := wantOffset[tt.name]
				if !ok {
					t.Fatalf("no expected offset for case %q", tt.name)
				}
				if fe.Offset != want {
					t.Errorf("FormatError.Offset = %d, want %d (%v)", fe.Offset, want, fe)
				}
			}
		})
	}
}

// TestParseRawValid checks that the raw builder itself makes files Parse
// accepts, so the corruption cases above fail for the reason they name.
func TestParseRawValid(t *testing.T) {
	tests := []struct {
		name    string
		entries []rawEntry
		size    int
	}{
		{"no sections", nil, 24},
		{"one section", []rawEntry{{kind: 1, offset: 48, length: 16}}, 64},
		{"gap and trailing bytes", []rawEntry{{kind: 1, offset: 64, length: 3}}, 100},
		{"bodies in reverse order", []rawEntry{
			{kind: 1, offset: 88, length: 8},
			{kind: 2, offset: 72, length: 16},
		}, 96},
		{"empty sections share an offset", []rawEntry{
			{kind: 1, offset: 72, length: 0},
			{kind: 2, offset: 72, length: 8},
		}, 80},
		{"empty section at end of file", []rawEntry{{kind: 1, offset: 48, length: 0}}, 48},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			b := rawFile(t, 1, 0, tt.entries, tt.size)
			le := binary.LittleEndian
			for _, e := range tt.entries {
				le.PutUint32(b[24+24*indexOf(tt.entries, e):][4:], refCRC(b[e.offset:e.offset+e.length]))
			}
			fixHeaderCRC(b)
			f, err := Parse(b)
			if err != nil {
				t.Fatalf("Parse = %v, want nil", err)
			}
			if err := f.VerifyAll(); err != nil {
				t.Errorf("VerifyAll = %v, want nil", err)
			}
			if got := len(f.Sections()); got != len(tt.entries) {
				t.Errorf("len(Sections()) = %d, want %d", got, len(tt.entries))
			}
		})
	}
}

func indexOf(es []rawEntry, e rawEntry) int {
	for i := range es {
		if es[i] == e {
			return i
		}
	}
	return -1
}

// TestParseTruncated parses every proper prefix of a valid file.
func TestParseTruncated(t *testing.T) {
	full := mustAppend(t, sampleSections())
	for n := range len(full) {
		b := full[:n:n]
		_, err := Parse(b)
		want := ErrCorrupt
		if n == 0 {
			want = ErrNotModel
		}
		if !errors.Is(err, want) {
			t.Errorf("Parse(first %d of %d bytes) = %v, want %v", n, len(full), err, want)
		}
	}
}

// TestParseHeaderByteFlips flips every byte of the header and table in turn.
func TestParseHeaderByteFlips(t *testing.T) {
	valid := mustAppend(t, sampleSections())
	tableEnd := 24 + 24*len(sampleSections())
	for i := range tableEnd {
		b := bytes.Clone(valid)
		b[i] ^= 0xFF
		var want error
		switch {
		case i < 8: // magic
			want = ErrNotModel
		case i < 10: // major version
			want = ErrVersion
		case i >= 16 && i < 20: // section count: too many for the bytes left, or a CRC mismatch
			n := uint64(binary.LittleEndian.Uint32(b[16:]))
			want = ErrChecksum
			if n > MaxSections || n*24 > uint64(len(b)-24) {
				want = ErrCorrupt
			}
		default: // minor, flags, header CRC, table
			want = ErrChecksum
		}
		t.Run(fmt.Sprintf("byte%d", i), func(t *testing.T) {
			if _, err := Parse(b); !errors.Is(err, want) {
				t.Errorf("Parse with byte %d flipped = %v, want %v", i, err, want)
			}
		})
	}
}

// TestVerifyByteFlips flips the first, middle and last byte of each section:
// Parse still succeeds (it does not read bodies) and Verify of that section
// alone fails with ErrChecksum.
func TestVerifyByteFlips(t *testing.T) {
	in := sampleSections()
	valid := mustAppend(t, in)
	f0, err := Parse(valid)
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range f0.Sections() {
		for _, at := range []uint64{0, s.Length / 2, s.Length - 1} {
			t.Run(fmt.Sprintf("%s/byte%d", s.Kind, at), func(t *testing.T) {
				b := bytes.Clone(valid)
				b[s.Offset+at] ^= 0x01
				f, err := Parse(b)
				if err != nil {
					t.Fatalf("Parse = %v, want nil (bodies are not checked)", err)
				}
				if err := f.Verify(s.Kind); !errors.Is(err, ErrChecksum) {
					t.Errorf("Verify(%s) = %v, want ErrChecksum", s.Kind, err)
				}
				if err := f.VerifyAll(); !errors.Is(err, ErrChecksum) {
					t.Errorf("VerifyAll = %v, want ErrChecksum", err)
				}
				for _, o := range f.Sections() {
					if o.Kind != s.Kind {
						if err := f.Verify(o.Kind); err != nil {
							t.Errorf("Verify(%s) = %v, want nil", o.Kind, err)
						}
					}
				}
			})
		}
	}
}

// TestParseNewerMinor opens a file from a later minor version that adds a
// flag and a kind this version does not know.
func TestParseNewerMinor(t *testing.T) {
	future := Kind(77)
	in := append(sampleSections(), Section{Kind: future, Data: []byte("from the future")})
	b, err := appendFile(nil, fileHeader{major: MajorVersion, minor: MinorVersion + 1, flags: 1 << 9}, in)
	if err != nil {
		t.Fatal(err)
	}
	f, err := Parse(b)
	if err != nil {
		t.Fatalf("Parse = %v, want nil", err)
	}
	if f.Minor() != MinorVersion+1 || f.Flags() != 1<<9 {
		t.Errorf("Minor, Flags = %d, %x; want %d, %x", f.Minor(), f.Flags(), MinorVersion+1, 1<<9)
	}
	var kinds []Kind
	for _, s := range f.Sections() {
		kinds = append(kinds, s.Kind)
	}
	if want := []Kind{KindMeta, KindLexicon, KindNgrams, KindOverlay, future}; fmt.Sprint(kinds) != fmt.Sprint(want) {
		t.Errorf("Sections kinds = %v, want %v", kinds, want)
	}
	if future.Known() || future.String() != "kind(77)" {
		t.Errorf("Kind(77): Known %v, String %q", future.Known(), future.String())
	}
	for _, s := range sampleSections() {
		if got, ok := f.Section(s.Kind); !ok || !bytes.Equal(got, s.Data) {
			t.Errorf("Section(%s) = %q, %v; want %q", s.Kind, got, ok, s.Data)
		}
	}
	if err := f.VerifyAll(); err != nil {
		t.Errorf("VerifyAll = %v, want nil", err)
	}
}

func TestSectionAliasesInput(t *testing.T) {
	b := mustAppend(t, sampleSections())
	f, err := Parse(b)
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range f.Sections() {
		got, _ := f.Section(s.Kind)
		if len(got) > 0 && &got[0] != &b[s.Offset] {
			t.Errorf("Section(%s) does not alias the input", s.Kind)
		}
		if cap(got) != len(got) {
			t.Errorf("Section(%s): cap %d, len %d; appending could overwrite the file", s.Kind, cap(got), len(got))
		}
	}
	if allocs := testing.AllocsPerRun(100, func() { f.Section(KindNgrams) }); allocs != 0 {
		t.Errorf("Section allocates %v times, want 0", allocs)
	}
}

func TestKindString(t *testing.T) {
	tests := []struct {
		k    Kind
		want string
	}{
		{KindMeta, "meta"}, {KindLexicon, "lexicon"}, {KindNgrams, "ngrams"}, {KindOverlay, "overlay"},
		{0, "kind(0)"}, {5, "kind(5)"}, {math.MaxUint32, "kind(4294967295)"},
	}
	for _, tt := range tests {
		if got := tt.k.String(); got != tt.want {
			t.Errorf("Kind(%d).String() = %q, want %q", uint32(tt.k), got, tt.want)
		}
	}
}

func TestFormatErrorIs(t *testing.T) {
	err := fmt.Errorf("open x: %w", &FormatError{Section: KindLexicon, Offset: 48, Reason: "bad"})
	if !errors.Is(err, ErrCorrupt) {
		t.Errorf("errors.Is(%v, ErrCorrupt) = false", err)
	}
	var fe *FormatError
	if !errors.As(err, &fe) || fe.Section != KindLexicon || fe.Offset != 48 {
		t.Errorf("errors.As = %+v", fe)
	}
	if errors.Is(err, ErrChecksum) {
		t.Errorf("FormatError matches ErrChecksum")
	}
}
