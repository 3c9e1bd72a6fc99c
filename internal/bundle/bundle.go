// Package bundle assembles and opens Keyloom model files: it puts the
// metadata, lexicon (package trie) and n-gram (package lm) sections into one
// container (package internal/format) and loads them back from bytes.
package bundle

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"

	"github.com/keyloom/keyloom/internal/format"
	"github.com/keyloom/keyloom/lm"
	"github.com/keyloom/keyloom/trie"
)

// Meta is the metadata section: what the model is and how it was built.
// It is stored as JSON with fields in this order, so its bytes are deterministic.
type Meta struct {
	Order     int          `json:"order"`
	Vocab     int          `json:"vocab"`
	QuantBits int          `json:"quant_bits"`
	NGrams    []int        `json:"ngrams"`
	Tokens    int64        `json:"tokens"`
	Discounts [][3]float64 `json:"discounts,omitempty"`
	Corpus    string       `json:"corpus,omitempty"`
	Sources   []string     `json:"sources,omitempty"`
	Params    string       `json:"params,omitempty"`
}

// Errors returned by Load.
var (
	// ErrMissingSection is returned when a model file lacks a required section.
	ErrMissingSection = errors.New("bundle: required section missing")
	// ErrMismatch is returned when the sections of a file disagree (lexicon and n-gram vocabulary sizes).
	ErrMismatch = errors.New("bundle: sections disagree")
)

// Encode lays out an exact model as the bytes of one model file.
// qbits is the quantization width (0 = lossless, 4..16). overlay, when not
// nil, is stored as the user-overlay section.
func Encode(b *lm.Backoff, meta Meta, qbits int, overlay []byte) ([]byte, error) {
	entries := make([]trie.Entry, len(b.Vocab))
	for i, w := range b.Vocab {
		entries[i] = trie.Entry{Word: w}
		if i < len(b.Surface) {
			entries[i].Surface = b.Surface[i]
		}
	}
	lex, err := trie.AppendSection(nil, entries)
	if err != nil {
		return nil, fmt.Errorf("lexicon: %w", err)
	}
	grams, err := lm.AppendSection(nil, b, lm.LayoutOptions{QuantBits: qbits})
	if err != nil {
		return nil, fmt.Errorf("n-grams: %w", err)
	}
	meta.Order = b.Order()
	meta.Vocab = len(b.Vocab)
	meta.QuantBits = qbits
	meta.NGrams = b.NGrams()
	meta.Tokens = b.Tokens
	if meta.Discounts == nil {
		meta.Discounts = b.Discounts
	}
	mj, err := json.Marshal(meta)
	if err != nil {
		return nil, err
	}
	secs := []format.Section{
		{Kind: format.KindMeta, Data: mj},
		{Kind: format.KindLexicon, Data: lex},
		{Kind: format.KindNgrams, Data: grams},
	}
	if overlay != nil {
		secs = append(secs, format.Section{Kind: format.KindOverlay, Data: overlay})
	}
	return format.Append(nil, secs)
}

// Model is an opened model file. Its slices alias the bytes given to Load.
type Model struct {
	File    *format.File
	Meta    Meta
	Lex     *trie.Lexicon
	LM      *lm.Model
	Overlay []byte // nil when the file has no overlay section
	Size    int
}

// LoadOptions controls Load.
type LoadOptions struct {
	// VerifyAll checks the CRC-32C of every section and walks the lexicon
	// (reads every page). Without it, opening reads only the header, the
	// section table, the metadata and the first bytes of each section, so
	// it costs microseconds whatever the file's size; every later read is
	// bounds-checked, so damaged bytes give wrong answers or errors, never a
	// crash. vellum only ever sees the FST after the full walk.
	VerifyAll bool
}

// Load opens the model file held in b without copying its tables.
func Load(b []byte, opts LoadOptions) (*Model, error) {
	f, err := format.Parse(b)
	if err != nil {
		return nil, err
	}
	if opts.VerifyAll {
		if err := f.VerifyAll(); err != nil {
			return nil, err
		}
	}
	m := &Model{File: f, Size: len(b)}
	mb, ok := f.Section(format.KindMeta)
	if !ok {
		return nil, fmt.Errorf("%w: metadata", ErrMissingSection)
	}
	if err := f.Verify(format.KindMeta); err != nil {
		return nil, err
	}
	if err := json.Unmarshal(mb, &m.Meta); err != nil {
		return nil, fmt.Errorf("%w: metadata: %v", format.ErrCorrupt, err)
	}
	lb, ok := f.Section(format.KindLexicon)
	if !ok {
		return nil, fmt.Errorf("%w: lexicon", ErrMissingSection)
	}
	if opts.VerifyAll {
		m.Lex, err = trie.LoadSection(lb)
	} else {
		m.Lex, err = trie.LoadSectionWith(lb, trie.LoadOptions{SkipWalk: true})
	}
	if err != nil {
		return nil, err
	}
	gb, ok := f.Section(format.KindNgrams)
	if !ok {
		return nil, fmt.Errorf("%w: n-grams", ErrMissingSection)
	}
	if m.LM, err = lm.LoadSection(gb); err != nil {
		return nil, err
	}
	if m.LM.VocabSize() != m.Lex.Len() {
		return nil, fmt.Errorf("%w: lexicon has %d words, n-gram tables %d", ErrMismatch, m.Lex.Len(), m.LM.VocabSize())
	}
	if ob, ok := f.Section(format.KindOverlay); ok {
		if err := f.Verify(format.KindOverlay); err != nil {
			return nil, err
		}
		m.Overlay = ob
	}
	return m, nil
}

// Source is one input of a build.
type Source struct {
	Name string
	R    io.Reader
	Kind SourceKind
	// Weight is the pseudo-count of each word of a word list.
	Weight float64
}

// SourceKind tells how a build reads a source.
type SourceKind int

// Kinds of build input.
const (
	SourceText       SourceKind = iota // running text
	SourceTokenized                    // one sentence per line, tokens separated by spaces
	SourceWordCounts                   // word<TAB>count lines
	SourceWordList                     // one word per line
	SourceShards                       // count shard lines, n-gram<TAB>count (lm/SHARDS.md)
)

// BuildOptions controls Build.
type BuildOptions struct {
	Order     int    // default 3
	QuantBits int    // default 8; -1 means lossless
	Corpus    string // description stored in the metadata
	// ListWeight is lm.EstimateOptions.ListWeight.
	ListWeight float64
	// Progress, if not nil, reports bytes read from the current source.
	Progress func(source string, bytes int64)

	// Mem bounds the memory of the n-gram counts in bytes; past it sorted
	// runs spill to TempDir and are merged at the end (0 = no bound).
	Mem int64
	// Workers is the number of goroutines counting text (0 = 1). The model
	// is the same for any value.
	Workers int
	// TempDir is where spilled runs go ("" = the system default).
	TempDir string
	// Tokens, if not nil, is called with the tokens counted so far whenever
	// Progress is (bounded or parallel builds only).
	Tokens func(tokens int64)
}

// Build counts the sources, estimates a modified Kneser-Ney model and returns
// the exact model and the bytes of its model file.
func Build(ctx context.Context, sources []Source, opts BuildOptions) (*lm.Backoff, []byte, error) {
	order := opts.Order
	if order == 0 {
		order = 3
	}
	q := opts.QuantBits
	switch {
	case q == 0:
		q = 8
	case q < 0:
		q = 0
	}
	tally := opts.Mem > 0 || opts.Workers > 1
	for _, s := range sources {
		tally = tally || s.Kind == SourceShards
	}
	if tally {
		return buildTally(ctx, sources, opts, order, q)
	}
	c, err := lm.NewCounter(order)
	if err != nil {
		return nil, nil, err
	}
	names, err := addSources(ctx, c, sources, opts)
	if err != nil {
		return nil, nil, err
	}
	b, err := lm.Estimate(ctx, c, lm.EstimateOptions{ListWeight: opts.ListWeight})
	if err != nil {
		return nil, nil, err
	}
	data, err := Encode(b, Meta{Corpus: opts.Corpus, Sources: names}, q, nil)
	return b, data, err
}

// buildTally is Build through lm.Tally: bounded memory, several workers or
// count shards. It gives the same bytes as the single-Counter path.
func buildTally(ctx context.Context, sources []Source, opts BuildOptions, order, q int) (*lm.Backoff, []byte, error) {
	t, err := lm.NewTally(lm.TallyOptions{Order: order, Workers: opts.Workers, MemBudget: opts.Mem, TempDir: opts.TempDir})
	if err != nil {
		return nil, nil, err
	}
	defer t.Close()
	names, err := addSources(ctx, t, sources, opts)
	if err != nil {
		return nil, nil, err
	}
	cs, err := t.Counts(ctx)
	if err != nil {
		return nil, nil, err
	}
	if err := t.Close(); err != nil {
		return nil, nil, err
	}
	b, err := lm.EstimateCounts(ctx, cs, lm.EstimateOptions{ListWeight: opts.ListWeight})
	if err != nil {
		return nil, nil, err
	}
	data, err := Encode(b, Meta{Corpus: opts.Corpus, Sources: names}, q, nil)
	return b, data, err
}

// counter is what a build feeds its sources to: an lm.Counter or an lm.Tally.
type counter interface {
	AddText(ctx context.Context, r io.Reader, opts lm.ScanOptions, progress func(bytes int64)) error
	AddWordCounts(r io.Reader) error
	AddWordList(r io.Reader, weight float64) error
	Tokens() int64
}

// shardReader is a counter that also reads count shards (lm.Tally).
type shardReader interface {
	AddShards(ctx context.Context, r io.Reader) error
}

// addSources feeds every source to c and returns their names.
func addSources(ctx context.Context, c counter, sources []Source, opts BuildOptions) ([]string, error) {
	var names []string
	for _, s := range sources {
		names = append(names, s.Name)
		var err error
		switch s.Kind {
		case SourceText, SourceTokenized:
			var prog func(int64)
			if opts.Progress != nil {
				name := s.Name
				prog = func(n int64) {
					if opts.Tokens != nil {
						opts.Tokens(c.Tokens())
					}
					opts.Progress(name, n)
				}
			}
			err = c.AddText(ctx, s.R, lm.ScanOptions{Pretokenized: s.Kind == SourceTokenized}, prog)
		case SourceWordCounts:
			err = c.AddWordCounts(s.R)
		case SourceWordList:
			err = c.AddWordList(s.R, s.Weight)
		case SourceShards:
			sr, ok := c.(shardReader)
			if !ok {
				return nil, fmt.Errorf("bundle: internal error: shards on the in-memory path")
			}
			err = sr.AddShards(ctx, s.R)
		}
		if err != nil {
			return nil, fmt.Errorf("%s: %w", s.Name, err)
		}
	}
	return names, nil
}
