package lm

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// reference is the output of testdata/reference/mkn.py, a separate, plain
// Python implementation of the convention in Estimate's doc, written from
// the formulas of Chen & Goodman 1998 (TR-10-98, §3.4), checked there by two
// probabilities worked by hand (testdata/reference/README.md).
type reference struct {
	Order             int          `json:"order"`
	VocabSize         int          `json:"vocab_size"`
	NGrams            []int        `json:"ngrams"`
	Discounts         [][3]float64 `json:"discounts"`
	Tokens            int64        `json:"tokens"`
	OOV               int64        `json:"oov"`
	Perplexity        float64      `json:"perplexity"`
	PerplexityWithOOV float64      `json:"perplexity_with_oov"`
	Samples           []struct {
		Context []string `json:"context"`
		Word    string   `json:"word"`
		LnP     float64  `json:"ln_p"`
	} `json:"samples"`
}

func loadReference(t *testing.T, name string) reference {
	t.Helper()
	var r reference
	if err := json.Unmarshal([]byte(readFile(t, filepath.Join("testdata", "reference", name))), &r); err != nil {
		t.Fatal(err)
	}
	return r
}

func near(a, b, tol float64) bool {
	return math.Abs(a-b) <= tol*math.Max(1, math.Max(math.Abs(a), math.Abs(b)))
}

func TestEstimateMatchesReference(t *testing.T) {
	cases := []struct{ ref, train, test string }{
		{"toy-order3.json", "toy-train.txt", "toy-test.txt"},
		{"opticks-order2.json", "../opticks-train.txt", "../opticks-test.txt"},
		{"opticks-order3.json", "../opticks-train.txt", "../opticks-test.txt"},
		{"opticks-order4.json", "../opticks-train.txt", "../opticks-test.txt"},
	}
	for _, tc := range cases {
		t.Run(tc.ref, func(t *testing.T) {
			ref := loadReference(t, tc.ref)
			dir := filepath.Join("testdata", "reference")
			x := buildText(t, readFile(t, filepath.Join(dir, tc.train)), ref.Order, ScanOptions{Pretokenized: true}, 0)
			// |V| in the reference excludes <s> (context only).
			if got := len(x.b.Vocab) - 1; got != ref.VocabSize {
				t.Errorf("vocabulary = %d, want %d", got, ref.VocabSize)
			}
			for n := 1; n <= ref.Order; n++ {
				for i := range 3 {
					if !near(x.b.Discounts[n-1][i], ref.Discounts[n-1][i], 1e-12) {
						t.Errorf("order %d D%d = %v, want %v", n, i+1, x.b.Discounts[n-1][i], ref.Discounts[n-1][i])
					}
				}
				if n > 1 && x.m.NGrams()[n-1] != ref.NGrams[n-1] {
					t.Errorf("order %d n-grams = %d, want %d", n, x.m.NGrams()[n-1], ref.NGrams[n-1])
				}
			}
			for _, s := range ref.Samples {
				ctx := x.ids(t, s.Context)
				w := x.ids(t, []string{s.Word})[0]
				for name, got := range map[string]float64{"exact": x.b.LogProb(ctx, w), "compact": x.m.LogProb(ctx, w)} {
					if !near(got, s.LnP, 1e-9) {
						t.Errorf("%s ln p(%s | %v) = %.12f, want %.12f", name, s.Word, s.Context, got, s.LnP)
					}
				}
			}
			bos, eos, unk := x.b.specials()
			res, err := Perplexity(context.Background(), x.m, x.lookup, bos, eos, unk,
				strings.NewReader(readFile(t, filepath.Join(dir, tc.test))), ScanOptions{Pretokenized: true})
			if err != nil {
				t.Fatal(err)
			}
			if res.Tokens != ref.Tokens || res.OOV != ref.OOV {
				t.Errorf("tokens, oov = %d, %d, want %d, %d", res.Tokens, res.OOV, ref.Tokens, ref.OOV)
			}
			if !near(res.Perplexity, ref.Perplexity, 1e-9) || !near(res.PerplexityWithOOV, ref.PerplexityWithOOV, 1e-9) {
				t.Errorf("perplexity = %.10f / %.10f, want %.10f / %.10f", res.Perplexity, res.PerplexityWithOOV, ref.Perplexity, ref.PerplexityWithOOV)
			}
		})
	}
}

// TestSumsToOne checks that every context's distribution is proper: a
// probability distribution sums to 1 (definition; no source needed).
func TestSumsToOne(t *testing.T) {
	text := readFile(t, filepath.Join("testdata", "opticks-train.txt"))
	seed := uint64(20261202)
	t.Logf("seed %d", seed)
	rng := rand.New(rand.NewPCG(seed, 1))
	for _, order := range []int{1, 2, 3, 5} {
		x := buildText(t, text, order, ScanOptions{Pretokenized: true}, 0)
		bos, _, _ := x.b.specials()
		V := uint32(len(x.b.Vocab))
		var ctxs [][]uint32
		// Seen contexts of every order, taken from the model's own n-grams.
		for n := 1; n < order; n++ {
			lv := &x.b.Levels[n-1]
			for range 6 {
				ctxs = append(ctxs, append([]uint32(nil), lv.Key(rng.IntN(lv.Len()))...))
			}
		}
		// Unseen and partly seen contexts.
		for range 6 {
			c := make([]uint32, rng.IntN(order)+1)
			for i := range c {
				c[i] = rng.Uint32N(V)
			}
			ctxs = append(ctxs, c)
		}
		ctxs = append(ctxs, nil, []uint32{bos})
		for _, c := range ctxs {
			t.Run(fmt.Sprintf("order%d/%v", order, c), func(t *testing.T) {
				var sum, sumExact float64
				for w := range V {
					if w == bos {
						continue
					}
					sum += math.Exp(x.m.LogProb(c, w))
					sumExact += math.Exp(x.b.LogProb(c, w))
				}
				if math.Abs(sum-1) > 1e-9 || math.Abs(sumExact-1) > 1e-9 {
					t.Errorf("Σ p(w | %v) = %.15f (exact %.15f), want 1 ± 1e-9", c, sum, sumExact)
				}
			})
		}
	}
}

// TestWorkedExample checks a bigram model on a corpus small enough to work
// out by hand from the formulas in Estimate's doc (Chen & Goodman 1998).
//
// Corpus (3 sentences):  "a b" / "a b" / "a c"
// Bigram counts (order 2 = highest, raw): <s> a:3, a b:2, a c:1, b </s>:2, c </s>:1
// Count-of-counts at order 2: n1=2 (a c, c </s>), n2=2 (a b, b </s>), n3=1 (<s> a), n4=0
//
//	Y = 2/(2+4) = 1/3; D1 = 1 − 2·(1/3)·(2/2) = 1/3; D2 = 2 − 3·(1/3)·(1/2) = 3/2;
//	D3+ = 3 − 4·(1/3)·(0/1) = 3.
//
// Unigram continuation counts N1+(• w): a:1 (<s>), b:1 (a), c:1 (a), </s>:2 (b, c).
// Count-of-counts at order 1: n1=3, n2=1, n3=0 → the fallback discounts apply
// (n3 = 0 leaves D2 undefined): D = 0.5, 1, 1.5.
// |V| = {a, b, c, </s>, <unk>} = 5; S = 1+1+1+2 = 5;
// γ = (0.5·3 + 1·1)/5 = 0.5.
//
//	p(b) = (1−0.5)/5 + 0.5/5 = 0.2;  p(</s>) = (2−1)/5 + 0.5/5 = 0.3;  p(<unk>) = 0.5/5 = 0.1.
//
// Context "a": S = 3, N1 = 1 (c), N2 = 1 (b); γ(a) = (1/3 + 3/2)/3 = 11/18.
//
//	p(b | a) = (2 − 3/2)/3 + (11/18)·0.2 = 1/6 + 11/90 = 26/90.
//	p(c | a) = (1 − 1/3)/3 + (11/18)·0.2 = 2/9 + 11/90 = 31/90.
//	p(</s> | a) = (11/18)·0.3 = 11/60 (unseen after "a": backs off).
//
// Context "c": S = 1, N1 = 1; γ(c) = 1/3: p(</s> | c) = (1 − 1/3)/1 + (1/3)·0.3 = 0.7666…
func TestWorkedExample(t *testing.T) {
	x := buildText(t, "a b\na b\na c\n", 2, ScanOptions{Pretokenized: true}, 0)
	id := func(w string) uint32 { return x.ids(t, []string{w})[0] }
	cases := []struct {
		ctx  []string
		w    string
		want float64
	}{
		{nil, "b", 0.2},
		{nil, "</s>", 0.3},
		{nil, "<unk>", 0.1},
		{[]string{"a"}, "b", 26.0 / 90},
		{[]string{"a"}, "c", 31.0 / 90},
		{[]string{"a"}, "</s>", 11.0 / 60},
		{[]string{"c"}, "</s>", 2.0/3 + 0.1},
		{[]string{"b"}, "a", 0.2 * (1.0 / 3)}, // γ(b) = D2·1/2 = 3/4? see below
	}
	// Context "b": S = 2 (b </s>: 2), N2 = 1; γ(b) = 1.5/2 = 0.75; p(a | b) = 0.75·p(a),
	// p(a) = (1−0.5)/5 + 0.5/5 = 0.2 → 0.15.
	cases[len(cases)-1].want = 0.15
	for _, c := range cases {
		got := math.Exp(x.m.LogProb(x.ids(t, c.ctx), id(c.w)))
		if math.Abs(got-c.want) > 1e-12 {
			t.Errorf("p(%s | %v) = %.15f, want %.15f", c.w, c.ctx, got, c.want)
		}
	}
	if d := x.b.Discounts[1]; !near(d[0], 1.0/3, 1e-12) || !near(d[1], 1.5, 1e-12) || !near(d[2], 3, 1e-12) {
		t.Errorf("order-2 discounts = %v, want [1/3 3/2 3]", d)
	}
}

func TestEstimateErrors(t *testing.T) {
	c, _ := NewCounter(3)
	if _, err := Estimate(context.Background(), c, EstimateOptions{}); err != ErrEmptyCorpus {
		t.Errorf("empty corpus: err = %v, want ErrEmptyCorpus", err)
	}
	for _, n := range []int{0, 6, -1} {
		if _, err := NewCounter(n); err == nil {
			t.Errorf("NewCounter(%d) succeeded", n)
		}
	}
	_ = os.Getenv
}
