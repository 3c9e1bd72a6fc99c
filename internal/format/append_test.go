package format

import (
	"bytes"
	"encoding/binary"
	"errors"
	"flag"
	"os"
	"path/filepath"
	"slices"
	"testing"
)

var update = flag.Bool("update", false, "rewrite golden files in testdata/")

// tinySections is the content of the golden file testdata/tiny-v1.0.model.
func tinySections() []Section {
	return []Section{
		{Kind: KindMeta, Data: []byte("tiny")},
		{Kind: KindLexicon, Data: []byte{0xAA, 0xBB, 0xCC, 0xDD, 0xEE, 0xFF, 0x11, 0x22, 0x33}},
	}
}

// TestAppendHandBuilt compares Append's output with a file written out by
// hand from FORMAT.md. Only the CRCs are computed, with the standard
// library's CRC-32C.
func TestAppendHandBuilt(t *testing.T) {
	want := []byte{
		// header
		0xab, 'K', 'L', 'O', 'O', 'M', '\r', '\n', // magic
		1, 0, // major 1
		0, 0, // minor 0
		0, 0, 0, 0, // flags
		2, 0, 0, 0, // section count
		0, 0, 0, 0, // header CRC, filled in below
		// table entry 0: meta
		1, 0, 0, 0, // kind
		0, 0, 0, 0, // CRC, filled in below
		72, 0, 0, 0, 0, 0, 0, 0, // offset 24 + 2*24 = 72
		4, 0, 0, 0, 0, 0, 0, 0, // length
		// table entry 1: lexicon
		2, 0, 0, 0,
		0, 0, 0, 0,
		80, 0, 0, 0, 0, 0, 0, 0, // 72 + 4 rounded up to 8
		9, 0, 0, 0, 0, 0, 0, 0,
		// body of meta at 72, then 4 bytes of padding
		't', 'i', 'n', 'y', 0, 0, 0, 0,
		// body of lexicon at 80; the file ends with it
		0xAA, 0xBB, 0xCC, 0xDD, 0xEE, 0xFF, 0x11, 0x22, 0x33,
	}
	le := binary.LittleEndian
	le.PutUint32(want[24+4:], refCRC([]byte("tiny")))
	le.PutUint32(want[48+4:], refCRC(want[80:89]))
	fixHeaderCRC(want)

	// Given out of order, to check that Append sorts.
	in := tinySections()
	slices.Reverse(in)
	got, err := Append(nil, in)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got, want) {
		t.Errorf("Append =\n% x\nwant\n% x", got, want)
	}
}

// TestGolden keeps the bytes of a tiny file in testdata/. Run with -update
// to rewrite it after a deliberate format change (which needs a new
// version: files of released versions are never deleted).
func TestGolden(t *testing.T) {
	got := mustAppend(t, tinySections())
	path := filepath.Join("testdata", "tiny-v1.0.model")
	if *update {
		if err := WriteFileAtomic(path, got, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("read golden (run with -update to create it): %v", err)
	}
	if !bytes.Equal(got, want) {
		t.Errorf("Append(tiny) =\n% x\ngolden %s =\n% x", got, path, want)
	}
}

// TestReadsReleasedFiles opens every model kept in testdata/: each reader
// must open the files of every released minor version of its major.
func TestReadsReleasedFiles(t *testing.T) {
	paths, err := filepath.Glob(filepath.Join("testdata", "*.model"))
	if err != nil {
		t.Fatal(err)
	}
	if len(paths) == 0 {
		t.Fatal("no testdata/*.model files")
	}
	for _, p := range paths {
		t.Run(filepath.Base(p), func(t *testing.T) {
			b, err := os.ReadFile(p)
			if err != nil {
				t.Fatal(err)
			}
			f, err := Parse(b)
			if err != nil {
				t.Fatalf("Parse(%s) = %v", p, err)
			}
			if err := f.VerifyAll(); err != nil {
				t.Errorf("VerifyAll(%s) = %v", p, err)
			}
		})
	}
}

func TestAppendDeterministic(t *testing.T) {
	in := sampleSections()
	first := mustAppend(t, in)
	perms := [][]int{{0, 1, 2, 3}, {3, 2, 1, 0}, {2, 0, 3, 1}, {1, 3, 0, 2}}
	for _, p := range perms {
		var s []Section
		for _, i := range p {
			s = append(s, in[i])
		}
		if got := mustAppend(t, s); !bytes.Equal(got, first) {
			t.Errorf("Append with sections in order %v differs from order 0,1,2,3", p)
		}
	}
	// Appending after a prefix of any length adds the same bytes: offsets
	// and padding count from the start of the appended file.
	for n := range 9 {
		prefix := bytes.Repeat([]byte{0x5A}, n)
		got, err := Append(prefix, in)
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(got[:n], prefix[:n]) || !bytes.Equal(got[n:], first) {
			t.Errorf("Append after a %d-byte prefix differs", n)
		}
	}
	// Append does not keep or change its input.
	in[0].Data[0] ^= 0xFF
	f, err := Parse(first)
	if err != nil {
		t.Fatal(err)
	}
	if err := f.VerifyAll(); err != nil {
		t.Errorf("changing the input after Append changed the file: %v", err)
	}
}

func TestAppendEmpty(t *testing.T) {
	tests := []struct {
		name     string
		sections []Section
	}{
		{"no sections", nil},
		{"empty body", []Section{{Kind: KindMeta}}},
		{"empty bodies around one", []Section{{Kind: KindMeta}, {Kind: KindLexicon, Data: []byte("x")}, {Kind: KindNgrams}}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			f, err := Parse(mustAppend(t, tt.sections))
			if err != nil {
				t.Fatalf("Parse = %v", err)
			}
			if err := f.VerifyAll(); err != nil {
				t.Errorf("VerifyAll = %v", err)
			}
			for _, s := range tt.sections {
				if got, ok := f.Section(s.Kind); !ok || !bytes.Equal(got, s.Data) {
					t.Errorf("Section(%s) = %q, %v", s.Kind, got, ok)
				}
			}
		})
	}
}

func TestAppendErrors(t *testing.T) {
	many := make([]Section, MaxSections+1)
	for i := range many {
		many[i].Kind = Kind(i + 1)
	}
	tests := []struct {
		name     string
		sections []Section
		want     error
	}{
		{"kind zero", []Section{{Kind: KindMeta}, {Kind: 0}}, ErrInvalidKind},
		{"duplicate", []Section{{Kind: KindNgrams}, {Kind: KindMeta}, {Kind: KindNgrams}}, ErrDuplicateKind},
		{"too many", many, ErrTooLarge},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			dst := []byte("keep")
			got, err := Append(dst, tt.sections)
			if !errors.Is(err, tt.want) {
				t.Errorf("Append = %v, want %v", err, tt.want)
			}
			if string(got) != "keep" {
				t.Errorf("Append changed dst to %q on error", got)
			}
		})
	}
	// The limit itself is allowed.
	if _, err := Parse(mustAppend(t, many[:MaxSections])); err != nil {
		t.Errorf("Parse of %d sections = %v", MaxSections, err)
	}
}
