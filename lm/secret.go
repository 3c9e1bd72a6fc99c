package lm

import (
	"unicode"
	"unicode/utf8"
)

// Secret filtering keeps text that looks private out of the user overlay. It
// runs on the raw text, before tokenization, because the tokenizer splits a
// card number typed as "4111 1111 1111 1111" into four harmless-looking
// tokens and keeps "hunter2x" as an ordinary word.
//
// The text is cut into white-space separated chunks, each trimmed of
// surrounding punctuation. A chunk is secret when it
//
//   - is an e-mail address: an '@' with a letter or digit on each side and a
//     '.' somewhere after it;
//   - holds a run of SecretDigitRun or more consecutive digits (phone, account
//     and one-time codes);
//   - mixes letters and digits in a way ordinary words do not (see
//     mixedAllowed): "hunter2x", "Pa55word", "abc123" are secret; ordinals and
//     quantities ("2nd", "21st", "10am", "5km", "100mg"), short model names
//     ("mp3", "a4", "ps5", "win10") and three-character forms ("h2o", "b2b",
//     "4x4") are not.
//
// A run of consecutive number chunks (digits with inner '-' only, such as
// "4111", "1111-1111") is also secret as a whole when its digits, read
// together, pass the Luhn check with 13 to 19 digits (a payment card number,
// ISO/IEC 7812) or number SecretGroupedDigits or more (a grouped phone or
// account number).
const (
	// SecretDigitRun is the shortest run of consecutive digits treated as secret.
	SecretDigitRun = 6
	// SecretGroupedDigits is the smallest total of digits in a run of number
	// chunks ("020 7946 0958") treated as secret. Project choice, no source.
	SecretGroupedDigits = 9
)

// secretKind says why a span of text was held back.
type secretKind uint8

const (
	notSecret secretKind = iota
	secretEmail
	secretDigits
	secretMixed
	secretCard
	secretGrouped
)

// LooksSecret reports whether a single word (as typed, without spaces) would
// be withheld from learning: an e-mail address, a run of SecretDigitRun or
// more digits, a password-like mix of letters and digits, or a card number
// written with dashes. The overlay applies it to raw text before tokenizing;
// callers may use it to avoid showing or storing such words elsewhere.
func LooksSecret(word string) bool {
	a, b := trimPunct(word, 0, len(word))
	if a >= b {
		return false
	}
	if chunkKind(word[a:b]) != notSecret {
		return true
	}
	if nd, ok := numberChunk(word[a:b]); ok {
		return groupedKind(word[a:b], nd) != notSecret
	}
	return false
}

// secretSpans appends to dst the byte ranges [start, end) of text that must
// not be learned, in increasing order and not overlapping.
func secretSpans(text string, dst [][2]int) [][2]int {
	// Pending run of number chunks.
	runStart, runEnd, runDigits, runChunks := -1, -1, 0, 0
	flush := func() {
		if runChunks > 0 {
			if k := groupedKind(text[runStart:runEnd], runDigits); k != notSecret {
				dst = append(dst, [2]int{runStart, runEnd})
			}
		}
		runStart, runDigits, runChunks = -1, 0, 0
	}
	i := 0
	for i < len(text) {
		r, w := utf8.DecodeRuneInString(text[i:])
		if unicode.IsSpace(r) {
			i += w
			continue
		}
		j := i
		for j < len(text) {
			r, w := utf8.DecodeRuneInString(text[j:])
			if unicode.IsSpace(r) {
				break
			}
			j += w
		}
		a, b := trimPunct(text, i, j)
		if a < b {
			chunk := text[a:b]
			if k := chunkKind(chunk); k != notSecret {
				flush()
				dst = append(dst, [2]int{a, b})
			} else if nd, ok := numberChunk(chunk); ok {
				if runStart < 0 {
					runStart = a
				}
				runEnd, runDigits = b, runDigits+nd
				runChunks++
				if b < j { // punctuation after the number ends the run
					flush()
				}
			} else {
				flush()
			}
		} else {
			flush()
		}
		i = j
	}
	flush()
	return mergeSpans(dst)
}

// mergeSpans sorts nothing (spans arrive in order) but joins overlapping or
// touching spans.
func mergeSpans(s [][2]int) [][2]int {
	out := s[:0]
	for _, x := range s {
		if n := len(out); n > 0 && x[0] <= out[n-1][1] {
			out[n-1][1] = max(out[n-1][1], x[1])
			continue
		}
		out = append(out, x)
	}
	return out
}

// trimPunct returns the bounds of text[i:j] without leading and trailing
// runes that are neither letters nor digits.
func trimPunct(text string, i, j int) (int, int) {
	for i < j {
		r, w := utf8.DecodeRuneInString(text[i:j])
		if isAlnum(r) {
			break
		}
		i += w
	}
	for j > i {
		r, w := utf8.DecodeLastRuneInString(text[i:j])
		if isAlnum(r) {
			break
		}
		j -= w
	}
	return i, j
}

func isAlnum(r rune) bool {
	if r < utf8.RuneSelf {
		return 'a' <= r && r <= 'z' || 'A' <= r && r <= 'Z' || '0' <= r && r <= '9'
	}
	return unicode.IsLetter(r) || unicode.IsDigit(r)
}

// chunkKind classifies one trimmed chunk on its own.
func chunkKind(c string) secretKind {
	if at := indexByte(c, '@'); at > 0 && at < len(c)-1 {
		before, _ := utf8.DecodeLastRuneInString(c[:at])
		after, _ := utf8.DecodeRuneInString(c[at+1:])
		if isAlnum(before) && isAlnum(after) && indexByte(c[at+1:], '.') >= 0 {
			return secretEmail
		}
	}
	run, letters, digits := 0, false, false
	for _, r := range c {
		switch {
		case isDigit(r):
			digits = true
			run++
			if run >= SecretDigitRun {
				return secretDigits
			}
			continue
		case unicode.IsLetter(r):
			letters = true
		}
		run = 0
	}
	if letters && digits && !partsPure(c) && !mixedAllowed(c) {
		return secretMixed
	}
	return notSecret
}

// mixedAllowed reports whether a chunk mixing letters and digits is an
// ordinary word form rather than a password-like string. Separators
// ('-', '\”, '.', ',', '_' and the like) are ignored once some part mixes
// letters and digits, so "pa55-word" is judged as "pa55word" (a chunk whose
// parts are each all letters or all digits, like "covid-19", is never mixed). Allowed shapes (project choice, no source):
// digits then at most three letters ("2nd", "10am", "100mg"); at most three
// letters then at most two digits ("mp3", "ps5", "win10"); anything of at
// most three letters and digits ("h2o", "4x4").
func mixedAllowed(c string) bool {
	var runs [3]struct {
		digit bool
		n     int
	}
	nr, total := 0, 0
	for _, r := range c {
		var d bool
		switch {
		case isDigit(r):
			d = true
		case unicode.IsLetter(r):
			d = false
		default:
			continue
		}
		total++
		if nr > 0 && runs[nr-1].digit == d {
			runs[nr-1].n++
			continue
		}
		if nr == len(runs) {
			return false
		}
		runs[nr].digit, runs[nr].n = d, 1
		nr++
	}
	if total <= 3 {
		return true
	}
	if nr != 2 {
		return false
	}
	if runs[0].digit {
		return runs[1].n <= 3
	}
	return runs[0].n <= 3 && runs[1].n <= 2
}

// partsPure reports whether every part of c between separators (runes that
// are neither letters nor digits) is all letters or all digits, as in
// "covid-19" or "10.30".
func partsPure(c string) bool {
	letters, digits := false, false
	for _, r := range c {
		switch {
		case isDigit(r):
			digits = true
		case unicode.IsLetter(r):
			letters = true
		default:
			letters, digits = false, false
			continue
		}
		if letters && digits {
			return false
		}
	}
	return true
}

func indexByte(s string, b byte) int {
	for i := 0; i < len(s); i++ {
		if s[i] == b {
			return i
		}
	}
	return -1
}

// numberChunk reports whether c holds only digits and inner dashes, and how
// many digits.
func numberChunk(c string) (int, bool) {
	n := 0
	for i := 0; i < len(c); i++ {
		switch b := c[i]; {
		case '0' <= b && b <= '9':
			n++
		case b == '-' && i > 0 && i < len(c)-1:
		default:
			return 0, false
		}
	}
	return n, n > 0
}

// groupedKind classifies a run of number chunks (digits with spaces or
// dashes between groups) holding nd digits in total.
func groupedKind(s string, nd int) secretKind {
	if nd >= 13 && nd <= 19 {
		var buf [19]byte
		d := buf[:0]
		for i := 0; i < len(s); i++ {
			if '0' <= s[i] && s[i] <= '9' {
				d = append(d, s[i])
			}
		}
		if luhnValid(d) {
			return secretCard
		}
	}
	if nd >= SecretGroupedDigits {
		return secretGrouped
	}
	return notSecret
}

// luhnValid reports whether the ASCII digits pass the Luhn check (ISO/IEC
// 7812-1 annex B): doubling every second digit from the right, subtracting 9
// from doubles above 9, the sum must be a multiple of 10.
func luhnValid(digits []byte) bool {
	if len(digits) < 2 {
		return false
	}
	sum := 0
	double := false
	for i := len(digits) - 1; i >= 0; i-- {
		d := int(digits[i] - '0')
		if d < 0 || d > 9 {
			return false
		}
		if double {
			d *= 2
			if d > 9 {
				d -= 9
			}
		}
		sum += d
		double = !double
	}
	return sum%10 == 0
}
