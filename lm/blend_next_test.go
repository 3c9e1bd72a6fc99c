package lm

import (
	"cmp"
	"slices"
)

// nextCandidates returns the words a next-word TopK of k words after ctx
// ranks (see blend_next.go), found the long way: the base model's k best by
// scoring every base word (bruteTopK), and the nextDepth largest user
// counts after the last word and after the last two (ties: lower ID), by
// looking every word up in the user's counts, less the special tokens.
// Whether a user-only word is suggestible is left to the caller.
func nextCandidates(v *OverlayView, ctx []uint32, k int) map[uint32]bool {
	if n := v.base.order - 1; len(ctx) > n {
		ctx = ctx[len(ctx)-n:]
	}
	bc := make([]uint32, len(ctx))
	for i, t := range ctx {
		bc[i] = t
		if t >= v.V {
			bc[i] = v.unk
		}
	}
	set := map[uint32]bool{}
	for _, s := range bruteTopK(v.base, bc, 0, v.V, min(k, MaxK)) {
		set[s.ID] = true
	}
	var q query
	v.prepare(ctx, &q)
	for _, nd := range []nref{q.n2, q.n3} {
		var all []Scored
		for w := range uint32(v.VocabSize()) {
			if e := nd.find(w); e != nil {
				all = append(all, Scored{w, e.cnt})
			}
		}
		slices.SortFunc(all, func(a, b Scored) int {
			return cmp.Or(cmp.Compare(b.LogP, a.LogP), cmp.Compare(a.ID, b.ID))
		})
		for _, s := range all[:min(nextDepth, len(all))] {
			if s.ID != v.bos && s.ID != v.eos && s.ID != v.unk {
				set[s.ID] = true
			}
		}
	}
	return set
}
