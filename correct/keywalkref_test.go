package correct

import (
	"fmt"
	"runtime"
	"slices"
	"testing"
)

// refKeyWalk is the keys' walk of round 10 (keyTrie.keyWalk before its
// fast paths), kept as the reference the current walk must equal.
func (t *keyTrie) refKeyWalk(f *refSkelFilter, g *belowTable, node, d, maxDepth int) int32 {
	ok, _ := g.final(node)
	accept := ok && f.accepts(d)
	idx := int32(len(t.nodes))
	t.nodes = append(t.nodes, keyNode{accept: accept})
	base := len(t.pending)
	if d < maxDepth {
		m := f.mask(d)
		lo, hi := g.edges(node)
		for k := lo; k < hi; k++ {
			c := g.eb[k]
			if m[c>>6]&(1<<(c&63)) == 0 {
				continue
			}
			t.steps++
			if t.steps > keyWalkMax {
				return -1
			}
			next := int(g.en[k])
			if !f.step(d, c, g.nodes[next].sets.below(), g.rest[next]) {
				continue
			}
			if ch := t.refKeyWalk(f, g, next, d+1, maxDepth); ch >= 0 {
				t.pending = append(t.pending, keyEdge{k: int32(k), child: ch})
			} else if t.steps > keyWalkMax {
				return -1
			}
		}
	}
	return t.close(idx, base, accept)
}

// refBuild is keyTrie.build with refKeyWalk (round 10) or, with
// round11, refKeyWalk11, both over the banded byte rows.
func (t *keyTrie) refBuild(f *refSkelFilter, g *belowTable, maxDepth int, round11 bool) bool {
	t.nodes, t.edges, t.pending, t.steps = t.nodes[:0], t.edges[:0], t.pending[:0], 0
	var root int32
	if round11 {
		root = t.refKeyWalk11(f, g, 0, 0, maxDepth)
	} else {
		root = t.refKeyWalk(f, g, 0, 0, maxDepth)
	}
	if root < 0 {
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
// node for node and edge for edge, the same trie as the round-10 and
// round-11 walks over the banded byte rows (refKeyWalk, refKeyWalk11)
// and gives up on the same words with as many steps, for every
// development misspelling and 200 random strings over the SUBTLEX-US
// letters-below table.
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
	nodes := 0
	for _, w := range keyWalkWords(t, 200) {
		maxDepth := min(len(w)+maxExtra, 2*maxTyped)
		f.reset(w, maxDepth)
		okGot := got.build(&f, c.below, maxDepth)
		for _, round11 := range []bool{false, true} {
			rf.reset(w, maxDepth)
			okWant := want.refBuild(&rf, c.below, maxDepth, round11)
			nodes += len(want.nodes)
			if okGot != okWant || fmt.Sprint(got.nodes) != fmt.Sprint(want.nodes) || fmt.Sprint(got.edges) != fmt.Sprint(want.edges) {
				t.Errorf("%q: trie of %d nodes (finished %v), want %d nodes (finished %v; round 11 walk %v)", w, len(got.nodes), okGot, len(want.nodes), okWant, round11)
			}
			if round11 && got.steps != want.steps {
				t.Errorf("%q: %d steps, the round 11 walk %d", w, got.steps, want.steps)
			}
		}
	}
	if nodes == 0 {
		t.Error("every trie empty: the comparison tests nothing")
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
			kt.refBuild(&rf, c.below, maxDepth, true)
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
