package lm

import (
	"bytes"
	"context"
	"fmt"
	"path/filepath"
	"strings"
	"testing"
)

// TestTallyWorkersDeterministic checks that the model is the same bytes for
// any number of workers, chunk size and budget, and equal to one Counter's
// (the same property as compress/flate's TestDeterministic: output must not
// depend on how the input was cut).
func TestTallyWorkersDeterministic(t *testing.T) {
	text := casedText(t, 600)
	tok := readFile(t, filepath.Join("testdata", "opticks-train.txt"))[:60000]
	for _, in := range []struct {
		name string
		text string
		scan ScanOptions
	}{{"text", text, ScanOptions{}}, {"tokenized", tok, ScanOptions{Pretokenized: true}}} {
		want := counterSection(t, in.text, 3, in.scan)
		for _, workers := range []int{1, 2, 4} {
			for _, chunk := range []int{1, 5000, 1 << 20} {
				for _, budget := range []int64{0, 48 << 10} {
					t.Run(fmt.Sprintf("%s/workers=%d/chunk=%d/budget=%d", in.name, workers, chunk, budget), func(t *testing.T) {
						got, _ := tallySection(t, in.text, TallyOptions{
							Order: 3, Workers: workers, ChunkBytes: chunk, MemBudget: budget, TempDir: t.TempDir(),
						}, in.scan)
						if !bytes.Equal(got, want) {
							t.Errorf("model differs from the single Counter's")
						}
					})
				}
			}
		}
	}
}

// TestSurfaceMostFrequentForm checks the display form of a mixed-case word:
// the most frequent form, ties to the smallest in byte order, whatever the
// order the text arrives or is merged in. Rule of thumb (common practice, no
// source): show a word the way it is usually written.
func TestSurfaceMostFrequentForm(t *testing.T) {
	cases := []struct {
		name  string
		paras []string
		word  string
		want  string
	}{
		{"majority-later", []string{"we saw an iPhone.", "an iPHone here.", "one iPHone there."}, "iphone", "iPHone"},
		{"majority-first", []string{"one iPHone there.", "an iPHone here.", "we saw an iPhone."}, "iphone", "iPHone"},
		{"tie-byte-order", []string{"the eBay one.", "the ebAy one."}, "ebay", "eBay"},
		{"lower-wins", []string{"the ebay one.", "the ebay two.", "the eBay three."}, "ebay", ""},
		{"sentence-initial-title-ignored", []string{"Tea is hot.", "Tea now.", "we like tea."}, "tea", ""},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			for _, rev := range []bool{false, true} {
				paras := append([]string(nil), tc.paras...)
				if rev {
					for i, j := 0, len(paras)-1; i < j; i, j = i+1, j-1 {
						paras[i], paras[j] = paras[j], paras[i]
					}
				}
				text := strings.Join(paras, "\n\n") + "\n"
				for _, workers := range []int{1, 3} {
					tl, err := NewTally(TallyOptions{Order: 2, Workers: workers, ChunkBytes: 1})
					if err != nil {
						t.Fatal(err)
					}
					if err := tl.AddText(context.Background(), strings.NewReader(text), ScanOptions{}, nil); err != nil {
						t.Fatal(err)
					}
					cs, err := tl.Counts(context.Background())
					if err != nil {
						t.Fatal(err)
					}
					got := "<missing>"
					for i, w := range cs.vocab {
						if w == tc.word {
							got = cs.surface[i]
						}
					}
					if got != tc.want {
						t.Errorf("reversed=%v workers=%d: surface of %q = %q, want %q", rev, workers, tc.word, got, tc.want)
					}
				}
			}
		})
	}
}

// TestSafeCut checks where text may be cut without splitting a sentence,
// following the Scanner's documented rules (blank lines and '.', '!', '?',
// '…' end sentences).
func TestSafeCut(t *testing.T) {
	cases := []struct {
		name      string
		in        string
		tokenized bool
		want      int
	}{
		{"tokenized/last-newline", "a b\nc d\ne", true, 8},
		{"tokenized/none", "a b c", true, 0},
		{"text/mid-sentence-only", "this goes\non and on\nand", false, 0},
		{"text/blank-line", "one\n\ntwo\nthree", false, 5},
		{"text/space-only-line", "one\n \t \ntwo", false, 8},
		{"text/period-end", "one.\ntwo\nthree", false, 5},
		{"text/trailing-space-after-bang", "one!  \ntwo", false, 7},
		{"text/ellipsis", "wait…\nno", false, len("wait…\n")},
		{"text/comma-end-not-safe", "one,\ntwo", false, 0},
		{"text/latest-wins", "a.\nb.\nc", false, 6},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if got := safeCut([]byte(tc.in), tc.tokenized); got != tc.want {
				t.Errorf("safeCut(%q, %v) = %d, want %d", tc.in, tc.tokenized, got, tc.want)
			}
		})
	}
}
