package correct

import (
	"errors"
	"math"
	"strings"
	"testing"
)

func TestBuiltinLayouts(t *testing.T) {
	// Key rows from the printed legends of standard US (ANSI), French and
	// German (ISO) keyboards (from memory of common hardware).
	tests := []struct {
		layout   Layout
		name     string
		rowStart []string // first letter of each letter row
		nearA    rune     // a key touching 'a' in the same row
	}{
		{LayoutQWERTY, "qwerty", []string{"q", "a", "z"}, 's'},
		{LayoutAZERTY, "azerty", []string{"a", "q", "w"}, 'z'},
		{LayoutQWERTZ, "qwertz", []string{"q", "a", "y"}, 's'},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := tc.layout.String(); got != tc.name {
				t.Fatalf("String() = %q, want %q", got, tc.name)
			}
			kb, err := tc.layout.Keyboard()
			if err != nil {
				t.Fatalf("Keyboard() error %v", err)
			}
			for c := 'a'; c <= 'z'; c++ {
				if _, _, ok := kb.Position(c); !ok {
					t.Errorf("Position(%q) missing", c)
				}
			}
			// Neighbouring keys of one row are one key width apart (the
			// unit of the format, LAYOUT.md).
			d, ok := kb.Distance('a', tc.nearA)
			if !ok || math.Abs(d-1) > 1e-9 {
				t.Errorf("Distance(a,%q) = %v,%v, want 1", tc.nearA, d, ok)
			}
			_, y0, _ := kb.Position([]rune(tc.rowStart[0])[0])
			_, y1, _ := kb.Position([]rune(tc.rowStart[1])[0])
			_, y2, _ := kb.Position([]rune(tc.rowStart[2])[0])
			if !(y0 < y1 && y1 < y2) {
				t.Errorf("rows %v not top to bottom: %v %v %v", tc.rowStart, y0, y1, y2)
			}
			// Stagger: each lower letter row starts further right (ANSI and
			// ISO mechanical layouts).
			x0, _, _ := kb.Position([]rune(tc.rowStart[0])[0])
			x1, _, _ := kb.Position([]rune(tc.rowStart[1])[0])
			x2, _, _ := kb.Position([]rune(tc.rowStart[2])[0])
			if !(x0 < x1 && x1 < x2) {
				t.Errorf("stagger %v: %v %v %v", tc.rowStart, x0, x1, x2)
			}
		})
	}
	if _, err := Layout(99).Keyboard(); !errors.Is(err, ErrUnknownLayout) {
		t.Errorf("Layout(99).Keyboard() error %v, want ErrUnknownLayout", err)
	}
}

func TestParseLayout(t *testing.T) {
	tests := []struct {
		name, text string
		err        error
		keys       int
	}{
		{"rows", "layout mini\nrow 0 0 ab c\nrow 1 0.5 d\n", nil, 4},
		{"key line", "layout x\nkey Q 2 3\n", nil, 1},
		{"comment", "# hi\nlayout x\n\nrow 0 0 a\n", nil, 1},
		{"empty", "", ErrLayout, 0},
		{"no keys", "layout x\n", ErrLayout, 0},
		{"unknown directive", "layout x\ncol 0 0 a\n", ErrLayout, 0},
		{"bad number", "row y 0 a\n", ErrLayout, 0},
		{"nan", "row NaN 0 a\n", ErrLayout, 0},
		{"duplicate", "row 0 0 a b a\n", ErrLayout, 0},
		{"duplicate case", "row 0 0 a\nkey A 1 1\n", ErrLayout, 0},
		{"short row", "row 0 0\n", ErrLayout, 0},
		{"invalid utf8", "row 0 0 \xff\n", ErrLayout, 0},
		{"long line", "row 0 0 " + strings.Repeat("a", 5000) + "\n", ErrLayout, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			kb, err := ParseLayout(strings.NewReader(tc.text))
			if tc.err != nil {
				if !errors.Is(err, tc.err) {
					t.Fatalf("ParseLayout error %v, want %v", err, tc.err)
				}
				return
			}
			if err != nil {
				t.Fatalf("ParseLayout error %v", err)
			}
			if got := len(kb.Keys()); got != tc.keys {
				t.Errorf("len(Keys()) = %d, want %d", got, tc.keys)
			}
		})
	}
	kb, err := ParseLayout(strings.NewReader("row 0 0 ab c\nrow 1 0.5 d\n"))
	if err != nil {
		t.Fatal(err)
	}
	// Pythagoras on the hand-placed keys: a (0,0), d (0.5,1).
	if d, _ := kb.Distance('a', 'D'); math.Abs(d-math.Sqrt(1.25)) > 1e-12 {
		t.Errorf("Distance(a,D) = %v, want %v", d, math.Sqrt(1.25))
	}
	if _, _, ok := kb.Position('b'); !ok {
		t.Errorf("Position(b): a token of several characters puts each on the key")
	}
}
