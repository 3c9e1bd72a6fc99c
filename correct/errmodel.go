package correct

//go:generate go run ./internal/errtrain -in ../corpora/misspellings-dev.tsv -out errmodel.tsv

import (
	"bufio"
	"bytes"
	_ "embed"
	"fmt"
	"io"
	"math"
	"slices"
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
// by class, and of three whole-word errors (Affix, Irregular, Moved). They are
// estimated from the same training pairs as the rules.
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
	// Irregular is the cost of giving a verb with an irregular past the
	// regular ending ("teached" for taught, "payed" for paid), per word
	// (see addIrregular in irregular.go).
	Irregular float64
	// Moved is the cost of typing one letter two places from where it
	// belongs, across two others ("tath" for that), per word (see
	// addMoved in moved.go).
	Moved float64
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
var builtinErrorModel string

// BuiltinErrorModel parses the error model shipped with the package
// (errmodel.tsv, trained on the development half of the Wikipedia list of
// common misspellings by internal/errtrain). Each call returns a new value.
// Its rule sides are slices of the embedded table, so parsing it
// allocates little beyond the rule list.
func BuiltinErrorModel() (*ErrorModel, error) {
	m := &ErrorModel{rules: make([]Rule, 0, strings.Count(builtinErrorModel, "\n"))}
	p := tableParser{m: m}
	rest := builtinErrorModel
	for rest != "" {
		var s string
		s, rest, _ = strings.Cut(rest, "\n")
		if err := p.line(strings.TrimSuffix(s, "\r")); err != nil {
			return nil, err
		}
	}
	return p.finish()
}

// emptySide stands for an empty rule side in the table format.
const emptySide = "∅"

// maxRuleLen bounds the byte length of either side of a rule.
const maxRuleLen = 8

// maxRules bounds the number of rules in one table.
const maxRules = 1 << 16

// backoffNames lists the backoff lines of the table format, in order.
var backoffNames = [...]string{"sub-vowel", "sub", "del", "del-double", "ins", "ins-double", "trans", "affix", "irregular", "moved"}

func (b *Backoff) field(i int) *float64 {
	return [...]*float64{&b.SubVowel, &b.Sub, &b.Del, &b.DelDouble, &b.Ins, &b.InsDouble, &b.Trans, &b.Affix, &b.Irregular, &b.Moved}[i]
}

// DefaultAffixCost is Backoff.Affix for a table without an "@affix" line
// (tables written before it existed): the value trained on the development
// misspellings list, rounded.
const DefaultAffixCost = 3.2

// affixBit is the "@affix" line's bit in ParseErrorModel's seen set.
const affixBit = 1 << 7

// DefaultIrregularCost is Backoff.Irregular for a table without an
// "@irregular" line (tables written before it existed): the value in the
// built-in table (errmodel.tsv, trained on the development misspellings
// list), which a Corrector built without Options.ErrorModel uses.
const DefaultIrregularCost = 5.734

// irregularBit is the "@irregular" line's bit in ParseErrorModel's seen
// set.
const irregularBit = 1 << 8

// DefaultMovedCost is Backoff.Moved for a table without a "@moved" line
// (tables written before it existed): the value in the built-in table
// (errmodel.tsv, trained on the development misspellings list).
const DefaultMovedCost = 7.515

// movedBit is the "@moved" line's bit in ParseErrorModel's seen set.
const movedBit = 1 << 9

// ParseErrorModel reads an error-model table: UTF-8 text, '#' comments,
// "@NAME<TAB>COST" lines for the ten backoff costs (sub-vowel, sub, del,
// del-double, ins, ins-double, trans, all required, then affix, irregular
// and moved, which default to DefaultAffixCost, DefaultIrregularCost and
// DefaultMovedCost) and
// "INTENDED<TAB>TYPED<TAB>COST" rule lines, where an empty side is written "∅".
// It returns an error wrapping ErrErrorModel on malformed input.
func ParseErrorModel(r io.Reader) (*ErrorModel, error) {
	p := tableParser{m: &ErrorModel{}}
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 0, 256), 4096)
	for sc.Scan() {
		if err := p.line(string(sc.Bytes())); err != nil {
			return nil, err
		}
	}
	if err := sc.Err(); err != nil {
		return nil, fmt.Errorf("%w: line %d: %v", ErrErrorModel, p.n+1, err)
	}
	return p.finish()
}

// tableParser reads the lines of an error-model table one at a time.
type tableParser struct {
	m    *ErrorModel
	seen int // bit i: backoff line i read
	n    int // lines read
}

// line reads one line s of the table, without its line end. Rule sides are
// kept as slices of s.
func (p *tableParser) line(s string) error {
	p.n++
	line := p.n
	if s == "" || s[0] == '#' {
		return nil
	}
	if !utf8.ValidString(s) {
		return fmt.Errorf("%w: line %d: invalid UTF-8", ErrErrorModel, line)
	}
	// Split on tabs without allocating: at most three fields are used, and
	// nf counts them all.
	nf := strings.Count(s, "\t") + 1
	f0, after, _ := strings.Cut(s, "\t")
	f1, _, _ := strings.Cut(after, "\t")
	last := s[strings.LastIndexByte(s, '\t')+1:]
	cost, err := strconv.ParseFloat(last, 64)
	if err != nil || math.IsNaN(cost) || math.IsInf(cost, 0) || cost < 0 || cost > 100 {
		return fmt.Errorf("%w: line %d: bad cost", ErrErrorModel, line)
	}
	if strings.HasPrefix(f0, "@") {
		if nf != 2 {
			return fmt.Errorf("%w: line %d: want @NAME<TAB>COST", ErrErrorModel, line)
		}
		i := indexOf(backoffNames[:], f0[1:])
		if i < 0 {
			return fmt.Errorf("%w: line %d: unknown backoff %q", ErrErrorModel, line, f0)
		}
		*p.m.backoff.field(i) = cost
		p.seen |= 1 << i
		return nil
	}
	if nf != 3 {
		return fmt.Errorf("%w: line %d: want INTENDED<TAB>TYPED<TAB>COST", ErrErrorModel, line)
	}
	a, b := unDash(f0), unDash(f1)
	if a == "" || a == b || len(a) > maxRuleLen || len(b) > maxRuleLen {
		return fmt.Errorf("%w: line %d: bad rule %q→%q", ErrErrorModel, line, a, b)
	}
	if len(p.m.rules) >= maxRules {
		return fmt.Errorf("%w: more than %d rules", ErrErrorModel, maxRules)
	}
	p.m.rules = append(p.m.rules, Rule{Intended: a, Typed: b, Cost: cost})
	return nil
}

// finish checks the backoff lines, fills in defaults and sorts the rules.
func (p *tableParser) finish() (*ErrorModel, error) {
	if p.seen&affixBit == 0 {
		p.m.backoff.Affix = DefaultAffixCost // tables written before the affix line
		p.seen |= affixBit
	}
	if p.seen&irregularBit == 0 {
		p.m.backoff.Irregular = DefaultIrregularCost // tables written before the irregular line
		p.seen |= irregularBit
	}
	if p.seen&movedBit == 0 {
		p.m.backoff.Moved = DefaultMovedCost // tables written before the moved line
		p.seen |= movedBit
	}
	if p.seen != 1<<len(backoffNames)-1 {
		return nil, fmt.Errorf("%w: missing backoff lines", ErrErrorModel)
	}
	p.m.sortRules()
	return p.m, nil
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
	// A table already in strictly increasing order (as written by WriteTo)
	// is left as it is: sorting could not change it.
	if slices.IsSortedFunc(m.rules, func(a, b Rule) int {
		if c := strings.Compare(a.Intended, b.Intended); c != 0 {
			return c
		}
		return strings.Compare(a.Typed, b.Typed)
	}) && !hasEqualNeighbours(m.rules) {
		return
	}
	sort.Slice(m.rules, func(i, j int) bool {
		a, b := m.rules[i], m.rules[j]
		if a.Intended != b.Intended {
			return a.Intended < b.Intended
		}
		return a.Typed < b.Typed
	})
}

// hasEqualNeighbours reports whether two adjacent rules have the same sides.
func hasEqualNeighbours(rules []Rule) bool {
	for i := 1; i < len(rules); i++ {
		if rules[i].Intended == rules[i-1].Intended && rules[i].Typed == rules[i-1].Typed {
			return true
		}
	}
	return false
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
