package correct

import (
	"cmp"
	"slices"
	"strings"
	"testing"
)

// TestPrepareRulesMatchScan checks the rules prepare lists for a typed
// word (looked up by typed side and collected as a set of cost ranks)
// against a direct scan of the channel's rules: every rule whose
// typed side β occurs in the word, with bit e of its ends set where an
// occurrence ends at typed position e, ordered by cost and, at equal
// cost, by rule index. Words: every typed word of
// corpora/misspellings-dev.tsv, under the built-in error model and one
// trained on half the list.
func TestPrepareRulesMatchScan(t *testing.T) {
	pairs := devPairs(t)
	half, _ := SplitPairs(pairs, 0, 2)
	builtin, err := BuiltinErrorModel()
	if err != nil {
		t.Fatalf("BuiltinErrorModel: %v", err)
	}
	kb, err := LayoutQWERTY.Keyboard()
	if err != nil {
		t.Fatalf("Keyboard: %v", err)
	}
	for _, m := range []struct {
		name string
		em   *ErrorModel
	}{{"builtin", builtin}, {"trained-half", TrainErrorModel(half, TrainOptions{})}} {
		t.Run(m.name, func(t *testing.T) {
			ch := newChannel(kb, m.em)
			var s search
			for _, p := range pairs {
				w := strings.ToLower(p.Typed)
				if len(w) > maxTyped {
					continue
				}
				s.reset(ch, nil, w, inf, len(w)+maxExtra)
				want := listRulesDirect(ch, w)
				if len(s.rules) != len(want) {
					t.Fatalf("%q: prepare lists %d rules, want %d", w, len(s.rules), len(want))
				}
				for i, r := range s.rules {
					if r != want[i] {
						t.Fatalf("%q: rule %d = %+v, want %+v", w, i, r, want[i])
					}
				}
				// The heads by first intended byte: each rule once, under
				// its first byte, by cost, its starts the positions its
				// typed side starts at.
				heads := 0
				for c := range s.first {
					for k, h := range s.first[c] {
						r := &s.rules[h.rule]
						var starts uint64
						for ends := r.ends; ends != 0; ends &= ends - 1 {
							starts |= 1 << (bitIndex64(ends) - r.lb)
						}
						if r.alpha[0] != byte(c) || h.cost != r.cost || h.starts != starts ||
							k > 0 && s.first[c][k-1].rule >= h.rule {
							t.Fatalf("%q: head %d of byte %d = %+v, rule %+v (starts %b)", w, k, c, h, *r, starts)
						}
						heads++
					}
				}
				if heads != len(s.rules) {
					t.Fatalf("%q: %d rule heads, want %d", w, heads, len(s.rules))
				}
			}
		})
	}
}

// TestSubRowMatchesChannel checks the substitution rows the search fills
// on first use (subRow) against the channel's costs read directly, for
// every intended byte and every typed word of
// corpora/misspellings-dev.tsv: cost 0 where the typed byte is the
// intended one, else the channel's substitution cost, with the
// first-letter surcharge at the first typed byte (the cheaper of
// spelling cost plus surcharge and keyboard slip). Rows are asked for in
// a scrambled byte order and twice, as a walk asks for them.
func TestSubRowMatchesChannel(t *testing.T) {
	pairs := devPairs(t)
	d := corpus(t)
	c, err := New(newFlatLex(d.subtlexLex[:100]), d.unigramScorer(d.subtlexLex[:100]), Options{})
	if err != nil {
		t.Fatalf("New: %v", err)
	}
	ch := c.ch
	var s search
	for _, p := range pairs {
		w := strings.ToLower(p.Typed)
		if len(w) > maxTyped || w == "" {
			continue
		}
		s.reset(ch, nil, w, inf, len(w)+maxExtra)
		for k := range 512 {
			b := byte((k * 167) % 256) // each byte twice, scrambled
			got := s.subRow(b)
			for j := range len(w) {
				want := ch.sub[w[j]][b]
				if w[j] == b {
					want = 0
				} else if j == 0 && ch.lead > 0 {
					want += ch.lead
					if w[0] < 128 && b < 128 {
						want = min(want, ch.slipSub[w[0]][b])
					}
				}
				if got[j] != want {
					t.Fatalf("%q: subRow(%q)[%d] = %v, want %v", w, b, j, got[j], want)
				}
			}
		}
	}
}

// listRulesDirect lists the rules of ch whose typed side occurs in typed
// by scanning every rule and every place in the word, ordered by cost,
// then rule index.
func listRulesDirect(ch *channel, typed string) []appRule {
	var out []appRule
	for ri := range ch.rules {
		cr := &ch.rules[ri]
		var ends uint64
		for e := len(cr.beta); e <= len(typed); e++ {
			if typed[e-len(cr.beta):e] == cr.beta {
				ends |= 1 << e
			}
		}
		if ends == 0 {
			continue
		}
		out = append(out, appRule{src: int32(ri), alpha: cr.alpha, la: len(cr.alpha), lb: len(cr.beta), cost: cr.cost, ends: ends,
			alphaBits: cr.alphaBits, next1: cr.next1, rest2: cr.rest2})
	}
	slices.SortStableFunc(out, func(a, b appRule) int { return cmp.Compare(a.cost, b.cost) })
	return out
}
