package correct

import (
	"bufio"
	"bytes"
	"embed"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"
)

// Layout names one of the built-in keyboard layouts. The zero value is
// LayoutQWERTY.
type Layout int

// The built-in layouts. Their key positions are data files embedded in the
// package (layouts/*.txt, format in LAYOUT.md).
const (
	// LayoutQWERTY is the US QWERTY layout with the ANSI row stagger.
	LayoutQWERTY Layout = iota
	// LayoutAZERTY is the French AZERTY layout with the ISO row stagger.
	LayoutAZERTY
	// LayoutQWERTZ is the German QWERTZ layout with the ISO row stagger.
	LayoutQWERTZ
)

// String returns the layout's lower-case name ("qwerty", "azerty",
// "qwertz"), or "layout(N)" for a value that names no built-in layout.
func (l Layout) String() string {
	switch l {
	case LayoutQWERTY:
		return "qwerty"
	case LayoutAZERTY:
		return "azerty"
	case LayoutQWERTZ:
		return "qwertz"
	}
	return "layout(" + strconv.Itoa(int(l)) + ")"
}

//go:embed layouts/*.txt
var layoutFiles embed.FS

// Keyboard returns a fresh copy of the built-in keyboard for l, or
// ErrUnknownLayout. Each call parses the embedded file, so callers may
// keep or change the result freely.
func (l Layout) Keyboard() (*Keyboard, error) {
	switch l {
	case LayoutQWERTY, LayoutAZERTY, LayoutQWERTZ:
	default:
		return nil, fmt.Errorf("%w: %d", ErrUnknownLayout, int(l))
	}
	b, err := layoutFiles.ReadFile("layouts/" + l.String() + ".txt")
	if err != nil {
		return nil, fmt.Errorf("%w: %s: %v", ErrUnknownLayout, l, err)
	}
	return ParseLayout(bytes.NewReader(b))
}

// Key is one character's key centre. X grows to the right and Y downwards;
// both are measured in key widths.
type Key struct {
	Char rune
	X, Y float64
}

// Keyboard holds the key centres of one layout. A Keyboard is not changed
// by the corrector and may be shared once built.
type Keyboard struct {
	// Name is the layout's name as given by its "layout" line.
	Name string
	keys []Key
	pos  map[rune]int
}

// Keys returns a copy of the keys in file order.
func (k *Keyboard) Keys() []Key {
	return append([]Key(nil), k.keys...)
}

// Position returns the key centre of r (folded to lower case), and whether
// the keyboard has it.
func (k *Keyboard) Position(r rune) (x, y float64, ok bool) {
	i, ok := k.pos[unicode.ToLower(r)]
	if !ok {
		return 0, 0, false
	}
	return k.keys[i].X, k.keys[i].Y, true
}

// Distance returns the Euclidean distance between the centres of the keys
// of a and b in key widths, and false when either is not on the keyboard.
func (k *Keyboard) Distance(a, b rune) (float64, bool) {
	ax, ay, ok1 := k.Position(a)
	bx, by, ok2 := k.Position(b)
	if !ok1 || !ok2 {
		return 0, false
	}
	return math.Hypot(ax-bx, ay-by), true
}

// maxLayoutLine bounds one line of a layout file.
const maxLayoutLine = 4096

// maxLayoutKeys bounds the number of keys in a layout file.
const maxLayoutKeys = 1024

// ParseLayout reads a layout in the text format described in LAYOUT.md:
// "layout NAME", then "row Y X0 KEY..." lines placing keys one width apart
// from X0, and "key CHARS X Y" lines placing one key anywhere. Characters
// are folded to lower case. It returns an error wrapping ErrLayout on any
// malformed line, on a character placed twice, or when no key is defined.
func ParseLayout(r io.Reader) (*Keyboard, error) {
	kb := &Keyboard{pos: make(map[rune]int)}
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 0, 256), maxLayoutLine)
	line := 0
	add := func(tok string, x, y float64) error {
		if !utf8.ValidString(tok) {
			return fmt.Errorf("%w: line %d: invalid UTF-8", ErrLayout, line)
		}
		for _, c := range tok {
			c = unicode.ToLower(c)
			if _, dup := kb.pos[c]; dup {
				return fmt.Errorf("%w: line %d: %q placed twice", ErrLayout, line, c)
			}
			if len(kb.keys) >= maxLayoutKeys {
				return fmt.Errorf("%w: line %d: more than %d keys", ErrLayout, line, maxLayoutKeys)
			}
			kb.pos[c] = len(kb.keys)
			kb.keys = append(kb.keys, Key{Char: c, X: x, Y: y})
		}
		return nil
	}
	num := func(s string) (float64, error) {
		v, err := strconv.ParseFloat(s, 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) || math.Abs(v) > 1e6 {
			return 0, fmt.Errorf("%w: line %d: bad number %q", ErrLayout, line, s)
		}
		return v, nil
	}
	for sc.Scan() {
		line++
		f := strings.Fields(sc.Text())
		if len(f) == 0 || strings.HasPrefix(f[0], "#") {
			continue
		}
		switch f[0] {
		case "layout":
			if len(f) != 2 {
				return nil, fmt.Errorf("%w: line %d: want \"layout NAME\"", ErrLayout, line)
			}
			kb.Name = f[1]
		case "row":
			if len(f) < 4 {
				return nil, fmt.Errorf("%w: line %d: want \"row Y X0 KEY...\"", ErrLayout, line)
			}
			y, err := num(f[1])
			if err != nil {
				return nil, err
			}
			x0, err := num(f[2])
			if err != nil {
				return nil, err
			}
			for i, tok := range f[3:] {
				if err := add(tok, x0+float64(i), y); err != nil {
					return nil, err
				}
			}
		case "key":
			if len(f) != 4 {
				return nil, fmt.Errorf("%w: line %d: want \"key CHARS X Y\"", ErrLayout, line)
			}
			x, err := num(f[2])
			if err != nil {
				return nil, err
			}
			y, err := num(f[3])
			if err != nil {
				return nil, err
			}
			if err := add(f[1], x, y); err != nil {
				return nil, err
			}
		default:
			return nil, fmt.Errorf("%w: line %d: unknown directive %q", ErrLayout, line, f[0])
		}
	}
	if err := sc.Err(); err != nil {
		return nil, fmt.Errorf("%w: line %d: %v", ErrLayout, line+1, err)
	}
	if len(kb.keys) == 0 {
		return nil, fmt.Errorf("%w: no keys", ErrLayout)
	}
	return kb, nil
}
