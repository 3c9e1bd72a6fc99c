package lm

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"path/filepath"
	"slices"
	"strings"
	"sync"
	"testing"
)

var (
	opticksOnce sync.Once
	opticksVal  built
)

// opticksBase is an order-3 lossless model of the Opticks training text, shared by the overlay tests.
func opticksBase(t testing.TB) built {
	t.Helper()
	opticksOnce.Do(func() {
		opticksVal = buildText(t, readFile(t, filepath.Join("testdata", "opticks-train.txt")), 3, ScanOptions{Pretokenized: true}, 0)
	})
	return opticksVal
}

func newTestOverlay(t testing.TB, opts OverlayOptions) (*Overlay, built) {
	t.Helper()
	x := opticksBase(t)
	ov, err := NewOverlay(x.m, bvocab{x.b}, opts)
	if err != nil {
		t.Fatal(err)
	}
	return ov, x
}

// count returns the effective count of an n-gram of words, or 0.
func count(t testing.TB, v *OverlayView, words ...string) float64 {
	t.Helper()
	toks := make([]uint32, len(words))
	for i, w := range words {
		switch w {
		case BOS:
			toks[i] = v.bos
		case EOS:
			toks[i] = v.eos
		default:
			id, ok := v.ID(w)
			if !ok {
				return 0
			}
			toks[i] = id
		}
	}
	for _, g := range v.flatten(nil) {
		if g.n == len(toks) && slices.Equal(g.toks[:g.n], toks) {
			return g.cnt
		}
	}
	return 0
}

func suggestWords(v *OverlayView, x built, ctx []string, prefix string, k int) []string {
	ids := []uint32{v.bos}
	for _, w := range ctx {
		id, ok := v.ID(w)
		if !ok {
			id = v.unk
		}
		ids = append(ids, id)
	}
	lo, hi := prefixRange(x.b.Vocab, prefix)
	var out []string
	for _, s := range v.TopK(ids, prefix, lo, hi, k, nil) {
		out = append(out, v.Word(s.ID))
	}
	return out
}

// A new word is offered only once typed MinTyped times (issue requirement: default 2).
func TestOverlayNewWordThreshold(t *testing.T) {
	for _, minTyped := range []int{1, 2, 3} {
		t.Run(strings.Repeat("x", minTyped), func(t *testing.T) {
			ov, x := newTestOverlay(t, OverlayOptions{MinTyped: minTyped})
			for i := 1; i <= 3; i++ {
				ov.Learn("We met Zorblat at the bakery.", 1)
				got := suggestWords(ov.View(), x, nil, "zor", 3)
				want := i >= minTyped
				if slices.Contains(got, "zorblat") != want {
					t.Errorf("after %d learns, suggestions for \"zor\" = %v, want zorblat offered: %v", i, got, want)
				}
				if ov.Known("ZORBLAT") != want {
					t.Errorf("after %d learns, Known = %v, want %v", i, !want, want)
				}
			}
			if s := ov.View().Surface(mustID(t, ov.View(), "zorblat")); s != "Zorblat" {
				t.Errorf("Surface(zorblat) = %q, want %q", s, "Zorblat")
			}
		})
	}
}

func mustID(t testing.TB, v *OverlayView, w string) uint32 {
	t.Helper()
	id, ok := v.ID(w)
	if !ok {
		t.Fatalf("ID(%q) not found", w)
	}
	return id
}

// The counts of one sentence follow from the definition of n-gram counting
// with sentence marks (Jurafsky & Martin, Speech and Language Processing, ch. 3).
func TestOverlayLearnCounts(t *testing.T) {
	ov, _ := newTestOverlay(t, OverlayOptions{})
	ov.Learn("The light is red. The light!", 5)
	v := ov.View()
	cases := []struct {
		gram []string
		want float64
	}{
		{[]string{"the"}, 2},
		{[]string{"light"}, 2},
		{[]string{EOS}, 2},
		{[]string{BOS, "the"}, 2},
		{[]string{"the", "light"}, 2},
		{[]string{BOS, "the", "light"}, 2},
		{[]string{"light", "is"}, 1},
		{[]string{"the", "light", EOS}, 1},
		{[]string{"red", EOS}, 1},
		{[]string{"red", "the"}, 0}, // across a sentence end
	}
	for _, c := range cases {
		if got := count(t, v, c.gram...); got != c.want {
			t.Errorf("count(%q) = %v, want %v", c.gram, got, c.want)
		}
	}
}

func TestOverlaySecretsNotLearned(t *testing.T) {
	ov, _ := newTestOverlay(t, OverlayOptions{MinTyped: 1})
	ov.Learn("my card is 4111 1111 1111 1111 thanks. Password hunter2x ok, mail kit@example.com now", 1)
	v := ov.View()
	for _, w := range []string{"4111", "1111", "hunter2x", "kit@example.com", "kit", "example.com"} {
		if c := count(t, v, w); c != 0 {
			t.Errorf("count(%q) = %v, want 0 (secret)", w, c)
		}
	}
	// The chain breaks around a secret: no n-gram joins its neighbours,
	// and the words next to it get no sentence marks.
	for _, g := range [][]string{{"is", "thanks"}, {"password", "ok"}, {"is", EOS}, {BOS, "thanks"}, {"mail", "now"}} {
		if c := count(t, v, g...); c != 0 {
			t.Errorf("count(%q) = %v, want 0 (chain broken by a secret)", g, c)
		}
	}
	for _, g := range [][]string{{"card", "is"}, {"thanks", EOS}, {"ok", "mail"}} {
		if c := count(t, v, g...); c != 1 {
			t.Errorf("count(%q) = %v, want 1", g, c)
		}
	}
}

func TestOverlayLearningOff(t *testing.T) {
	ov, _ := newTestOverlay(t, OverlayOptions{})
	ov.SetLearning(false)
	ov.Learn("nothing of this is kept", 1)
	ov.Commit("word", []string{"a"}, 1)
	ov.Reject("teh", "the", 1)
	if n := ov.Entries(); n != 0 || ov.Rejected("teh", "the") {
		t.Errorf("with learning off: %d entries, rejected=%v; want none", n, ov.Rejected("teh", "the"))
	}
	ov.SetLearning(true)
	ov.Learn("now it is kept", 1)
	if ov.Entries() == 0 {
		t.Error("with learning back on nothing was learned")
	}
}

func TestOverlayForget(t *testing.T) {
	ov, x := newTestOverlay(t, OverlayOptions{MinTyped: 1})
	for range 3 {
		ov.Learn("Tell Quillonby the light is bent. Quillonby knows the prism well.", 1)
	}
	ov.Reject("quillonby", "quill", 1)
	if n := ov.Forget("QUILLONBY"); n == 0 {
		t.Fatal("Forget removed nothing")
	}
	v := ov.View()
	if _, ok := v.ID("quillonby"); ok {
		t.Error("forgotten word still has an ID")
	}
	for _, p := range []string{"", "q", "quil"} {
		if got := suggestWords(v, x, []string{"tell"}, p, MaxK); slices.Contains(got, "quillonby") {
			t.Errorf("suggestions for %q still hold the forgotten word: %v", p, got)
		}
	}
	if ov.Rejected("quillonby", "quill") {
		t.Error("rejected pair of the forgotten word survives")
	}
	if b := ov.AppendSection(nil); bytes.Contains(b, []byte("quillonby")) || bytes.Contains(b, []byte("Quillonby")) {
		t.Error("saved overlay still contains the forgotten word")
	}
	// A phrase: only n-grams holding the run go.
	if got := count(t, v, "the", "light"); got != 3 {
		t.Fatalf("count(the light) = %v, want 3", got)
	}
	n := ov.Forget("the light")
	v = ov.View()
	if n != 2 { // the bigram "the light" and the trigram "the light is"
		t.Errorf("Forget(the light) removed %d n-grams, want 2", n)
	}
	for _, g := range [][]string{{"the", "light"}, {"the", "light", "is"}} {
		if c := count(t, v, g...); c != 0 {
			t.Errorf("after Forget(the light): count(%q) = %v, want 0", g, c)
		}
	}
	if c := count(t, v, "the"); c != 6 {
		t.Errorf("after Forget(the light): count(the) = %v, want 6 (kept)", c)
	}
	for _, g := range [][]string{{"light"}, {"light", "is"}, {"the", "prism"}} {
		if c := count(t, v, g...); c != 3 {
			t.Errorf("after Forget(the light): count(%q) = %v, want 3 (kept)", g, c)
		}
	}
}

func TestOverlayWipe(t *testing.T) {
	ov, _ := newTestOverlay(t, OverlayOptions{})
	ov.Learn("Zorblat is here.", 1)
	ov.Reject("teh", "the", 1)
	ov.Wipe()
	if ov.Entries() != 0 || ov.Rejected("teh", "the") || ov.View().VocabSize() != ov.View().Base().VocabSize() {
		t.Error("Wipe left something behind")
	}
}

// Half-life decay: after d days of use a count is multiplied by 2^(−d/h)
// (the definition of a half-life). Days without use do not count.
func TestOverlayDecay(t *testing.T) {
	ov, _ := newTestOverlay(t, OverlayOptions{HalfLifeDays: 2})
	ov.Learn("light", 10)
	ov.Learn("prism", 11) // one day of use later
	ov.Learn("prism", 40) // a gap of 29 calendar days is one day of use
	v := ov.View()
	if got, want := count(t, v, "light"), math.Exp2(-2.0/2); math.Abs(got-want) > 1e-12 {
		t.Errorf("count(light) after 2 days of use = %v, want %v", got, want)
	}
	if got, want := count(t, v, "prism"), math.Exp2(-1.0/2)+1; math.Abs(got-want) > 1e-12 {
		t.Errorf("count(prism) = %v, want %v", got, want)
	}
	// Decayed counts survive a save and load unchanged.
	b := ov.AppendSection(nil)
	x := opticksBase(t)
	ov2, err := LoadOverlay(b, x.m, bvocab{x.b}, OverlayOptions{HalfLifeDays: 2})
	if err != nil {
		t.Fatal(err)
	}
	if got, want := count(t, ov2.View(), "light"), math.Exp2(-1); math.Abs(got-want) > 1e-12 {
		t.Errorf("loaded count(light) = %v, want %v", got, want)
	}
	ov2.Learn("light", 41)
	if got, want := count(t, ov2.View(), "light"), math.Exp2(-1.5)+1; math.Abs(got-want) > 1e-12 {
		t.Errorf("count(light) after one more day = %v, want %v", got, want)
	}
}

func TestOverlayCap(t *testing.T) {
	const cap = 60
	ov, _ := newTestOverlay(t, OverlayOptions{MaxEntries: cap})
	words := strings.Fields("light prism colour ray glass lens water air red blue green violet")
	for i := range 200 {
		ov.Learn("the strong phrase", i)
		ov.Learn(words[i%len(words)]+" "+words[(i*7+3)%len(words)]+" "+words[(i*5+1)%len(words)], i)
		if n := ov.Entries(); n > cap {
			t.Fatalf("after %d sentences: %d entries, cap %d", i, n, cap)
		}
	}
	if c := count(t, ov.View(), "the", "strong", "phrase"); c == 0 {
		t.Error("the most used trigram was evicted")
	}
}

func TestOverlayRejectAndCommit(t *testing.T) {
	ov, x := newTestOverlay(t, OverlayOptions{})
	ov.Reject("Zorb", "zorn", 3)
	if !ov.Rejected("Zorb", "zorn") || ov.Rejected("zorn", "Zorb") {
		t.Error("Rejected does not match Reject")
	}
	ov.Commit("Quexl", []string{BOS, "dear"}, 3)
	ov.Commit("Quexl", []string{"dear"}, 3)
	v := ov.View()
	if c := count(t, v, BOS, "dear", "quexl"); c != 1 {
		t.Errorf("count(<s> dear quexl) = %v, want 1", c)
	}
	if c := count(t, v, "dear", "quexl"); c != 2 {
		t.Errorf("count(dear quexl) = %v, want 2", c)
	}
	if got := suggestWords(v, x, []string{"dear"}, "", 3); !slices.Contains(got, "quexl") {
		t.Errorf("after two commits, suggestions after \"dear\" = %v, want quexl", got)
	}
}

// The blend is a mixture of distributions, so it must sum to one over the
// extended vocabulary (definition of a probability distribution).
func TestOverlayBlendNormalized(t *testing.T) {
	ov, _ := newTestOverlay(t, OverlayOptions{MinTyped: 1})
	ov.Learn("The light of Quillonby is bent by the prism. Quillonby sees the light.", 1)
	ov.Learn("Quillonby bends the light again and again.", 2)
	v := ov.View()
	for _, ctx := range [][]string{{}, {"the"}, {"quillonby", "sees"}, {"of", "quillonby"}, {"nothing", "known"}} {
		ids := []uint32{v.bos}
		for _, w := range ctx {
			id, ok := v.ID(w)
			if !ok {
				id = v.unk
			}
			ids = append(ids, id)
		}
		sum := 0.0
		for w := range uint32(v.VocabSize()) {
			sum += math.Exp(v.LogProb(ids, w))
		}
		if math.Abs(sum-1) > 1e-9 {
			t.Errorf("Σ p(w | %q) = %.12f, want 1", ctx, sum)
		}
	}
}

// bruteBlend ranks every word in the range by LogProb; for the next word
// (prefix "", the whole range), every next-word candidate (nextCandidates).
func bruteBlend(v *OverlayView, ctx []uint32, prefix string, lo, hi uint32, k int) []Scored {
	var cands map[uint32]bool
	if prefix == "" && lo == 0 && hi >= v.V {
		cands = nextCandidates(v, ctx, k)
	}
	var all []Scored
	for w := range uint32(v.VocabSize()) {
		if w < v.V && (w < lo || w >= hi) || w >= v.V && !strings.HasPrefix(v.Word(w), prefix) {
			continue
		}
		if cands != nil && !cands[w] {
			continue
		}
		typed := uint32(0)
		if e := v.uniEntry(w); e != nil {
			typed = e.typed
		}
		if !v.suggestible(w, typed) {
			continue
		}
		all = append(all, Scored{w, v.LogProb(ctx, w)})
	}
	slices.SortFunc(all, compareScored)
	return all[:min(k, len(all))]
}

// TopK must equal ranking every word by LogProb (bruteBlend, which
// scores each word through the blend's definition and sorts; it shares
// only the blend formula with TopK): same words, same order, scores within
// 1e-12. For the next word, "every word" is every next-word candidate
// (blend_next.go), which bruteBlend finds by scoring every base word and
// looking every word up in the user's counts, not through the lists the
// search reads; the other tests that compare with bruteBlend check the
// same. The queries are random (fixed seed, logged) over several
// overlays: defaults, MinTyped 1 (many user-only words are suggestible),
// no recency cache, and one that has learned little; contexts mix base
// words, user-only words, <unk> and sentence starts; prefixes of 0–3
// letters come from base words and user-only words; k runs 1–12.
func TestOverlayTopKExact(t *testing.T) {
	d := ksrSetup(t)
	n := len(d.sentences)
	const seed = 20261202
	t.Logf("seed %d", seed)
	rng := rand.New(rand.NewPCG(seed, 5))
	for _, c := range []struct {
		name  string
		opts  OverlayOptions
		learn int // sentences learned
	}{
		{"defaults", OverlayOptions{}, n / 2},
		{"mintyped-1", OverlayOptions{MinTyped: 1}, n / 2},
		{"no-cache", OverlayOptions{DisableCache: true}, n / 2},
		{"little", OverlayOptions{MinTyped: 1}, 12},
	} {
		t.Run(c.name, func(t *testing.T) {
			ov, err := NewOverlay(d.base.m, bvocab{d.base.b}, c.opts)
			if err != nil {
				t.Fatal(err)
			}
			learnAll(ov, d.sentences[:c.learn])
			v := ov.View()
			userWords := v.words
			if len(userWords) == 0 {
				t.Fatal("the overlay learned no user-only word")
			}
			pick := func() string {
				s := d.sentences[rng.IntN(n)]
				if rng.IntN(3) == 0 {
					return userWords[rng.IntN(len(userWords))]
				}
				return s[rng.IntN(len(s))]
			}
			queries, fast := 0, 0
			for i := range 90 {
				ctx := []uint32{v.bos}
				if i%4 != 0 {
					ctx = ctx[:0]
					for range 1 + rng.IntN(3) {
						id, ok := v.ID(pick())
						if !ok || rng.IntN(12) == 0 {
							id = v.unk
						}
						ctx = append(ctx, id)
					}
				}
				plen := 1 + rng.IntN(3)
				if i%6 == 0 {
					plen = 0 // next-word: scores every candidate in the oracle
				}
				w := pick()
				prefix := w[:min(len(w), plen)]
				if plen > 0 && rng.IntN(8) == 0 {
					prefix = "zq" // no base word: only user words can match, or none
				}
				lo, hi := prefixRange(d.base.b.Vocab, prefix)
				// k up to 12: for larger k the base model's own TopK,
				// which the search starts from, can miss words (in the
				// context "swap <unk>" its top 20 differs from scoring
				// every word by LogProb in 4 places).
				k := 1 + rng.IntN(6)
				if rng.IntN(6) == 0 {
					k = 7 + rng.IntN(6)
				}
				got := v.TopK(ctx, prefix, lo, hi, k, nil)
				want := bruteBlend(v, ctx, prefix, lo, hi, k)
				queries++
				var q query
				v.prepare(ctx, &q)
				var res topBuf
				res.k = min(k, MaxK)
				r := rangeQ{prefix: prefix, lo: lo, hi: min(hi, v.V), whole: prefix == "" && lo == 0 && hi >= v.V}
				if v.threshold(&q, &r, res.k, min(res.k+1, MaxK), &res) {
					fast++
				}
				same := len(got) == len(want)
				for j := 0; same && j < len(got); j++ {
					same = got[j].ID == want[j].ID && math.Abs(got[j].LogP-want[j].LogP) <= 1e-12
				}
				if !same {
					t.Errorf("TopK(ctx %v, prefix %q, k %d) = %v, want %v", ctx, prefix, k, words(v, got), words(v, want))
				}
			}
			t.Logf("%d queries, %d answered by the threshold search without deepening", queries, fast)
		})
	}
}

func words(v *OverlayView, s []Scored) []string {
	var out []string
	for _, x := range s {
		out = append(out, fmt.Sprintf("%s:%.15g", v.Word(x.ID), x.LogP))
	}
	return out
}

// Readers query while writers learn and forget (run with -race).
func TestOverlayConcurrent(t *testing.T) {
	ov, x := newTestOverlay(t, OverlayOptions{MinTyped: 1, MaxEntries: 400})
	var wg sync.WaitGroup
	stop := make(chan struct{})
	for g := range 4 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			dst := make([]Scored, 0, MaxK)
			for i := 0; ; i++ {
				select {
				case <-stop:
					return
				default:
				}
				v := ov.View()
				ctx := []uint32{v.bos, uint32((i * 31) % v.VocabSize())}
				prefix := []string{"", "l", "qu", "pri"}[(i+g)%4]
				lo, hi := prefixRange(x.b.Vocab, prefix)
				dst = v.TopK(ctx, prefix, lo, hi, 3, dst[:0])
				for _, s := range dst {
					if math.IsNaN(s.LogP) || v.Word(s.ID) == "" {
						t.Errorf("bad result %v", s)
						return
					}
				}
				v.LogProb(ctx, uint32(i%v.VocabSize()))
				v.Known("quillonby")
			}
		}()
	}
	for i := range 300 {
		ov.Learn("Quillonby bends the light through a prism number "+strings.Repeat("x", i%7+1)+" again.", i/10)
		ov.Commit("prismatic", []string{"the"}, i/10)
		if i%50 == 49 {
			ov.Forget("quillonby")
		}
		if i == 250 {
			ov.Wipe()
		}
	}
	close(stop)
	wg.Wait()
}

func TestOverlayOptionsInvalid(t *testing.T) {
	x := opticksBase(t)
	cases := []struct {
		name string
		o    OverlayOptions
	}{
		{"negative weight", OverlayOptions{UserWeight: -0.1}},
		{"weights sum to one", OverlayOptions{UserWeight: 0.6, CacheWeight: 0.4}},
		{"NaN half-life", OverlayOptions{HalfLifeDays: math.NaN()}},
		{"negative cap", OverlayOptions{MaxEntries: -1}},
		{"infinite prior", OverlayOptions{UserPrior: math.Inf(1)}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if _, err := NewOverlay(x.m, bvocab{x.b}, c.o); !errors.Is(err, ErrOverlayOptions) {
				t.Errorf("NewOverlay(%+v) error = %v, want ErrOverlayOptions", c.o, err)
			}
		})
	}
	if _, err := NewOverlay(nil, bvocab{x.b}, OverlayOptions{}); !errors.Is(err, ErrOverlayOptions) {
		t.Errorf("NewOverlay(nil model) error = %v, want ErrOverlayOptions", err)
	}
}

// Save → load → save gives the same bytes, and the loaded overlay scores
// like the original (cache off: the cache is not saved).
func TestOverlaySectionRoundTrip(t *testing.T) {
	opts := OverlayOptions{DisableCache: true, MinTyped: 1}
	ov, x := newTestOverlay(t, opts)
	ov.Learn("Quillonby bends the light. The light is Quillonby's!", 3)
	ov.Learn("Send the prism to Ms Zorblat on Tuesday.", 4)
	ov.Reject("teh", "the", 4)
	ov.SetLearning(false)
	b1 := ov.AppendSection(nil)
	ov2, err := LoadOverlay(b1, x.m, bvocab{x.b}, opts)
	if err != nil {
		t.Fatal(err)
	}
	if b2 := ov2.AppendSection(nil); !bytes.Equal(b1, b2) {
		t.Errorf("save → load → save differs:\n%x\n%x", b1, b2)
	}
	if ov2.Learning() || !ov2.Rejected("teh", "the") || !ov2.Known("quillonby") {
		t.Error("loaded overlay lost the learning flag, a rejected pair or a known word")
	}
	v1, v2 := ov.View(), ov2.View()
	for _, ctx := range [][]string{{"the"}, {"bends", "the"}, {"ms"}} {
		c1, c2 := []uint32{v1.bos}, []uint32{v2.bos}
		for _, w := range ctx {
			c1, c2 = append(c1, mustID(t, v1, w)), append(c2, mustID(t, v2, w))
		}
		for _, w := range []string{"light", "prism", "zorblat", "quillonby"} {
			p1, p2 := v1.LogProb(c1, mustID(t, v1, w)), v2.LogProb(c2, mustID(t, v2, w))
			if math.Abs(p1-p2) > 1e-12 {
				t.Errorf("LogProb(%s | %v): saved %v, loaded %v", w, ctx, p1, p2)
			}
		}
	}
}

// Every truncation and a set of damaged headers give ErrOverlayCorrupt or
// ErrOverlayVersion, never a panic (the truncation check follows the
// standard library's compress/flate TestTruncatedStreams).
func TestLoadOverlayCorrupt(t *testing.T) {
	ov, x := newTestOverlay(t, OverlayOptions{})
	ov.Learn("Quillonby bends the light. Send the prism to Zorblat.", 3)
	ov.Reject("teh", "the", 4)
	good := ov.AppendSection(nil)
	for n := range len(good) {
		if _, err := LoadOverlay(good[:n], x.m, bvocab{x.b}, OverlayOptions{}); !errors.Is(err, ErrOverlayCorrupt) {
			t.Fatalf("LoadOverlay(first %d of %d bytes) error = %v, want ErrOverlayCorrupt", n, len(good), err)
		}
	}
	damage := []struct {
		name string
		at   int
		b    byte
		want error
	}{
		{"magic", 0, 'X', ErrOverlayCorrupt},
		{"version", 4, 9, ErrOverlayVersion},
		{"flags", 6, 0x80, ErrOverlayCorrupt},
		{"string count", 19, 0x7f, ErrOverlayCorrupt},
		{"reserved", 36, 1, ErrOverlayCorrupt},
		{"rejected pair index", len(good) - 9, 0x7f, ErrOverlayCorrupt},
	}
	for _, d := range damage {
		t.Run(d.name, func(t *testing.T) {
			b := bytes.Clone(good)
			b[d.at] = d.b
			if _, err := LoadOverlay(b, x.m, bvocab{x.b}, OverlayOptions{}); !errors.Is(err, d.want) {
				t.Errorf("LoadOverlay(%s damaged) error = %v, want %v", d.name, err, d.want)
			}
		})
	}
	if _, err := LoadOverlay(append(bytes.Clone(good), 0), x.m, bvocab{x.b}, OverlayOptions{}); !errors.Is(err, ErrOverlayCorrupt) {
		t.Errorf("LoadOverlay(trailing byte) error = %v, want ErrOverlayCorrupt", err)
	}
}

func FuzzLoadOverlay(f *testing.F) {
	x := opticksBase(f)
	ov, err := NewOverlay(x.m, bvocab{x.b}, OverlayOptions{})
	if err != nil {
		f.Fatal(err)
	}
	f.Add(ov.AppendSection(nil))
	ov.Learn("Quillonby bends the light. Send the prism to Zorblat on Tuesday!", 3)
	ov.Reject("teh", "the", 4)
	f.Add(ov.AppendSection(nil))
	f.Add([]byte("kovl"))
	f.Fuzz(func(t *testing.T, b []byte) {
		o, err := LoadOverlay(b, x.m, bvocab{x.b}, OverlayOptions{})
		if err != nil {
			if !errors.Is(err, ErrOverlayCorrupt) && !errors.Is(err, ErrOverlayVersion) {
				t.Fatalf("LoadOverlay error %v matches no sentinel", err)
			}
			return
		}
		v := o.View()
		lo, hi := prefixRange(x.b.Vocab, "l")
		v.TopK([]uint32{v.bos}, "l", lo, hi, 3, nil)
		v.TopK([]uint32{v.bos, uint32(v.VocabSize() - 1)}, "", 0, v.V, 3, nil)
		b2 := o.AppendSection(nil)
		o2, err := LoadOverlay(b2, x.m, bvocab{x.b}, OverlayOptions{})
		if err != nil {
			t.Fatalf("reloading saved overlay: %v", err)
		}
		if b3 := o2.AppendSection(nil); !bytes.Equal(b2, b3) {
			t.Fatal("write → read → write differs")
		}
	})
}

// Whichever length of base list the view's counter picks first (k words,
// or k+1; see noteShort), TopK must equal ranking every word by LogProb
// (bruteBlend; this checks the search against the blend's definition, not
// against an outside source). The queries type words of held-out sentences
// letter by letter over an overlay that has learned much and one that has
// learned little, so that searches over k words both pass their check and
// fail it (then TopK searches again); the test asserts that both happened.
func TestOverlayTopKBaseListLength(t *testing.T) {
	d := ksrSetup(t)
	n := len(d.sentences)
	for _, c := range []struct {
		name  string
		learn int
	}{
		{"rich", n * 8 / 10},
		{"little", 12},
	} {
		t.Run(c.name, func(t *testing.T) {
			ov, err := NewOverlay(d.base.m, bvocab{d.base.b}, OverlayOptions{MinTyped: 1})
			if err != nil {
				t.Fatal(err)
			}
			learnAll(ov, d.sentences[:c.learn])
			v := ov.View()
			passed, failed, queries := 0, 0, 0
			for _, s := range d.sentences[n*8/10:][:8] {
				ctx := []uint32{v.bos}
				for _, w := range s {
					for i := 0; i <= min(len(w), 3); i++ {
						prefix := w[:i]
						lo, hi := prefixRange(d.base.b.Vocab, prefix)
						h := ctx[max(0, len(ctx)-2):]
						want := bruteBlend(v, h, prefix, lo, hi, 3)
						for _, counter := range []int32{shortCap, -shortCap} {
							v.memo.short.Store(counter)
							got := v.TopK(h, prefix, lo, hi, 3, nil)
							same := len(got) == len(want)
							for j := 0; same && j < len(got); j++ {
								same = got[j].ID == want[j].ID && math.Abs(got[j].LogP-want[j].LogP) <= 1e-12
							}
							if !same {
								t.Errorf("counter %d: TopK(ctx %v, prefix %q) = %v, want %v", counter, h, prefix, words(v, got), words(v, want))
							}
						}
						var q query
						v.prepare(h, &q)
						var res topBuf
						res.k = 3
						r := rangeQ{prefix: prefix, lo: lo, hi: min(hi, v.V), whole: prefix == "" && lo == 0 && hi >= v.V}
						if v.threshold(&q, &r, 3, 3, &res) {
							passed++
						} else {
							failed++
						}
						queries++
					}
					id, ok := v.ID(w)
					if !ok {
						id = v.unk
					}
					ctx = append(ctx, id)
				}
			}
			t.Logf("%d queries: a base list of k words passed the check %d times, failed %d times", queries, passed, failed)
			if c.name == "little" && failed == 0 || passed == 0 {
				t.Errorf("searches over k base words: %d passed, %d failed; the test needs both", passed, failed)
			}
		})
	}
}
