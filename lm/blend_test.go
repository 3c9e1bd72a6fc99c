package lm

import (
	"context"
	"math"
	"path/filepath"
	"sort"
	"strings"
	"sync"
	"testing"
	"unicode/utf8"

	"github.com/keyloom/keyloom/corpora"
)

// The personalisation setup ("demo-80/20"), used by the measurement test
// and for tuning the defaults:
//
//   - base model: the Opticks training text (testdata/opticks-train.txt,
//     pretokenized) plus the SUBTLEX-US word counts (Brysbaert & New 2009),
//     order 3, modified Kneser-Ney, lossless layout;
//   - the user: the invented demo corpus (corpora.DemoText, running text),
//     split into sentences in reading order; the first 80 % are learned, the
//     last 20 % are typed by the simulated typist. Defaults were tuned on a
//     development split inside the learned part (learn 0–60 %, type
//     60–80 %), never on the reported last 20 %.
//   - keystroke savings as defined in shared/DESIGN.md, k = 3.

// bvocab adapts a Backoff's vocabulary to the Vocab interface.
type bvocab struct{ b *Backoff }

func (v bvocab) ID(w string) (uint32, bool) { return v.b.ID(w) }
func (v bvocab) Word(id uint32) string {
	if int(id) < len(v.b.Vocab) {
		return v.b.Vocab[id]
	}
	return ""
}

// prefixRange returns the IDs of the sorted vocabulary's words that start with prefix.
func prefixRange(vocab []string, prefix string) (uint32, uint32) {
	if prefix == "" {
		return 0, uint32(len(vocab))
	}
	lo := sort.SearchStrings(vocab, prefix)
	hi := lo + sort.Search(len(vocab)-lo, func(j int) bool { return !strings.HasPrefix(vocab[lo+j], prefix) })
	return uint32(lo), uint32(hi)
}

type ksrData struct {
	base      built
	sentences [][]string // demo sentences, folded tokens
}

var (
	ksrOnce sync.Once
	ksrVal  ksrData
	ksrErr  error
)

// buildCounts counts the Opticks text and SUBTLEX-US plus extra running text added `times` times.
func buildCounts(t testing.TB, extra string, times int) built {
	t.Helper()
	c, err := NewCounter(3)
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	text := readFile(t, filepath.Join("testdata", "opticks-train.txt"))
	if err := c.AddText(ctx, strings.NewReader(text), ScanOptions{Pretokenized: true}, nil); err != nil {
		t.Fatal(err)
	}
	if err := c.AddWordCounts(corpora.WordCounts()); err != nil {
		t.Fatal(err)
	}
	for range times {
		if err := c.AddText(ctx, strings.NewReader(extra), ScanOptions{Pretokenized: true}, nil); err != nil {
			t.Fatal(err)
		}
	}
	b, err := Estimate(ctx, c, EstimateOptions{})
	if err != nil {
		t.Fatal(err)
	}
	sec, err := AppendSection(nil, b, LayoutOptions{})
	if err != nil {
		t.Fatal(err)
	}
	m, err := LoadSection(sec)
	if err != nil {
		t.Fatal(err)
	}
	return built{b, m}
}

func ksrSetup(t testing.TB) ksrData {
	t.Helper()
	ksrOnce.Do(func() {
		ksrVal.base = buildCounts(t, "", 0)
		sc := NewScanner(strings.NewReader(corpora.DemoText()), ScanOptions{})
		for sc.Scan() {
			var s []string
			for _, f := range sc.Tokens() {
				s = append(s, string(f))
			}
			ksrVal.sentences = append(ksrVal.sentences, s)
		}
		ksrErr = sc.Err()
	})
	if ksrErr != nil {
		t.Fatal(ksrErr)
	}
	return ksrVal
}

// suggester is what the simulated typist talks to.
type suggester interface {
	suggest(ctx []string, prefix string, k int) []string
	learn(sentence []string, day int)
}

// baseEngine suggests from a model alone.
type baseEngine struct{ x built }

func (e baseEngine) suggest(ctx []string, prefix string, k int) []string {
	bos, _, unk := e.x.m.Specials()
	ids := make([]uint32, 0, len(ctx))
	for _, w := range ctx {
		if w == BOS {
			ids = append(ids, bos)
			continue
		}
		id, ok := e.x.b.ID(w)
		if !ok {
			id = unk
		}
		ids = append(ids, id)
	}
	lo, hi := prefixRange(e.x.b.Vocab, prefix)
	var out []string
	for _, s := range e.x.m.TopK(ids, lo, hi, k, nil) {
		out = append(out, e.x.b.Vocab[s.ID])
	}
	return out
}

func (baseEngine) learn([]string, int) {}

// overlayEngine suggests from an overlay's blend.
type overlayEngine struct {
	x      built
	ov     *Overlay
	online bool
}

func (e *overlayEngine) suggest(ctx []string, prefix string, k int) []string {
	v := e.ov.View()
	ids := make([]uint32, 0, len(ctx))
	for _, w := range ctx {
		if w == BOS {
			ids = append(ids, v.bos)
			continue
		}
		id, ok := v.ID(w)
		if !ok {
			id = v.unk
		}
		ids = append(ids, id)
	}
	lo, hi := prefixRange(e.x.b.Vocab, prefix)
	var out []string
	for _, s := range v.TopK(ids, prefix, lo, hi, k, nil) {
		out = append(out, v.Word(s.ID))
	}
	return out
}

func (e *overlayEngine) learn(s []string, day int) {
	if e.online {
		e.ov.Learn(strings.Join(s, " ")+".", day)
	}
}

// typeText runs the simulated typist of shared/DESIGN.md over sentences and
// returns the keystroke savings: before each letter the engine shows k
// suggestions for the context and typed prefix; picking the word costs one
// keystroke and inserts the space; otherwise the word costs its letters and
// a space. KSR = 1 − used / (letters + spaces).
func typeText(e suggester, sentences [][]string, k, day0 int) float64 {
	used, total := 0, 0
	for si, s := range sentences {
		ctx := []string{BOS}
		for _, w := range s {
			n := utf8.RuneCountInString(w)
			total += n + 1
			cost := n + 1
			typed := 0
			for p := 0; p < len(w); {
				if slicesContain(e.suggest(ctx[max(0, len(ctx)-2):], w[:p], k), w) {
					cost = typed + 1
					break
				}
				_, size := utf8.DecodeRuneInString(w[p:])
				p += size
				typed++
			}
			used += cost
			ctx = append(ctx, w)
		}
		e.learn(s, day0+si/40)
	}
	return 1 - float64(used)/float64(total)
}

func slicesContain(s []string, w string) bool {
	for _, x := range s {
		if x == w {
			return true
		}
	}
	return false
}

// learnAll teaches the overlay the sentences, one day of use per 40 sentences.
func learnAll(ov *Overlay, sentences [][]string) {
	for i, s := range sentences {
		ov.Learn(strings.Join(s, " ")+".", i/40)
	}
}

func newEngine(t testing.TB, d ksrData, opts OverlayOptions, train [][]string, online bool) *overlayEngine {
	t.Helper()
	ov, err := NewOverlay(d.base.m, bvocab{d.base.b}, opts)
	if err != nil {
		t.Fatal(err)
	}
	learnAll(ov, train)
	return &overlayEngine{x: d.base, ov: ov, online: online}
}

// TestPersonalizationKSR measures keystroke savings on the demo-80/20
// setup: the base model alone, the blend with and without online learning
// during the typed part, and two calibration baselines in the same harness
// (constant interpolation λ = 0.3 with the user model and no cache; static
// count merging with the user's counts weighted ×2). The bar of ≥ 5 points
// over the base model is the project's requirement (issue text), no outside source.
func TestPersonalizationKSR(t *testing.T) {
	d := ksrSetup(t)
	n := len(d.sentences)
	cut := n * 8 / 10
	train, test := d.sentences[:cut], d.sentences[cut:]
	day0 := cut / 40
	const k = 3

	base := typeText(baseEngine{d.base}, test, k, day0)
	blendOff := typeText(newEngine(t, d, OverlayOptions{}, train, false), test, k, day0)
	blendOn := typeText(newEngine(t, d, OverlayOptions{}, train, true), test, k, day0)
	interp := typeText(newEngine(t, d, OverlayOptions{UserWeight: 0.3, DisableCache: true}, train, false), test, k, day0)
	var sb strings.Builder
	for _, s := range train {
		sb.WriteString(strings.Join(s, " "))
		sb.WriteByte('\n')
	}
	merged := typeText(baseEngine{buildCounts(t, sb.String(), 2)}, test, k, day0)

	t.Logf("demo-80/20, %d learned / %d typed sentences, k=%d", len(train), len(test), k)
	t.Logf("KSR base alone                        %.4f", base)
	t.Logf("KSR blend, no online learning         %.4f (%+.2f points)", blendOff, 100*(blendOff-base))
	t.Logf("KSR blend, online learning            %.4f (%+.2f points)", blendOn, 100*(blendOn-base))
	t.Logf("KSR constant interpolation λ=0.3      %.4f (%+.2f points)", interp, 100*(interp-base))
	t.Logf("KSR count merging ×2                  %.4f (%+.2f points)", merged, 100*(merged-base))
	if gain := 100 * (blendOn - base); gain < 5 {
		t.Errorf("personalisation gains %.2f KSR points over the base model, want ≥ 5 (issue requirement)", gain)
	}
	if blendOn <= interp || blendOn <= merged {
		t.Errorf("blend KSR %.4f does not beat the baselines (interpolation %.4f, count merging %.4f)", blendOn, interp, merged)
	}
	if math.IsNaN(blendOff) {
		t.Error("KSR is NaN")
	}
}

// entryLower must agree with the standard library's sort.Search (the
// reference) for every query token over sorted entry lists of every length
// up to a few chunks, including tokens at and above 1<<ovTokenBits, where
// it switches to a plain binary search.
func TestEntryLower(t *testing.T) {
	const top = 1<<ovTokenBits - 1
	for _, c := range []struct {
		name string
		toks []uint32
	}{
		{"empty", nil},
		{"one", []uint32{7}},
		{"two", []uint32{3, 9}},
		{"odd", []uint32{1, 4, 9, 16, 25}},
		{"from-zero", []uint32{0, 1, 2, 3, 5, 8, 13, 21}},
		{"edge-of-range", []uint32{0, top - 2, top - 1, top}},
		{"chunk", func() []uint32 {
			var s []uint32
			for i := range uint32(ovChunkMax) {
				s = append(s, 3*i+2)
			}
			return s
		}()},
		{"large", func() []uint32 {
			var s []uint32
			for i := range uint32(1000) {
				s = append(s, i*i+i)
			}
			return s
		}()},
	} {
		t.Run(c.name, func(t *testing.T) {
			s := make([]ovEntry, len(c.toks))
			for i, x := range c.toks {
				s[i].tok = x
			}
			queries := []uint32{0, 1, top - 1, top, top + 1, 1 << 31, math.MaxUint32}
			for _, x := range c.toks {
				queries = append(queries, x, x+1)
				if x > 0 {
					queries = append(queries, x-1)
				}
			}
			for _, q := range queries {
				want := sort.Search(len(s), func(i int) bool { return s[i].tok >= q })
				if got := entryLower(s, q); got != want {
					t.Errorf("entryLower(%v, %d) = %d, want %d", c.toks, q, got, want)
				}
			}
		})
	}
}
