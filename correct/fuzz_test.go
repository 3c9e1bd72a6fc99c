package correct

import (
	"testing"
	"unicode/utf8"
)

// FuzzCorrect feeds arbitrary text to Correct and Merge: no panic, no more
// candidates than asked, valid UTF-8 out for valid UTF-8 in.
func FuzzCorrect(f *testing.F) {
	for _, s := range []string{"Teh,", "aboutthe", "", "\xff", "καλη", "a'b-c", "AAAAAAAA", "recieve!"} {
		f.Add(s, "ab")
	}
	freq := []string{"the", "they", "about", "out", "ab", "receive", "hello", "café", "don't"}
	lex := newFlatLex(freq)
	c, err := New(lex, func(_ []uint32, id uint32) float64 { return -float64(id + 1) }, Options{})
	if err != nil {
		f.Fatal(err)
	}
	f.Fuzz(func(t *testing.T, typed, prev string) {
		got, dec := c.Correct(typed, []uint32{1, 2}, 3, nil)
		if len(got) > 3 {
			t.Fatalf("Correct(%q) gave %d candidates", typed, len(got))
		}
		if dec.Confidence < 0 || dec.Confidence > 1 {
			t.Fatalf("Correct(%q) confidence %v", typed, dec.Confidence)
		}
		for _, g := range got {
			if utf8.ValidString(typed) && !utf8.ValidString(g.Word) {
				t.Fatalf("Correct(%q) = %q, invalid UTF-8", typed, g.Word)
			}
		}
		c.Merge(prev, typed, nil)
	})
}
