package correct

// sameDigits drops the candidates that would change the digits of typed
// ("17th" → "11th"): no lexicon tells which number was meant, so a digit
// slip is never undone, while a digit typed for a letter ("s3cond") or a
// letter for a digit ("yth" → "6th") may be. When the first candidate
// goes, so does the decision.
func sameDigits(typed string, cands []Candidate, dec Decision) ([]Candidate, Decision) {
	if !hasDigit(typed) {
		return cands, dec
	}
	out := cands[:0]
	for i, c := range cands {
		if hasDigit(c.Word) && !equalDigits(c.Word, typed) {
			if i == 0 {
				return cands[:0], Decision{}
			}
			continue
		}
		out = append(out, c)
	}
	return out, dec
}

func isDigit(b byte) bool { return '0' <= b && b <= '9' }

func hasDigit(s string) bool {
	for i := 0; i < len(s); i++ {
		if isDigit(s[i]) {
			return true
		}
	}
	return false
}

// equalDigits reports whether a and b hold the same digits in the same
// order.
func equalDigits(a, b string) bool {
	i, j := 0, 0
	for {
		for i < len(a) && !isDigit(a[i]) {
			i++
		}
		for j < len(b) && !isDigit(b[j]) {
			j++
		}
		if i == len(a) || j == len(b) {
			return i == len(a) && j == len(b)
		}
		if a[i] != b[j] {
			return false
		}
		i, j = i+1, j+1
	}
}
