package keyloom

import (
	"math"
	"strings"
	"unicode"
	"unicode/utf8"

	"github.com/keyloom/keyloom/lm"
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
}

// maxContextBytes bounds how much of the text before the cursor is read.
const maxContextBytes = 256

// cursor is the parsed text before the cursor.
type cursor struct {
	words  []string // folded context words of the current sentence, oldest first
	prefix string   // partial word being typed (as typed)
	start  bool     // the next word starts a sentence
}

func parseCursor(before string) cursor {
	if len(before) > maxContextBytes {
		cut := len(before) - maxContextBytes
		for cut < len(before) && !utf8.RuneStart(before[cut]) {
			cut++
		}
		before = before[cut:]
	}
	var c cursor
	// The partial word: trailing word characters.
	end := len(before)
	i := end
	for i > 0 {
		r, w := utf8.DecodeLastRuneInString(before[:i])
		if !(unicode.IsLetter(r) || unicode.IsDigit(r) || unicode.IsMark(r) || ((r == '\'' || r == '’' || r == '-') && i < end)) {
			break
		}
		i -= w
	}
	c.prefix = strings.TrimLeft(before[i:end], "'’-")
	rest := before[:end-len(c.prefix)]
	// The current sentence: text after the last sentence end.
	if j := strings.LastIndexAny(rest, ".!?…\n"); j >= 0 {
		_, w := utf8.DecodeRuneInString(rest[j:])
		rest = rest[j+w:]
	}
	sc := lm.NewScanner(strings.NewReader(rest), lm.ScanOptions{})
	for sc.Scan() {
		for _, t := range sc.Tokens() {
			c.words = append(c.words, string(t))
		}
	}
	c.start = len(c.words) == 0
	return c
}

// Suggest answers one keystroke: given the text before the cursor it returns
// completions of the word being typed or, after a space, predictions of the
// next word. Cost: a few microseconds; it allocates only the result.
func (e *Engine) Suggest(beforeCursor string) (Result, error) {
	if e.closed.Load() {
		return Result{}, ErrClosed
	}
	c := parseCursor(beforeCursor)
	ctx := e.contextIDs(c.words, make([]uint32, 0, lm.MaxOrder+1))
	res := Result{Prefix: c.prefix}
	var buf [lm.MaxK]lm.Scored
	k := e.opts.Suggestions
	if c.prefix == "" {
		res.Predictions = e.display(e.topK(ctx, "", k, buf[:0]), "", c.start)
		return res, nil
	}
	res.Completions = e.display(e.topK(ctx, lm.Fold(c.prefix), k, buf[:0]), c.prefix, c.start)
	return res, nil
}

// display turns scored IDs into suggestions in display casing: the word's
// usual surface form, raised to the casing of what was typed.
func (e *Engine) display(top []lm.Scored, typed string, sentenceStart bool) []Suggestion {
	out := make([]Suggestion, 0, len(top))
	for _, s := range top {
		w := e.model.Lex.Surface(s.ID)
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
