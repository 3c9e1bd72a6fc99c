package correct

import (
	"cmp"
	"math"
	"slices"
	"sort"
	"strings"
	"unicode/utf8"
)

// inf is the cost of an impossible edit.
const inf = float32(1e9)

// Slip parameters of the keyboard half of the channel (per intended
// letter). They follow the error mix reported for touch typing by Azenkot
// and Zhai (2012): about 8 % of letters wrong, substitutions of nearby keys
// the largest share; the split between kinds is common practice, no source.
const (
	slipSubRate    = 0.04  // a nearby key hit instead
	slipDropRate   = 0.012 // a letter left out
	slipDoubleDrop = 0.03  // the second of a doubled letter left out
	slipInsRate    = 0.012 // an extra key hit next to the intended one
	slipRepeat     = 0.008 // a key hit twice
	slipSwapRate   = 0.005 // two letters swapped
	slipSigma      = 0.5   // spread of touches around a key centre, key widths
)

// leadCost is added to a spelling-error explanation of an edit of the
// first letter (not to a swap of the first two letters, nor to a keyboard
// slip): writers rarely get a word's first letter wrong. On
// corpora/misspellings-dev.tsv edits hit 12.8 % of letters, but only
// 1.33 % of the pairs change the first letter other than by a swap, so a
// first-letter spelling edit is about 9.6 times rarer: ln 9.6 ≈ 2.26 nats.
// That the first letter is usually right is also reported by Pollock and
// Zamora (1983) and Yannakoudakis and Fawthrop (1983) (from memory).
const leadCost = 2.26

// accentCost is the cost of typing a plain letter for its accented form or
// the other way round (common practice, no source).
const accentCost = 1.5

// chRule is a multi-letter rule compiled for the search.
type chRule struct {
	alpha, beta string
	cost        float32
	// The classes (belowBit) of alpha's bytes, of alpha[1] and of
	// alpha[2:] (zero where alpha is shorter), for the search's
	// letters-below tables (below.go), so that it need not compute them
	// for each typed word.
	alphaBits, next1, rest2 uint32
}

// costOpt is one byte and its cost, for lists sorted by cost.
type costOpt struct {
	c    byte
	cost float32
}

// channel holds the compiled edit costs (nats) of the noisy channel: the
// keyboard-slip model and the spelling-error model combined by taking the
// cheaper explanation of each edit. It is immutable after newChannel.
type channel struct {
	sub      [256][256]float32 // sub[typed][intended], inf on the diagonal
	del      [256]float32      // intended byte left out
	delDbl   float32           // intended byte left out after the same byte
	insBase  float32           // an extra typed byte, no context
	insDbl   float32           // an extra typed byte repeating a neighbour
	insNear  [256][256]float32 // insNear[extra][neighbour] for key slips
	trans    float32
	lead     float32           // added to spelling edits of the first letter (leadCost)
	slipSub  [128][128]float32 // keyboard-slip part of sub, ASCII only
	slipDel  float32           // keyboard-slip part of del
	slipRep  float32           // keyboard-slip part of insDbl
	rules    []chRule
	byBeta   map[string][]int32
	byByte   [256][]int32   // byBeta's lists of the one-byte typed sides, by byte
	betaLens []int          // distinct β lengths, ascending
	cheapSub [256][]costOpt // per typed byte: intended bytes by sub cost
	cheapDel []costOpt      // intended bytes by deletion cost
	// delCost[i] is cheapDel[i].cost and delUpTo[i] the set of the bytes
	// of cheapDel[:i+1], so that the search's set of bytes worth trying
	// (allowed) takes the deletions that fit its budget by a scan of the
	// costs and one union (fillDelUpTo).
	delCost   []float32
	delUpTo   [][4]uint64
	minEdit   float32 // cheapest non-match edit cost
	maxAlpha  int
	affix     float32 // a stem typed with another ending (family.go); inf: off
	irregular float32 // a verb's regular past for its irregular form (irregular.go); inf: off
	moved     float32 // a letter typed two places from where it belongs (moved.go); inf: off
}

// alphabet is the set of bytes tried as intended letters where no typed
// byte or rule suggests them: ASCII letters, apostrophe and hyphen.
var alphabet = []byte("abcdefghijklmnopqrstuvwxyz'-")

// newChannel compiles the costs for a keyboard and an error model.
func newChannel(kb *Keyboard, em *ErrorModel) *channel {
	ch := &channel{lead: leadCost}
	bo := em.backoff
	ln := func(p float64) float32 { return float32(-math.Log(p)) }
	// Keyboard slips between ASCII keys.
	type kp struct {
		c    byte
		x, y float64
	}
	var keys []kp
	for _, k := range kb.keys {
		if k.Char < utf8.RuneSelf {
			keys = append(keys, kp{byte(k.Char), k.X, k.Y})
		}
	}
	g := func(a, b kp) float64 {
		d2 := (a.x-b.x)*(a.x-b.x) + (a.y-b.y)*(a.y-b.y)
		return math.Exp(-d2 / (2 * slipSigma * slipSigma))
	}
	for i := range ch.sub {
		for j := range ch.sub[i] {
			ch.sub[i][j] = inf
			ch.insNear[i][j] = inf
		}
	}
	for i := range ch.slipSub {
		for j := range ch.slipSub[i] {
			ch.slipSub[i][j] = inf
		}
	}
	for _, a := range keys {
		z := 0.0
		for _, b := range keys {
			if b.c != a.c {
				z += g(a, b)
			}
		}
		for _, b := range keys {
			if b.c == a.c || z == 0 {
				continue
			}
			p := g(a, b) / z
			ch.sub[b.c][a.c] = ln(slipSubRate * p)
			ch.slipSub[b.c][a.c] = ch.sub[b.c][a.c]
			ch.insNear[b.c][a.c] = ln(slipInsRate * p)
		}
	}
	// Spelling backoff for every byte pair, then learned single-letter rules.
	for t := 0; t < 256; t++ {
		for c := 0; c < 256; c++ {
			if t == c {
				ch.sub[t][c] = inf
				continue
			}
			b := float32(bo.Sub)
			if isVowel(byte(t)) && isVowel(byte(c)) {
				b = float32(bo.SubVowel)
			}
			ch.sub[t][c] = min(ch.sub[t][c], b)
		}
		ch.del[t] = min(ln(slipDropRate), float32(bo.Del))
	}
	ch.slipDel = ln(slipDropRate)
	ch.slipRep = ln(slipRepeat)
	ch.delDbl = min(ln(slipDoubleDrop), float32(bo.DelDouble))
	ch.insBase = float32(bo.Ins)
	ch.insDbl = min(ln(slipRepeat), float32(bo.InsDouble))
	ch.trans = min(ln(slipSwapRate), float32(bo.Trans))
	ch.affix = float32(bo.Affix)
	ch.irregular = float32(bo.Irregular)
	ch.moved = float32(bo.Moved)
	add := func(a, b string, cost float32) {
		switch {
		case len(a) == 1 && len(b) == 1:
			ch.sub[b[0]][a[0]] = min(ch.sub[b[0]][a[0]], cost)
		case len(a) == 1 && b == "":
			ch.del[a[0]] = min(ch.del[a[0]], cost)
		default:
			cr := chRule{alpha: a, beta: b, cost: cost, alphaBits: classBits(a)}
			if len(a) > 1 {
				cr.next1, cr.rest2 = belowBit(a[1]), classBits(a[2:])
			}
			ch.rules = append(ch.rules, cr)
			ch.maxAlpha = max(ch.maxAlpha, len(a))
		}
	}
	ch.rules = make([]chRule, 0, len(em.rules)+2*len(accentPairs))
	for _, r := range em.rules {
		add(r.Intended, r.Typed, float32(r.Cost))
	}
	for _, p := range accentPairs {
		add(p[0], p[1], accentCost)
		add(p[1], p[0], accentCost+1)
	}
	// The rules by cost, rules of equal cost in the order added, so that
	// a search lists the rules of a typed word by cost by listing a set
	// of rule indices (search.gatherRules), reading ch.rules at rising
	// addresses and without an index from rank to rule.
	slices.SortStableFunc(ch.rules, func(a, b chRule) int { return cmp.Compare(a.cost, b.cost) })
	ch.byBeta = groupByBeta(ch.rules)
	for b, l := range ch.byBeta {
		if len(b) == 1 {
			ch.byByte[b[0]] = l
		}
	}
	for b := range ch.byBeta {
		if !slices.Contains(ch.betaLens, len(b)) {
			ch.betaLens = append(ch.betaLens, len(b))
		}
	}
	sort.Ints(ch.betaLens)
	// Cost-sorted lists for choosing which bytes to try in the search.
	ch.minEdit = min(ch.delDbl, ch.insDbl, ch.trans, ch.insBase)
	byCost := func(a, b costOpt) int { return cmp.Compare(a.cost, b.cost) }
	var pool []costOpt // backing array of the cheapSub lists
	for t := 0; t < 256; t++ {
		n := 0
		for c := 0; c < 256; c++ {
			if c != t && (isAlpha(byte(c)) || ch.sub[t][c] < float32(bo.Sub)) {
				n++
			}
		}
		if len(pool) < n {
			pool = make([]costOpt, max(n, 32*(256-t)))
		}
		l := pool[:0:n]
		pool = pool[n:]
		for c := 0; c < 256; c++ {
			if c != t && (isAlpha(byte(c)) || ch.sub[t][c] < float32(bo.Sub)) {
				l = append(l, costOpt{byte(c), ch.sub[t][c]})
			}
		}
		slices.SortStableFunc(l, byCost)
		if n == 0 {
			l = nil
		}
		ch.cheapSub[t] = l
		if len(l) > 0 {
			ch.minEdit = min(ch.minEdit, l[0].cost)
		}
	}
	for c := 0; c < 256; c++ {
		if isAlpha(byte(c)) || ch.del[c] < float32(bo.Del) {
			ch.cheapDel = append(ch.cheapDel, costOpt{byte(c), ch.del[c]})
		}
	}
	slices.SortStableFunc(ch.cheapDel, byCost)
	ch.minEdit = min(ch.minEdit, ch.cheapDel[0].cost)
	ch.fillDelUpTo()
	return ch
}

// fillDelUpTo fills delCost and delUpTo from cheapDel.
func (ch *channel) fillDelUpTo() {
	ch.delCost = make([]float32, len(ch.cheapDel))
	ch.delUpTo = make([][4]uint64, len(ch.cheapDel))
	var m [4]uint64
	for i, o := range ch.cheapDel {
		m[o.c>>6] |= 1 << (o.c & 63)
		ch.delCost[i], ch.delUpTo[i] = o.cost, m
	}
}

// groupByBeta indexes rules by their typed side β: each list holds the
// rule indices in increasing order. The lists share one backing array and
// are capped, so appending to one cannot overwrite another.
func groupByBeta(rules []chRule) map[string][]int32 {
	order := make([]int32, len(rules))
	for i := range order {
		order[i] = int32(i)
	}
	slices.SortStableFunc(order, func(a, b int32) int { return strings.Compare(rules[a].beta, rules[b].beta) })
	distinct := 0
	for i := range order {
		if i == 0 || rules[order[i]].beta != rules[order[i-1]].beta {
			distinct++
		}
	}
	m := make(map[string][]int32, distinct)
	for lo := 0; lo < len(order); {
		hi := lo + 1
		for hi < len(order) && rules[order[hi]].beta == rules[order[lo]].beta {
			hi++
		}
		m[rules[order[lo]].beta] = order[lo:hi:hi]
		lo = hi
	}
	return m
}

func isAlpha(c byte) bool {
	for _, a := range alphabet {
		if a == c {
			return true
		}
	}
	return false
}

// accentPairs maps accented Latin letters to the plain letters typed for
// them on keyboards without dead keys.
var accentPairs = [][2]string{
	{"à", "a"}, {"á", "a"}, {"â", "a"}, {"ä", "a"}, {"ã", "a"}, {"å", "a"},
	{"ç", "c"}, {"è", "e"}, {"é", "e"}, {"ê", "e"}, {"ë", "e"},
	{"ì", "i"}, {"í", "i"}, {"î", "i"}, {"ï", "i"}, {"ñ", "n"},
	{"ò", "o"}, {"ó", "o"}, {"ô", "o"}, {"ö", "o"}, {"õ", "o"},
	{"ù", "u"}, {"ú", "u"}, {"û", "u"}, {"ü", "u"}, {"ý", "y"}, {"ÿ", "y"},
	{"ß", "ss"}, {"æ", "ae"}, {"œ", "oe"}, {"ø", "o"},
}

// unitChannel returns a channel with unit costs and no rules: its
// distances are plain optimal-string-alignment distances (with
// transpositions) or Levenshtein distances (without).
func unitChannel(transpose bool) *channel {
	ch := &channel{byBeta: map[string][]int32{}}
	for t := range ch.sub {
		for c := range ch.sub[t] {
			ch.sub[t][c] = 1
			ch.insNear[t][c] = 1
		}
		ch.sub[t][t] = inf
		ch.del[t] = 1
	}
	ch.delDbl, ch.insBase, ch.insDbl, ch.trans, ch.affix, ch.irregular, ch.moved = 1, 1, 1, inf, inf, inf, inf
	if transpose {
		ch.trans = 1
	}
	for t := 0; t < 256; t++ {
		for _, c := range alphabet {
			if c != byte(t) {
				ch.cheapSub[t] = append(ch.cheapSub[t], costOpt{c, 1})
			}
		}
	}
	for _, c := range alphabet {
		ch.cheapDel = append(ch.cheapDel, costOpt{c, 1})
	}
	ch.fillDelUpTo()
	ch.minEdit = 1
	return ch
}

// insCosts fills ins[j] with the cost of typed byte t[j] being extra.
func (ch *channel) insCosts(t []byte, ins []float32) {
	for j := range t {
		v := ch.insBase
		if j > 0 {
			if t[j] == t[j-1] {
				v = min(v, ch.insDbl)
			}
			v = min(v, ch.insNear[t[j]][t[j-1]])
		}
		if j+1 < len(t) {
			if t[j] == t[j+1] {
				v = min(v, ch.insDbl)
			}
			v = min(v, ch.insNear[t[j]][t[j+1]])
		}
		ins[j] = v
	}
}
