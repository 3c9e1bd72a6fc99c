package main

import (
	"bufio"
	"context"
	"fmt"
	"io"
	"os"

	"github.com/keyloom/keyloom/internal/format"
	"github.com/keyloom/keyloom/lm"
)

func runExport(ctx context.Context, e *env, args []string) error {
	fs := newFlags(e, "export", "--arpa [--model M] [--out FILE]",
		"Writes a model's n-gram tables as ARPA text, the usual interchange format for back-off\n"+
			"n-gram models (log10 probabilities; quantized values are written as stored).")
	model := fs.String("model", "", "model file (default: the bundled default model)")
	arpa := fs.Bool("arpa", false, "write ARPA text")
	out := fs.String("out", "", "output file (default: standard output)")
	if _, err := parse(fs, args); err != nil {
		return err
	}
	if !*arpa {
		return fmt.Errorf("%w: choose a format: --arpa", errUsage)
	}
	eng, err := openModel(ctx, e, *model, engineOptions())
	if err != nil {
		return err
	}
	defer eng.Close()
	lex := eng.Lexicon()
	vocab := make([]string, lex.Len())
	for i := range vocab {
		vocab[i] = lex.Word(uint32(i))
	}
	b := eng.LM().Backoff(vocab)
	if b == nil {
		return fmt.Errorf("model tables and lexicon disagree")
	}
	if *out == "" {
		w := bufio.NewWriterSize(e.stdout, 1<<16)
		if err := lm.WriteARPA(w, b); err != nil {
			return err
		}
		return w.Flush()
	}
	pr, pw := io.Pipe()
	go func() { pw.CloseWithError(lm.WriteARPA(pw, b)) }()
	data, err := io.ReadAll(pr)
	if err != nil {
		return err
	}
	return format.WriteFileAtomic(*out, data, 0o644)
}

// readARPAFile reads an ARPA model from path.
func readARPAFile(ctx context.Context, path string) (*lm.Backoff, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return lm.ReadARPA(ctx, bufio.NewReaderSize(f, 1<<16))
}
