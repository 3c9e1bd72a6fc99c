package main

import (
	"bufio"
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"
	"unicode"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"
	"github.com/keyloom/keyloom"
	"github.com/keyloom/keyloom/corpora"
)

const (
	demoModel   = "../../testdata/models/demo-v1.klm"
	routeInputs = "../../testdata/routes/inputs.txt"
)

// openDemo opens the shared demo model with k suggestions.
func openDemo(t *testing.T, k int) *keyloom.Engine {
	t.Helper()
	eng, err := keyloom.Open(demoModel, keyloom.Options{Suggestions: k})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { eng.Close() })
	return eng
}

// newTestPad returns a playground over a fresh demo engine, wide enough
// that nothing is cut.
func newTestPad(t *testing.T, k int) *pad {
	t.Helper()
	p := newPad(openDemo(t, k), "demo-v1", k, true, newPadLook(io.Discard))
	p.Update(tea.WindowSizeMsg{Width: 240, Height: 20})
	return p
}

// press sends keys to the playground's Update, as the terminal would.
func press(t *testing.T, p *pad, keys ...tea.KeyMsg) {
	t.Helper()
	for _, k := range keys {
		p.Update(k)
	}
}

// typeText sends s one key per character; spaces arrive as the space key.
func typeText(t *testing.T, p *pad, s string) {
	t.Helper()
	for _, r := range s {
		if r == ' ' {
			press(t, p, tea.KeyMsg{Type: tea.KeySpace, Runes: []rune{' '}})
			continue
		}
		press(t, p, tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune{r}})
	}
}

// paste sends s as one pasted block.
func paste(t *testing.T, p *pad, s string) {
	t.Helper()
	press(t, p, tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune(s), Paste: true})
}

func key(kt tea.KeyType) tea.KeyMsg { return tea.KeyMsg{Type: kt} }

// screen is what the terminal shows, without colours.
func screen(p *pad) string { return ansi.Strip(p.View()) }

var stripItem = regexp.MustCompile(`(?:^|\s)(\d) (\S+)`)

// shownStrip reads the suggestion strip off the screen: its label ("next" or
// "word") and its words in order.
func shownStrip(t *testing.T, scr string) (label string, words []string) {
	t.Helper()
	for _, row := range strings.Split(scr, "\n") {
		f := strings.Fields(row)
		if len(f) == 0 || (f[0] != "next" && f[0] != "word") {
			continue
		}
		rest := strings.TrimPrefix(strings.TrimSpace(row), f[0])
		for _, m := range stripItem.FindAllStringSubmatch(rest, -1) {
			words = append(words, m[2])
		}
		return f[0], words
	}
	t.Fatalf("no suggestion strip on screen:\n%s", scr)
	return "", nil
}

// shownLine reads the edited line off the screen (cursor cell included, so
// a line ending in a space shows one more blank).
func shownLine(t *testing.T, scr string) string {
	t.Helper()
	for _, row := range strings.Split(scr, "\n") {
		if s, ok := strings.CutPrefix(row, "  » "); ok {
			return s
		}
	}
	t.Fatalf("no line on screen:\n%s", scr)
	return ""
}

// facadeWords returns what the Go facade suggests for before, from an engine
// of its own: completions while a word is typed, predictions after a space.
func facadeWords(t *testing.T, k int, before string) (label string, words []string, fix *keyloom.Correction) {
	t.Helper()
	res, err := openDemo(t, k).Suggest(before)
	if err != nil {
		t.Fatal(err)
	}
	list, label := res.Predictions, "next"
	if res.Prefix != "" {
		list, label = res.Completions, "word"
	}
	for _, s := range list {
		words = append(words, s.Word)
	}
	return label, words, res.Correction
}

// corpusFollowers counts, in the demo corpus the model was built from, the
// words that follow the two-word context a b (case folded).
func corpusFollowers(a, b string) map[string]int {
	words := strings.FieldsFunc(strings.ToLower(corpora.DemoText()), func(r rune) bool {
		return !unicode.IsLetter(r) && !unicode.IsDigit(r) && r != '\''
	})
	n := map[string]int{}
	for i := 2; i < len(words); i++ {
		if words[i-2] == a && words[i-1] == b {
			n[words[i]]++
		}
	}
	return n
}

// topCounted returns the n keys of m with the highest counts.
func topCounted(m map[string]int, n int) []string {
	keys := make([]string, 0, len(m))
	for w := range m {
		keys = append(keys, w)
	}
	slices.SortFunc(keys, func(x, y string) int { return m[y] - m[x] })
	return keys[:min(n, len(keys))]
}

func TestTypeShowsSuggestions(t *testing.T) {
	cases := []struct {
		name, typed, label string
	}{
		{"predictions after a space", "see you at the ", "next"},
		{"completions of a prefix", "see you at the bl", "word"},
		{"capitalised prefix", "See you at the Sh", "word"},
		{"sentence start", "", "next"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			p := newTestPad(t, 3)
			typeText(t, p, tc.typed)
			scr := screen(p)
			label, got := shownStrip(t, scr)
			wantLabel, want, _ := facadeWords(t, 3, tc.typed)
			if label != tc.label || wantLabel != tc.label {
				t.Errorf("strip label %q (facade %q), want %q", label, wantLabel, tc.label)
			}
			if len(want) == 0 {
				t.Fatalf("facade suggests nothing for %q: the case tests nothing", tc.typed)
			}
			if !slices.Equal(got, want) {
				t.Errorf("strip %q, facade Suggest %q\n%s", got, want, scr)
			}
			if line := shownLine(t, scr); strings.TrimRight(line, " ") != strings.TrimRight(tc.typed, " ") {
				t.Errorf("line %q, typed %q", line, tc.typed)
			}
		})
	}
}

// TestTypePredictionsFollowCorpus checks the predictions shown after "see you
// at the " against the text the demo model was built from (corpora/demo,
// counted here): the trigram context is "at the", and the most frequent
// word after it in the training text must be shown first or second.
// Rule: Kneser-Ney keeps the order of seen counts up to its backoff term
// (Chen & Goodman 1998, eq. for modified KN), so near-ties may swap; hence
// "top two" (common practice, no source for the tolerance).
func TestTypePredictionsFollowCorpus(t *testing.T) {
	p := newTestPad(t, 3)
	typeText(t, p, "see you at the ")
	_, got := shownStrip(t, screen(p))
	followers := corpusFollowers("at", "the")
	best := topCounted(followers, 1)
	if len(best) == 0 {
		t.Fatal("the demo corpus has no \"at the\": the check cannot run")
	}
	if len(got) < 2 || (got[0] != best[0] && got[1] != best[0]) {
		t.Errorf("shown %q; the corpus's most frequent word after \"at the\" is %q (counts %v)", got, best[0], topCounted(followers, 5))
	}
	for _, w := range got {
		if followers[strings.ToLower(w)] == 0 {
			t.Errorf("shown %q never follows \"at the\" in the corpus, though %d words do", w, len(followers))
		}
	}
}

func TestTypeCompletionsMatchPrefix(t *testing.T) {
	cases := []struct{ name, typed, prefix string }{
		{"lower case", "fix it night at the la", "la"},
		{"after a space in mid sentence", "thanks for the he", "he"},
		{"capitalised", "We will Gr", "Gr"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			p := newTestPad(t, 3)
			typeText(t, p, tc.typed)
			label, got := shownStrip(t, screen(p))
			if label != "word" || len(got) == 0 {
				t.Fatalf("strip %s %q, want completions", label, got)
			}
			// A completion starts with what was typed, in the typed casing
			// (definition of completion in DESIGN.md; casing rule of Result).
			for _, w := range got {
				if !strings.HasPrefix(w, tc.prefix) {
					t.Errorf("completion %q does not start with %q", w, tc.prefix)
				}
			}
		})
	}
}

func TestTypeAcceptKeys(t *testing.T) {
	const typed = "see you at the "
	_, want, _ := facadeWords(t, 3, typed)
	if len(want) < 3 {
		t.Fatalf("facade gives %q: need three predictions", want)
	}
	cases := []struct {
		name string
		key  tea.KeyMsg
		pick int
	}{
		{"Tab takes the first", key(tea.KeyTab), 0},
		{"F2 takes the second", key(tea.KeyF2), 1},
		{"Alt+3 takes the third", tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune{'3'}, Alt: true}, 2},
		{"Alt+1 takes the first", tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune{'1'}, Alt: true}, 0},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			p := newTestPad(t, 3)
			typeText(t, p, typed)
			press(t, p, tc.key)
			scr := screen(p)
			if got, w := string(p.line), typed+want[tc.pick]+" "; got != w {
				t.Errorf("line %q, want %q", got, w)
			}
			if !strings.Contains(shownLine(t, scr), want[tc.pick]) {
				t.Errorf("screen does not show the accepted word %q:\n%s", want[tc.pick], scr)
			}
			// The strip now predicts after the accepted word.
			_, now := shownStrip(t, scr)
			_, next, _ := facadeWords(t, 3, string(p.line))
			if !slices.Equal(now, next) {
				t.Errorf("after accepting: strip %q, facade %q", now, next)
			}
		})
	}
	t.Run("Tab replaces the typed prefix", func(t *testing.T) {
		p := newTestPad(t, 3)
		typeText(t, p, "see you at the bl")
		_, comp, _ := facadeWords(t, 3, "see you at the bl")
		press(t, p, key(tea.KeyTab))
		if got, w := string(p.line), "see you at the "+comp[0]+" "; got != w {
			t.Errorf("line %q, want %q", got, w)
		}
	})
	t.Run("F9 beyond the strip does nothing", func(t *testing.T) {
		p := newTestPad(t, 3)
		typeText(t, p, typed)
		press(t, p, key(tea.KeyF9))
		if string(p.line) != typed {
			t.Errorf("line %q, want it unchanged", string(p.line))
		}
	})
}

func TestTypeEditingKeys(t *testing.T) {
	cases := []struct {
		name  string
		keys  []tea.KeyMsg
		typed string
		want  string
	}{
		{"backspace", []tea.KeyMsg{key(tea.KeyBackspace)}, "tools", "tool"},
		{"ctrl+w deletes a word", []tea.KeyMsg{key(tea.KeyCtrlW)}, "the blue shed ", "the blue "},
		{"ctrl+u clears", []tea.KeyMsg{key(tea.KeyCtrlU)}, "the blue shed", ""},
		{"left then insert", []tea.KeyMsg{key(tea.KeyLeft), {Type: tea.KeyRunes, Runes: []rune{'X'}}}, "ab", "aXb"},
		{"home then delete", []tea.KeyMsg{key(tea.KeyHome), key(tea.KeyDelete)}, "abc", "bc"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			p := newTestPad(t, 3)
			typeText(t, p, tc.typed)
			press(t, p, tc.keys...)
			if got := string(p.line); got != tc.want {
				t.Errorf("line %q, want %q", got, tc.want)
			}
			// The strip always answers the text before the cursor.
			_, got := shownStrip(t, screen(p))
			_, want, _ := facadeWords(t, 3, p.before())
			if !slices.Equal(got, want) {
				t.Errorf("strip %q, facade for %q gives %q", got, p.before(), want)
			}
		})
	}
}

// TestTypeEnterLearns types an invented word in two finished lines: the
// engine documents (Options.MinTyped, default 2, from the issue) that a new
// word becomes suggestible once it has been typed twice.
func TestTypeEnterLearns(t *testing.T) {
	const word = "snorvickle" // invented; not in the demo corpus
	if strings.Contains(strings.ToLower(corpora.DemoText()), word) {
		t.Fatalf("%q is in the demo corpus; pick another invented word", word)
	}
	offered := func(p *pad) bool {
		typeText(t, p, "the snorv")
		_, got := shownStrip(t, screen(p))
		press(t, p, key(tea.KeyCtrlU))
		for _, w := range got {
			if strings.EqualFold(w, word) {
				return true
			}
		}
		return false
	}
	cases := []struct {
		name      string
		learnOff  bool
		times     int
		suggested bool
	}{
		{"typed twice is suggested", false, 2, true},
		{"typed once is not yet", false, 1, false},
		{"learning off learns nothing", true, 2, false},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			p := newTestPad(t, 3)
			if offered(p) {
				t.Fatalf("%q offered before it was typed", word)
			}
			if tc.learnOff {
				press(t, p, key(tea.KeyCtrlL))
				if !strings.Contains(screen(p), "learning off") {
					t.Errorf("status does not say learning is off:\n%s", screen(p))
				}
			}
			for range tc.times {
				typeText(t, p, "we moved the "+word+" to the shed")
				press(t, p, key(tea.KeyEnter))
				if len(p.line) != 0 {
					t.Fatalf("Enter left %q on the line", string(p.line))
				}
			}
			if got := offered(p); got != tc.suggested {
				t.Errorf("%q offered = %v, want %v\n%s", word, got, tc.suggested, screen(p))
			}
			scr := screen(p)
			wantWords := 0
			if !tc.learnOff {
				wantWords = 7 * tc.times // "we moved the WORD to the shed"
			}
			if !strings.Contains(scr, strconv.Itoa(wantWords)+" words learned") {
				t.Errorf("status lacks %d words learned:\n%s", wantWords, scr)
			}
			if !strings.Contains(scr, "┊ we moved the "+word) {
				t.Errorf("finished line not shown above:\n%s", scr)
			}
			if tc.learnOff && p.eng.UserEntries() != 0 {
				t.Errorf("learning off, yet the overlay holds %d n-grams", p.eng.UserEntries())
			}
		})
	}
}

// TestTypeCorrection drives the correction keys with a fixed proposal, so
// that the editing rules are checked apart from the corrector's choices.
func TestTypeCorrection(t *testing.T) {
	fix := func(apply bool) func(string) *keyloom.Correction {
		return func(before string) *keyloom.Correction {
			if strings.HasSuffix(before, "tbe") {
				return &keyloom.Correction{Typed: "tbe", Replacement: "the", Confidence: 0.9, Apply: apply}
			}
			return nil
		}
	}
	t.Run("space applies, backspace keeps the typed word", func(t *testing.T) {
		p := newTestPad(t, 3)
		p.fixFor = fix(true)
		typeText(t, p, "at tbe ")
		if got := string(p.line); got != "at the " {
			t.Fatalf("after space: %q, want the correction applied", got)
		}
		if scr := screen(p); !strings.Contains(scr, "fixed  tbe → the") {
			t.Errorf("applied correction not shown:\n%s", scr)
		}
		before, _ := p.eng.SaveBytes()
		press(t, p, key(tea.KeyBackspace))
		if got := string(p.line); got != "at tbe " {
			t.Fatalf("after backspace: %q, want the typed word back", got)
		}
		after, _ := p.eng.SaveBytes()
		if bytes.Contains(before, []byte("tbe")) || !bytes.Contains(after, []byte("tbe")) {
			t.Errorf("undo did not record the rejection in the overlay")
		}
		press(t, p, key(tea.KeyBackspace))
		if got := string(p.line); got != "at tbe" {
			t.Errorf("second backspace: %q, want an ordinary delete", got)
		}
	})
	t.Run("backspace after another key is ordinary", func(t *testing.T) {
		p := newTestPad(t, 3)
		p.fixFor = fix(true)
		typeText(t, p, "at tbe x")
		press(t, p, key(tea.KeyBackspace), key(tea.KeyBackspace))
		if got := string(p.line); got != "at the" {
			t.Errorf("line %q, want %q", got, "at the")
		}
	})
	t.Run("not safe: space leaves it", func(t *testing.T) {
		p := newTestPad(t, 3)
		p.fixFor = fix(false)
		typeText(t, p, "at tbe ")
		if got := string(p.line); got != "at tbe " {
			t.Errorf("line %q, want it unchanged", got)
		}
	})
	t.Run("punctuation applies, backspace keeps it", func(t *testing.T) {
		p := newTestPad(t, 3)
		p.fixFor = fix(true)
		typeText(t, p, "at tbe,")
		if got := string(p.line); got != "at the," {
			t.Fatalf("after comma: %q, want the correction applied", got)
		}
		press(t, p, key(tea.KeyBackspace))
		if got := string(p.line); got != "at tbe," {
			t.Errorf("after backspace: %q, want %q", got, "at tbe,")
		}
	})
	t.Run("several runes in one message", func(t *testing.T) {
		p := newTestPad(t, 3)
		p.fixFor = fix(true)
		press(t, p, tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune("at")}, tea.KeyMsg{Type: tea.KeySpace, Runes: []rune{' '}},
			tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune("tbe,")})
		if got := string(p.line); got != "at the," {
			t.Errorf("line %q, want %q", got, "at the,")
		}
	})
	t.Run("not safe: offered after the space, Ctrl+R takes it", func(t *testing.T) {
		p := newTestPad(t, 3)
		p.fixFor = fix(false)
		typeText(t, p, "at tbe ")
		if scr := screen(p); !strings.Contains(scr, "fix?") || !strings.Contains(scr, "tbe → the") {
			t.Errorf("offer not shown:\n%s", scr)
		}
		press(t, p, key(tea.KeyCtrlR))
		if got := string(p.line); got != "at the " {
			t.Errorf("line %q, want %q", got, "at the ")
		}
	})
	t.Run("offer lasts one key", func(t *testing.T) {
		p := newTestPad(t, 3)
		p.fixFor = fix(false)
		typeText(t, p, "at tbe x")
		press(t, p, key(tea.KeyCtrlR))
		if got := string(p.line); got != "at tbe x" {
			t.Errorf("line %q, want it unchanged", got)
		}
	})
	t.Run("pasted text is not corrected", func(t *testing.T) {
		p := newTestPad(t, 3)
		p.fixFor = fix(true)
		paste(t, p, "at tbe ")
		if got := string(p.line); got != "at tbe " {
			t.Errorf("line %q, want it unchanged", got)
		}
	})
	t.Run("offered proposal is shown and Ctrl+R takes it", func(t *testing.T) {
		p := newTestPad(t, 3)
		typeText(t, p, "at tbe")
		p.res.Correction = &keyloom.Correction{Typed: "tbe", Replacement: "the", Confidence: 0.4}
		if scr := screen(p); !strings.Contains(scr, "fix?") || !strings.Contains(scr, "tbe → the") || !strings.Contains(scr, "40%") {
			t.Errorf("proposal not shown:\n%s", scr)
		}
		press(t, p, key(tea.KeyCtrlR))
		if got := string(p.line); got != "at the" {
			t.Errorf("line %q, want %q", got, "at the")
		}
	})
}

// loadRouteInputs reads the shared cross-route input table (one JSON string
// per line); when it is absent it returns the list below, written for this test.
func loadRouteInputs(t *testing.T) []string {
	t.Helper()
	f, err := os.Open(routeInputs)
	if errors.Is(err, fs.ErrNotExist) {
		t.Logf("%s absent: using this test's own inputs", routeInputs)
		return []string{"see you at the ", "see you at the bl", "Thanks for ", "", "Fix-It Night at ", "We ", "the tool li", "See you To", "I will bring the kettle ", "recieve", "teh ", "BLUE SH"}
	}
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var ins []string
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		line := strings.TrimSpace(sc.Text())
		if line == "" || strings.HasPrefix(line, "#") {
			continue
		}
		var s string
		if err := json.Unmarshal([]byte(line), &s); err != nil {
			t.Fatalf("%s: %q: %v", routeInputs, line, err)
		}
		ins = append(ins, s)
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	return ins
}

// TestTypeRoutesAgree: the terminal route shows, for every input of the
// shared table, the suggestions the Go facade returns for the same model.
func TestTypeRoutesAgree(t *testing.T) {
	for _, in := range loadRouteInputs(t) {
		t.Run(strings.ReplaceAll(in, " ", "_"), func(t *testing.T) {
			p := newTestPad(t, 3)
			paste(t, p, in)
			scr := screen(p)
			label, got := shownStrip(t, scr)
			wantLabel, want, fix := facadeWords(t, 3, in)
			if label != wantLabel || !slices.Equal(got, want) {
				t.Errorf("strip %s %q, facade %s %q\n%s", label, got, wantLabel, want, scr)
			}
			if fix != nil && !strings.Contains(scr, fix.Typed+" → "+fix.Replacement) {
				t.Errorf("facade proposes %q → %q, not shown:\n%s", fix.Typed, fix.Replacement, scr)
			}
		})
	}
}

// TestTypeCommand runs "keyloom type" end to end on scripted input (no
// terminal): a line is typed and learned, Ctrl+C quits, the overlay is saved.
func TestTypeCommand(t *testing.T) {
	dir := t.TempDir()
	user := filepath.Join(dir, "me.overlay")
	in := "the snorvickle at the shed\r" + "the snorvickle at the shed\r" + "\x03"
	var out, errb bytes.Buffer
	e := &env{stdin: strings.NewReader(in), stdout: &out, stderr: &errb, cacheDir: dir}
	if code := run(context.Background(), e, []string{"type", "--model", demoModel, "--user", user}); code != 0 {
		t.Fatalf("code %d: %s", code, errb.String())
	}
	st, err := os.Stat(user)
	if err != nil {
		t.Fatalf("overlay not saved: %v\n%s", err, out.String())
	}
	if st.Mode().Perm() != 0o600 {
		t.Errorf("overlay mode %v, want 0600 (typed text is personal data)", st.Mode().Perm())
	}
	// The saved overlay makes the invented word suggestible in another route.
	code, sout, serr := runCmd(t, dir, "suggest", "--model", demoModel, "--user", user, "the snorv")
	if code != 0 || !strings.Contains(strings.ToLower(sout), "snorvickle") {
		t.Errorf("suggest with the saved overlay: code %d %q %q", code, sout, serr)
	}
	for _, args := range [][]string{{"type", "--k", "0"}, {"type", "--k", "10"}, {"type", "extra"}} {
		if code, _, _ := runCmd(t, dir, args...); code != 2 {
			t.Errorf("keyloom %v: code %d, want 2", args, code)
		}
	}
}

// misspellingPairs reads pairs of the Wikipedia common misspellings list
// (corpora/misspellings-dev.tsv, development half; provenance in
// /work/shared/data/SOURCES.md) whose correct word the demo corpus uses at
// least five times, so that the small demo model can know it.
func misspellingPairs(t *testing.T) [][2]string {
	t.Helper()
	seen := map[string]int{}
	for _, w := range strings.FieldsFunc(strings.ToLower(corpora.DemoText()), func(r rune) bool { return !unicode.IsLetter(r) }) {
		seen[w]++
	}
	f, err := os.Open("../../corpora/misspellings-dev.tsv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var pairs [][2]string
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		typo, right, ok := strings.Cut(sc.Text(), "\t")
		if !ok || strings.HasPrefix(typo, "#") || strings.Contains(right, ",") || seen[right] < 5 {
			continue
		}
		pairs = append(pairs, [2]string{typo, right})
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	if len(pairs) < 20 {
		t.Fatalf("only %d usable misspelling pairs", len(pairs))
	}
	return pairs
}

// TestTypeCorrectsWithEngine types real misspellings followed by a space:
// the line must change exactly as the facade's Correct decides for the same
// text, and most misspellings must end up as the list's correct word.
func TestTypeCorrectsWithEngine(t *testing.T) {
	pairs := misspellingPairs(t)
	ref := openDemo(t, 3)
	fixed := 0
	for _, pr := range pairs {
		p := newTestPad(t, 3)
		typeText(t, p, "we will "+pr[0]+" ")
		want := "we will " + pr[0] + " "
		c, err := ref.Correct("we will " + pr[0])
		if err != nil {
			t.Fatal(err)
		}
		if c != nil && c.Apply {
			want = "we will " + c.Replacement + " "
		}
		if got := string(p.line); got != want {
			t.Errorf("%s: line %q, facade Correct says %q", pr[0], got, want)
		}
		if string(p.line) == "we will "+pr[1]+" " {
			fixed++
		}
	}
	// Threshold: at least half of the typos whose word the model knows well
	// are fixed on space (common practice, no source).
	if fixed*2 < len(pairs) {
		t.Errorf("fixed %d of %d misspellings from the Wikipedia list", fixed, len(pairs))
	}
	t.Logf("fixed on space: %d of %d pairs from misspellings-dev.tsv", fixed, len(pairs))

	// Taking a correction back makes the engine leave that word alone.
	for _, pr := range pairs {
		p := newTestPad(t, 3)
		typeText(t, p, "we will "+pr[0]+" ")
		if string(p.line) != "we will "+pr[1]+" " {
			continue
		}
		press(t, p, key(tea.KeyBackspace))
		if got := string(p.line); got != "we will "+pr[0]+" " {
			t.Fatalf("undo: line %q, want the typed %q back", got, pr[0])
		}
		press(t, p, key(tea.KeyBackspace))
		typeText(t, p, " ")
		if got := string(p.line); got != "we will "+pr[0]+" " {
			t.Errorf("after undo, %q was corrected again: %q", pr[0], got)
		}
		return
	}
	t.Error("no misspelling was corrected, so undo could not be checked")
}
