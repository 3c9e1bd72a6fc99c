package correct

// Letters moved across one: a writer types a letter two places from where
// it belongs, across two others ("tath" for that, "tyhe" for they, "yrea"
// for year). Damerau (1964) counts only the swap of two adjacent letters
// as one error; such a move is two of those swaps, which the letter model
// prices as two edits, often dearer than the narrow pass's budget. This
// kind of error, a transposition of letters not next to each other, is
// known as metathesis at a distance (a term of spelling-error studies,
// from memory). addMoved offers the lexicon words obtained by moving one
// letter of an unknown typed word two places left or right, at a cost
// per move learned from the training pairs (Backoff.Moved): the pairs
// the class explains over the moves their intended words allow, as the
// transposition backoff counts swaps over letters (7.515 nats on the
// whole development list: 14 of 2,173 pairs). It runs after the search
// for every unknown typed word, since the misses it repairs are words
// whose narrow pass ended the search ("tath": teeth, tooth and tenth
// scored above the narrow pass's reference); run only when the search
// went past the narrow pass it repaired none. On
// corpora/misspellings-dev.tsv, package cross-validation (each fold's
// error model trained on the others) gained 3 words of top-3 and 1 of
// top-1 on 5 and 10 folds and two seeded permutations; the engine's
// (keyloom eval --folds) 3 and 2 on 5 and 10 folds; the held-out typist
// of the root package lost 1 repaired word of 7,479 (seed 1; seeds 2-4
// unchanged), the FST walk costs about 0.24 µs per 8-letter word (CPU
// median of BenchmarkCorrect8/trie-cap within the noise). Measured, this
// project; BENCHMARKS.md, "letters moved across one".

// moveSpan is the number of letters a move rearranges: the moved letter
// and the two it crosses.
const moveSpan = 3

// movedWindow returns the three bytes w[i:i+3] after a move: dir 0 moves
// the first of them to the end ("abc" to "bca"), dir 1 the last to the
// front ("abc" to "cab"). ok is false when the result differs from
// w[i:i+3] in fewer than its first and last bytes (a letter moved across
// a copy of itself is an adjacent swap, or no change), which the letter
// model already prices as one edit or none.
func movedWindow(w string, i, dir int) (out [moveSpan]byte, ok bool) {
	a, b, c := w[i], w[i+1], w[i+2]
	if dir == 0 {
		out = [moveSpan]byte{b, c, a}
	} else {
		out = [moveSpan]byte{c, a, b}
	}
	return out, out[0] != a && out[2] != c
}

// countMoves returns the number of moves (movedWindow) of w that change
// it: the chances w gives a writer to move one of its letters.
func countMoves(w string) int {
	n := 0
	for i := 0; i+moveSpan <= len(w); i++ {
		for dir := range 2 {
			if _, ok := movedWindow(w, i, dir); ok {
				n++
			}
		}
	}
	return n
}

// isMovedError reports whether typed (lower-case) is intended with one
// letter moved two places (movedWindow), and neither is empty.
func isMovedError(typed, intended string) bool {
	n := len(typed)
	if n != len(intended) || n < moveSpan {
		return false
	}
	p := 0
	for p < n && typed[p] == intended[p] {
		p++
	}
	q := n - 1
	for q > p && typed[q] == intended[q] {
		q--
	}
	if q-p != moveSpan-1 {
		return false
	}
	for dir := range 2 {
		if w, ok := movedWindow(typed, p, dir); ok && string(w[:]) == intended[p:p+moveSpan] {
			return true
		}
	}
	return false
}

// addMoved offers to rk the lexicon words obtained from lower (a typed
// word the lexicon does not know, at most maxTyped bytes) by one move
// (movedWindow), at cost each. A move starting at byte i leaves lower[:i]
// as it is, so the lexicon states of lower's prefixes are found once and
// only the moves within the prefix the lexicon continues are walked, each
// from the state before its window until the lexicon has no word that
// continues it. Cost: at most 2n walks of at most n steps, most ending
// within a step or two of the window.
func (c *Corrector) addMoved(rk *ranker, lower string, cost float32) {
	n := len(lower)
	if n < moveSpan || n > maxTyped {
		return
	}
	w := famWalk{lex: c.lex, tab: c.below}
	var states [maxTyped + 1]int
	var accs [maxTyped + 1]uint64
	st, ok := w.start()
	if !ok {
		return
	}
	states[0] = st
	L := 0
	for L < n {
		next, out, ok := w.step(states[L], lower[L])
		if !ok {
			break
		}
		states[L+1], accs[L+1] = next, accs[L]+out
		L++
	}
	for i := 0; i+moveSpan <= n && i <= L; i++ {
		for dir := range 2 {
			win, ok := movedWindow(lower, i, dir)
			if !ok {
				continue
			}
			c.walkMoved(rk, &w, states[i], accs[i], win, lower[i+moveSpan:], cost)
		}
	}
}

// walkMoved follows win and then rest from state (output acc so far) and
// offers the word they end, if any, to rk at cost.
func (c *Corrector) walkMoved(rk *ranker, w *famWalk, state int, acc uint64, win [moveSpan]byte, rest string, cost float32) {
	for _, b := range win {
		next, out, ok := w.step(state, b)
		if !ok {
			return
		}
		state, acc = next, acc+out
	}
	for k := 0; k < len(rest); k++ {
		next, out, ok := w.step(state, rest[k])
		if !ok {
			return
		}
		state, acc = next, acc+out
	}
	if ok, fo := w.final(state); ok {
		rk.addMin(uint32(acc+fo), cost)
	}
}
