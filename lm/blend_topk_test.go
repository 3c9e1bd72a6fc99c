package lm

import (
	"fmt"
	"strings"
	"testing"
)

// A typed prefix whose range holds more of the user's most counted words
// than a search list keeps (MaxK): the words the list drops must still be
// bounded, so that a base word just below the kept ones in count, but
// likelier under the base model, is found. The overlay learns, as
// one-word sentences, 40 words of one initial letter (each typed hi
// times) and one word w of the same letter typed hi−1 times, where w is
// among the range's likelier base words; TopK must equal ranking every
// word by LogProb (bruteBlend).
func TestOverlayTopKCrowdedPrefix(t *testing.T) {
	d := ksrSetup(t)
	vocab := d.base.b.Vocab
	for _, letter := range []string{"s", "c", "p", "t"} {
		lo, hi := prefixRange(vocab, letter)
		if hi-lo < 60 {
			continue
		}
		// The range's words by base unigram probability, likeliest first.
		top := d.base.m.TopK(nil, lo, hi, 12, nil)
		for _, x := range top[3:] {
			for _, times := range []int{3, 6} {
				name := fmt.Sprintf("%s/%s/%d", letter, vocab[x.ID], times)
				t.Run(name, func(t *testing.T) {
					ov, err := NewOverlay(d.base.m, bvocab{d.base.b}, OverlayOptions{})
					if err != nil {
						t.Fatal(err)
					}
					n := 0
					for w := lo; w < hi && n < 40; w++ {
						word := vocab[w]
						if w == x.ID || strings.ContainsAny(word, "<>") {
							continue
						}
						for range times {
							ov.Learn(word+".", 0)
						}
						n++
					}
					for range times - 1 {
						ov.Learn(vocab[x.ID]+".", 0)
					}
					v := ov.View()
					for _, ctx := range [][]uint32{{v.bos}, nil} {
						for k := 1; k <= 3; k++ {
							got := v.TopK(ctx, letter, lo, hi, k, nil)
							want := bruteBlend(v, ctx, letter, lo, hi, k)
							if !sameScored(got, want, 1e-12) {
								t.Errorf("TopK(ctx %v, prefix %q, k %d) = %v, want %v", ctx, letter, k, words(v, got), words(v, want))
							}
						}
					}
				})
			}
		}
	}
}
