package trie

import (
	"bytes"
	"fmt"
	"testing"
)

// TestHeads checks the head bytes of front-coded entries against the rule
// in FORMAT.md ("Front-coded words"), worked out by hand: lengths below 15
// share one byte as nibbles, 15 or more escape to a byte of their own.
func TestHeads(t *testing.T) {
	tests := []struct {
		shared, rest int
		want         []byte
	}{
		{0, 4, []byte{0x04}},
		{14, 14, []byte{0xee}},
		{15, 2, []byte{0xf2, 15}},
		{3, 20, []byte{0x3f, 20}},
		{17, 19, []byte{0xff, 17, 19}},
		{255, 0, []byte{0xf0, 255}},
	}
	for _, tt := range tests {
		t.Run(fmt.Sprintf("%d+%d", tt.shared, tt.rest), func(t *testing.T) {
			got := appendHead(nil, tt.shared, tt.rest)
			if !bytes.Equal(got, tt.want) {
				t.Fatalf("appendHead(%d, %d) = %x, want %x", tt.shared, tt.rest, got, tt.want)
			}
			entry := append(got, make([]byte, tt.rest)...)
			shared, rest, q, canonical, ok := readHead(entry, 0)
			if !ok || !canonical || shared != tt.shared || rest != tt.rest || q != len(tt.want) {
				t.Fatalf("readHead(%x) = %d, %d, %d, %v, %v", entry, shared, rest, q, canonical, ok)
			}
		})
	}
	if _, _, _, canonical, ok := readHead([]byte{0xf0, 3}, 0); !ok || canonical {
		t.Errorf("readHead(f0 03) = canonical %v, ok %v, want an accepted non-canonical head", canonical, ok)
	}
	if _, _, _, _, ok := readHead([]byte{0x05, 'a'}, 0); ok {
		t.Errorf("readHead of a head promising 5 bytes with 1 left = ok")
	}
}

// TestLongWords round-trips words whose shared prefixes and suffixes need
// the escaped head form.
func TestLongWords(t *testing.T) {
	words := []string{
		"abcdefghijklmnopq",
		"abcdefghijklmnopqrstuvwxyz0123456789",
		"abcdefghijklmnopqrstuvwxyz0123456789abcdefghijklmnop",
		"abd",
		"abdefghijklmnopqrstuvwxyz",
	}
	_, lex := build(t, words...)
	for i, w := range words {
		if got := lex.Word(uint32(i)); got != w {
			t.Errorf("Word(%d) = %q, want %q", i, got, w)
		}
	}
}

// TestBlockSizes builds the SUBTLEX-US lexicon with word-table blocks of
// other sizes than the writer's (the loader accepts 1 to 256) and checks
// that every word comes back by id; blocks past 32 words take the
// forward-decoding path of AppendWord.
func TestBlockSizes(t *testing.T) {
	c := loadCorpus(t, subtlexPath)
	for _, bs := range []int{1, 7, 33, 256} {
		t.Run(fmt.Sprint(bs), func(t *testing.T) {
			sec, err := appendSection(nil, c.entries, bs)
			if err != nil {
				t.Fatal(err)
			}
			lex, err := LoadSection(sec)
			if err != nil {
				t.Fatal(err)
			}
			buf := make([]byte, 0, MaxWordLen)
			for i, w := range c.words { // words[i] has id i: sort.Strings order
				if got := lex.AppendWord(buf[:0], uint32(i)); string(got) != w {
					t.Fatalf("block size %d: AppendWord(%d) = %q, want %q", bs, i, got, w)
				}
			}
		})
	}
}
