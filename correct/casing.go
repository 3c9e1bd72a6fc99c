package correct

import (
	"strings"
	"unicode"
	"unicode/utf8"
)

// casePattern is how the letters of a typed word were cased.
type casePattern uint8

const (
	caseLower casePattern = iota // as the lexicon stores it
	caseTitle                    // first letter upper case
	caseUpper                    // every letter upper case (two letters or more)
)

// token is a typed word taken apart: leading punctuation, the word,
// trailing punctuation, and its casing.
type token struct {
	lead, core, trail string
	pattern           casePattern
}

// strayLead lists the characters that prose never puts before a word but
// that sit on keys next to letters: one of them typed alone before a word
// is taken as a slip for a letter and left in the word for the search
// (";erson" is "person" with the neighbouring key hit). A bracket counts
// only when the token holds no other bracket.
const strayLead = ",;./\\=[]"

// splitToken separates surrounding punctuation from the word and records
// the casing. Apostrophes and hyphens inside the word stay in it, and so
// does a single stray leading character (see strayLead).
func splitToken(s string) token {
	isWord := func(r rune) bool { return unicode.IsLetter(r) || unicode.IsDigit(r) || unicode.IsMark(r) }
	start := strings.IndexFunc(s, isWord)
	if start < 0 {
		return token{lead: s}
	}
	end := strings.LastIndexFunc(s, isWord)
	_, size := utf8.DecodeRuneInString(s[end:])
	end += size
	if start == 1 && strings.IndexByte(strayLead, s[0]) >= 0 && !strings.ContainsAny(s[1:], "[]") {
		start = 0 // a key next to a letter hit instead of it
	}
	tk := token{lead: s[:start], core: s[start:end], trail: s[end:]}
	letters, upper := 0, 0
	first := true
	for _, r := range tk.core {
		if !unicode.IsLetter(r) {
			continue
		}
		letters++
		if unicode.IsUpper(r) {
			upper++
			if first {
				tk.pattern = caseTitle
			}
		}
		first = false
	}
	if letters >= 2 && upper == letters {
		tk.pattern = caseUpper
	}
	return tk
}

// appendCased appends word (lower case) to dst in the given pattern.
func appendCased(dst []byte, word []byte, p casePattern) []byte {
	switch p {
	case caseUpper:
		return append(dst, strings.ToUpper(string(word))...)
	case caseTitle:
		r, size := utf8.DecodeRune(word)
		if r == utf8.RuneError {
			return append(dst, word...)
		}
		dst = utf8.AppendRune(dst, unicode.ToTitle(r))
		return append(dst, word[size:]...)
	}
	return append(dst, word...)
}

// latinOnly reports whether every letter of s is Latin script, so that the
// keyboard and spelling models apply.
func latinOnly(s string) bool {
	for _, r := range s {
		if unicode.IsLetter(r) && !unicode.Is(unicode.Latin, r) {
			return false
		}
	}
	return true
}
