package lm

import (
	"cmp"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"
)

// checkStore verifies the invariants the copy-on-write store keeps
// incrementally against a recomputation from scratch: every main node's
// chunks are non-empty, at most ovChunkMax long and strictly increasing by
// token; its entry count and total match its entries (total within
// rounding of a different summation order); its best list equals one
// ranked anew; the shards are sorted by key. The same holds for every node
// as the view sees it through its delta (patch entries strictly increasing,
// count, total and best list of the patched node). Folding the delta into
// a copy of the view leaves the same n-grams. The recency cache's heaviest
// list equals one ranked anew, and its unigram count and sum match its
// lists. These are the store's own definitions (no outside source).
func checkStore(t *testing.T, v *OverlayView) {
	t.Helper()
	for si, sh := range v.shards {
		if sh == nil {
			continue
		}
		for i, sl := range sh.slots {
			if i > 0 && sh.slots[i-1].key >= sl.key {
				t.Fatalf("shard %d: keys out of order at %d", si, i)
			}
			nd := sl.nd
			if nd.key != sl.key || shardOf(nd.key) != si {
				t.Fatalf("shard %d: node key %x in slot %x", si, nd.key, sl.key)
			}
			n, total := 0, 0.0
			last := int64(-1)
			for _, p := range nd.parts {
				if len(p) == 0 || len(p) > ovChunkMax {
					t.Fatalf("node %x: chunk of %d entries", nd.key, len(p))
				}
				for _, e := range p {
					if int64(e.tok) <= last {
						t.Fatalf("node %x: tokens out of order", nd.key)
					}
					last = int64(e.tok)
					n++
					total += e.cnt
				}
			}
			if n != nd.n || math.Abs(total-nd.total) > 1e-9*total {
				t.Fatalf("node %x: n %d total %v, entries give %d, %v", nd.key, nd.n, nd.total, n, total)
			}
			fresh := ovNode{n: nd.n, parts: nd.parts}
			fresh.rank()
			switch {
			case (fresh.top == nil) != (nd.top == nil):
				t.Fatalf("node %x of %d entries: best list presence differs", nd.key, nd.n)
			case fresh.top != nil && *fresh.top != *nd.top:
				t.Fatalf("node %x: best list %v, ranked anew %v", nd.key, nd.top.e[:nd.top.n], fresh.top.e[:fresh.top.n])
			}
		}
	}
	entries := 0
	v.eachNode(func(key uint64, r nref) {
		if r.p != nil {
			for i := 1; i < len(r.p.ents); i++ {
				if r.p.ents[i-1].tok >= r.p.ents[i].tok {
					t.Fatalf("patch of %x: tokens out of order", key)
				}
			}
		}
		n, total := 0, 0.0
		var fresh ovBest
		last := int64(-1)
		r.entries(func(e ovEntry) {
			if int64(e.tok) <= last {
				t.Fatalf("node %x as seen: tokens out of order", key)
			}
			last = int64(e.tok)
			n++
			total += e.cnt
			fresh.note(e.tok, e.cnt)
		})
		if n != r.size() || math.Abs(total-r.total()) > 1e-9*total {
			t.Fatalf("node %x as seen: n %d total %v, entries give %d, %v", key, r.size(), r.total(), n, total)
		}
		switch b := r.best(); {
		case (b == nil) != (n <= ovNodeBest):
			t.Fatalf("node %x as seen, %d entries: best list presence differs", key, n)
		case b != nil && *b != fresh:
			t.Fatalf("node %x as seen: best list %v, ranked anew %v", key, b.e[:b.n], fresh.e[:fresh.n])
		}
		entries += n
	})
	if entries != v.entries {
		t.Fatalf("view counts %d entries, nodes hold %d", v.entries, entries)
	}
	if v.delta != nil {
		var owned [ovShardCount]uint64
		fv := *v
		w := writer{v: &fv, owned: &owned, batch: 1}
		w.fold()
		if fv.delta != nil {
			t.Fatal("fold left a delta")
		}
		got, want := sortedGrams(fv.flatten(nil)), sortedGrams(v.flatten(nil))
		if !slices.Equal(got, want) {
			t.Fatalf("folded view holds %d n-grams, view %d, or they differ", len(got), len(want))
		}
		checkStore(t, &fv)
	}
	fresh := v.cache
	fresh.rank()
	if fresh.best != v.cache.best || fresh.nbest != v.cache.nbest {
		t.Fatalf("cache heaviest %v, ranked anew %v", v.cache.best[:v.cache.nbest], fresh.best[:fresh.nbest])
	}
	n, sum := 0, 0.0
	v.cache.eachUni(func(e cacheEnt) { n, sum = n+1, sum+e.w })
	if n != v.cache.nUni || math.Abs(sum-v.cache.sum) > 1e-9*sum {
		t.Fatalf("cache counts %d unigrams of sum %v, its lists hold %d of %v", v.cache.nUni, v.cache.sum, n, sum)
	}
}

// sortedGrams sorts n-grams by order then tokens.
func sortedGrams(g []gram) []gram {
	slices.SortFunc(g, func(a, b gram) int {
		if c := cmp.Compare(a.n, b.n); c != 0 {
			return c
		}
		return slices.Compare(a.toks[:a.n], b.toks[:b.n])
	})
	return g
}

func TestOverlayStoreInvariants(t *testing.T) {
	d := ksrSetup(t)
	for _, c := range []struct {
		name string
		opts OverlayOptions
	}{
		{"defaults", OverlayOptions{}},
		{"capped", OverlayOptions{MaxEntries: 3000}},
		{"fast-decay", OverlayOptions{HalfLifeDays: 0.5}},
	} {
		t.Run(c.name, func(t *testing.T) {
			ov, err := NewOverlay(d.base.m, bvocab{d.base.b}, c.opts)
			if err != nil {
				t.Fatal(err)
			}
			for i, s := range d.sentences[:len(d.sentences)/3] {
				ov.Learn(strings.Join(s, " ")+".", i/20) // a day of use every 20 sentences
				if i%97 == 0 {
					checkStore(t, ov.View())
				}
				if i == 400 {
					ov.Forget("the")
				}
			}
			checkStore(t, ov.View())
		})
	}
}

// TestOverlaySortsStable checks the writer's small sorts against the
// standard library's stable sort (slices.SortStableFunc), on both sides of
// the insertion-sort threshold and with many equal keys.
func TestOverlaySortsStable(t *testing.T) {
	for _, c := range []struct {
		name      string
		n, keys   int
		wantInsrt bool
	}{
		{"empty", 0, 1, true},
		{"one", 1, 1, true},
		{"sentence", 38, 12, true},
		{"all-equal", 40, 1, true},
		{"at-threshold", smallSort, 20, true},
		{"past-threshold", smallSort + 1, 20, false},
		{"long", 500, 30, false},
	} {
		t.Run(c.name, func(t *testing.T) {
			if got := c.n <= smallSort; got != c.wantInsrt {
				t.Fatalf("case of %d elements: insertion sort %v, want %v", c.n, got, c.wantInsrt)
			}
			rng := rand.New(rand.NewPCG(7, uint64(c.n)))
			ups := make([]ovUpdate, c.n)
			ents := make([]cacheEnt, c.n)
			for i := range ups {
				k := uint64(rng.IntN(c.keys))
				// delta and w carry the input position, to see stability.
				ups[i] = ovUpdate{key: k / 3, tok: uint32(k % 3), delta: float64(i)}
				ents[i] = cacheEnt{prev: uint32(k / 3), tok: uint32(k % 3), w: float64(i)}
			}
			wantU := slices.Clone(ups)
			slices.SortStableFunc(wantU, func(a, b ovUpdate) int {
				if c := cmp.Compare(a.key, b.key); c != 0 {
					return c
				}
				return cmp.Compare(a.tok, b.tok)
			})
			wantE := slices.Clone(ents)
			slices.SortStableFunc(wantE, cmpCache)
			sortUpdates(ups)
			sortCache(ents)
			if !slices.Equal(ups, wantU) {
				t.Errorf("sortUpdates gives %v, stable sort %v", ups, wantU)
			}
			if !slices.Equal(ents, wantE) {
				t.Errorf("sortCache gives %v, stable sort %v", ents, wantE)
			}
		})
	}
}
