package correct

import (
	"sort"
	"strings"
	"testing"
)

// TestRestLensMatchWordList checks the entries of belowTable.rest
// (fillRest) along the prefixes of about 3,000 SUBTLEX-US words against
// the listed words that start with each prefix, read off the sorted list
// itself: the shortest and longest rest, the most skeleton bytes of a
// rest (inSkeleton, repeats counted), and lead, the letters that start
// the skeleton of some rest and leadEnd for a rest without a skeleton
// byte. The keys' walk leaves out the states whose lead rules out every
// kept word (setSkMask), so a lead missing a letter would drop words
// from the widest pass.
func TestRestLensMatchWordList(t *testing.T) {
	d := corpus(t)
	l := newTrieLex(t, d.subtlexLex)
	words := l.words
	tab := newBelowTable(l, l)
	if tab == nil || tab.rest == nil {
		t.Fatal("no letters-below table")
	}
	checked, leads := 0, 0
	cache := map[string]restLens{}
	for i := 0; i < len(words); i += len(words) / 3000 {
		w := words[i]
		node := 0
		for k := 0; k <= len(w); k++ {
			if k > 0 {
				var ok bool
				if node, _, ok = tableStep(tab, node, w[k-1]); !ok {
					t.Fatalf("%q: no transition on %q", w, w[:k])
				}
			}
			prefix := w[:k]
			want, seen := cache[prefix]
			if !seen {
				want = wantRest(words, prefix)
				cache[prefix] = want
			}
			got := tab.rest[node]
			if got != want {
				t.Errorf("%q: prefix %q: rest %+v, want %+v", w, prefix, got, want)
			}
			if want.lead&^leadEnd != 0 && want.lead&^leadEnd != belowAll {
				leads++
			}
			checked++
		}
	}
	if checked < 10000 || leads < 1000 {
		t.Errorf("checked %d prefixes, %d with some letters but not all as lead; too few", checked, leads)
	}
}

// wantRest returns the restLens of the rests after prefix of the sorted
// words, read off the list.
func wantRest(words []string, prefix string) restLens {
	k := len(prefix)
	want := restLens{min: 255}
	lo := sort.SearchStrings(words, prefix)
	for j := lo; j < len(words) && strings.HasPrefix(words[j], prefix); j++ {
		rest := words[j][k:]
		want.min = min(want.min, sat8(len(rest)))
		want.max = max(want.max, sat8(len(rest)))
		sk, lead := 0, uint32(leadEnd)
		for x := len(rest) - 1; x >= 0; x-- {
			if inSkeleton(rest[x]) {
				sk++
				lead = belowBit(rest[x]) // the first one wins
			}
		}
		want.skel = max(want.skel, sat8(sk))
		want.lead |= lead
	}
	return want
}
