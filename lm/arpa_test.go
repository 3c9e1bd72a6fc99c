package lm

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"strings"
	"testing"
)

// writeARPA returns b as ARPA text.
func writeARPA(t testing.TB, b *Backoff) []byte {
	t.Helper()
	var buf bytes.Buffer
	if err := WriteARPA(&buf, b); err != nil {
		t.Fatalf("WriteARPA: %v", err)
	}
	return buf.Bytes()
}

// readARPA reads ARPA text that must be valid.
func readARPA(t testing.TB, text []byte) *Backoff {
	t.Helper()
	b, err := ReadARPA(context.Background(), bytes.NewReader(text))
	if err != nil {
		t.Fatalf("ReadARPA: %v", err)
	}
	return b
}

// layout lays b out and loads it.
func layout(t testing.TB, b *Backoff, qbits int) *Model {
	t.Helper()
	sec, err := AppendSection(nil, b, LayoutOptions{QuantBits: qbits})
	if err != nil {
		t.Fatalf("AppendSection: %v", err)
	}
	m, err := LoadSection(sec)
	if err != nil {
		t.Fatalf("LoadSection: %v", err)
	}
	if err := m.Check(); err != nil {
		t.Fatalf("Check: %v", err)
	}
	return m
}

// event is one scored position of a test text: a context and the next word.
type event struct {
	ctx []uint32
	w   uint32
}

// textEvents returns every event of a pretokenized text (as Perplexity scores
// them), with out-of-vocabulary words mapped to <unk>.
func textEvents(t testing.TB, b *Backoff, text string) []event {
	t.Helper()
	bos, eos, unk := b.specials()
	var out []event
	for _, line := range strings.Split(text, "\n") {
		hist := []uint32{bos}
		toks := strings.Fields(line)
		if len(toks) == 0 {
			continue
		}
		for j := 0; j <= len(toks); j++ {
			w := eos
			if j < len(toks) {
				id, ok := b.ID(toks[j])
				if !ok || id == bos || id == eos {
					id = unk
				}
				w = id
			}
			out = append(out, event{ctx: append([]uint32(nil), hist[max(0, len(hist)-MaxOrder+1):]...), w: w})
			hist = append(hist, w)
		}
	}
	return out
}

// TestARPARoundTrip writes estimated models as ARPA text, reads them back and
// compares with the independent reference (testdata/reference/mkn.py, a
// plain implementation of Chen & Goodman 1998 §3.4): the values read back
// must match its samples within 1e-6, the bound of seven-decimal rounding of
// log10 values (≤ 1.2e-7 per stored value, at most three values per query).
// Every event of the test text must match the model that was written.
func TestARPARoundTrip(t *testing.T) {
	cases := []struct{ ref, train, test string }{
		{"toy-order3.json", "toy-train.txt", "toy-test.txt"},
		{"opticks-order2.json", "../opticks-train.txt", "../opticks-test.txt"},
		{"opticks-order3.json", "../opticks-train.txt", "../opticks-test.txt"},
	}
	for _, tc := range cases {
		t.Run(tc.ref, func(t *testing.T) {
			ref := loadReference(t, tc.ref)
			dir := filepath.Join("testdata", "reference")
			x := buildText(t, readFile(t, filepath.Join(dir, tc.train)), ref.Order, ScanOptions{Pretokenized: true}, 0)
			text := writeARPA(t, x.b)
			b := readARPA(t, text)
			if got, want := fmt.Sprint(b.NGrams()), fmt.Sprint(x.b.NGrams()); got != want {
				t.Fatalf("n-grams read back = %s, want %s", got, want)
			}
			if !equalStrings(b.Vocab, x.b.Vocab) {
				t.Fatalf("vocabulary read back differs")
			}
			m := layout(t, b, 0)
			for _, s := range ref.Samples {
				ctx := x.ids(t, s.Context)
				w := x.ids(t, []string{s.Word})[0]
				if got := b.LogProb(ctx, w); math.Abs(got-s.LnP) > 1e-6 {
					t.Errorf("read back: ln p(%s | %v) = %.9f, reference %.9f", s.Word, s.Context, got, s.LnP)
				}
				if got := m.LogProb(ctx, w); math.Abs(got-s.LnP) > 1e-6 {
					t.Errorf("read back, compact: ln p(%s | %v) = %.9f, reference %.9f", s.Word, s.Context, got, s.LnP)
				}
			}
			for _, e := range textEvents(t, x.b, readFile(t, filepath.Join(dir, tc.test))) {
				if got, want := b.LogProb(e.ctx, e.w), x.b.LogProb(e.ctx, e.w); math.Abs(got-want) > 1e-6 {
					t.Fatalf("ln p(%d | %v) = %.9f after the round trip, %.9f before", e.w, e.ctx, got, want)
				}
			}
			// write → read → write gives the same bytes (STYLE.md, fuzz properties).
			if again := writeARPA(t, b); !bytes.Equal(again, text) {
				t.Errorf("second write differs from the first (%d vs %d bytes)", len(again), len(text))
			}
		})
	}
}

func equalStrings(a, b []string) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// TestARPAFormat checks the written text against the layout of the ARPA
// format (header with one "ngram N=count" per order, \N-grams: sections,
// log10 values, <s> at -99, no weights at the highest order, \end\) on the
// worked bigram example of TestWorkedExample, whose values are computed by
// hand there: p(b) = 0.2, p(</s>) = 0.3, p(<unk>) = 0.1, γ(a) = 11/18,
// p(b | a) = 26/90, p(c | a) = 31/90.
func TestARPAFormat(t *testing.T) {
	x := buildText(t, "a b\na b\na c\n", 2, ScanOptions{Pretokenized: true}, 0)
	text := string(writeARPA(t, x.b))
	lines := strings.Split(text, "\n")
	want := []string{`\data\`, "ngram 1=6", "ngram 2=5", "", `\1-grams:`}
	for i, w := range want {
		if lines[i] != w {
			t.Fatalf("line %d = %q, want %q\n%s", i+1, lines[i], w, text)
		}
	}
	f := func(p float64) string { return fmt.Sprintf("%.7f", math.Log10(p)) }
	for _, w := range []string{
		"-99\t<s>\n",             // <s>: customary -99; γ(<s>) = D3+·3/3 = 1, so no weight
		f(0.3) + "\t</s>\n",      // p(</s>) = 0.3, no successors: no weight
		f(0.1) + "\t<unk>\n",     // p(<unk>) = 0.1
		f(0.2) + "\tb\t",         // p(b) = 0.2
		"\t" + f(11.0/18) + "\n", // γ(a) = 11/18 as a's weight
		f(26.0/90) + "\ta b\n",   // highest order: no weight
		f(31.0/90) + "\ta c\n",   //
		"\n\n\\2-grams:\n",       // sections separated by a blank line
		"\n\n\\end\\\n",          // and closed by \end\
	} {
		if !strings.Contains(text, w) {
			t.Errorf("ARPA text lacks %q:\n%s", w, text)
		}
	}
	if strings.HasSuffix(text, "\\end\\\n") == false {
		t.Errorf("text does not end with \\end\\")
	}
	// Deterministic: the same model writes the same bytes.
	if again := string(writeARPA(t, x.b)); again != text {
		t.Errorf("two writes of one model differ")
	}
}

// TestARPAHandModel reads testdata/arpa/tiny.arpa, whose values were chosen
// by hand, and checks probabilities worked out by hand with the back-off
// rule of the ARPA format (Katz 1987; the rule as given in Backoff.LogProb's
// doc): p(w | h) is the listed value when the n-gram hw is listed, otherwise
// bow(h)·p(w | h minus its first word), with bow(h) = 1 when h is not listed.
// In log10 the product is a sum. The file lists (log10):
//
//	1-grams: <s> -99 bow -0.5 | </s> -0.6 | <unk> -1.5 | a -0.4 bow -0.3 | b -0.7 bow -0.2 | c -1 bow -0.1
//	2-grams: <s> a -0.2 bow -0.15 | a b -0.3 bow -0.25 | a c -0.5 | b </s> -0.1 bow -0.4 | c a -0.45
//	3-grams: <s> a b -0.05 | a b c -0.35 (suffix "b c" not listed) | c b a -0.12 (context "c b" not listed)
func TestARPAHandModel(t *testing.T) {
	b := readARPA(t, []byte(readFile(t, filepath.Join("testdata", "arpa", "tiny.arpa"))))
	if got := strings.Join(b.Vocab, " "); got != "</s> <s> <unk> a b c" {
		t.Fatalf("vocabulary = %q, want byte order", got)
	}
	// ReadARPA adds the missing context "c b" and a successor "b </s> </s>"
	// that carries the weight of "b </s>" (see its doc).
	if got := fmt.Sprint(b.NGrams()); got != "[6 6 4]" {
		t.Errorf("n-grams = %s, want [6 6 4]", got)
	}
	cases := []struct {
		ctx   string
		w     string
		log10 float64
	}{
		{"<s>", "a", -0.2},                   // listed
		{"<s> a", "b", -0.05},                // listed
		{"<s> a", "c", -0.15 - 0.5},          // bow(<s> a) + p(c | a)
		{"<s> a", "</s>", -0.15 - 0.3 - 0.6}, // bow(<s> a) + bow(a) + p(</s>)
		{"a b", "c", -0.35},                  // listed although "b c" is not
		{"a b", "a", -0.25 - 0.2 - 0.4},      // bow(a b) + bow(b) + p(a)
		{"c b", "a", -0.12},                  // listed although "c b" is not
		{"c b", "c", 0 - 0.2 - 1},            // bow(c b) = 1 (not listed) + bow(b) + p(c)
		{"c", "b", -0.1 - 0.7},               // bow(c) + p(b): this is the value given to the added "c b"
		{"b </s>", "a", -0.4 + 0 - 0.4},      // bow(b </s>) + bow(</s>) = 1 + p(a)
		{"a", "<unk>", -0.3 - 1.5},           // bow(a) + p(<unk>)
		{"<s>", "</s>", -0.5 - 0.6},          // bow(<s>) + p(</s>)
		{"<s> <s>", "b", 0 - 0.5 - 0.7},      // "<s> <s>" unlisted (1) + bow(<s>) + p(b)
		{"", "c", -1},                        // unigram
	}
	m := layout(t, b, 0)
	for _, c := range cases {
		ctx := mustIDs(t, b, strings.Fields(c.ctx))
		w := mustIDs(t, b, []string{c.w})[0]
		want := c.log10 * math.Ln10
		if got := b.LogProb(ctx, w); math.Abs(got-want) > 1e-12 {
			t.Errorf("exact: log10 p(%s | %s) = %.6f, want %.6f", c.w, c.ctx, got/math.Ln10, c.log10)
		}
		if got := m.LogProb(ctx, w); math.Abs(got-want) > 1e-12 {
			t.Errorf("compact: log10 p(%s | %s) = %.6f, want %.6f", c.w, c.ctx, got/math.Ln10, c.log10)
		}
	}
	if got := b.LogProb(nil, mustIDs(t, b, []string{BOS})[0]); !math.IsInf(got, -1) {
		t.Errorf("p(<s>) = %v, want zero (-99 in the file)", got)
	}
}

func mustIDs(t *testing.T, b *Backoff, words []string) []uint32 {
	t.Helper()
	out := make([]uint32, len(words))
	for i, w := range words {
		id, ok := b.ID(w)
		if !ok {
			t.Fatalf("word %q not in vocabulary", w)
		}
		out[i] = id
	}
	return out
}

// TestARPAMissingSpecials checks what ReadARPA adds to a file without <s>,
// </s> and <unk>: <s> with probability zero, the others with 10⁻¹⁰ (the
// values documented on ReadARPA).
func TestARPAMissingSpecials(t *testing.T) {
	b := readARPA(t, []byte("\\data\\\nngram 1=2\n\n\\1-grams:\n-0.30103\tx\n-0.30103\ty\n\n\\end\\\n"))
	if got := strings.Join(b.Vocab, " "); got != "</s> <s> <unk> x y" {
		t.Fatalf("vocabulary = %q", got)
	}
	for _, c := range []struct {
		w    string
		want float64
	}{{EOS, -10 * math.Ln10}, {UNK, -10 * math.Ln10}, {BOS, math.Inf(-1)}, {"x", -0.30103 * math.Ln10}} {
		if got := b.LogProb(nil, mustIDs(t, b, []string{c.w})[0]); got != c.want && math.Abs(got-c.want) > 1e-12 {
			t.Errorf("ln p(%s) = %v, want %v", c.w, got, c.want)
		}
	}
	layout(t, b, 8) // the result lays out and passes Check
}

// TestARPAErrors feeds malformed texts; each must fail with ErrARPA at the given line.
func TestARPAErrors(t *testing.T) {
	head := "\\data\\\nngram 1=3\nngram 2=1\n\n\\1-grams:\n-1\t<s>\t-0.5\n-0.5\ta\t-0.2\n-0.5\t</s>\n\n\\2-grams:\n" // 10 lines
	cases := []struct {
		name string
		text string
		line int
	}{
		{"empty", "", 1},
		{"no data line", "hello\nworld\n", 3},
		{"ends in header", "\\data\\\nngram 1=1\n", 3},
		{"no counts", "\\data\\\n\\1-grams:\n", 2},
		{"order out of sequence", "\\data\\\nngram 2=1\n", 2},
		{"order too high", "\\data\\\nngram 1=1\nngram 2=1\nngram 3=1\nngram 4=1\nngram 5=1\nngram 6=1\n", 7},
		{"count not a number", "\\data\\\nngram 1=x\n", 2},
		{"negative count", "\\data\\\nngram 1=-1\n", 2},
		{"not an ngram line", "\\data\\\nngrams 1=1\n", 2},
		{"too many unigrams", "\\data\\\nngram 1=99999999\n", 2},
		{"wrong first section", "\\data\\\nngram 1=1\n\\2-grams:\n", 3},
		{"fewer than announced", "\\data\\\nngram 1=2\n\\1-grams:\n-1\ta\n\\end\\\n", 5},
		{"more than announced", "\\data\\\nngram 1=1\n\\1-grams:\n-1\ta\n-1\tb\n\\end\\\n", 5},
		{"duplicate unigram", "\\data\\\nngram 1=2\n\\1-grams:\n-1\ta\n-1\ta\n\\end\\\n", 5},
		{"unknown word", head + "-0.1\ta zzz\n\\end\\\n", 11},
		{"duplicate bigram", strings.Replace(head, "ngram 2=1", "ngram 2=2", 1) + "-0.1\ta a\n-0.2\ta a\n\\end\\\n", 12},
		{"nan", head + "nan\ta a\n\\end\\\n", 11},
		{"inf", head + "-inf\ta a\n\\end\\\n", 11},
		{"overflow", head + "-1e400\ta a\n\\end\\\n", 11},
		{"out of range", head + "-1e10\ta a\n\\end\\\n", 11},
		{"not a number", head + "abc\ta a\n\\end\\\n", 11},
		{"above one", head + "0.5\ta a\n\\end\\\n", 11},
		{"weight at highest order", head + "-0.1\ta a\t-0.3\n\\end\\\n", 11},
		{"weight not a number", strings.Replace(head, "-0.2\n", "x\n", 1), 7},
		{"too few fields", head + "-0.1\ta\n\\end\\\n", 11},
		{"too many fields", head + "-0.1\ta a a a\n\\end\\\n", 11},
		{"invalid UTF-8", head + "-0.1\ta \xff\n\\end\\\n", 11},
		{"no end", head + "-0.1\ta a\n", 12},
		{"junk for end", head + "-0.1\ta a\n\\the end\\\n", 12},
		{"line too long", head + "-0.1\ta " + strings.Repeat("a", arpaMaxLine) + "\n", 11},
		// Added values must not exceed probability 1: the missing context
		// "a b" of "a b a" gets bow(a) + p(b) = 2 − 0.5 > 0 (log10).
		{"missing context above one", "\\data\\\nngram 1=2\nngram 2=0\nngram 3=1\n\\1-grams:\n-0.1\ta\t2\n-0.5\tb\n\\2-grams:\n\\3-grams:\n-0.1\ta b a\n\\end\\\n", 10},
		// "a b" has a weight and no successor: p(</s> | a b) = 3 + bow(b) + p(</s>) > 0.
		{"weight above one", "\\data\\\nngram 1=3\nngram 2=1\nngram 3=0\n\\1-grams:\n-0.1\ta\n-0.5\tb\n-1\t</s>\n\\2-grams:\n-0.1\ta b\t3\n\\3-grams:\n\\end\\\n", 10},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			b, err := ReadARPA(context.Background(), strings.NewReader(c.text))
			if !errors.Is(err, ErrARPA) {
				t.Fatalf("ReadARPA = %v, %v; want ErrARPA", b != nil, err)
			}
			var ae *ARPAError
			if !errors.As(err, &ae) || ae.Line != c.line {
				t.Errorf("ReadARPA error %v, want line %d", err, c.line)
			}
		})
	}
}

// TestARPACanceled checks that a canceled context stops a long read.
func TestARPACanceled(t *testing.T) {
	x := buildText(t, readFile(t, filepath.Join("testdata", "opticks-train.txt")), 2, ScanOptions{Pretokenized: true}, 0)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := ReadARPA(ctx, bytes.NewReader(writeARPA(t, x.b))); !errors.Is(err, context.Canceled) {
		t.Errorf("ReadARPA on a canceled context = %v, want context.Canceled", err)
	}
}

// TestWriteARPAErrors checks that models that cannot be written give errors.
func TestWriteARPAErrors(t *testing.T) {
	good := func() *Backoff {
		return readARPA(t, []byte("\\data\\\nngram 1=1\n\\1-grams:\n-1\ta\n\\end\\\n"))
	}
	cases := []struct {
		name  string
		spoil func(b *Backoff)
	}{
		{"space in word", func(b *Backoff) { b.Vocab[3] = "a b" }},
		{"empty word", func(b *Backoff) { b.Vocab[3] = "" }},
		{"id out of range", func(b *Backoff) { b.Levels[0].IDs[3] = 99 }},
		{"nan", func(b *Backoff) { b.Levels[0].LogP[3] = math.NaN() }},
		{"short level", func(b *Backoff) { b.Levels[0].LogP = b.Levels[0].LogP[:2] }},
		{"no levels", func(b *Backoff) { b.Levels = nil }},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			b := good()
			c.spoil(b)
			if err := WriteARPA(&bytes.Buffer{}, b); err == nil {
				t.Errorf("WriteARPA succeeded")
			}
		})
	}
}

// TestCompactExport dequantizes an 8-bit model (Model.Backoff), writes it as
// ARPA text, reads it back and lays it out again. Laid out losslessly it
// must give the 8-bit model's probabilities within the text rounding (1e-6);
// quantized again to 8 bits, within the rounding bound of nearest-centroid
// coding: a stored value moves by at most its distance to the nearest
// centroid (found here by brute force over the codebook), so a query moves
// by at most the sum, over the orders it reads, of the largest such distance
// for a probability and for a back-off weight, plus the text rounding.
func TestCompactExport(t *testing.T) {
	x := buildText(t, readFile(t, filepath.Join("testdata", "opticks-train.txt")), 3, ScanOptions{Pretokenized: true}, 8)
	exp := x.m.Backoff(x.b.Vocab)
	if exp == nil {
		t.Fatal("Backoff returned nil")
	}
	if x.m.Backoff(x.b.Vocab[1:]) != nil {
		t.Error("Backoff accepted a vocabulary of the wrong length")
	}
	if got, want := fmt.Sprint(exp.NGrams()), fmt.Sprint(x.m.NGrams()); got != want {
		t.Fatalf("dequantized n-grams = %s, want %s", got, want)
	}
	b := readARPA(t, writeARPA(t, exp))
	lossless := layout(t, b, 0)
	again := layout(t, b, 8)
	tol := quantBound(b, again) + 1e-6 // plus the text rounding
	t.Logf("8-bit re-quantization bound per query: %.4g nats", tol)
	events := textEvents(t, x.b, readFile(t, filepath.Join("testdata", "opticks-test.txt")))
	for _, e := range events {
		want := x.m.LogProb(e.ctx, e.w)
		if got := lossless.LogProb(e.ctx, e.w); math.Abs(got-want) > 1e-6 {
			t.Fatalf("lossless: ln p(%d | %v) = %.9f, 8-bit original %.9f", e.w, e.ctx, got, want)
		}
		if got := again.LogProb(e.ctx, e.w); math.Abs(got-want) > tol {
			t.Fatalf("8-bit again: ln p(%d | %v) = %.9f, 8-bit original %.9f (bound %.4g)", e.w, e.ctx, got, want, tol)
		}
	}
	// Coarser codes on the way back: the bound is no longer trivial.
	coarse := layout(t, b, 5)
	ctol := quantBound(b, coarse) + 1e-6
	t.Logf("5-bit re-quantization bound per query: %.4g nats", ctol)
	for _, e := range events {
		want := x.m.LogProb(e.ctx, e.w)
		if got := coarse.LogProb(e.ctx, e.w); math.Abs(got-want) > ctol {
			t.Fatalf("5-bit: ln p(%d | %v) = %.9f, 8-bit original %.9f (bound %.4g)", e.w, e.ctx, got, want, ctol)
		}
	}
	// Σ check: each context's total probability moves by no more than its terms.
	bos, _, _ := x.b.specials()
	for _, e := range events[:40] {
		var s0, s1, s2 float64
		for w := range uint32(len(x.b.Vocab)) {
			if w == bos {
				continue
			}
			s0 += math.Exp(x.m.LogProb(e.ctx, w))
			s1 += math.Exp(lossless.LogProb(e.ctx, w))
			s2 += math.Exp(again.LogProb(e.ctx, w))
		}
		if math.Abs(math.Log(s1/s0)) > 1e-6 || math.Abs(math.Log(s2/s0)) > tol {
			t.Errorf("Σ p(w | %v) = %.6f lossless, %.6f 8-bit again, original %.6f", e.ctx, s1, s2, s0)
		}
	}
}

// quantBound returns the largest change nearest-centroid coding in m can make
// to a query of the exact model b: per order, the bound of a probability and
// of a back-off weight, summed over the orders.
func quantBound(b *Backoff, m *Model) float64 {
	total := 0.0
	for n := 1; n <= b.Order(); n++ {
		l := &m.lv[n-1]
		lv := &b.Levels[n-1]
		total += bookBound(l.probBook, lv.LogP) + bookBound(l.bowBook, lv.Bow)
	}
	return total
}

func bookBound(cb codebook, vals []float64) float64 {
	if cb == nil {
		return 0
	}
	worst := 0.0
	for _, v := range vals {
		if math.IsInf(v, 0) {
			continue
		}
		d := math.Inf(1)
		for _, c := range cb { // brute force: the distance to the nearest centroid
			d = min(d, math.Abs(v-c))
		}
		worst = max(worst, d)
	}
	return worst
}
