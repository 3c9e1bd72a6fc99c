package correct

// Word families: a writer who knows a word's stem but not its ending types
// the stem with another ending ("examinated" for examined, "oftenly" for
// often). Such errors are usually several letter edits from the intended
// word, beyond the search budget, so addFamily offers the lexicon words
// that share a long prefix with an unknown typed word, at the affix cost
// learned from the training pairs (Backoff.Affix) plus familyTailCost per
// plain edit between the two endings.

// familyMinStem is the shortest shared prefix (bytes) that makes a family.
const familyMinStem = 4

// familyMaxTail bounds the ending (bytes after the stem) of the typed word
// and of a family member.
const familyMaxTail = 6

// familyBackoff is how many bytes shorter than the longest prefix of the
// typed word that the lexicon continues a stem may be.
const familyBackoff = 2

// familyMaxStates caps the lexicon states one addFamily call visits.
const familyMaxStates = 256

// familyTailCost (nats) is added to Backoff.Affix per plain edit between
// the typed and the intended ending, so that of a stem's family the
// endings closest to the typed one come first. It is a generic knob set
// by 5-fold cross-validation on corpora/misspellings-dev.tsv (error model
// trained on four folds, scored on the fifth): at 1 nat families crowd
// out ordinary corrections (top-1 87 %); from 2.5 to 4.5 top-3 was
// 96.9–97.0 % and top-1 rose with the cost; 3 is the value with the best
// top-3 (measured, this project; see BENCHMARKS.md).
const familyTailCost = 3

// famFrame is one state of the family walk: its bytes after the stem are
// tail[:depth].
type famFrame struct {
	state int
	acc   uint64
	depth int
	tail  [familyMaxTail]byte
}

// addFamily offers to rk the lexicon words that share a stem of at least
// familyMinStem bytes and half its length with lower (a typed word the
// lexicon does not know) and whose endings after the stem, like the typed
// one, are at most familyMaxTail letters a–z and two or more plain edits
// apart. Stems are the longest prefix of
// lower that the lexicon continues and up to familyBackoff bytes shorter;
// their subtrees are walked breadth first, over the corrector's copy of the
// lexicon automaton when it has one (belowTable: a step decodes nothing;
// the walk then took a third of the time, measured, this project), and a
// member's text is the stem and the bytes walked after it. It returns the
// number of lexicon states visited, at most familyMaxStates.
//
// First, for any typed word, known or not, it offers the irregular forms
// of a verb lower over-regularises (addIrregular in irregular.go): they
// are family members no shared stem finds ("teached" for taught). Then,
// for a typed word the lexicon does not know, the words one moved letter
// away (addMoved in moved.go). Each feature is off when its channel cost
// is inf (a unit-cost channel).
func (c *Corrector) addFamily(rk *ranker, lower string) int {
	if c.ch.irregular < inf {
		c.addIrregular(rk, lower, c.ch.irregular)
	}
	if !rk.skipOK && c.ch.moved < inf {
		c.addMoved(rk, lower, c.ch.moved) // a letter moved two places (moved.go)
	}
	if rk.skipOK || c.ch.affix >= inf || len(lower) <= familyMinStem || len(lower) > maxTyped {
		return 0
	}
	w := famWalk{lex: c.lex, tab: c.below}
	w.el, _ = c.lex.(EdgeLister)
	var states [maxTyped + 1]int
	var accs [maxTyped + 1]uint64
	st, ok := w.start()
	if !ok {
		return 0
	}
	states[0] = st
	L := 0
	for L < len(lower) {
		next, out, ok := w.step(states[L], lower[L])
		if !ok {
			break
		}
		states[L+1], accs[L+1] = next, accs[L]+out
		L++
	}
	visited := 0
	for k := L; k >= familyMinStem && k >= L-familyBackoff && visited < familyMaxStates; k-- {
		if len(lower)-k > familyMaxTail || 2*k < len(lower) {
			break
		}
		typedTail := lower[k:]
		if !lettersOnly(typedTail) {
			continue // a clitic ("amira's") or compound, not an ending
		}
		q := append(rk.fam[:0], famFrame{state: states[k], acc: accs[k]})
		for i := 0; i < len(q) && visited < familyMaxStates; i++ {
			f := q[i]
			visited++
			if ok, fo := w.final(f.state); ok {
				tail := f.tail[:f.depth]
				if lettersOnly(string(tail)) {
					if d := tailDistance(typedTail, string(tail)); d >= 2 {
						rk.addMin(uint32(f.acc+fo), c.ch.affix+familyTailCost*float32(d))
					}
				}
			}
			if f.depth >= familyMaxTail {
				continue
			}
			rk.edges = w.appendEdges(rk.edges[:0], f.state)
			for _, e := range rk.edges {
				g := famFrame{state: e.Next, acc: f.acc + e.Out, depth: f.depth + 1, tail: f.tail}
				g.tail[f.depth] = e.Byte
				q = append(q, g)
			}
		}
		rk.fam = q
	}
	return visited
}

// famWalk steps through the lexicon automaton for addFamily: through tab,
// the corrector's copy of it (states are its node indices), when that is
// not nil, else through the lexicon (with el, if not nil, listing edges).
type famWalk struct {
	lex Lexicon
	el  EdgeLister
	tab *belowTable
}

// start returns the start state and whether any word can follow it.
func (w *famWalk) start() (int, bool) {
	if w.tab != nil {
		return 0, true
	}
	st := w.lex.Start()
	return st, w.lex.CanMatch(st)
}

// step follows byte b from state to a state some word can follow.
func (w *famWalk) step(state int, b byte) (next int, out uint64, ok bool) {
	if t := w.tab; t != nil {
		lo, hi := t.edges(state)
		for k := lo; k < hi; k++ {
			if t.eb[k] == b {
				return int(t.en[k]), uint64(t.eo[k]), true
			}
		}
		return 0, 0, false
	}
	next, out, ok = w.lex.Step(state, b)
	return next, out, ok && w.lex.CanMatch(next)
}

// final reports whether state ends a word, and its final output.
func (w *famWalk) final(state int) (bool, uint64) {
	if t := w.tab; t != nil {
		ok, fo := t.final(state)
		return ok, uint64(fo)
	}
	return w.lex.Final(state)
}

// appendEdges appends the edges of state to dst: with no edge listing,
// those on the bytes of the alphabet.
func (w *famWalk) appendEdges(dst []Edge, state int) []Edge {
	if t := w.tab; t != nil {
		lo, hi := t.edges(state)
		for k := lo; k < hi; k++ {
			dst = append(dst, Edge{Byte: t.eb[k], Next: int(t.en[k]), Out: uint64(t.eo[k])})
		}
		return dst
	}
	if w.el != nil {
		return w.el.AppendEdges(dst, state)
	}
	for _, b := range alphabet {
		if next, out, ok := w.lex.Step(state, b); ok && w.lex.CanMatch(next) {
			dst = append(dst, Edge{Byte: b, Next: next, Out: out})
		}
	}
	return dst
}

// lettersOnly reports whether s holds only the letters a–z: endings are
// letters, while an apostrophe or hyphen marks a clitic or a compound.
func lettersOnly(s string) bool {
	for i := 0; i < len(s); i++ {
		if s[i] < 'a' || s[i] > 'z' {
			return false
		}
	}
	return true
}

// tailDistance is the plain optimal-string-alignment distance between two
// endings; bytes past familyMaxTail+2 of either are counted as edits.
func tailDistance(a, b string) int {
	const n = familyMaxTail + 2
	extra := 0
	if len(a) > n {
		extra += len(a) - n
		a = a[:n]
	}
	if len(b) > n {
		extra += len(b) - n
		b = b[:n]
	}
	var cells [n + 1][n + 1]int // on the stack: tailDistance runs per candidate
	var d [n + 1][]int
	for i := range d {
		d[i] = cells[i][:]
	}
	osaFill(d[:], a, b)
	return d[len(a)][len(b)] + extra
}
