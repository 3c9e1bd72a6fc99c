package evaluate_test

import (
	"context"
	"math"
	"os"
	"slices"
	"strings"
	"testing"

	"github.com/keyloom/keyloom"
	"github.com/keyloom/keyloom/internal/bundle"
	"github.com/keyloom/keyloom/internal/evaluate"
	"github.com/keyloom/keyloom/lm"
)

func sentences(text string) [][]string {
	var out [][]string
	for _, line := range strings.Split(text, "\n") {
		if f := strings.Fields(line); len(f) > 0 {
			out = append(out, f)
		}
	}
	return out
}

func TestCeilingAndFloor(t *testing.T) {
	sents := sentences("the shed is open\nsee you at the blue door tomorrow\na\n")
	var letters, words int
	for _, s := range sents {
		for _, w := range s {
			letters += len(w)
			words++
		}
	}
	// Definition (DESIGN.md "Measurements"): picking the word before any
	// letter costs one keystroke, so the ceiling is 1 − words/(letters+spaces).
	ceiling := 1 - float64(words)/float64(letters+words)
	// The oracle offers every word that continues a test sentence with this
	// history (at most three here, so always within k = 3).
	always := evaluate.PredictorFunc(func(h []string, p string, k int, dst []string) []string {
		for _, x := range sents {
			if len(h) < len(x) && slices.Equal(x[:len(h)], h) && !slices.Contains(dst, x[len(h)]) {
				dst = append(dst, x[len(h)])
			}
		}
		return dst
	})
	never := evaluate.PredictorFunc(func(h []string, p string, k int, dst []string) []string {
		return append(dst, "zzzz", "qqqq")
	})
	r, err := evaluate.Run(context.Background(), always, sents, evaluate.Options{NoLatency: true})
	if err != nil {
		t.Fatal(err)
	}
	if r.KSR != ceiling || r.Ceiling != ceiling {
		t.Errorf("always-right KSR = %v (ceiling %v), want exactly %v", r.KSR, r.Ceiling, ceiling)
	}
	if r.Top3 != 1 || r.Keystrokes != int64(words) {
		t.Errorf("always-right top3 = %v, keystrokes %d, want 1, %d", r.Top3, r.Keystrokes, words)
	}
	r, _ = evaluate.Run(context.Background(), never, sents, evaluate.Options{NoLatency: true, Workers: 2})
	if r.KSR != 0 || r.Top3 != 0 {
		t.Errorf("never-right KSR = %v, top3 = %v, want 0, 0", r.KSR, r.Top3)
	}
}

func opticksEngine(t *testing.T) *keyloom.Engine {
	t.Helper()
	f, err := os.Open("../../lm/testdata/opticks-train.txt")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	_, data, err := bundle.Build(context.Background(), []bundle.Source{{Name: "opticks", R: f, Kind: bundle.SourceTokenized}}, bundle.BuildOptions{Order: 3, QuantBits: -1})
	if err != nil {
		t.Fatal(err)
	}
	eng, err := keyloom.OpenBytes(data, keyloom.Options{})
	if err != nil {
		t.Fatal(err)
	}
	return eng
}

// TestKSRMatchesStraightforward checks the typist with the engine against
// the obvious method the issue prescribes: score every word for the context,
// sort, take the first k that start with the typed letters, test membership.
// Data: Newton's Opticks (public domain), split 9:1 by sentences as in
// lm/testdata/reference/README.md, lower-cased and pre-tokenized; order 3, k = 3.
func TestKSRMatchesStraightforward(t *testing.T) {
	eng := opticksEngine(t)
	defer eng.Close()
	b, err := os.ReadFile("../../lm/testdata/opticks-test.txt")
	if err != nil {
		t.Fatal(err)
	}
	test := sentences(string(b))[:50]
	got, err := evaluate.Run(context.Background(), eng, test, evaluate.Options{K: 3, Workers: 2, NoLatency: true})
	if err != nil {
		t.Fatal(err)
	}

	// The reference typist.
	m, lex := eng.LM(), eng.Lexicon()
	bos, eos, unk := m.Specials()
	V := uint32(m.VocabSize())
	type sc struct {
		w string
		p float64
	}
	var used, base int
	for _, s := range test {
		for i, w := range s {
			ctx := []uint32{bos}
			for _, h := range s[max(0, i-2):i] {
				id, ok := lex.ID(h)
				if !ok {
					id = unk
				}
				ctx = append(ctx, id)
			}
			if len(ctx) > 2 {
				ctx = ctx[len(ctx)-2:]
			}
			all := make([]sc, 0, V)
			for id := range V {
				if id == bos || id == eos || id == unk {
					continue
				}
				all = append(all, sc{lex.Word(id), m.LogProb(ctx, id)})
			}
			slices.SortFunc(all, func(a, b sc) int {
				if a.p != b.p {
					if a.p > b.p {
						return -1
					}
					return 1
				}
				return strings.Compare(a.w, b.w)
			})
			cost := len(w) + 1
			for L := 0; L < len(w); L++ {
				shown := 0
				hit := false
				for _, x := range all {
					if strings.HasPrefix(x.w, w[:L]) {
						if x.w == w {
							hit = true
						}
						if shown++; shown == 3 {
							break
						}
					}
				}
				if hit {
					cost = L + 1
					break
				}
			}
			used += cost
			base += len(w) + 1
		}
	}
	want := 1 - float64(used)/float64(base)
	t.Logf("KSR engine %.4f, straightforward %.4f, ceiling %.4f", got.KSR, want, got.Ceiling)
	if math.Abs(got.KSR-want) > 0.005 {
		t.Errorf("KSR = %.4f, straightforward reference %.4f: differ by more than 0.5 points", got.KSR, want)
	}
	if got.KSR > got.Ceiling {
		t.Errorf("KSR %.4f above the ceiling %.4f", got.KSR, got.Ceiling)
	}
	_ = lm.MaxK
}

func TestDeterministic(t *testing.T) {
	eng := opticksEngine(t)
	defer eng.Close()
	b, _ := os.ReadFile("../../lm/testdata/opticks-test.txt")
	test := sentences(string(b))[:40]
	r1, _ := evaluate.Run(context.Background(), eng, test, evaluate.Options{Workers: 1, NoLatency: true})
	r2, _ := evaluate.Run(context.Background(), eng, test, evaluate.Options{Workers: 3, NoLatency: true})
	if r1.KSR != r2.KSR || r1.Top1 != r2.Top1 || !slices.Equal(r1.HitByPrefix, r2.HitByPrefix) {
		t.Errorf("1 worker %+v, 3 workers %+v", r1, r2)
	}
}
