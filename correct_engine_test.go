package keyloom

import (
	"bufio"
	"bytes"
	"context"
	"os"
	"slices"
	"strings"
	"testing"

	"github.com/keyloom/keyloom/corpora"
	"github.com/keyloom/keyloom/correct"
	"github.com/keyloom/keyloom/internal/bundle"
	"github.com/keyloom/keyloom/internal/evaluate"
	"github.com/keyloom/keyloom/lm"
)

// englishModel builds a model the way the default one is built (the demo
// corpus as running text, SUBTLEX-US counts mixed into the unigrams, the
// SCOWL list for coverage) but without the demo documents named in leave,
// and opens it.
func englishModel(t testing.TB, leave ...string) *Engine {
	t.Helper()
	var kept []string
	for _, d := range corpora.Demo() {
		left := false
		for _, l := range leave {
			left = left || d.Name == l
		}
		if !left {
			kept = append(kept, strings.TrimRight(d.Text, "\r\n"))
		}
	}
	return openEnglish(t, englishData(t, strings.Join(kept, "\n\n")+"\n"), Options{})
}

// englishData builds a model from text the way the default model is built
// from the demo corpus, and returns its bytes.
func englishData(t testing.TB, text string) []byte {
	t.Helper()
	_, data, err := bundle.Build(context.Background(), []bundle.Source{
		{Name: "demo", R: strings.NewReader(text), Kind: bundle.SourceText},
		{Name: "subtlex", R: corpora.WordCounts(), Kind: bundle.SourceWordCounts},
		{Name: "scowl", R: corpora.WordList(), Kind: bundle.SourceWordList, Weight: 0.5},
	}, bundle.BuildOptions{Order: 3, ListWeight: 0.5})
	if err != nil {
		t.Fatalf("bundle.Build: %v", err)
	}
	return data
}

// openEnglish opens model bytes and closes the engine when the test ends.
func openEnglish(t testing.TB, data []byte, opts Options) *Engine {
	t.Helper()
	e, err := OpenBytes(data, opts)
	if err != nil {
		t.Fatalf("OpenBytes: %v", err)
	}
	t.Cleanup(func() { e.Close() })
	return e
}

// TestCorrectFalseAutoApply types the 20,000 most frequent SUBTLEX-US words
// (Brysbaert & New 2009) correctly, each on its own; the engine may replace
// at most 0.5 % of them on space (target of issue 4). It also bounds the
// share of them that get any alternative offered to 9 % (project choice,
// no source: set just above the 8.8 % measured before the rare listed word
// rule, commonWords, so that it fails if that rule reaches common words;
// the rule left the share unchanged, 8.84 % with one cross-validation
// fold's error model, 8.79 % with the built-in one).
func TestCorrectFalseAutoApply(t *testing.T) {
	e := englishModel(t)
	sc := bufio.NewScanner(corpora.WordCounts())
	n, fired, offered := 0, 0, 0
	var examples []string
	for sc.Scan() && n < 20000 {
		w, _, ok := strings.Cut(sc.Text(), "\t")
		if !ok || strings.HasPrefix(w, "#") {
			continue
		}
		n++
		c, err := e.Correct(w)
		if err != nil {
			t.Fatalf("Correct(%q): %v", w, err)
		}
		if c != nil {
			offered++
		}
		if c != nil && c.Apply {
			fired++
			if len(examples) < 10 {
				examples = append(examples, w+"→"+c.Replacement)
			}
		}
	}
	rate, offers := float64(fired)/float64(n), float64(offered)/float64(n)
	t.Logf("auto-apply fired on %d of %d frequent words (%.3f%%), e.g. %v; alternatives offered on %.2f%%", fired, n, 100*rate, examples, 100*offers)
	if n != 20000 || rate > 0.005 {
		t.Errorf("auto-apply fired on %.3f%% of %d correct words, want ≤ 0.5%% of 20000", 100*rate, n)
	}
	if offers > 0.09 {
		t.Errorf("alternatives offered on %.2f%% of %d correct words, want ≤ 9%%", 100*offers, n)
	}
}

// TestCorrectRealWordInContext checks the rule for words the lexicon knows
// (issue 4: "never replace a word the lexicon or the user overlay knows
// unless context makes the alternative far more likely"): a listed but
// rare word is replaced after words that make the frequent one far
// likelier, and left alone without them or once the user has taught it.
func TestCorrectRealWordInContext(t *testing.T) {
	var text string
	for _, w := range []string{"a", "my", "her", "his", "our", "good", "new", "old", "big", "dull", "first", "last"} {
		text += "she starts the " + w + " job on monday.\nthe " + w + " job is near the station.\n"
	}
	text += "he likes the new car.\nthe new house is big.\nthe new plan is good.\n"
	_, data, err := bundle.Build(context.Background(), []bundle.Source{
		{Name: "text", R: strings.NewReader(text), Kind: bundle.SourceText},
		{Name: "scowl", R: corpora.WordList(), Kind: bundle.SourceWordList, Weight: 0.5},
	}, bundle.BuildOptions{Order: 3})
	if err != nil {
		t.Fatal(err)
	}
	e, err := OpenBytes(data, Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer e.Close()
	tests := []struct {
		before string
		apply  bool
	}{
		{"she starts the new kob", true},
		{"kob", false},         // no context: the prior alone never replaces a known word
		{"the new job", false}, // a right word stays
	}
	for _, tc := range tests {
		t.Run(tc.before, func(t *testing.T) {
			c, err := e.Correct(tc.before)
			if err != nil {
				t.Fatal(err)
			}
			got := c != nil && c.Apply
			if got != tc.apply || got && c.Replacement != "job" {
				t.Errorf("Correct(%q) = %+v, want apply %v (job)", tc.before, c, tc.apply)
			}
		})
	}
	if err := e.Learn("my kob. the kob. a kob."); err != nil {
		t.Fatal(err)
	}
	if c, _ := e.Correct("she starts the new kob"); c != nil && c.Apply {
		t.Errorf("Correct after teaching kob = %+v, want a word the user taught left alone", c)
	}
}

// TestCorrectRareListedWord checks the engine's rule for a word the
// lexicon lists but the model ranks below its commonWords most probable
// words: its correction is offered, never applied on space, and a word the
// user taught is left alone. The pairs are from the development half of
// the Wikipedia list of common misspellings (corpora/misspellings-dev.tsv);
// SCOWL lists every typed word, SUBTLEX-US has them rarely or not at all.
func TestCorrectRareListedWord(t *testing.T) {
	e := englishModel(t)
	tests := []struct{ typed, want string }{
		{"aircrafts", "aircraft"},
		{"fightings", "fighting"},
		{"liquify", "liquefy"},
		{"heterogenous", "heterogeneous"},
		{"unmistakeably", "unmistakably"},
	}
	for _, tc := range tests {
		t.Run(tc.typed, func(t *testing.T) {
			if _, ok := e.model.Lex.ID(tc.typed); !ok {
				t.Fatalf("the lexicon does not list %q", tc.typed)
			}
			c, err := e.Correct(tc.typed)
			if err != nil {
				t.Fatal(err)
			}
			if c == nil || c.Apply || !slices.Contains(append([]string{c.Replacement}, c.Alternatives...), tc.want) {
				t.Errorf("Correct(%q) = %+v, want %q offered, not applied", tc.typed, c, tc.want)
			}
		})
	}
	if err := e.Learn("the aircrafts landed. two aircrafts. new aircrafts."); err != nil {
		t.Fatal(err)
	}
	if c, err := e.Correct("aircrafts"); err != nil || c != nil {
		t.Errorf("Correct(aircrafts) after teaching it = %+v, %v, want it left alone", c, err)
	}
}

// TestCorrectNumbersLeftAlone: a mistyped number cannot be told from a
// right one, so numbers and the digits in words are never corrected
// (common practice, no source).
func TestCorrectNumbersLeftAlone(t *testing.T) {
	e := openTest(t)
	for _, in := range []string{"370", "see you at 8.15", "12,500", "+44", "on the 17th"} {
		t.Run(in, func(t *testing.T) {
			c, err := e.Correct(in)
			if err != nil || c != nil {
				t.Errorf("Correct(%q) = %+v, %v, want nothing", in, c, err)
			}
		})
	}
}

// TestTypistHeldOut types each demo file with the key-geometry noise
// model at 8 % of letters (Azenkot & Zhai 2012 report about 8 % for touch
// typing without decoding) on a model that has not seen that file: the
// default recipe without it (leave-one-file-out). Goal of issue 4: at
// least 85 % of the corrupted words repaired and at most 1 % of the clean
// ones broken, pooled over the files. One fixed seed keeps it repeatable.
func TestTypistHeldOut(t *testing.T) {
	kb, err := LayoutQWERTY.Keyboard()
	if err != nil {
		t.Fatal(err)
	}
	var corrupted, repaired, clean, broken int64
	for _, d := range corpora.Demo() {
		e := englishModel(t, d.Name)
		var sents [][]string
		sc := lm.NewScanner(bytes.NewReader([]byte(d.Text)), lm.ScanOptions{})
		for sc.Scan() {
			s := make([]string, len(sc.Tokens()))
			for i, tok := range sc.Tokens() {
				s[i] = string(tok)
			}
			sents = append(sents, s)
		}
		fix, fixErr := evaluate.NewFixer(e.CorrectWord)
		r, err := evaluate.RunNoisy(context.Background(), e, fix, sents, correct.NewTypist(kb, 1, 0.08).Type, 3)
		if err == nil {
			err = fixErr()
		}
		if err != nil {
			t.Fatal(err)
		}
		t.Logf("%s: %d of %d corrupted words repaired (%.2f%%), %d of %d clean broken; %+v",
			d.Name, r.Repaired, r.Corrupted, 100*r.RepairedShare, r.Broken, r.Words-r.Corrupted, r.Misses)
		corrupted += r.Corrupted
		repaired += r.Repaired
		clean += r.Words - r.Corrupted
		broken += r.Broken
	}
	rep, brk := float64(repaired)/float64(corrupted), float64(broken)/float64(clean)
	t.Logf("pooled: %.2f%% of %d corrupted words repaired, %.3f%% of %d clean broken", 100*rep, corrupted, 100*brk, clean)
	if corrupted < 1000 || rep < 0.85 || brk > 0.01 {
		t.Errorf("typist repaired %.2f%% of %d corrupted words and broke %.3f%% of clean ones, want ≥ 85%% and ≤ 1%%", 100*rep, corrupted, 100*brk)
	}
}

// TestCorrectSentenceStartPrior checks that the first word of a sentence
// is ranked by its frequency, not by how often the model's running text
// starts a sentence with it. The running text is the demo corpus plus
// sentences that all start with "fourteen"; the typed words and the
// corrections they must get first come from the development half of the
// Wikipedia list of common misspellings (corpora/misspellings-dev.tsv):
// "fourties" → "forties" and "fromed" → "formed", whose competitors
// "fourteen" and "from" start every added sentence.
func TestCorrectSentenceStartPrior(t *testing.T) {
	text := corpora.DemoText()
	for _, rest := range []string{"people came to the party", "days passed before we heard", "cars were parked outside",
		"of them signed up", "boxes arrived on monday", "from the list replied", "from the office came along",
		"from our street joined", "from the team stayed late", "from the class passed"} {
		text += "\nFourteen " + rest + ".\nFrom " + rest + ".\n"
	}
	e := openEnglish(t, englishData(t, text), Options{})
	tests := []struct{ before, want string }{
		{"fourties", "forties"},
		{"Fourties", "Forties"},
		{"fromed", "formed"},
		{"We sat down. fromed", "formed"},
	}
	for _, tc := range tests {
		t.Run(tc.before, func(t *testing.T) {
			c, err := e.Correct(tc.before)
			if err != nil {
				t.Fatal(err)
			}
			if c == nil || c.Replacement != tc.want {
				t.Errorf("Correct(%q) = %+v, want %q first", tc.before, c, tc.want)
			}
		})
	}
}

// TestCorrectDevCrossValidated measures the engine's correction of
// misspellings its spelling-error model has not seen: 5-fold
// cross-validation over the development half of the Wikipedia list of
// common misspellings (corpora/misspellings-dev.tsv), each fold corrected
// by a model built as the default one with an error model trained on the
// other four, every word typed on its own as `keyloom eval --correct
// --folds 5` does. The floors are the issue's goals (top-1 ≥ 90 %, top-3
// ≥ 97 %; measured 92.87 % and 97.05 %, BENCHMARKS.md, corrector round 9). (The default model leaves
// SUBTLEX-US contraction halves out, so `keyloom eval` shows slightly
// different figures.)
func TestCorrectDevCrossValidated(t *testing.T) {
	if testing.Short() {
		t.Skip("builds a model and corrects 2,173 words (about 20 s)")
	}
	f, err := os.Open("corpora/misspellings-dev.tsv")
	if err != nil {
		t.Fatal(err)
	}
	pairs, err := correct.ParsePairs(f)
	f.Close()
	if err != nil {
		t.Fatalf("ParsePairs: %v", err)
	}
	var kept []string
	for _, d := range corpora.Demo() {
		kept = append(kept, strings.TrimRight(d.Text, "\r\n"))
	}
	data := englishData(t, strings.Join(kept, "\n\n")+"\n")
	const folds = 5
	n, top1, top3 := 0, 0, 0
	for k := range folds {
		train, test := correct.SplitPairs(pairs, k, folds)
		e := openEnglish(t, data, Options{ErrorModel: correct.TrainErrorModel(train, correct.TrainOptions{})})
		for _, p := range test {
			c, err := e.Correct(p.Typed)
			if err != nil {
				t.Fatalf("Correct(%q): %v", p.Typed, err)
			}
			n++
			if c == nil {
				continue
			}
			for i, w := range append([]string{c.Replacement}, c.Alternatives...) {
				if slices.ContainsFunc(p.Intended, func(x string) bool { return strings.EqualFold(x, w) }) {
					if i == 0 {
						top1++
					}
					top3++
					break
				}
			}
		}
	}
	p1, p3 := 100*float64(top1)/float64(n), 100*float64(top3)/float64(n)
	t.Logf("%d-fold cross-validation over %d misspellings: top-1 %.2f%%, top-3 %.2f%%", folds, n, p1, p3)
	if n < 2000 || p1 < 90 || p3 < 97 {
		t.Errorf("cross-validated top-1 %.2f%%, top-3 %.2f%% of %d, want ≥ 90%% and ≥ 97%%", p1, p3, n)
	}
}

// TestListed checks which typed words the engine counts as listed: the
// words of the model's text (engine_test.go's shedText), whatever their
// case and the punctuation around them, and nothing else (the cases are
// read off that text by hand).
func TestListed(t *testing.T) {
	e := openTest(t)
	for _, c := range []struct {
		name, word string
		want       bool
	}{
		{"plain", "ladder", true},
		{"capitalised", "Ladder", true},
		{"punctuation around", "(shed),", true},
		{"all caps in the text", "nasa", true},
		{"not in the text", "ladders", false},
		{"a slip", "sged", false},
		{"empty", "", false},
		{"punctuation only", "?!", false},
	} {
		if got := e.Listed(c.word); got != c.want {
			t.Errorf("%s: Listed(%q) = %v, want %v", c.name, c.word, got, c.want)
		}
	}
}
