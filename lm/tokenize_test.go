package lm

import (
	"strings"
	"testing"
	"unicode/utf8"
)

func scanAll(text string, opts ScanOptions) (folded, surface [][]string) {
	sc := NewScanner(strings.NewReader(text), opts)
	for sc.Scan() {
		var f, s []string
		for i, t := range sc.Tokens() {
			f = append(f, string(t))
			s = append(s, string(sc.Surfaces()[i]))
		}
		folded = append(folded, f)
		surface = append(surface, s)
	}
	return
}

func TestScanner(t *testing.T) {
	cases := []struct {
		name, in string
		want     string // sentences joined by " | ", tokens by " "
	}{
		{"plain", "Hello world. How are you?", "hello world | how are you"},
		{"apostrophes", "We don't know. It’s Wren's shed!", "we don't know | it's wren's shed"},
		{"hyphens", "A well-known sign-out book - and more", "a well-known sign-out book and more"},
		{"numbers", "It cost 3.50 or 1,000 pounds. Then 7.", "it cost 3.50 or 1,000 pounds | then 7"},
		{"blank-line", "no stop here\n\nnew paragraph", "no stop here | new paragraph"},
		{"line-wrap", "a sentence that\ncontinues here.", "a sentence that continues here"},
		{"ellipsis", "wait… what...", "wait | what"},
		{"nfc", "cafe\u0301 au lait", "café au lait"},
		{"invalid-utf8", "ab\xffcd ef", "ab cd ef"},
		{"long-token", strings.Repeat("x", 100) + " short", "short"},
		{"non-latin", "Привет мир. 你好", "привет мир | 你好"},
		{"empty", "", ""},
		{"only-punct", "... !!! ???", ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			f, _ := scanAll(c.in, ScanOptions{})
			var parts []string
			for _, s := range f {
				parts = append(parts, strings.Join(s, " "))
			}
			if got := strings.Join(parts, " | "); got != c.want {
				t.Errorf("Scan(%q) = %q, want %q", c.in, got, c.want)
			}
		})
	}
}

func TestScannerSurfaces(t *testing.T) {
	_, s := scanAll("Ask NASA and Wren in London.", ScanOptions{})
	if got := strings.Join(s[0], " "); got != "Ask NASA and Wren in London" {
		t.Errorf("surfaces = %q", got)
	}
}

func TestScannerPretokenized(t *testing.T) {
	f, _ := scanAll("The Cat , sat\n\n  <s> x </s>  \ncafe\u0301\n", ScanOptions{Pretokenized: true})
	want := [][]string{{"The", "Cat", ",", "sat"}, {"x"}, {"cafe\u0301"}} // no normalization at all
	if len(f) != len(want) {
		t.Fatalf("got %q, want %q", f, want)
	}
	for i := range want {
		if strings.Join(f[i], " ") != strings.Join(want[i], " ") {
			t.Errorf("sentence %d = %q, want %q", i, f[i], want[i])
		}
	}
}

// TestSurfaceCasing checks that a word's display casing is its most common
// non-initial form.
func TestSurfaceCasing(t *testing.T) {
	text := "I met Wren. Then I saw Wren and NASA staff. The wren sang. Wren left. I think so."
	x := buildText(t, text, 2, ScanOptions{}, 0)
	for w, want := range map[string]string{"wren": "Wren", "nasa": "NASA", "i": "I", "the": "", "think": ""} {
		id, ok := x.b.ID(w)
		if !ok {
			t.Fatalf("%q not in vocabulary", w)
		}
		if got := x.b.Surface[id]; got != want {
			t.Errorf("surface of %q = %q, want %q", w, got, want)
		}
	}
}

func FuzzScanner(f *testing.F) {
	for _, s := range []string{"Hello world. How are you?", "don't-stop 3.5,1", "\xff\xfe", "a\n\nb", "café…"} {
		f.Add(s, false)
		f.Add(s, true)
	}
	f.Fuzz(func(t *testing.T, in string, pre bool) {
		sc := NewScanner(strings.NewReader(in), ScanOptions{Pretokenized: pre})
		for sc.Scan() {
			for _, tok := range sc.Tokens() {
				if len(tok) == 0 {
					t.Fatalf("empty token from %q", in)
				}
				if !pre && !utf8.Valid(tok) {
					t.Fatalf("invalid UTF-8 token %q from %q", tok, in)
				}
			}
		}
	})
}
