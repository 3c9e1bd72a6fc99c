package correct

import (
	"fmt"
	"runtime"
	"slices"
	"testing"
)

// refBuild is keyTrie.build with refKeyWalk11, the walk of round 11 over
// the banded byte rows (which, in its turn, was checked node for node
// against the round-10 walk: BENCHMARKS.md, round 11).
func (t *keyTrie) refBuild(f *refSkelFilter, g *belowTable, maxDepth int) bool {
	t.nodes, t.edges, t.pending, t.steps = t.nodes[:0], t.edges[:0], t.pending[:0], 0
	if t.refKeyWalk11(f, g, 0, 0, maxDepth) < 0 {
		t.nodes = t.nodes[:0]
		return t.steps <= keyWalkMax
	}
	return true
}

// keyWalkWords returns the lower-cased development misspellings of at
// most maxTyped bytes and n random strings of 1 to 12 bytes (fixed seed).
func keyWalkWords(t testing.TB, n int) []string {
	t.Helper()
	return typedSample(t, 1, 0, 11, n, 1, 12)
}

// TestKeyWalkSameTrie checks that the keys' walk over the bit rows builds,
// node for node and edge for edge, the same trie as the round-11 walk
// over the banded byte rows (refKeyWalk11) and gives up on the same
// words, with no more steps than it for each word and fewer in all (the
// states left out by setSkMask, round 17), for every development
// misspelling and 200 random strings over the SUBTLEX-US letters-below
// table.
func TestKeyWalkSameTrie(t *testing.T) {
	d := corpus(t)
	c, err := New(newTrieLex(t, d.subtlexLex), d.unigramScorer(d.subtlexLex), Options{})
	if err != nil {
		t.Fatal(err)
	}
	if c.below == nil {
		t.Fatal("no letters-below table")
	}
	var f skelFilter
	var rf refSkelFilter
	var got, want keyTrie
	nodes, steps, refSteps := 0, 0, 0
	for _, w := range keyWalkWords(t, 200) {
		maxDepth := min(len(w)+maxExtra, 2*maxTyped)
		f.reset(w, maxDepth)
		okGot := got.build(&f, c.below, maxDepth)
		rf.reset(w, maxDepth)
		okWant := want.refBuild(&rf, c.below, maxDepth)
		nodes += len(want.nodes)
		if okGot != okWant || fmt.Sprint(got.nodes) != fmt.Sprint(want.nodes) || fmt.Sprint(got.edges) != fmt.Sprint(want.edges) {
			t.Errorf("%q: trie of %d nodes (finished %v), want %d nodes (finished %v)", w, len(got.nodes), okGot, len(want.nodes), okWant)
		}
		// Round 17 steps into no child below the states whose rests
		// start no skeleton the key keeps (setSkMask): never more steps.
		if got.steps > want.steps {
			t.Errorf("%q: %d steps, the round 11 walk %d", w, got.steps, want.steps)
		}
		steps, refSteps = steps+got.steps, refSteps+want.steps
	}
	if nodes == 0 {
		t.Error("every trie empty: the comparison tests nothing")
	}
	if steps >= refSteps {
		t.Errorf("%d steps in all, the round 11 walk %d: the skeletons' leads (restLens.lead) cut none", steps, refSteps)
	}
}

// BenchmarkKeyWalkOnly times the keys' walk alone (keyTrie.build) for the
// 8-letter misspellings of BenchmarkCorrect8, the round-11 walk over the
// banded byte rows (refKeyWalk11) and the current one in turn, each word's least CPU time
// per walk, and reports their median, p99 and mean, the steps per word
// (median, p99) and the median over words of the time ratio (new / old).
// Run it for a few passes: -benchtime=6x the 305 words.
func BenchmarkKeyWalkOnly(b *testing.B) {
	c, typed := cappedCorrector(b)
	if c.below == nil {
		b.Fatal("no letters-below table")
	}
	runtime.LockOSThread()
	defer runtime.UnlockOSThread()
	best := pairedBest(len(typed))
	steps := make([]float64, len(typed))
	var f skelFilter
	var rf refSkelFilter
	var kt keyTrie
	k := 0
	b.ReportAllocs()
	for b.Loop() {
		i, m := k%len(typed), (k/len(typed))%2
		k++
		w := typed[i]
		maxDepth := min(len(w)+maxExtra, 2*maxTyped)
		cpu0 := threadClock()
		if m == 0 {
			rf.reset(w, maxDepth)
			kt.refBuild(&rf, c.below, maxDepth)
		} else {
			f.reset(w, maxDepth)
			kt.build(&f, c.below, maxDepth)
			steps[i] = float64(kt.steps)
		}
		best[m][i] = min(best[m][i], threadClock()-cpu0)
	}
	if k < 2*len(typed) {
		b.Logf("%d walks, fewer than a pass with each; no figures", k)
		return
	}
	reportPaired(b, [2]string{"old", "new"}, best)
	slices.Sort(steps)
	b.ReportMetric(steps[len(steps)/2], "steps-median")
	b.ReportMetric(steps[len(steps)*99/100], "steps-p99")
}
