package lm

import (
	"cmp"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"
)

// sameScored reports whether got and want hold the same words in the same
// order with scores within tol.
func sameScored(got, want []Scored, tol float64) bool {
	if len(got) != len(want) {
		return false
	}
	for j := range got {
		if got[j].ID != want[j].ID || math.Abs(got[j].LogP-want[j].LogP) > tol {
			return false
		}
	}
	return true
}

// Typing a word letter by letter goes through the view's memo (same
// history, growing prefix), which must not change any answer: every
// keystroke's TopK must equal ranking every word by LogProb (bruteBlend,
// the blend's definition), same words and order, scores within 1e-12. The
// keystrokes include backspaces (a prefix that does not extend the last
// one), a change of history between words, and a Learn between two
// keystrokes of one word, after which the answers must be those of the new
// view (the learned sentence makes the typed word likelier in the history).
func TestOverlayTopKKeystrokes(t *testing.T) {
	d := ksrSetup(t)
	n := len(d.sentences)
	const seed = 20261203
	t.Logf("seed %d", seed)
	rng := rand.New(rand.NewPCG(seed, 7))
	for _, c := range []struct {
		name string
		opts OverlayOptions
	}{
		{"defaults", OverlayOptions{}},
		{"mintyped-1", OverlayOptions{MinTyped: 1}},
	} {
		t.Run(c.name, func(t *testing.T) {
			ov, err := NewOverlay(d.base.m, bvocab{d.base.b}, c.opts)
			if err != nil {
				t.Fatal(err)
			}
			learnAll(ov, d.sentences[:n/2])
			check := func(v *OverlayView, ctx []uint32, prefix string, k int) {
				t.Helper()
				lo, hi := prefixRange(d.base.b.Vocab, prefix)
				got := v.TopK(ctx, prefix, lo, hi, k, nil)
				want := bruteBlend(v, ctx, prefix, lo, hi, k)
				if !sameScored(got, want, 1e-12) {
					t.Errorf("TopK(ctx %v, prefix %q, k %d) = %v, want %v", ctx, prefix, k, words(v, got), words(v, want))
				}
			}
			reused := 0
			for range 6 {
				s := d.sentences[rng.IntN(n)]
				v := ov.View()
				ctx := []uint32{v.bos}
				for wi, w := range s[:min(len(s), 4)] {
					k := 1 + rng.IntN(5)
					for i := 0; i <= len(w); i++ {
						check(v, ctx[max(0, len(ctx)-2):], w[:i], k)
						if v.memo.get().state != [nStreams]uint8{} && i >= 2 {
							reused++
						}
					}
					if wi == 1 && len(w) >= 3 { // backspace to the first letter, then type on
						check(v, ctx[max(0, len(ctx)-2):], w[:1], k)
						check(v, ctx[max(0, len(ctx)-2):], w[:2], k)
					}
					id, ok := v.ID(w)
					if !ok {
						id = v.unk
					}
					ctx = append(ctx, id)
				}
			}
			if reused == 0 {
				t.Error("no keystroke left a remembered list in the memo: the test did not reach it")
			}
			t.Logf("%d keystrokes with a remembered list", reused)

			// Learn between keystrokes: the new view must answer for itself.
			s := d.sentences[n-1]
			v := ov.View()
			ctx := []uint32{v.bos}
			w := s[0]
			check(v, ctx, w[:1], 3)
			check(v, ctx, w[:min(2, len(w))], 3)
			for range 3 {
				ov.Learn(strings.Join(s, " ")+".", n)
			}
			nv := ov.View()
			if nv == v || nv.memo == v.memo {
				t.Fatal("Learn did not publish a new view with its own memo slot")
			}
			check(nv, ctx, w[:min(2, len(w))], 3)
			check(nv, ctx, w, 3)
		})
	}
}

// A new view takes over its predecessor's memo object (see publish), so
// nothing the memo learned under one view may leak into another's answers.
// A Learn between keystrokes changes the user's counts and the recency
// cache; after it, keystrokes alternate between the new view and the old
// one (a reader may still hold it), each time through the one shared memo.
// Every TopK must equal ranking every word by LogProb on a copy of its view
// without a memo (bruteBlend: the blend's definition, an exhaustive path
// that shares only the blend formula with TopK), and every LogProb must
// equal the memo-less copy's, exactly. Cross-check of two code paths of the
// project, no external source. The handed-over memo must also hold no
// reference into the superseded view (so that a Forget or Wipe does not
// leave the old view reachable through it).
func TestOverlayMemoAcrossViews(t *testing.T) {
	d, ov := halfLearned(t)
	n := len(d.sentences)
	check := func(name string, v *OverlayView, ctx []uint32, prefix string) {
		t.Helper()
		lo, hi := prefixRange(d.base.b.Vocab, prefix)
		got := v.TopK(ctx, prefix, lo, hi, 3, nil)
		want := bruteBlend(bare(v), ctx, prefix, lo, hi, 3)
		if !sameScored(got, want, 1e-12) {
			t.Errorf("%s: TopK(ctx %v, prefix %q) = %v, want %v", name, ctx, prefix, words(v, got), words(v, want))
		}
		for _, s := range want {
			if lp, ref := v.LogProb(ctx, s.ID), bare(v).LogProb(ctx, s.ID); lp != ref {
				t.Errorf("%s: LogProb(ctx %v, %q) = %v, want %v", name, ctx, v.Word(s.ID), lp, ref)
			}
		}
	}
	for _, c := range []struct {
		name string
		s    []string
	}{
		{"first-test-sentence", d.sentences[n/2]},
		{"last-sentence", d.sentences[n-1]},
	} {
		t.Run(c.name, func(t *testing.T) {
			old := ov.View()
			ctx := []uint32{old.bos}
			w := c.s[0]
			check("old view", old, ctx, "")
			check("old view", old, ctx, w[:1])
			for range 3 {
				ov.Learn(strings.Join(c.s, " ")+".", n)
			}
			nv := ov.View()
			m := nv.memo.p.Load()
			if nv == old || m != old.memo.p.Load() {
				t.Fatal("Learn did not publish a new view sharing its predecessor's memo: the test does not reach the shared path")
			}
			if m.view != nil || m.q.n2 != (nref{}) || m.q.cMain != nil {
				t.Error("the handed-over memo still refers to the superseded view")
			}
			for i := 0; i <= len(w); i++ {
				check("new view", nv, ctx, w[:i])
				check("old view", old, ctx, w[:i])
			}
			id, ok := nv.ID(w)
			if !ok {
				id = nv.unk
			}
			check("new view, next word", nv, append(ctx, id), "")
			check("old view, next word", old, append(ctx, id), "")
		})
	}
}

// The memo hands a search the first stage of an evidence list that an
// earlier call under the same view (and, for the lists that depend on it,
// the same history) built for a range around the query's (see firstStage).
// Keystrokes that reach it (a remembered first stage covers the range) must
// answer as ranking every word by LogProb on a copy of the view without a
// memo (bruteBlend, the blend's definition): typing words letter by letter
// after the next-word query, a backspace, the same prefix after another
// history (the bigram and trigram stages must not be reused), and the same
// prefix under a view that learned the typed word since (the unigram and
// cache stages must not be reused across views), alternating with the old
// view through the one shared memo. Cross-check of two code paths of the
// project, no external source.
func TestOverlayFirstStageReuse(t *testing.T) {
	d, ov := halfLearned(t)
	n := len(d.sentences)
	reached := 0
	check := func(name string, v *OverlayView, ctx []uint32, prefix string, k int) {
		t.Helper()
		lo, hi := prefixRange(d.base.b.Vocab, prefix)
		r := rangeQ{prefix: prefix, lo: lo, hi: hi, whole: prefix == "" && lo == 0 && hi == v.V}
		if m := v.memo.get(); m.view == v {
			for si := range m.first {
				if m.first[si].covers(&r) {
					reached++
					break
				}
			}
		}
		got := v.TopK(ctx, prefix, lo, hi, k, nil)
		want := bruteBlend(bare(v), ctx, prefix, lo, hi, k)
		if !sameScored(got, want, 1e-12) {
			t.Errorf("%s: TopK(ctx %v, prefix %q, k %d) = %v, want %v", name, ctx, prefix, k, words(v, got), words(v, want))
		}
	}
	for si, s := range []([]string){d.sentences[n/2], d.sentences[n/2+1], d.sentences[n-1]} {
		v := ov.View()
		ctx := []uint32{v.bos}
		for wi, w := range s[:min(len(s), 5)] {
			k := 1 + (si+wi)%4
			for i := 0; i <= len(w); i++ {
				check("typing", v, ctx[max(0, len(ctx)-2):], w[:i], k)
			}
			if len(w) >= 3 {
				check("backspace", v, ctx[max(0, len(ctx)-2):], w[:1], k)
				check("other history", v, []uint32{v.bos}, w[:2], k)
				check("back", v, ctx[max(0, len(ctx)-2):], w[:2], k)
			}
			id, ok := v.ID(w)
			if !ok {
				id = v.unk
			}
			ctx = append(ctx, id)
		}
		// A Learn between keystrokes of one word, then both views in turn.
		w := s[0]
		ctx = []uint32{v.bos}
		check("old view", v, ctx, "", 3)
		check("old view", v, ctx, w[:1], 3)
		for range 4 {
			ov.Learn(strings.Join(s, " ")+".", n)
		}
		nv := ov.View()
		for i := 1; i <= len(w); i++ {
			check("new view", nv, ctx, w[:i], 3)
			check("old view", v, ctx, w[:i], 3)
		}
	}
	if reached == 0 {
		t.Error("no keystroke found a remembered first stage covering its range: the test does not reach the reuse")
	}
	t.Logf("%d keystrokes with a remembered first stage", reached)
}

// halfLearned returns the KSR test setup and an overlay (MinTyped 1) that
// has learned the first half of its sentences.
func halfLearned(t *testing.T) (ksrData, *Overlay) {
	t.Helper()
	d := ksrSetup(t)
	ov, err := NewOverlay(d.base.m, bvocab{d.base.b}, OverlayOptions{MinTyped: 1})
	if err != nil {
		t.Fatal(err)
	}
	learnAll(ov, d.sentences[:len(d.sentences)/2])
	return d, ov
}

// bare returns a copy of v without its memo: the memo-less path.
func bare(v *OverlayView) *OverlayView {
	c := *v
	c.memo = nil
	return &c
}

// sortByValue must order a list as the standard library's slices.SortFunc
// (the reference) does with the same comparison, value descending and
// then ID ascending, for lists on both sides of insertionMax, with ties
// of value, already sorted and reversed input. Entries of one list have
// distinct IDs, so the reference's order is the only right one.
func TestSortByValue(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 5))
	random := func(n, distinctVals int) []memoEnt {
		s := make([]memoEnt, n)
		for i, tok := range rng.Perm(n) {
			s[i] = memoEnt{tok: uint32(tok) * 3, val: float64(rng.IntN(distinctVals))}
		}
		return s
	}
	cases := []struct {
		name string
		s    []memoEnt
	}{
		{"empty", nil},
		{"one", []memoEnt{{tok: 4, val: 1}}},
		{"two-tied", []memoEnt{{tok: 9, val: 2}, {tok: 4, val: 2}}},
		{"sorted", []memoEnt{{tok: 1, val: 5}, {tok: 2, val: 4}, {tok: 3, val: 3}}},
		{"reversed", []memoEnt{{tok: 3, val: 3}, {tok: 2, val: 4}, {tok: 1, val: 5}}},
	}
	for _, n := range []int{insertionMax - 1, insertionMax, insertionMax + 1, 200} {
		for _, d := range []int{3, 1 << 20} {
			cases = append(cases, struct {
				name string
				s    []memoEnt
			}{fmt.Sprintf("random-%d-vals-%d", n, d), random(n, d)})
		}
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got := slices.Clone(c.s)
			want := slices.Clone(c.s)
			sortByValue(got)
			slices.SortFunc(want, func(a, b memoEnt) int {
				if x := cmp.Compare(b.val, a.val); x != 0 {
					return x
				}
				return cmp.Compare(a.tok, b.tok)
			})
			if !slices.Equal(got, want) {
				t.Errorf("sortByValue(%v) = %v, want %v", c.s, got, want)
			}
		})
	}
}
