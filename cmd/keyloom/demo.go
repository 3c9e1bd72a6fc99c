package main

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"time"

	"github.com/keyloom/keyloom"
	"github.com/keyloom/keyloom/corpora"
	"github.com/keyloom/keyloom/internal/bundle"
	"github.com/keyloom/keyloom/internal/format"
	"github.com/keyloom/keyloom/lm"
)

func runDemo(ctx context.Context, e *env, args []string) error {
	fs := newFlags(e, "demo", "",
		"Builds a model from the bundled demo corpus (the invented notes and messages of a\n"+
			"volunteer coordinator) plus the bundled word lists in a temporary directory, then\n"+
			"shows completions, predictions and perplexity. Takes a few seconds.")
	keep := fs.String("keep", "", "also save the demo model to this path")
	if _, err := parse(fs, args); err != nil {
		return err
	}
	w := e.stdout
	dir, err := os.MkdirTemp("", "keyloom-demo-")
	if err != nil {
		return err
	}
	defer os.RemoveAll(dir)
	start := time.Now()
	// Hold out the last 10% of the demo corpus to measure the model on.
	docs := corpora.DemoText()
	cut := len(docs) * 9 / 10
	cut += strings.Index(docs[cut:], "\n\n") + 2
	train, test := docs[:cut], docs[cut:]
	srcs := defaultSources()
	srcs[0].R = strings.NewReader(train)
	b, data, err := bundle.Build(ctx, srcs, bundle.BuildOptions{Order: 3, ListWeight: defaultListWeight, Corpus: "demo: 90% of the invented demo corpus + word lists"})
	if err != nil {
		return err
	}
	path := filepath.Join(dir, "demo.klm")
	if err := format.WriteFileAtomic(path, data, 0o644); err != nil {
		return err
	}
	if *keep != "" {
		if err := format.WriteFileAtomic(*keep, data, 0o644); err != nil {
			return err
		}
	}
	fmt.Fprintf(w, "Built a demo model in %s: %d training tokens, %d words, n-grams %v, %d bytes on disk.\n",
		time.Since(start).Round(time.Millisecond), b.Tokens, len(b.Vocab), b.NGrams(), len(data))
	fmt.Fprintln(w, "(The demo corpus is invented: the notes and messages of a fictional volunteer coordinator.)")
	eng, err := keyloom.Open(path, keyloom.Options{})
	if err != nil {
		return err
	}
	defer eng.Close()
	fmt.Fprintln(w, "\nWhat the keyboard would show (text before the cursor → suggestions):")
	for _, before := range []string{"see you at the ", "see you at the bl", "Thanks a ", "Can you bring the ", "I'll put it in the sign", "We need more vol"} {
		t0 := time.Now()
		res, err := eng.Suggest(before)
		if err != nil {
			return err
		}
		el := time.Since(t0)
		list := res.Predictions
		if res.Prefix != "" {
			list = res.Completions
		}
		words := make([]string, len(list))
		for i, s := range list {
			words[i] = fmt.Sprintf("%s (%.2f)", s.Word, s.Prob)
		}
		fmt.Fprintf(w, "  %-26q → %s   [%s]\n", before, strings.Join(words, ", "), el.Round(time.Microsecond))
	}
	fmt.Fprintln(w, "\nAutocorrect when a word is finished (applied only when it is safe):")
	for _, before := range []string{"see you tomorow", "I'll bring teh", "Can you recieve", "Wren"} {
		c, err := eng.Correct(before)
		if err != nil {
			return err
		}
		switch {
		case c == nil:
			fmt.Fprintf(w, "  %-22q → left as typed\n", before)
		case c.Apply:
			fmt.Fprintf(w, "  %-22q → %s (%.0f%%, applied on space)\n", before, c.Replacement, 100*c.Confidence)
		default:
			fmt.Fprintf(w, "  %-22q → %s (%.0f%%, offered only)\n", before, c.Replacement, 100*c.Confidence)
		}
	}
	fmt.Fprintln(w, "\nLearning on the device: an invented word becomes suggestible once typed twice.")
	for i, note := range []string{"Meet me by the quorvel bed.", "The quorvel bed needs weeding."} {
		if err := eng.Learn(note); err != nil {
			return err
		}
		r, err := eng.Suggest("by the quor")
		if err != nil {
			return err
		}
		var got []string
		for _, s := range r.Completions {
			got = append(got, s.Word)
		}
		fmt.Fprintf(w, "  after learning %q (%d×): \"by the quor\" → %s\n", note, i+1, strings.Join(got, ", "))
	}
	eng.Wipe()
	res, err := eng.Perplexity(ctx, strings.NewReader(test), lm.ScanOptions{})
	if err != nil {
		return err
	}
	fmt.Fprintf(w, "\nOn the held-out 10%% (%d events): perplexity %.1f, %.1f%% out of vocabulary.\n",
		res.Tokens, res.Perplexity, 100*float64(res.OOV)/float64(max(1, res.Tokens)))
	fmt.Fprintln(w, "\nNext: 'keyloom build --out my.klm notes.txt', 'keyloom suggest --model my.klm \"see you at \"',")
	fmt.Fprintln(w, "'keyloom eval --ppl --model my.klm test.txt', 'keyloom inspect my.klm'.")
	return nil
}
