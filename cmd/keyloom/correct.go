package main

import (
	"context"
	"fmt"
	"os"
	"strings"

	"github.com/keyloom/keyloom"
)

// layoutOption parses --layout: a built-in name or a layout file.
func layoutOption(name string, opts *keyloom.Options) error {
	switch strings.ToLower(name) {
	case "", "qwerty":
		opts.Layout = keyloom.LayoutQWERTY
	case "azerty":
		opts.Layout = keyloom.LayoutAZERTY
	case "qwertz":
		opts.Layout = keyloom.LayoutQWERTZ
	default:
		f, err := os.Open(name)
		if err != nil {
			return fmt.Errorf("%w: --layout %q: not qwerty, azerty, qwertz or a readable layout file", errUsage, name)
		}
		defer f.Close()
		kb, err := keyloom.ParseLayout(f)
		if err != nil {
			return fmt.Errorf("--layout %s: %w", name, err)
		}
		opts.Keyboard = kb
	}
	return nil
}

type correctAnswer struct {
	Word         string   `json:"word"`
	Replacement  string   `json:"replacement,omitempty"`
	Alternatives []string `json:"alternatives,omitempty"`
	Confidence   float64  `json:"confidence"`
	Apply        bool     `json:"apply"`
}

func runCorrect(ctx context.Context, e *env, args []string) error {
	fs := newFlags(e, "correct", "WORD...",
		"Proposes corrections of each WORD as typed after --context, and says whether the engine\n"+
			"would replace it automatically on space. Words the model or the user knows are left\n"+
			"alone unless the context makes another word far more likely.")
	model := fs.String("model", "", "model file (default: the bundled default model)")
	user := fs.String("user", "", "user overlay file (its words are never 'fixed')")
	layout := fs.String("layout", "qwerty", "keyboard: qwerty, azerty, qwertz or a layout file")
	context_ := fs.String("context", "", "text typed before the word")
	asJSON := fs.Bool("json", false, "print JSON")
	pos, err := parse(fs, args)
	if err != nil {
		return err
	}
	if len(pos) == 0 {
		return fmt.Errorf("%w: give at least one WORD", errUsage)
	}
	opts := engineOptions()
	if err := layoutOption(*layout, &opts); err != nil {
		return err
	}
	eng, err := openUser(ctx, e, *model, *user, true, opts)
	if err != nil {
		return err
	}
	defer eng.Close()
	var out []correctAnswer
	for _, w := range pos {
		before := *context_
		if before != "" && !strings.HasSuffix(before, " ") {
			before += " "
		}
		c, err := eng.Correct(before + w)
		if err != nil {
			return err
		}
		a := correctAnswer{Word: w}
		if c != nil {
			a.Replacement, a.Alternatives, a.Confidence, a.Apply = c.Replacement, c.Alternatives, c.Confidence, c.Apply
		}
		out = append(out, a)
	}
	if *asJSON {
		return writeJSON(e.stdout, out)
	}
	for _, a := range out {
		switch {
		case a.Replacement == "":
			fmt.Fprintf(e.stdout, "%-16s (leave as typed)\n", a.Word)
		default:
			act := "offer"
			if a.Apply {
				act = "apply on space"
			}
			fmt.Fprintf(e.stdout, "%-16s → %-16s %3.0f%%  %s", a.Word, a.Replacement, 100*a.Confidence, act)
			if len(a.Alternatives) > 0 {
				fmt.Fprintf(e.stdout, "   also: %s", strings.Join(a.Alternatives, ", "))
			}
			fmt.Fprintln(e.stdout)
		}
	}
	return nil
}
