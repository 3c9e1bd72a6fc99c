package correct

// soundKey appends to dst a code of how the lower-case word w sounds,
// after the Metaphone rules of Philips (1990) (recalled from memory and
// simplified): letter groups that sound alike get one code (c/k/ck/q → K,
// ph/v → F, sh/-tion/-sion/-cian → X, th → 0, soft c and z → S, soft g → J),
// silent letters are dropped (initial k/g/p/w before n or r, gh before
// a consonant or at the end, b after m at the end, h, w and y not before
// a vowel), a letter repeated is coded once, and vowels are dropped except
// at the start, where any vowel is coded A. Bytes other than a–z are
// skipped. Words that get the same code are taken to sound the same.
func soundKey(dst []byte, w []byte) []byte {
	// Letters only.
	var buf [64]byte
	s := buf[:0]
	for _, c := range w {
		if c >= 'a' && c <= 'z' {
			if len(s) == cap(s) {
				break
			}
			s = append(s, c)
		}
	}
	at := func(i int) byte {
		if i < 0 || i >= len(s) {
			return 0
		}
		return s[i]
	}
	i := 0
	if len(s) >= 2 {
		switch string(s[:2]) {
		case "ae", "gn", "kn", "pn", "wr":
			i = 1
		case "wh":
			dst = append(dst, 'W')
			i = 2
		}
	}
	if i == 0 && at(0) == 'x' {
		dst = append(dst, 'S')
		i = 1
	}
	emit := func(b byte) {
		if len(dst) == 0 || dst[len(dst)-1] != b {
			dst = append(dst, b)
		}
	}
	for ; i < len(s); i++ {
		c, prev, next, next2 := s[i], at(i-1), at(i+1), at(i+2)
		if c == prev && c != 'c' {
			continue
		}
		switch c {
		case 'a', 'e', 'i', 'o', 'u':
			if i == 0 {
				dst = append(dst, 'A')
			}
		case 'b':
			if !(prev == 'm' && i == len(s)-1) {
				emit('B')
			}
		case 'c':
			switch {
			case next == 'i' && next2 == 'a', next == 'h' && prev != 's':
				emit('X')
			case next == 'i' || next == 'e' || next == 'y':
				if prev != 's' {
					emit('S')
				}
			default:
				emit('K')
			}
		case 'd':
			if next == 'g' && (next2 == 'e' || next2 == 'i' || next2 == 'y') {
				emit('J')
			} else {
				emit('T')
			}
		case 'g':
			switch {
			case next == 'h' && !isVowel(next2):
				// silent: night, through
			case next == 'n' && (i+2 == len(s) || string(s[i+1:]) == "ned"):
				// silent: sign, signed
			case (next == 'i' || next == 'e' || next == 'y') && prev != 'g':
				emit('J')
			default:
				emit('K')
			}
		case 'h':
			if isVowel(next) && next != 'y' && !isDigraphHead(prev) {
				emit('H')
			}
		case 'k':
			if prev != 'c' {
				emit('K')
			}
		case 'p':
			if next == 'h' {
				emit('F')
			} else {
				emit('P')
			}
		case 'q':
			emit('K')
		case 's':
			if next == 'h' || next == 'i' && (next2 == 'o' || next2 == 'a') {
				emit('X')
			} else {
				emit('S')
			}
		case 't':
			switch {
			case next == 'i' && (next2 == 'o' || next2 == 'a'):
				emit('X')
			case next == 'h':
				emit('0')
			case next == 'c' && next2 == 'h':
				// silent: watch
			default:
				emit('T')
			}
		case 'v':
			emit('F')
		case 'w', 'y':
			if isVowel(next) && next != 'y' {
				emit(c - 'a' + 'A')
			}
		case 'x':
			emit('K')
			emit('S')
		case 'z':
			emit('S')
		default: // f j l m n r
			emit(c - 'a' + 'A')
		}
	}
	return dst
}

// isDigraphHead reports whether c before h makes one sound with it (ch,
// gh, ph, sh, th), so that the h is not coded again.
func isDigraphHead(c byte) bool {
	switch c {
	case 'c', 'g', 'p', 's', 't':
		return true
	}
	return false
}
