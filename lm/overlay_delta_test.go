package lm

import (
	"cmp"
	"hash/fnv"
	"math"
	"slices"
	"strings"
	"sync"
	"testing"
)

// viewPrint hashes what a view answers: its n-grams in order with their
// counts, days and typed counts, the cache sum, and the blended LogProb and
// top three next words after a few histories.
func viewPrint(v *OverlayView, hist [][]uint32) uint64 {
	grams := v.flatten(nil)
	slices.SortFunc(grams, func(a, b gram) int {
		if c := cmp.Compare(a.n, b.n); c != 0 {
			return c
		}
		return slices.Compare(a.toks[:a.n], b.toks[:b.n])
	})
	h := fnv.New64a()
	var buf []byte
	f := func(x float64) { buf = le64(buf, math.Float64bits(x)) }
	for _, g := range grams {
		for _, t := range g.toks[:g.n] {
			buf = le64(buf, uint64(t))
		}
		f(g.cnt)
		buf = le64(buf, uint64(g.typed)<<32|uint64(uint32(g.day)))
	}
	f(v.cache.sum)
	var dst []Scored
	for _, c := range hist {
		for w := range uint32(50) {
			f(v.LogProb(c, w))
		}
		dst = v.TopK(c, "", 0, v.V, 3, dst[:0])
		for _, s := range dst {
			buf = le64(buf, uint64(s.ID))
			f(s.LogP)
		}
	}
	h.Write(buf)
	return h.Sum64()
}

func le64(b []byte, x uint64) []byte {
	for i := range 8 {
		b = append(b, byte(x>>(8*i)))
	}
	return b
}

// TestOverlayDeltaSnapshot checks that a published view never changes
// while the writer goes on learning, through many changes recorded in the
// delta and many folds of the delta into the main store, with readers
// running at the same time (run with -race). This is the overlay's own
// snapshot rule (no outside source).
func TestOverlayDeltaSnapshot(t *testing.T) {
	d := ksrSetup(t)
	ov, err := NewOverlay(d.base.m, bvocab{d.base.b}, OverlayOptions{})
	if err != nil {
		t.Fatal(err)
	}
	learnAll(ov, d.sentences[:200])
	v0 := ov.View()
	hist := [][]uint32{{v0.bos}, {v0.bos, 5}, {7, 9}, {v0.bos, v0.unk}}
	want0 := viewPrint(v0, hist)
	folds := 0
	var wg sync.WaitGroup
	stop := make(chan struct{})
	for range 2 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				select {
				case <-stop:
					return
				default:
				}
				v := ov.View()
				a := viewPrint(v, hist)
				if b := viewPrint(v, hist); a != b {
					t.Error("a view answered differently while the writer learned")
					return
				}
			}
		}()
	}
	for i, s := range d.sentences[200:1400] {
		before := ov.View().delta
		ov.Learn(strings.Join(s, " ")+".", 1+i/100)
		if before != nil && ov.View().delta == nil {
			folds++
		}
	}
	close(stop)
	wg.Wait()
	if got := viewPrint(v0, hist); got != want0 {
		t.Error("the first view answered differently after 1200 more sentences")
	}
	if folds < 5 {
		t.Errorf("%d folds of the delta, want at least 5 for the test to mean anything", folds)
	}
	checkStore(t, ov.View())
}
