package corpora

import (
	"embed"
	"io"
	"io/fs"
	"path"
	"slices"
	"strings"
)

// demoDir is the directory of the demo corpus inside demoFiles.
const demoDir = "demo"

// demoFiles holds the demo corpus. Only the .txt files are embedded, so the
// directory's README.md is not part of the corpus.
//
//go:embed demo/*.txt
var demoFiles embed.FS

// wordCounts is subtlex-us-word-counts.tsv. Strings are immutable, so this is
// not mutable package state.
//
//go:embed subtlex-us-word-counts.tsv
var wordCounts string

// wordList is scowl-american-english-large.txt.
//
//go:embed scowl-american-english-large.txt
var wordList string

// misspellings is misspellings-dev.tsv.
//
//go:embed misspellings-dev.tsv
var misspellings string

// Document is one file of the demo corpus.
type Document struct {
	// Name is the file name inside the demo directory, such as "notes.txt".
	Name string
	// Text is the whole file: UTF-8 text with one message or note per
	// paragraph and a blank line between paragraphs.
	Text string
}

// Demo returns the files of the invented demo corpus, sorted by name. Each
// call copies the corpus (about 130 kB) into new strings.
func Demo() []Document {
	entries, err := fs.ReadDir(demoFiles, demoDir)
	if err != nil {
		// Not reachable: the directory is compiled in. The package tests
		// compare the result with the files on disk.
		return nil
	}
	docs := make([]Document, 0, len(entries))
	for _, e := range entries {
		if e.IsDir() {
			continue
		}
		b, err := demoFiles.ReadFile(path.Join(demoDir, e.Name()))
		if err != nil {
			continue // not reachable, as above
		}
		docs = append(docs, Document{Name: e.Name(), Text: string(b)})
	}
	slices.SortFunc(docs, func(a, b Document) int { return strings.Compare(a.Name, b.Name) })
	return docs
}

// DemoText returns the whole demo corpus as one text: the files of [Demo] in
// name order, each with its trailing line breaks removed, joined by one blank
// line and ended by a single "\n". Paragraphs therefore stay separated by
// exactly one blank line across file boundaries.
func DemoText() string {
	docs := Demo()
	if len(docs) == 0 {
		return ""
	}
	var b strings.Builder
	for i, d := range docs {
		if i > 0 {
			b.WriteString("\n\n")
		}
		b.WriteString(strings.TrimRight(d.Text, "\r\n"))
	}
	b.WriteByte('\n')
	return b.String()
}

// WordCounts returns a new reader over the SUBTLEX-US word counts: a comment
// line starting with '#', then one "word\tcount" line per word form, highest
// count first.
func WordCounts() io.Reader {
	return strings.NewReader(wordCounts)
}

// WordList returns a new reader over the SCOWL large American English word
// list: one word per line, with no comment lines.
func WordList() io.Reader {
	return strings.NewReader(wordList)
}

// Misspellings returns a new reader over the development half of the common
// misspellings list: a comment line starting with '#', then one
// "misspelling\tcorrections" line per entry, with several corrections
// separated by commas.
func Misspellings() io.Reader {
	return strings.NewReader(misspellings)
}
