package lm

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"testing"
)

// Fuzz targets of the package's readers, seeded from real output and from
// testdata/. Crashers are kept in testdata/fuzz/.

// FuzzReadARPA feeds arbitrary text to ReadARPA. Whatever it accepts must
// write, read back and write again to the same bytes, and lay out as a
// section that passes Check.
func FuzzReadARPA(f *testing.F) {
	for _, text := range []string{"a b\na b\na c\n", "the cat sat\nthe dog sat on the cat\n"} {
		for _, order := range []int{1, 2, 3} {
			x := buildText(f, text, order, ScanOptions{Pretokenized: true}, 0)
			f.Add(writeARPA(f, x.b))
		}
	}
	files, _ := filepath.Glob(filepath.Join("testdata", "arpa", "*.arpa"))
	for _, p := range files {
		b, err := os.ReadFile(p)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	f.Fuzz(func(t *testing.T, text []byte) {
		b, err := ReadARPA(context.Background(), bytes.NewReader(text))
		if err != nil {
			if !errors.Is(err, ErrARPA) {
				t.Fatalf("ReadARPA error %v does not match ErrARPA", err)
			}
			return
		}
		first := writeARPA(t, b)
		b2, err := ReadARPA(context.Background(), bytes.NewReader(first))
		if err != nil {
			t.Fatalf("reading what WriteARPA wrote: %v\n%s", err, first)
		}
		if second := writeARPA(t, b2); !bytes.Equal(first, second) {
			t.Fatalf("write → read → write differs:\n%s\n----\n%s", first, second)
		}
		if len(b.Vocab) <= 64 {
			layout(t, b, 0)
		}
	})
}

// FuzzLoadSection loads arbitrary bytes as a section, seeded with real
// sections. Anything that loads must answer every query and Check without
// panicking; a model that passes Check must dequantize to n-grams whose
// count matches NGrams.
func FuzzLoadSection(f *testing.F) {
	// Small seeds keep each execution cheap: two toy models and one with a
	// top list and a maximum tree.
	toy := readFile(f, filepath.Join("testdata", "reference", "toy-train.txt"))
	// Version 0 is the newest layout (version 6 for the models of order 3
	// and 4, which carry their counts); version 3 keeps plain bigram
	// words, version 4 ranks of fixed width, version 5 probability codes
	// at the highest order. The last seed is version 6 with counts wider
	// than 0 bits and a group long enough to store its count sum.
	for _, c := range []struct {
		text              string
		order, q, version int
	}{{"a b\na b\na c\n", 2, 8, 0}, {toy, 3, 0, 0}, {toy, 3, 8, 0}, {toy, 3, 8, 3}, {toy, 3, 8, 4}, {toy, 3, 8, 5}, {toy, 4, 8, 0}, {smallText(f), 2, 4, 0}, {longGroupText(), 3, 4, 6}} {
		x := buildText(f, c.text, c.order, ScanOptions{Pretokenized: true}, c.q)
		sec, err := AppendSection(nil, x.b, LayoutOptions{QuantBits: c.q, Version: c.version})
		if err != nil {
			f.Fatal(err)
		}
		f.Add(sec)
	}
	// Sections that made queries panic before the fixes reported with
	// TestLoadSectionWideArrays: a start value and a top-list offset that
	// read as negative ints.
	base, _ := smallSection(f, 2, 8)
	f.Add(widen(f, base, tag(tagStart, 1), 0, ^uint64(1<<40-1)))
	f.Add(widen(f, base, tag(tagTop, 1), 0, ^uint64(1<<40-1)))
	f.Fuzz(func(t *testing.T, b []byte) {
		// A fresh heap copy starts on an 8-byte boundary, as a section in a model file does.
		m, err := LoadSection(append(make([]byte, 0, len(b)+8), b...))
		if err != nil {
			if !isLoadError(err) {
				t.Fatalf("LoadSection error %v is not ErrCorrupt or ErrSectionVersion", err)
			}
			return
		}
		if m.VocabSize() > 1<<12 {
			// Large claimed vocabularies make exercise slow, not different.
			m.LogProb([]uint32{0, 1}, 2)
			return
		}
		if err := exercise(t, m); err != nil {
			if !errors.Is(err, ErrCorrupt) {
				t.Fatalf("Check error %v is not ErrCorrupt", err)
			}
			return
		}
		bo := m.Backoff(make([]string, m.VocabSize()))
		if got, want := fmt.Sprint(bo.NGrams()), fmt.Sprint(m.NGrams()); got != want {
			t.Fatalf("a model that passes Check dequantizes to %s n-grams, NGrams says %s", got, want)
		}
	})
}
