package main

import (
	"context"
	"encoding/json"
	"fmt"
	"strings"

	"github.com/keyloom/keyloom"
)

func runSuggest(ctx context.Context, e *env, args []string) error {
	fs := newFlags(e, "suggest", "TEXT...",
		"Shows completions of the word at the end of TEXT, or next-word predictions when\n"+
			"TEXT ends with a space (or --next is given). TEXT is the text before the cursor.")
	model := fs.String("model", "", "model file (default: the bundled default model)")
	k := fs.Int("k", keyloom.DefaultSuggestions, "number of suggestions (1-32)")
	next := fs.Bool("next", false, "predict the next word even if TEXT does not end with a space")
	asJSON := fs.Bool("json", false, "print JSON")
	user := fs.String("user", "", "user overlay file to blend in")
	pos, err := parse(fs, args)
	if err != nil {
		return err
	}
	text := strings.Join(pos, " ")
	if *next && !strings.HasSuffix(text, " ") {
		text += " "
	}
	eng, err := openUser(ctx, e, *model, *user, true, keyloom.Options{Suggestions: *k})
	if err != nil {
		return err
	}
	defer eng.Close()
	res, err := eng.Suggest(text)
	if err != nil {
		return err
	}
	if *asJSON {
		enc := json.NewEncoder(e.stdout)
		enc.SetIndent("", "  ")
		return enc.Encode(res)
	}
	list, kind := res.Predictions, "next word"
	if res.Prefix != "" {
		list, kind = res.Completions, fmt.Sprintf("completions of %q", res.Prefix)
	}
	fmt.Fprintf(e.stdout, "%s:\n", kind)
	if len(list) == 0 {
		fmt.Fprintln(e.stdout, "  (none)")
	}
	for i, s := range list {
		fmt.Fprintf(e.stdout, "  %d. %-20s %.4f\n", i+1, s.Word, s.Prob)
	}
	if c := res.Correction; c != nil {
		act := "offer"
		if c.Apply {
			act = "apply on space"
		}
		fmt.Fprintf(e.stdout, "correction: %s → %s (%.0f%%, %s)\n", c.Typed, c.Replacement, 100*c.Confidence, act)
	}
	return nil
}
