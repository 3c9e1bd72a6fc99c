package correct

import (
	"fmt"
	"math"
	"strings"
	"sync"
	"unicode/utf8"
)

// Scorer gives the natural-log probability of word (a lexicon ID) after
// context (previous word IDs, oldest first; possibly empty). A language
// model's LogProb method value fits it. It must be safe for concurrent use.
type Scorer func(context []uint32, word uint32) float64

// Kind says what a Candidate replaces the typed text with.
type Kind uint8

// Candidate kinds.
const (
	// KindWord replaces the typed word with one lexicon word.
	KindWord Kind = iota
	// KindSplit replaces the typed word with two words (a missed space).
	KindSplit
	// KindMerge replaces the previous and the typed word with one word (a
	// space typed inside a word).
	KindMerge
)

// String returns "word", "split" or "merge".
func (k Kind) String() string {
	switch k {
	case KindWord:
		return "word"
	case KindSplit:
		return "split"
	case KindMerge:
		return "merge"
	}
	return fmt.Sprintf("kind(%d)", uint8(k))
}

// Candidate is one proposed correction.
type Candidate struct {
	// Word is the replacement text: the lexicon word(s) in the typed casing
	// pattern, with the typed leading and trailing punctuation kept.
	Word string
	// ID is the lexicon ID of the (first) word.
	ID uint32
	// Next is the ID of the second word of a KindSplit candidate.
	Next uint32
	// Kind says what the candidate replaces.
	Kind Kind
	// Cost is the channel cost -ln P(typed | candidate) in nats.
	Cost float64
	// Score is -Cost + LMWeight × ln P(candidate | context), plus a bonus
	// when an unknown typed word sounds like the candidate (rank.go);
	// higher is better.
	Score float64
}

// Decision says whether the first candidate should replace the typed text
// without asking when the user types a space.
type Decision struct {
	// Apply is true when the first candidate should be applied.
	Apply bool
	// Confidence is the estimated probability that the first candidate is
	// what the user meant, against the other candidates and the typed text
	// itself.
	Confidence float64
}

// Options configures a Corrector. The zero value means defaults.
type Options struct {
	// Layout picks a built-in keyboard; default LayoutQWERTY.
	Layout Layout
	// Keyboard, if not nil, is used instead of Layout (see ParseLayout).
	Keyboard *Keyboard
	// ErrorModel is the spelling-error model; nil means BuiltinErrorModel.
	ErrorModel *ErrorModel
	// MaxCost is the channel cost budget of the search in nats; words
	// dearer to reach are not found. Default 13 (about two ordinary edits).
	MaxCost float64
	// LMWeight scales the language-model log-probability against the
	// channel cost. Default 1.
	LMWeight float64
	// ApplyThreshold is the confidence at or above which an unknown typed
	// word is replaced on space. Default 0.5.
	ApplyThreshold float64
	// KnownOfferConfidence is the confidence below which no alternative to
	// a word the lexicon or Known knows is offered at all, so that correctly
	// spelled words do not come with noise. 0 (the default) offers them all.
	KnownOfferConfidence float64
	// RareLogProb marks the rare words of the lexicon: a word the lexicon
	// knows, and Known does not report, whose log-probability with no
	// context is below RareLogProb is treated as a rare listed spelling
	// that may stand for a more frequent word ("aircrafts", "liquify"):
	// it is searched with the narrow and middle passes (up to 9 nats;
	// other known words get the narrow pass only) and its alternatives
	// are offered whatever their confidence (KnownOfferConfidence does not
	// apply to it). They are still applied on space only under
	// KnownMargin. 0 (the default) marks no word rare.
	RareLogProb float64
	// KnownMargin is how many nats an alternative must out-score a word the
	// lexicon or Known knows before it may be applied. Default 10.
	KnownMargin float64
	// UnknownLogProb is the language-model log-probability given to a typed
	// word the lexicon does not know, as the "leave it" alternative.
	// Default -21.
	UnknownLogProb float64
	// SpaceCost is the channel cost (nats) of a missing or extra space.
	// Default 5.
	SpaceCost float64
	// Known, if not nil, reports words the user has taught (typed text,
	// lower-cased); they are offered corrections but never auto-replaced.
	Known func(word string) bool
	// MaxStates caps the work of one Correct call, which bounds its
	// worst-case time; the best candidates found within the cap are
	// returned. With a lexicon that lists edges ([EdgeLister]) it counts
	// the prefixes examined (one DP row each, or a bound from the parent's
	// row that spares it; about 0.2 µs on average); otherwise
	// the lexicon states entered (about 0.3–0.5 µs). 0 means no cap: the
	// middle and widest passes can together examine about 10⁴ prefixes
	// (a few milliseconds) for a badly misspelled long word.
	MaxStates int
	// Rejected, if not nil, reports corrections the user has undone
	// (typed and candidate word, both lower-cased); they are not offered.
	Rejected func(typed, word string) bool
}

func (o *Options) defaults() error {
	for _, v := range []float64{o.MaxCost, o.LMWeight, o.ApplyThreshold, o.KnownOfferConfidence, o.KnownMargin, o.SpaceCost} {
		if v < 0 || math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("%w: negative or non-finite value %v", ErrOptions, v)
		}
	}
	for _, v := range []float64{o.UnknownLogProb, o.RareLogProb} {
		if v > 0 || math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("%w: positive or non-finite log-probability %v", ErrOptions, v)
		}
	}
	if o.ApplyThreshold > 1 || o.KnownOfferConfidence > 1 {
		return fmt.Errorf("%w: threshold above one", ErrOptions)
	}
	def := func(v *float64, d float64) {
		if *v == 0 {
			*v = d
		}
	}
	def(&o.MaxCost, 13)
	def(&o.LMWeight, 1)
	def(&o.ApplyThreshold, 0.5)
	def(&o.KnownMargin, 10)
	def(&o.UnknownLogProb, -21)
	def(&o.SpaceCost, 5)
	if o.MaxStates < 0 {
		return fmt.Errorf("%w: negative MaxStates", ErrOptions)
	}
	o.MaxCost = min(o.MaxCost, 40)
	return nil
}

// Corrector proposes corrections of typed words. It is immutable after
// New and safe for concurrent use; per-call scratch comes from a pool.
type Corrector struct {
	lex  Lexicon
	lm   Scorer
	opts Options
	ch   *channel
	pool sync.Pool
	// depthFirst selects the previous search (alphabetical depth-first
	// passes of growing budget) for comparison in tests and benchmarks;
	// it changes the widest pass only with fullWide (runPass).
	depthFirst bool
	// below gives the letters below each lexicon state (nil when the
	// lexicon cannot list edges); the search's lower bound uses it.
	below *belowTable
	// capRows makes Options.MaxStates count the prefixes examined (DP
	// rows computed, and children parentBound prunes before their row)
	// rather than the states entered: with the letters-below bound a
	// state entered costs about five rows, most of them for children the
	// bound then prunes, so rows measure the work. (Counting the children
	// parentBound prunes keeps the cap where it was before that check:
	// the same prefixes are examined but for the rare subtrees it prunes
	// and childBound would not have; at the engine's cap of 25,000 all
	// 2,173 development words got the same candidates, 177k-word
	// lexicon, measured, this project.)
	capRows bool
	// noParent turns off the search's parentBound check (parentbound.go),
	// the previous search, for comparison in tests and benchmarks.
	noParent bool
	// midRef, when not zero, replaces midPassRefLogProb: passRefLogProb
	// gives the previous trigger of the widest pass, for comparison in
	// benchmarks.
	midRef float64
	// fullWide selects the previous widest pass (the whole lexicon within
	// the budget, best-first) instead of the skeleton-restricted one, for
	// comparison in tests and benchmarks.
	fullWide bool
	// oneWalk walks the widest pass in one walk with the keys as a filter
	// (the previous way) instead of the keys' walk and then the weighted
	// one along its words (keywalk.go), for comparison in tests and
	// benchmarks.
	oneWalk bool
	// midWhole selects the previous passes after the narrow one: the
	// middle pass over the whole lexicon, then the widest pass, instead
	// of the keys' pass (keysPass), for comparison in tests and
	// benchmarks.
	midWhole bool
}

// firstPass is the cost budget of the first, narrow search pass: about one
// ordinary edit. On the 8-letter misspellings of BenchmarkCorrect8 80 %
// of the words end after it; the rest get the keys' pass (keysPass),
// whose keys' walk is the dearest part of the slowest words (about
// 0.5-0.75 ms of their 1.0-1.4 ms CPU, narrow pass 0.07-0.18 ms, the
// weighted rows along the keys' words 0.25-0.45 ms; measured, this
// project; BENCHMARKS.md, round 16).
const firstPass = 6

// secondPass is the budget of the middle pass: of the whole lexicon for a
// rare listed word (rarePass), and otherwise the share of the keys' pass
// (keysPass) that is ranked first.
const secondPass = 9

// rarePass is the widest pass a rare listed word gets (Options.RareLogProb):
// the middle one. On corpora/misspellings-dev.tsv (engine 5-fold
// cross-validation) the narrow pass alone gave rare typed words +13 words
// of top-3, the middle pass +17 and the full budget +17 too; the middle
// pass makes a rare word typed right cost about five times the narrow
// pass (median about 1.4 ms against 0.3 ms on this project's loaded
// 2-core machine), the full budget about thirty times (measured, this
// project; BENCHMARKS.md). firstPass here keeps rare words as cheap as
// before.
const rarePass = secondPass

// passRefLogProb is the score (in LMWeight-scaled nats) the best
// candidate of a pass must reach to end the search: a word of
// probability e^-16 typed exactly. It trades speed for accuracy: on
// corpora/misspellings-dev.tsv, -13 ran the full pass on most 8-letter
// words; -16 skips it for over half of them and moved the package's
// top-1 by +0.1 and top-3 by -0.1 point (measured, this project).
const passRefLogProb = -16

// midPassRefLogProb is passRefLogProb for the middle pass: the score its
// best candidate must reach for the widest pass, the dearest (it sets
// the p99 latency), to be skipped. It is one parameter judged by
// cross-validation only, the one value tried (-17 to -20, or any
// candidate) that left it unchanged: on corpora/misspellings-dev.tsv (package 5-fold
// CV, each fold's error model trained on the other four) -17 sends
// 14.5 % of the words to the widest pass instead of 24.8 % with CV top-1
// and top-3 unchanged (93.28 % and 97.01 %, the same counts); -18 and
// -19 lost 2 words of top-3, -20 lost 3, and ending after any
// middle-pass candidate (0.9 % going wide) lost 8. The engine's CV
// (root TestCorrectDevCrossValidated) went from 92.87 / 97.05 % to
// 92.87 / 97.01 % (one word of top-3). Measured, this project;
// BENCHMARKS.md, round 7. Since round 16 it is the score the keys'
// pass's words within secondPass must reach for its dearer words not to
// be ranked (keysPass); the walk itself is no longer skipped.
const midPassRefLogProb = -17

// passRef returns the score (LMWeight-scaled) the best candidate of pass
// i (0 for the narrow one) must reach to end the search.
func (c *Corrector) passRef(i int) float64 {
	if i == 1 {
		if c.midRef != 0 {
			return c.opts.LMWeight * c.midRef
		}
		return c.opts.LMWeight * midPassRefLogProb
	}
	return c.opts.LMWeight * passRefLogProb
}

// New builds a Corrector over a lexicon and a language-model scorer. With
// a lexicon that lists edges ([EdgeLister]) it walks the lexicon twice to
// copy its automaton into the arrays the search walks, with the table
// behind the search's lower bound (below.go): for the 74k-word SUBTLEX-US
// lexicon 34,656 states, a 1.24 MB table built with 2.9 MB of allocations
// in about 15 ms on this project's machine.
func New(lex Lexicon, lm Scorer, opts Options) (*Corrector, error) {
	if lex == nil {
		return nil, ErrNoLexicon
	}
	if lm == nil {
		return nil, ErrNoScorer
	}
	if err := opts.defaults(); err != nil {
		return nil, err
	}
	kb := opts.Keyboard
	if kb == nil {
		var err error
		if kb, err = opts.Layout.Keyboard(); err != nil {
			return nil, err
		}
	}
	em := opts.ErrorModel
	if em == nil {
		var err error
		if em, err = BuiltinErrorModel(); err != nil {
			return nil, err
		}
	}
	c := &Corrector{lex: lex, lm: lm, opts: opts, ch: newChannel(kb, em)}
	if el, ok := lex.(EdgeLister); ok {
		c.below = newBelowTable(lex, el)
		c.capRows = true
	}
	c.pool.New = func() any { return &scratch{} }
	return c, nil
}

// scratch is the per-call memory of Correct.
type scratch struct {
	s     search
	rk    ranker
	top   []Candidate
	buf   []byte
	lower []byte
	ctx   []uint32
}

// Correct proposes up to max corrections of one typed word (surrounding
// punctuation and casing are kept in the candidates' Word) given the IDs
// of the words before it, best first, appended to dst[:0]. The typed word
// itself is never among them. The Decision says whether to apply the
// first one. A candidate never changes the digits typed (a digit slip is
// not undone: no lexicon says which number was meant). A word the lexicon
// or the user knows gets alternatives only at KnownOfferConfidence or
// above, from the narrow first pass, unless the lexicon word is rare
// (Options.RareLogProb). Empty, overlong
// (over 48 bytes), invalid UTF-8 or non-Latin input gets no candidates. Cost: one bounded lexicon walk (see
// Options.MaxCost) plus one Scorer call per word found within budget.
func (c *Corrector) Correct(typed string, context []uint32, max int, dst []Candidate) ([]Candidate, Decision) {
	dst = dst[:0]
	if max <= 0 || !utf8.ValidString(typed) {
		return dst, Decision{}
	}
	tk := splitToken(typed)
	if tk.core == "" || len(tk.core) > maxTyped || !latinOnly(tk.core) {
		return dst, Decision{}
	}
	sc := c.pool.Get().(*scratch)
	defer c.pool.Put(sc)
	lower := strings.ToLower(tk.core)
	if len(lower) > maxTyped {
		return dst, Decision{}
	}
	o := &c.opts
	typedID, inLex := c.lex.ID(lower)
	known := inLex || (o.Known != nil && o.Known(lower))
	keep := o.LMWeight * o.UnknownLogProb
	if inLex {
		keep = o.LMWeight * c.lm(context, typedID)
	}
	keepN := max
	if keepN < 8 {
		keepN = 8
	}
	// Words within the cost budget, searched in widening passes: most
	// misspellings are one cheap edit away, and a wider pass runs only when
	// the narrower one found nothing convincing. After the narrow pass an
	// unknown word gets the keys' pass (keysPass), which ranks the words
	// within 9 nats first and the dearer ones only when those found
	// nothing convincing. (A full-budget pass over the whole lexicon cut
	// short by the engine's cap did worse than a complete middle pass:
	// dropping the middle pass then cost 0.6 point of top-1 and 0.7 of
	// top-3.)
	s := &sc.s
	rk := &sc.rk
	rk.start(c, context, typedID, inLex, keepN, sc.top)
	widest, rare := c.widestPass(lower, typedID, inLex, known)
	c.searchUpTo(s, rk, lower, widest, !c.depthFirst)
	c.addFamily(rk, lower) // stems typed with another ending (family.go)
	rk.addSound(lower)     // the sound feature (rank.go)
	sc.top = rk.top
	s.rk, rk.c, rk.context = nil, nil, nil
	// Missing spaces: two words typed as one.
	for k := 1; k < len(lower); k++ {
		a, ok1 := c.lex.ID(lower[:k])
		if !ok1 {
			continue
		}
		b, ok2 := c.lex.ID(lower[k:])
		if !ok2 {
			continue
		}
		sc.ctx = append(append(sc.ctx[:0], context...), a)
		score := -o.SpaceCost + o.LMWeight*(c.lm(context, a)+c.lm(sc.ctx, b))
		sc.top = insertTop(sc.top, Candidate{ID: a, Next: b, Kind: KindSplit, Cost: o.SpaceCost, Score: score}, keepN)
	}
	// Turn IDs into text, drop rejected pairs, compute the posterior.
	z := math.Exp(0) // the keep alternative, scores taken relative to keep
	for _, cand := range sc.top {
		z += math.Exp(cand.Score - keep)
	}
	for _, cand := range sc.top {
		if len(dst) >= max {
			break
		}
		sc.buf = c.lex.AppendWord(sc.buf[:0], cand.ID)
		if cand.Kind == KindSplit {
			sc.buf = append(sc.buf, ' ')
			sc.buf = c.lex.AppendWord(sc.buf, cand.Next)
		}
		if o.Rejected != nil && o.Rejected(lower, string(sc.buf)) {
			continue
		}
		sc.lower = append(sc.lower[:0], tk.lead...)
		sc.lower = appendCased(sc.lower, sc.buf, tk.pattern)
		sc.lower = append(sc.lower, tk.trail...)
		cand.Word = string(sc.lower)
		dst = append(dst, cand)
	}
	if len(dst) == 0 {
		return dst, Decision{}
	}
	conf := math.Exp(dst[0].Score-keep) / z
	if known && !rare && conf < o.KnownOfferConfidence {
		return dst[:0], Decision{} // a known word is left alone, not even offered
	}
	apply := conf >= o.ApplyThreshold
	if known && (!inLex || dst[0].Score-keep < o.KnownMargin) {
		apply = false // a user's own word is never replaced on space
	}
	return sameDigits(typed, dst, Decision{Apply: apply, Confidence: conf})
}

// rare reports whether lower, a word the lexicon knows as id, is a rare
// listed spelling (Options.RareLogProb): less probable than the cut with
// no context, and not a word the user taught.
func (c *Corrector) rare(lower string, id uint32) bool {
	o := &c.opts
	return o.RareLogProb < 0 && c.lm(nil, id) < o.RareLogProb && (o.Known == nil || !o.Known(lower))
}

// hasWord reports whether top holds word id as a KindWord candidate.
func hasWord(top []Candidate, id uint32) bool {
	for _, c := range top {
		if c.Kind == KindWord && c.ID == id {
			return true
		}
	}
	return false
}

// ranksBefore reports whether a ranks before b: a higher score, or an
// equal score and a smaller (kind, ID, next ID), so that the order does
// not depend on the order in which the search finds the words.
func ranksBefore(a, b Candidate) bool {
	if a.Score != b.Score {
		return a.Score > b.Score
	}
	if a.Kind != b.Kind {
		return a.Kind < b.Kind
	}
	if a.ID != b.ID {
		return a.ID < b.ID
	}
	return a.Next < b.Next
}

// insertTop inserts c into top (best first by ranksBefore), keeping at
// most n entries.
func insertTop(top []Candidate, c Candidate, n int) []Candidate {
	if len(top) == n && !ranksBefore(c, top[n-1]) {
		return top
	}
	i := len(top)
	for i > 0 && ranksBefore(c, top[i-1]) {
		i--
	}
	if len(top) < n {
		top = append(top, Candidate{})
	}
	copy(top[i+1:], top[i:len(top)-1])
	top[i] = c
	return top
}

// searchUpTo finds the candidates of lower in passes of growing budget up
// to widest (at most Options.MaxCost), the cap shared by the passes; it
// returns the work the cap counted (see capRows) and the number of states
// entered. After the narrow pass, a word searched beyond the middle
// budget gets the keys' pass (keysPass), the last; other passes are
// walked by runPass.
func (c *Corrector) searchUpTo(s *search, rk *ranker, lower string, widest float64, bestFirst bool) (used, states int) {
	o := &c.opts
	last := 0.0
	for i, budget := range [...]float64{firstPass, secondPass, o.MaxCost} {
		budget = min(budget, widest, o.MaxCost)
		if budget <= last {
			break
		}
		last = budget
		if o.MaxStates > 0 && used >= o.MaxStates {
			break
		}
		keys := i == 1 && c.keysAfterNarrow(widest)
		if keys {
			budget = min(widest, o.MaxCost)
		}
		s.below = c.below
		s.capRows = c.capRows
		s.noParent = c.noParent
		s.reset(c.ch, c.lex, lower, float32(budget), min(len(lower)+maxExtra, 2*maxTyped))
		if o.MaxStates > 0 {
			s.limit = o.MaxStates - used
		}
		s.rk = rk
		if keys {
			c.keysPass(s, rk, lower)
		} else {
			c.runPass(s, lower, i, budget, bestFirst)
		}
		used += s.spent()
		states += s.visited
		if keys || budget >= min(widest, o.MaxCost) || len(rk.top) > 0 && rk.top[0].Score >= c.passRef(i) {
			break
		}
	}
	return used, states
}

// keysAfterNarrow reports whether a word searched up to widest gets the
// keys' pass (keysPass) after the narrow one, rather than the middle
// pass over the whole lexicon and then the widest pass (a rare listed
// word, whose widest pass is the middle one; a budget not above
// secondPass; or midWhole or fullWide set).
func (c *Corrector) keysAfterNarrow(widest float64) bool {
	return !c.midWhole && !c.fullWide && min(widest, c.opts.MaxCost) > secondPass
}

// keysPass is the pass after the narrow one for a word that may be
// searched up to the full budget: the middle and widest passes in one
// walk, over the words skelFilter keeps (walkKeys) within s's budget
// (the widest), whose hits are ranked in two steps as the two passes
// would: first those within secondPass, and then, unless the best
// candidate so far reaches passRef(1), the rest. The keys are built and
// walked once, not the whole lexicon at secondPass and then the keys at
// the full budget; the middle pass's words outside the keys are lost.
// On corpora/misspellings-dev.tsv, package cross-validation (each fold's
// error model trained on the others) lost 1 word of top-3 of 2,173
// and 2 of top-1 with 5 folds (2,112 to 2,111, 2,029 to 2,027) and 2 and
// 2 with 10 folds; the engine's (keyloom eval --folds) 1 and 1 with 5
// folds and 0 and 1 with 10. On the 8-letter misspellings of
// BenchmarkCorrect8 (SUBTLEX-US trie, engine cap) CPU p99 fell by about
// 30 %, from 1.7-1.9 to 1.1-1.4 ms, the median unchanged (measured, this
// project; BENCHMARKS.md, round 16). Before it, the slowest 5 % of those
// words (16 of 305) had all reached the widest pass, which added a top-3
// word for 9 or 10 of them, while 3 of their top-3 candidates (for 2
// words) came from the middle pass and were outside the keys.
func (c *Corrector) keysPass(s *search, rk *ranker, lower string) {
	s.rk = nil // the hits are ranked below, in two steps
	c.walkKeys(s, lower)
	s.rk = rk
	for _, h := range s.hits {
		if h.cost <= secondPass {
			rk.add(h.id, h.cost)
		}
	}
	if len(rk.top) > 0 && rk.top[0].Score >= c.passRef(1) {
		return
	}
	for _, h := range s.hits {
		if h.cost > secondPass {
			rk.add(h.id, h.cost)
		}
	}
}

// runPass walks pass i (0 for the narrow one) of searchUpTo with s, reset
// for lower and the pass's budget: the narrow pass, the middle pass over
// the whole lexicon of a rare listed word, and, with midWhole (the
// previous passes; otherwise keysPass stands for both), the middle pass
// over the whole lexicon and the widest pass. The passes walk
// depth-first. The third, widest pass follows only the words skelFilter
// keeps (skeleton.go; walkKeys): on
// the 8-letter misspellings of BenchmarkCorrect8 it examined at most
// 5,694 prefixes (median 1,976) instead of the whole lexicon's 17,997
// (10,675); on corpora/misspellings-dev.tsv (package 5-fold
// cross-validation) it gave the same top-3 count as the whole lexicon and
// one word more of top-1, and the engine's tests as many repaired typist
// slips (measured, this project; BENCHMARKS.md). With fullWide the
// widest pass is the previous one: the whole lexicon, walked best-first
// when bestFirst is set (see runBest: under the state cap it leaves out
// the least promising prefixes rather than the alphabetically last ones;
// a depth-first state costs about a quarter less, BenchmarkWidePass),
// else depth-first. A second pass whose budget is Options.MaxCost
// (MaxCost at most secondPass) is walked like that too.
func (c *Corrector) runPass(s *search, lower string, i int, budget float64, bestFirst bool) {
	switch {
	case i == 2 && !c.fullWide:
		c.walkKeys(s, lower)
	case bestFirst && budget >= c.opts.MaxCost:
		s.runBest()
	default:
		s.run()
	}
}

// walkKeys walks s, reset for lower and a budget, over the words
// skelFilter keeps (skeleton.go): found first by the keys' own walk
// (keywalk.go), then the weighted rows along their words only; with
// oneWalk, or without the letters-below table, or when the keys' walk
// gives up, the keys filter the weighted walk instead, with the same
// result.
func (c *Corrector) walkKeys(s *search, lower string) {
	s.skf.reset(lower, s.maxDepth)
	if s.below != nil && !c.oneWalk && s.kwt.build(&s.skf, s.below, s.maxDepth) {
		if len(s.kwt.nodes) == 0 {
			return // no word the keys keep
		}
		s.kt = &s.kwt
		s.ktAt = grow(s.ktAt, s.maxDepth+1)
		s.ktAt[0] = 0
		s.run()
		s.kt = nil
		return
	}
	s.skf.reset(lower, s.maxDepth)
	s.skel = &s.skf
	s.run()
	s.skel = nil
}

// widestPass returns the budget of the widest pass Correct searches a
// typed word with (lower; id is its lexicon ID when inLex, known says
// whether the lexicon or the user knows it), and whether it is a rare
// listed word (Options.RareLogProb): the middle pass (rarePass) for a
// rare one, the narrow pass alone for another known word, the full
// budget for the rest.
func (c *Corrector) widestPass(lower string, id uint32, inLex, known bool) (widest float64, rare bool) {
	switch {
	case inLex && c.rare(lower, id):
		return rarePass, true
	case known:
		return firstPass, false
	}
	return c.opts.MaxCost, false
}
