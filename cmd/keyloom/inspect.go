package main

import (
	"context"
	"encoding/json"
	"fmt"

	"github.com/keyloom/keyloom/internal/bundle"
	"github.com/keyloom/keyloom/internal/format"
	"github.com/keyloom/keyloom/internal/mmap"
)

type inspectSection struct {
	Kind     string `json:"kind"`
	Offset   uint64 `json:"offset"`
	Bytes    uint64 `json:"bytes"`
	CRC      string `json:"crc32c"`
	Verified string `json:"verified,omitempty"`
}

type inspectReport struct {
	Path          string           `json:"path"`
	Bytes         int              `json:"bytes"`
	Version       string           `json:"version"`
	Sections      []inspectSection `json:"sections"`
	Order         int              `json:"order"`
	Words         int              `json:"words"`
	NGrams        []int            `json:"ngrams"`
	BytesPerNGram float64          `json:"bytes_per_ngram"`
	QuantBits     int              `json:"quant_bits"`
	Discounts     [][3]float64     `json:"discounts,omitempty"`
	Tokens        int64            `json:"tokens"`
	Corpus        string           `json:"corpus,omitempty"`
	Sources       []string         `json:"sources,omitempty"`
	Lexicon       map[string]int   `json:"lexicon_bytes"`
	Layouts       map[string]int   `json:"layouts"` // section layout versions: lexicon, ngrams
	Verified      *bool            `json:"verified,omitempty"`
}

func runInspect(ctx context.Context, e *env, args []string) error {
	fs := newFlags(e, "inspect", "[MODEL]",
		"Prints a model file's sections, sizes, bytes per n-gram and build metadata.\n"+
			"--verify checks the CRC-32C of every section and the consistency of the tables.")
	verify := fs.Bool("verify", false, "check every section's checksum and the tables' consistency")
	asJSON := fs.Bool("json", false, "print JSON")
	pos, err := parse(fs, args)
	if err != nil {
		return err
	}
	var path string
	switch len(pos) {
	case 0:
		if path, err = defaultModelPath(ctx, e); err != nil {
			return err
		}
	case 1:
		path = pos[0]
	default:
		return fmt.Errorf("%w: one MODEL at a time", errUsage)
	}
	r, err := mmap.Open(path)
	if err != nil {
		return err
	}
	defer r.Close()
	m, err := bundle.Load(r.Bytes(), bundle.LoadOptions{})
	if err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	rep := inspectReport{
		Path: path, Bytes: len(r.Bytes()),
		Version: fmt.Sprintf("%d.%d", m.File.Major(), m.File.Minor()),
		Order:   m.LM.Order(), Words: m.Lex.Len(), NGrams: m.LM.NGrams(), QuantBits: m.LM.QuantBits(),
		Discounts: m.Meta.Discounts, Tokens: m.Meta.Tokens, Corpus: m.Meta.Corpus, Sources: m.Meta.Sources,
	}
	total := 0
	for _, n := range rep.NGrams {
		total += n
	}
	if total > 0 {
		rep.BytesPerNGram = float64(rep.Bytes) / float64(total)
	}
	fst, table, casing := m.Lex.SizeBreakdown()
	rep.Lexicon = map[string]int{"fst": fst, "word_table": table, "casing": casing}
	rep.Layouts = map[string]int{"lexicon": m.Lex.LayoutVersion(), "ngrams": m.LM.LayoutVersion()}
	ok := true
	for _, s := range m.File.Sections() {
		is := inspectSection{Kind: s.Kind.String(), Offset: s.Offset, Bytes: s.Length, CRC: fmt.Sprintf("%08x", s.CRC)}
		if *verify {
			if err := m.File.Verify(s.Kind); err != nil {
				is.Verified = "FAILED: " + err.Error()
				ok = false
			} else {
				is.Verified = "ok"
			}
		}
		rep.Sections = append(rep.Sections, is)
	}
	var checkErr error
	if *verify {
		if err := m.Lex.Check(); err != nil {
			checkErr, ok = fmt.Errorf("lexicon: %w", err), false
		}
		if err := m.LM.Check(); err != nil && checkErr == nil {
			checkErr, ok = fmt.Errorf("n-gram tables: %w", err), false
		}
		rep.Verified = &ok
	}
	if *asJSON {
		enc := json.NewEncoder(e.stdout)
		enc.SetIndent("", "  ")
		if err := enc.Encode(rep); err != nil {
			return err
		}
	} else {
		w := e.stdout
		fmt.Fprintf(w, "%s: model file version %s, %d bytes\n\n", path, rep.Version, rep.Bytes)
		fmt.Fprintf(w, "%-10s %10s %10s  %-8s %s\n", "section", "offset", "bytes", "crc32c", "")
		for _, s := range rep.Sections {
			fmt.Fprintf(w, "%-10s %10d %10d  %s %s\n", s.Kind, s.Offset, s.Bytes, s.CRC, s.Verified)
		}
		fmt.Fprintf(w, "\norder %d, %d words, quantization %s; layouts: lexicon %d, n-grams %d\n", rep.Order, rep.Words, qbitsText(rep.QuantBits), rep.Layouts["lexicon"], rep.Layouts["ngrams"])
		for i, n := range rep.NGrams {
			line := fmt.Sprintf("  %d-grams %10d", i+1, n)
			if i < len(rep.Discounts) {
				d := rep.Discounts[i]
				line += fmt.Sprintf("   discounts %.4f %.4f %.4f", d[0], d[1], d[2])
			}
			fmt.Fprintln(w, line)
		}
		fmt.Fprintf(w, "bytes per n-gram %.3f (whole file)\n", rep.BytesPerNGram)
		fmt.Fprintf(w, "lexicon: FST %d bytes (%.2f/word), word table %d, casing %d\n", fst, float64(fst)/float64(max(1, rep.Words)), table, casing)
		fmt.Fprintf(w, "trained on %d tokens", rep.Tokens)
		if rep.Corpus != "" {
			fmt.Fprintf(w, ": %s", rep.Corpus)
		}
		fmt.Fprintln(w)
		if *verify {
			if ok {
				fmt.Fprintln(w, "verify: all checksums and tables ok")
			} else {
				fmt.Fprintln(w, "verify: FAILED")
			}
		}
	}
	if *verify && !ok {
		if checkErr != nil {
			return checkErr
		}
		return fmt.Errorf("%s: %w", path, format.ErrChecksum)
	}
	return nil
}

func qbitsText(q int) string {
	if q == 0 {
		return "lossless"
	}
	return fmt.Sprintf("%d bits", q)
}
