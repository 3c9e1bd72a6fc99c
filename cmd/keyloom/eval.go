package main

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"os"

	"github.com/keyloom/keyloom"
	"github.com/keyloom/keyloom/lm"
)

func runEval(ctx context.Context, e *env, args []string) error {
	fs := newFlags(e, "eval", "TEST...",
		"Measures a model on test text. --ppl reports perplexity and the out-of-vocabulary rate:\n"+
			"every word and each sentence end is an event; perplexity leaves out-of-vocabulary words\n"+
			"out, perplexity_with_oov scores them as <unk>.")
	model := fs.String("model", "", "model file (default: the bundled default model)")
	ppl := fs.Bool("ppl", false, "report perplexity and OOV")
	tokenized := fs.Bool("tokenized", false, "TEST is one sentence per line, tokens separated by spaces, no normalization")
	asJSON := fs.Bool("json", false, "print JSON")
	pos, err := parse(fs, args)
	if err != nil {
		return err
	}
	if len(pos) == 0 {
		return fmt.Errorf("%w: give at least one TEST file (- for standard input)", errUsage)
	}
	if !*ppl {
		return fmt.Errorf("%w: choose a measurement: --ppl", errUsage)
	}
	eng, err := openModel(ctx, e, *model, keyloom.Options{})
	if err != nil {
		return err
	}
	defer eng.Close()
	var readers []io.Reader
	for _, p := range pos {
		if p == "-" {
			readers = append(readers, e.stdin)
			continue
		}
		f, err := os.Open(p)
		if err != nil {
			return err
		}
		defer f.Close()
		readers = append(readers, f)
	}
	lex := eng.Lexicon()
	bos, eos, unk := eng.LM().Specials()
	lookup := func(w []byte) (uint32, bool) { return lex.ID(string(w)) }
	res, err := lm.Perplexity(ctx, eng.LM(), lookup, bos, eos, unk, io.MultiReader(readers...), lm.ScanOptions{Pretokenized: *tokenized})
	if err != nil {
		return err
	}
	if res.Tokens == 0 {
		return fmt.Errorf("the test text holds no words")
	}
	if *asJSON {
		enc := json.NewEncoder(e.stdout)
		enc.SetIndent("", "  ")
		return enc.Encode(res)
	}
	fmt.Fprintf(e.stdout, "events              %d (%d sentences)\n", res.Tokens, res.Sentences)
	fmt.Fprintf(e.stdout, "out of vocabulary   %d (%.2f%%)\n", res.OOV, 100*float64(res.OOV)/float64(res.Tokens))
	fmt.Fprintf(e.stdout, "perplexity          %.3f\n", res.Perplexity)
	fmt.Fprintf(e.stdout, "perplexity with OOV %.3f\n", res.PerplexityWithOOV)
	return nil
}
