package correct

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"strings"
	"unicode/utf8"
)

// Pair is one training or test item: a misspelling and the words it may
// stand for (any of them is right).
type Pair struct {
	Typed    string
	Intended []string
}

// SplitPairs returns fold k of a folds-way split of pairs for
// cross-validating an error model: the pairs whose index is k modulo folds
// are the test part, the others the training part, both in list order.
// With folds < 2 or k outside [0, folds) every pair is for training.
func SplitPairs(pairs []Pair, k, folds int) (train, test []Pair) {
	for i, p := range pairs {
		if folds >= 2 && i%folds == k {
			test = append(test, p)
		} else {
			train = append(train, p)
		}
	}
	return train, test
}

// ParsePairs reads a misspelling list: UTF-8 lines "TYPED<TAB>WORD[,WORD...]",
// '#' comment lines and blank lines skipped. It returns an error wrapping
// ErrErrorModel on a line without a tab or with invalid UTF-8.
func ParsePairs(r io.Reader) ([]Pair, error) {
	var out []Pair
	sc := bufio.NewScanner(r)
	line := 0
	for sc.Scan() {
		line++
		s := strings.TrimRight(sc.Text(), "\r")
		if s == "" || s[0] == '#' {
			continue
		}
		typed, rest, ok := strings.Cut(s, "\t")
		if !ok || !utf8.ValidString(s) || typed == "" {
			return nil, fmt.Errorf("%w: pairs line %d: want TYPED<TAB>WORDS", ErrErrorModel, line)
		}
		p := Pair{Typed: typed}
		for _, w := range strings.Split(rest, ",") {
			if w = strings.TrimSpace(w); w != "" {
				p.Intended = append(p.Intended, w)
			}
		}
		if len(p.Intended) == 0 {
			return nil, fmt.Errorf("%w: pairs line %d: no correction", ErrErrorModel, line)
		}
		out = append(out, p)
	}
	if err := sc.Err(); err != nil {
		return nil, fmt.Errorf("%w: pairs line %d: %v", ErrErrorModel, line+1, err)
	}
	return out, nil
}

// TrainOptions tunes TrainErrorModel. The zero value means defaults.
type TrainOptions struct {
	// Window is how many aligned positions of context on each side of an
	// edit a rule may take in (Brill and Moore's expansion). Default 2.
	Window int
	// MaxLen bounds each side of a rule in bytes. Default 4.
	MaxLen int
	// MinCount is how many different pairs must show a rule before it is
	// kept; rarer rules are left to the backoff costs. Default 1: every
	// rule is kept, as Brill and Moore (2000) do, and absolute discounting
	// makes a rule seen once cost more than its raw frequency.
	MinCount int
	// Discount is subtracted from each rule count (absolute discounting).
	// Default: estimated from the rule counts as n1/(n1+2·n2), where n1
	// and n2 are the numbers of rules seen in one and in two pairs (the
	// estimate of Ney, Essen and Kneser 1994, from memory).
	Discount float64
}

func (o *TrainOptions) defaults() {
	if o.Window <= 0 {
		o.Window = 2
	}
	if o.MaxLen <= 0 {
		o.MaxLen = 4
	}
	if o.MinCount <= 0 {
		o.MinCount = 1
	}
	if o.Discount < 0 || o.Discount >= 1 || math.IsNaN(o.Discount) {
		o.Discount = 0
	}
}

// discount returns the absolute discount n1/(n1+2·n2) of rule counts, or
// 0.5 when there are too few rules to tell.
func discount(ruleCount map[[2]string]int) float64 {
	var n1, n2 float64
	for _, c := range ruleCount {
		switch c {
		case 1:
			n1++
		case 2:
			n2++
		}
	}
	if n1 == 0 || n2 == 0 {
		return 0.5
	}
	return n1 / (n1 + 2*n2)
}

// segment is one step of an alignment: intended a typed as b.
type segment struct{ a, b string }

func (s segment) match() bool { return s.a == s.b }

// TrainErrorModel learns rules α→β from misspelling pairs as Brill and Moore
// (2000) describe: each pair is aligned by plain Damerau-Levenshtein
// distance, every edit is expanded with up to Window aligned positions of
// context, and P(β|α) is the number of pairs showing α→β (discounted) over
// the number of times α occurs in the intended words. Pairs whose intended
// word holds a space are skipped; of several intended words the closest is
// used. Rules that are no cheaper than a shorter rule they contain are
// dropped. The affix cost is -ln((n+1)/(N+2)) for n pairs of N whose
// typed word is the intended word's stem with another ending (see
// isAffixError), and the irregular cost likewise for pairs whose typed
// word is a verb's base with the regular past ending and whose intended
// word is one of its irregular forms (isIrregularError), and the moved
// cost likewise for pairs whose typed word is the intended one with a
// letter moved two places (isMovedError). Training is
// deterministic. Cost: O(total bytes × Window²).
func TrainErrorModel(pairs []Pair, opts TrainOptions) *ErrorModel {
	opts.defaults()
	ruleCount := map[[2]string]int{}
	var words []string
	var nSubV, nSub, nDel, nDelDbl, nIns, nInsDbl, nTrans, nAffix, nIrregular, nMoved, nMoves, nPairs float64
	for _, p := range pairs {
		typed := strings.ToLower(p.Typed)
		best, bestD := "", math.MaxInt
		for _, w := range p.Intended {
			w = strings.ToLower(w)
			if strings.ContainsAny(w, " ") || w == typed {
				continue
			}
			if d := osaDistance(typed, w); d < bestD {
				best, bestD = w, d
			}
		}
		if best == "" {
			continue
		}
		nPairs++
		if isAffixError(typed, best) {
			nAffix++
		}
		if isIrregularError(typed, best) {
			nIrregular++
		}
		if isMovedError(typed, best) {
			nMoved++
		}
		nMoves += float64(countMoves(best))
		words = append(words, best)
		segs := align(best, typed)
		seen := map[[2]string]bool{}
		for k, s := range segs {
			if s.match() {
				continue
			}
			switch {
			case len(s.a) == 1 && len(s.b) == 1:
				if isVowel(s.a[0]) && isVowel(s.b[0]) {
					nSubV++
				} else {
					nSub++
				}
			case len(s.a) == 1 && s.b == "":
				if k > 0 && segs[k-1].a == s.a || k+1 < len(segs) && segs[k+1].a == s.a {
					nDelDbl++
				} else {
					nDel++
				}
			case s.a == "" && len(s.b) == 1:
				if k > 0 && segs[k-1].b == s.b || k+1 < len(segs) && segs[k+1].b == s.b {
					nInsDbl++
				} else {
					nIns++
				}
			case len(s.a) == 2:
				nTrans++
			}
			for l := max(0, k-opts.Window); l <= k; l++ {
				for r := k; r < len(segs) && r <= k+opts.Window; r++ {
					var a, b strings.Builder
					for _, t := range segs[l : r+1] {
						a.WriteString(t.a)
						b.WriteString(t.b)
					}
					if a.Len() == 0 || a.Len() > opts.MaxLen || b.Len() > opts.MaxLen {
						continue
					}
					key := [2]string{a.String(), b.String()}
					if !utf8.ValidString(key[0]) || !utf8.ValidString(key[1]) {
						continue
					}
					if !seen[key] {
						seen[key] = true
						ruleCount[key]++
					}
				}
			}
		}
	}
	// Occurrences of each α in the intended words.
	alphaOcc := map[string]int{}
	for key, c := range ruleCount {
		if c >= opts.MinCount {
			alphaOcc[key[0]] = 0
		}
	}
	var nChars, nVowels, nDoubles float64
	for _, w := range words {
		nChars += float64(len(w))
		for i := 0; i < len(w); i++ {
			if isVowel(w[i]) {
				nVowels++
			}
			if i > 0 && w[i] == w[i-1] {
				nDoubles++
			}
		}
		for a := range alphaOcc {
			alphaOcc[a] += strings.Count(w, a)
		}
	}
	m := &ErrorModel{}
	lp := func(n, d float64) float64 { return -math.Log((n + 1) / (d + 2)) }
	m.backoff = Backoff{
		SubVowel:  lp(nSubV, nVowels*4),
		Sub:       lp(nSub, nChars*25),
		Del:       lp(nDel, nChars),
		DelDouble: lp(nDelDbl, nDoubles),
		Ins:       lp(nIns, nChars*26),
		InsDouble: lp(nInsDbl, nChars),
		Trans:     lp(nTrans, nChars),
		Affix:     lp(nAffix, nPairs),
		Irregular: lp(nIrregular, nPairs),
		Moved:     lp(nMoved, nMoves),
	}
	if opts.Discount == 0 {
		opts.Discount = discount(ruleCount)
	}
	costOf := map[[2]string]float64{}
	for key, c := range ruleCount {
		occ := alphaOcc[key[0]]
		if c < opts.MinCount || occ == 0 {
			continue
		}
		p := (float64(c) - opts.Discount) / float64(max(occ, c))
		costOf[key] = -math.Log(p)
	}
	for key, cost := range costOf {
		if !m.coveredByShorter(key[0], key[1], cost, costOf) {
			m.rules = append(m.rules, Rule{Intended: key[0], Typed: key[1], Cost: math.Round(cost*1000) / 1000})
		}
	}
	m.sortRules()
	return m
}

// isAffixError reports whether typed is intended's stem with another
// ending: they share a prefix of at least familyMinStem bytes and half the
// typed word, their endings after it are at most familyMaxTail letters
// a–z (an apostrophe or hyphen marks a clitic or compound), and
// the endings are two or more plain edits apart (one edit is the letter
// model's).
func isAffixError(typed, intended string) bool {
	k := 0
	for k < len(typed) && k < len(intended) && typed[k] == intended[k] {
		k++
	}
	if k < familyMinStem || 2*k < len(typed) || len(typed)-k > familyMaxTail || len(intended)-k > familyMaxTail {
		return false
	}
	return lettersOnly(typed[k:]) && lettersOnly(intended[k:]) && tailDistance(typed[k:], intended[k:]) >= 2
}

// coveredByShorter reports whether stripping shared context from a rule
// gives a rule (or a backoff edit) at most as costly.
func (m *ErrorModel) coveredByShorter(a, b string, cost float64, costOf map[[2]string]float64) bool {
	const slack = 0.05
	for {
		switch {
		case len(a) > 0 && len(b) > 0 && a[0] == b[0]:
			a, b = a[1:], b[1:]
		case len(a) > 0 && len(b) > 0 && a[len(a)-1] == b[len(b)-1]:
			a, b = a[:len(a)-1], b[:len(b)-1]
		default:
			return false
		}
		if a == "" {
			return false // a bare insertion is no rule
		}
		if c, ok := costOf[[2]string{a, b}]; ok && c <= cost+slack {
			return true
		}
		if c, ok := m.backoffCost(a, b); ok && c <= cost+slack {
			return true
		}
	}
}

// backoffCost is the class cost of a single-letter edit a→b.
func (m *ErrorModel) backoffCost(a, b string) (float64, bool) {
	switch {
	case len(a) == 1 && len(b) == 1:
		if isVowel(a[0]) && isVowel(b[0]) {
			return m.backoff.SubVowel, true
		}
		return m.backoff.Sub, true
	case len(a) == 1 && b == "":
		return m.backoff.Del, true
	case len(a) == 2 && len(b) == 2 && a[0] == b[1] && a[1] == b[0]:
		return m.backoff.Trans, true
	}
	return 0, false
}

func isVowel(c byte) bool {
	switch c {
	case 'a', 'e', 'i', 'o', 'u', 'y':
		return true
	}
	return false
}

// osaDistance is the plain optimal-string-alignment distance (unit costs,
// adjacent transpositions) between two byte strings.
func osaDistance(a, b string) int {
	d := osaTable(a, b)
	return d[len(a)][len(b)]
}

func osaTable(a, b string) [][]int {
	d := make([][]int, len(a)+1)
	for i := range d {
		d[i] = make([]int, len(b)+1)
	}
	osaFill(d, a, b)
	return d
}

// osaFill fills d (at least len(a)+1 rows of at least len(b)+1 cells) with
// the optimal-string-alignment distances between the prefixes of a and b.
func osaFill(d [][]int, a, b string) {
	for i := 0; i <= len(a); i++ {
		d[i][0] = i
	}
	for j := 0; j <= len(b); j++ {
		d[0][j] = j
	}
	for i := 1; i <= len(a); i++ {
		for j := 1; j <= len(b); j++ {
			c := 1
			if a[i-1] == b[j-1] {
				c = 0
			}
			v := min(d[i-1][j-1]+c, d[i-1][j]+1, d[i][j-1]+1)
			if i > 1 && j > 1 && a[i-1] == b[j-2] && a[i-2] == b[j-1] && a[i-1] != a[i-2] {
				v = min(v, d[i-2][j-2]+1)
			}
			d[i][j] = v
		}
	}
}

// align returns one optimal plain alignment of intended a with typed b,
// preferring matches, then substitutions, transpositions, deletions.
func align(a, b string) []segment {
	d := osaTable(a, b)
	var rev []segment
	i, j := len(a), len(b)
	for i > 0 || j > 0 {
		switch {
		case i > 0 && j > 0 && a[i-1] == b[j-1] && d[i][j] == d[i-1][j-1]:
			rev = append(rev, segment{a[i-1 : i], b[j-1 : j]})
			i, j = i-1, j-1
		case i > 0 && j > 0 && d[i][j] == d[i-1][j-1]+1:
			rev = append(rev, segment{a[i-1 : i], b[j-1 : j]})
			i, j = i-1, j-1
		case i > 1 && j > 1 && a[i-1] == b[j-2] && a[i-2] == b[j-1] && a[i-1] != a[i-2] && d[i][j] == d[i-2][j-2]+1:
			rev = append(rev, segment{a[i-2 : i], b[j-2 : j]})
			i, j = i-2, j-2
		case i > 0 && d[i][j] == d[i-1][j]+1:
			rev = append(rev, segment{a[i-1 : i], ""})
			i--
		default:
			rev = append(rev, segment{"", b[j-1 : j]})
			j--
		}
	}
	for l, r := 0, len(rev)-1; l < r; l, r = l+1, r-1 {
		rev[l], rev[r] = rev[r], rev[l]
	}
	return rev
}
