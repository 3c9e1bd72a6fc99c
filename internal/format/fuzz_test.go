package format

import (
	"bytes"
	"encoding/binary"
	"errors"
	"os"
	"path/filepath"
	"testing"
)

// FuzzParse feeds arbitrary bytes to Parse. Properties: no panic; an error
// is one of the documented sentinels; a file that parses can be verified
// and all its sections read and viewed; and framing its sections again
// gives a file that parses to the same sections and frames to the same
// bytes (write, read, write is byte-identical).
func FuzzParse(f *testing.F) {
	addSeeds(f)
	f.Fuzz(checkParse)
}

// FuzzParseTable is FuzzParse with the header CRC recomputed over the
// mutated bytes whenever the table fits, so that mutations of the section
// table reach the bounds, alignment and overlap checks instead of stopping
// at the header CRC.
func FuzzParseTable(f *testing.F) {
	addSeeds(f)
	f.Fuzz(func(t *testing.T, b []byte) {
		if len(b) >= 24 {
			if n := uint64(binary.LittleEndian.Uint32(b[16:])); n <= MaxSections && 24+24*n <= uint64(len(b)) {
				b = bytes.Clone(b) // the fuzzer's input must not be modified
				fixHeaderCRC(b)
			}
		}
		checkParse(t, b)
	})
}

// addSeeds seeds a fuzz target from the package's own output and from every
// model file in testdata/.
func addSeeds(f *testing.F) {
	seeds := [][]Section{
		nil,
		sampleSections(),
		tinySections(),
		{{Kind: KindMeta}},
		{{Kind: KindNgrams, Data: bytes.Repeat([]byte{0xFF}, 40)}, {Kind: Kind(300), Data: []byte("future")}},
	}
	for _, s := range seeds {
		b, err := Append(nil, s)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
		f.Add(b[:len(b)/2])
	}
	newer, err := appendFile(nil, fileHeader{major: 1, minor: 7, flags: 3}, sampleSections())
	if err != nil {
		f.Fatal(err)
	}
	f.Add(newer)
	paths, err := filepath.Glob(filepath.Join("testdata", "*.model"))
	if err != nil {
		f.Fatal(err)
	}
	for _, p := range paths {
		b, err := os.ReadFile(p)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	f.Add([]byte{})
	f.Add([]byte("\x89PNG\r\n\x1a\n"))
}

// checkParse checks the fuzz properties on b.
func checkParse(t *testing.T, b []byte) {
	b = b[:len(b):len(b)]
	file, err := Parse(b)
	if err != nil {
		if !errors.Is(err, ErrNotModel) && !errors.Is(err, ErrVersion) &&
			!errors.Is(err, ErrChecksum) && !errors.Is(err, ErrCorrupt) {
			t.Fatalf("Parse error %v matches no sentinel", err)
		}
		return
	}
	infos := file.Sections()
	var sections []Section
	for _, s := range infos {
		data, ok := file.Section(s.Kind)
		if !ok || uint64(len(data)) != s.Length {
			t.Fatalf("Section(%s) = %d bytes, %v; table says %d", s.Kind, len(data), ok, s.Length)
		}
		_ = Uint64s(data)
		_ = Uint32s(data)
		_ = Uint16s(data)
		if err := file.Verify(s.Kind); err != nil && !errors.Is(err, ErrChecksum) {
			t.Fatalf("Verify(%s) = %v", s.Kind, err)
		}
		sections = append(sections, Section{Kind: s.Kind, Data: data})
	}
	if err := file.VerifyAll(); err != nil && !errors.Is(err, ErrChecksum) {
		t.Fatalf("VerifyAll = %v", err)
	}

	again, err := Append(nil, sections)
	if err != nil {
		t.Fatalf("Append(sections of a parsed file) = %v", err)
	}
	file2, err := Parse(again)
	if err != nil {
		t.Fatalf("Parse(Append(sections)) = %v", err)
	}
	if err := file2.VerifyAll(); err != nil {
		t.Fatalf("VerifyAll of a freshly written file = %v", err)
	}
	infos2 := file2.Sections()
	if len(infos2) != len(infos) {
		t.Fatalf("round trip has %d sections, want %d", len(infos2), len(infos))
	}
	var sections2 []Section
	for i, s := range infos2 {
		data, _ := file2.Section(s.Kind)
		if s.Kind != infos[i].Kind || !bytes.Equal(data, sections[i].Data) {
			t.Fatalf("round trip section %d = %s %q, want %s %q", i, s.Kind, data, infos[i].Kind, sections[i].Data)
		}
		sections2 = append(sections2, Section{Kind: s.Kind, Data: data})
	}
	third, err := Append(nil, sections2)
	if err != nil || !bytes.Equal(third, again) {
		t.Fatalf("write, read, write is not byte-identical (err %v)", err)
	}
}
