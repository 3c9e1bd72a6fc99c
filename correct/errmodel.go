package correct

//go:generate go run ./internal/errtrain -in ../corpora/misspellings-dev.tsv -out errmodel.tsv

import (
	"bufio"
	"bytes"
	_ "embed"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"
	"unicode/utf8"
)

// Rule is one multi-letter edit of the spelling-error model, in the manner
// of Brill and Moore (2000): the writer meant Intended and typed Typed in
// its place. Cost is -ln P(Typed | Intended) in nats.
type Rule struct {
	Intended, Typed string
	Cost            float64
}

// Backoff holds the costs (nats) of single-letter edits that no rule covers,
// by class, and of one whole-word error (Affix). They are estimated from
// the same training pairs as the rules.
type Backoff struct {
	// SubVowel is the cost of one vowel typed for another.
	SubVowel float64
	// Sub is the cost of any other single-letter substitution.
	Sub float64
	// Del is the cost of leaving out one letter.
	Del float64
	// DelDouble is the cost of leaving out the second of a doubled letter.
	DelDouble float64
	// Ins is the cost of typing one extra letter.
	Ins float64
	// InsDouble is the cost of doubling a letter that is single.
	InsDouble float64
	// Trans is the cost of swapping two adjacent letters.
	Trans float64
	// Affix is the cost of typing a word's stem with another ending, two
	// or more plain edits from the intended one ("oftenly" for often), per
	// word; the corrector adds a cost per edit between the two endings
	// (see addFamily in family.go).
	Affix float64
}

// ErrorModel is the spelling-error half of the channel: rules α→β with
// learned costs plus class backoff costs for single-letter edits. An
// ErrorModel is immutable once built and may be shared.
type ErrorModel struct {
	backoff Backoff
	rules   []Rule // sorted by Intended, then Typed
}

// Backoff returns the model's backoff costs.
func (m *ErrorModel) Backoff() Backoff { return m.backoff }

// Rules returns a copy of the model's rules sorted by Intended, then Typed.
func (m *ErrorModel) Rules() []Rule { return append([]Rule(nil), m.rules...) }

//go:embed errmodel.tsv
var builtinErrorModel []byte

// BuiltinErrorModel parses the error model shipped with the package
// (errmodel.tsv, trained on the development half of the Wikipedia list of
// common misspellings by internal/errtrain). Each call returns a new value.
func BuiltinErrorModel() (*ErrorModel, error) {
	return ParseErrorModel(bytes.NewReader(builtinErrorModel))
}

// emptySide stands for an empty rule side in the table format.
const emptySide = "∅"

// maxRuleLen bounds the byte length of either side of a rule.
const maxRuleLen = 8

// maxRules bounds the number of rules in one table.
const maxRules = 1 << 16

// backoffNames lists the backoff lines of the table format, in order.
var backoffNames = [...]string{"sub-vowel", "sub", "del", "del-double", "ins", "ins-double", "trans", "affix"}

func (b *Backoff) field(i int) *float64 {
	return [...]*float64{&b.SubVowel, &b.Sub, &b.Del, &b.DelDouble, &b.Ins, &b.InsDouble, &b.Trans, &b.Affix}[i]
}

// DefaultAffixCost is Backoff.Affix for a table without an "@affix" line
// (tables written before it existed): the value trained on the development
// misspellings list, rounded.
const DefaultAffixCost = 3.2

// affixBit is the "@affix" line's bit in ParseErrorModel's seen set.
const affixBit = 1 << 7

// ParseErrorModel reads an error-model table: UTF-8 text, '#' comments,
// "@NAME<TAB>COST" lines for the eight backoff costs (sub-vowel, sub, del,
// del-double, ins, ins-double, trans, all required, and affix, which
// defaults to DefaultAffixCost) and
// "INTENDED<TAB>TYPED<TAB>COST" rule lines, where an empty side is written "∅".
// It returns an error wrapping ErrErrorModel on malformed input.
func ParseErrorModel(r io.Reader) (*ErrorModel, error) {
	m := &ErrorModel{}
	seen := 0
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 0, 256), 4096)
	line := 0
	for sc.Scan() {
		line++
		s := sc.Text()
		if s == "" || s[0] == '#' {
			continue
		}
		if !utf8.ValidString(s) {
			return nil, fmt.Errorf("%w: line %d: invalid UTF-8", ErrErrorModel, line)
		}
		f := strings.Split(s, "\t")
		cost, err := strconv.ParseFloat(f[len(f)-1], 64)
		if err != nil || math.IsNaN(cost) || math.IsInf(cost, 0) || cost < 0 || cost > 100 {
			return nil, fmt.Errorf("%w: line %d: bad cost", ErrErrorModel, line)
		}
		if strings.HasPrefix(f[0], "@") {
			if len(f) != 2 {
				return nil, fmt.Errorf("%w: line %d: want @NAME<TAB>COST", ErrErrorModel, line)
			}
			i := indexOf(backoffNames[:], f[0][1:])
			if i < 0 {
				return nil, fmt.Errorf("%w: line %d: unknown backoff %q", ErrErrorModel, line, f[0])
			}
			*m.backoff.field(i) = cost
			seen |= 1 << i
			continue
		}
		if len(f) != 3 {
			return nil, fmt.Errorf("%w: line %d: want INTENDED<TAB>TYPED<TAB>COST", ErrErrorModel, line)
		}
		a, b := unDash(f[0]), unDash(f[1])
		if a == "" || a == b || len(a) > maxRuleLen || len(b) > maxRuleLen {
			return nil, fmt.Errorf("%w: line %d: bad rule %q→%q", ErrErrorModel, line, a, b)
		}
		if len(m.rules) >= maxRules {
			return nil, fmt.Errorf("%w: more than %d rules", ErrErrorModel, maxRules)
		}
		m.rules = append(m.rules, Rule{Intended: a, Typed: b, Cost: cost})
	}
	if err := sc.Err(); err != nil {
		return nil, fmt.Errorf("%w: line %d: %v", ErrErrorModel, line+1, err)
	}
	if seen&affixBit == 0 {
		m.backoff.Affix = DefaultAffixCost // tables written before the affix line
		seen |= affixBit
	}
	if seen != 1<<len(backoffNames)-1 {
		return nil, fmt.Errorf("%w: missing backoff lines", ErrErrorModel)
	}
	m.sortRules()
	return m, nil
}

// WriteTo writes the model in the format ParseErrorModel reads. The output
// is deterministic.
func (m *ErrorModel) WriteTo(w io.Writer) (int64, error) {
	var b bytes.Buffer
	b.WriteString("# keyloom spelling-error model: INTENDED<TAB>TYPED<TAB>COST (nats, -ln P(typed|intended)); ∅ is empty\n")
	for i, name := range backoffNames {
		fmt.Fprintf(&b, "@%s\t%.3f\n", name, *m.backoff.field(i))
	}
	for _, r := range m.rules {
		fmt.Fprintf(&b, "%s\t%s\t%.3f\n", dash(r.Intended), dash(r.Typed), r.Cost)
	}
	n, err := w.Write(b.Bytes())
	return int64(n), err
}

func (m *ErrorModel) sortRules() {
	sort.Slice(m.rules, func(i, j int) bool {
		a, b := m.rules[i], m.rules[j]
		if a.Intended != b.Intended {
			return a.Intended < b.Intended
		}
		return a.Typed < b.Typed
	})
}

func indexOf(list []string, s string) int {
	for i, v := range list {
		if v == s {
			return i
		}
	}
	return -1
}

func dash(s string) string {
	if s == "" {
		return emptySide
	}
	return s
}

func unDash(s string) string {
	if s == emptySide {
		return ""
	}
	return s
}
