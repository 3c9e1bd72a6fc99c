package keyloom

import (
	"math"
	"slices"
	"strings"
	"unicode"
	"unicode/utf8"

	"github.com/keyloom/keyloom/lm"
	"golang.org/x/text/unicode/norm"
)

// Suggestion is one word offered to the user.
type Suggestion struct {
	Word string  `json:"word"` // in its display casing
	Prob float64 `json:"prob"` // probability in context
}

// Result is the answer to one keystroke.
type Result struct {
	// Prefix is the partial word before the cursor ("" right after a space).
	Prefix string `json:"prefix"`
	// Completions are words that complete Prefix, most probable first
	// (empty when Prefix is "").
	Completions []Suggestion `json:"completions"`
	// Predictions are the most probable next words when the cursor follows a
	// space (empty while a word is being typed).
	Predictions []Suggestion `json:"predictions"`
	// Correction is set when the word being typed cannot be the start of
	// any known word and the corrector has a likely replacement.
	Correction *Correction `json:"correction,omitempty"`
}

// Correction proposes replacing the word before the cursor.
type Correction struct {
	Typed       string  `json:"typed"`       // the word as typed, punctuation included
	Replacement string  `json:"replacement"` // the proposed text, typed casing and punctuation kept
	Confidence  float64 `json:"confidence"`  // 0..1, calibrated on misspellings
	// Apply says the replacement is safe to make when the user types a space
	// or punctuation. When false it should only be offered.
	Apply bool `json:"apply"`
	// Alternatives are further candidates, best first.
	Alternatives []string `json:"alternatives,omitempty"`
}

// maxContextBytes bounds how much of the text before the cursor is read.
const maxContextBytes = 256

// cursor is the parsed text before the cursor.
type cursor struct {
	words  []string // folded context words of the current sentence, oldest first
	prefix string   // partial word being typed (as typed)
	start  bool     // the next word starts a sentence (no words before it)
}

func isWordRune(r rune) bool {
	return unicode.IsLetter(r) || unicode.IsDigit(r) || unicode.IsMark(r)
}

// parseCursor reads the text before the cursor backwards: the partial word
// at the end, then at most maxWords words of the current sentence. It reads
// no further back than maxContextBytes.
func parseCursor(before string, maxWords int) cursor { return parseCursorInto(before, maxWords, nil) }

// parseCursorInto is parseCursor with the words appended to words[:0]: give
// it room for maxWords and it does not allocate for them.
func parseCursorInto(before string, maxWords int, words []string) cursor {
	if len(before) > maxContextBytes {
		cut := len(before) - maxContextBytes
		for cut < len(before) && !utf8.RuneStart(before[cut]) {
			cut++
		}
		before = before[cut:]
	}
	c := cursor{words: words[:0]}
	i := len(before)
	// word returns the start of the word ending at end (end excluded).
	word := func(end int) int {
		j := end
		for j > 0 {
			r, w := utf8.DecodeLastRuneInString(before[:j])
			if isWordRune(r) {
				j -= w
				continue
			}
			// inner joiners: ' ’ - between word runes, . , between digits
			if j < end && j-w > 0 {
				p, _ := utf8.DecodeLastRuneInString(before[:j-w])
				n, _ := utf8.DecodeRuneInString(before[j:])
				if ((r == '\'' || r == '’' || r == '-') && isWordRune(p) && isWordRune(n)) ||
					((r == '.' || r == ',') && unicode.IsDigit(p) && unicode.IsDigit(n)) {
					j -= w
					continue
				}
			}
			break
		}
		return j
	}
	if j := word(i); j < i {
		c.prefix = before[j:i]
		i = j
	}
	for len(c.words) < maxWords {
		// skip separators; a sentence end stops the walk
		for i > 0 {
			r, w := utf8.DecodeLastRuneInString(before[:i])
			if isWordRune(r) {
				break
			}
			if r == '.' || r == '!' || r == '?' || r == '…' || r == '\n' {
				c.start = len(c.words) == 0
				goto done
			}
			i -= w
		}
		if i == 0 {
			c.start = len(c.words) == 0
			break
		}
		j := word(i)
		if i-j <= lm.DefaultMaxTokenBytes {
			c.words = append(c.words, lm.Fold(norm.NFC.String(before[j:i])))
		}
		i = j
	}
done:
	slices.Reverse(c.words) // collected newest first
	return c
}

// Suggest answers one keystroke: given the text before the cursor it returns
// completions of the word being typed or, after a space, predictions of the
// next word. Cost: a few microseconds; it allocates only the result.
func (e *Engine) Suggest(beforeCursor string) (Result, error) {
	if e.closed.Load() {
		return Result{}, ErrClosed
	}
	var wb [lm.MaxOrder]string
	c := parseCursorInto(beforeCursor, e.model.LM.Order()-1, wb[:0])
	q := e.query()
	var ib [lm.MaxOrder + 1]uint32
	ctx := q.contextIDs(c.words, ib[:0])
	res := Result{Prefix: c.prefix}
	var buf [lm.MaxK]lm.Scored
	k := e.opts.Suggestions
	if c.prefix == "" {
		res.Predictions = q.display(q.topK(ctx, "", k, buf[:0]), "", c.start)
		return res, nil
	}
	folded := lm.Fold(c.prefix)
	res.Completions = q.display(q.topK(ctx, folded, k, buf[:0]), c.prefix, c.start)
	if len(res.Completions) == 0 {
		res.Correction = e.correctPrefix(q, beforeCursor, c.prefix)
	}
	return res, nil
}

// display turns scored IDs into suggestions in display casing: the word's
// usual surface form, raised to the casing of what was typed.
func (q query) display(top []lm.Scored, typed string, sentenceStart bool) []Suggestion {
	out := make([]Suggestion, 0, len(top))
	for _, s := range top {
		w := q.surface(s.ID)
		w = matchCase(w, typed, sentenceStart)
		out = append(out, Suggestion{Word: w, Prob: math.Exp(s.LogP)})
	}
	return out
}

// matchCase applies the casing pattern of typed (ALL CAPS or Capitalised) to
// w, and capitalises w at the start of a sentence.
func matchCase(w, typed string, sentenceStart bool) string {
	upper, letters := 0, 0
	for _, r := range typed {
		if unicode.IsLetter(r) {
			letters++
			if unicode.IsUpper(r) {
				upper++
			}
		}
	}
	switch {
	case letters >= 2 && upper == letters:
		return strings.ToUpper(w)
	case upper > 0 || (sentenceStart && typed == ""):
		r, n := utf8.DecodeRuneInString(w)
		if unicode.IsLower(r) {
			return string(unicode.ToUpper(r)) + w[n:]
		}
	}
	return w
}
