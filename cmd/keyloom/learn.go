package main

import (
	"context"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"strings"

	"github.com/keyloom/keyloom"
	"github.com/keyloom/keyloom/internal/format"
)

// openUser opens the model and, when userPath names an existing overlay, loads it.
// A missing overlay file is an error only when mustExist is set.
func openUser(ctx context.Context, e *env, model, userPath string, mustExist bool, opts keyloom.Options) (*keyloom.Engine, error) {
	eng, err := openModel(ctx, e, model, opts)
	if err != nil {
		return nil, err
	}
	if userPath == "" {
		return eng, nil
	}
	if err := eng.OpenOverlay(userPath); err != nil {
		if errors.Is(err, fs.ErrNotExist) && !mustExist {
			return eng, nil
		}
		eng.Close()
		return nil, err
	}
	return eng, nil
}

func runLearn(ctx context.Context, e *env, args []string) error {
	fsx := newFlags(e, "learn", "--user U.overlay FILE...",
		"Teaches a user overlay the text in FILE (- for standard input) and saves it (mode 0600,\n"+
			"written atomically). The base model is never changed. Tokens that look like secrets\n"+
			"(long digit runs, card numbers, e-mail addresses, letter-digit passwords) are never learned.")
	model := fsx.String("model", "", "base model file (default: the bundled default model)")
	user := fsx.String("user", "", "user overlay file to update (created if missing; required)")
	pos, err := parse(fsx, args)
	if err != nil {
		return err
	}
	if *user == "" || len(pos) == 0 {
		return fmt.Errorf("%w: give --user and at least one FILE", errUsage)
	}
	eng, err := openUser(ctx, e, *model, *user, false, engineOptions())
	if err != nil {
		return err
	}
	defer eng.Close()
	before := eng.UserEntries()
	text, err := readAll(e, pos)
	if err != nil {
		return err
	}
	paras := strings.Split(string(text), "\n\n")
	bar := newProgress(e.stderr, "learning", int64(len(paras)))
	for i, p := range paras {
		if ctx.Err() != nil {
			bar.done()
			return ctx.Err()
		}
		if err := eng.Learn(p); err != nil {
			return err
		}
		bar.set(int64(i + 1))
	}
	bar.done()
	if err := eng.Save(*user); err != nil {
		return err
	}
	fmt.Fprintf(e.stdout, "%s: %d n-grams (was %d)\n", *user, eng.UserEntries(), before)
	return nil
}

func runForget(ctx context.Context, e *env, args []string) error {
	fsx := newFlags(e, "forget", "--user U.overlay [--all | PHRASE...]",
		"Removes every n-gram containing each PHRASE (and the words themselves) from a user\n"+
			"overlay, or everything with --all, and saves it.")
	model := fsx.String("model", "", "base model file (default: the bundled default model)")
	user := fsx.String("user", "", "user overlay file (required)")
	all := fsx.Bool("all", false, "wipe the overlay")
	pos, err := parse(fsx, args)
	if err != nil {
		return err
	}
	if *user == "" || (len(pos) == 0) == !*all {
		return fmt.Errorf("%w: give --user and either PHRASEs or --all", errUsage)
	}
	eng, err := openUser(ctx, e, *model, *user, true, engineOptions())
	if err != nil {
		return err
	}
	defer eng.Close()
	removed := 0
	if *all {
		removed = eng.UserEntries()
		eng.Wipe()
	}
	for _, p := range pos {
		n, err := eng.Forget(p)
		if err != nil {
			return err
		}
		removed += n
	}
	if err := eng.Save(*user); err != nil {
		return err
	}
	fmt.Fprintf(e.stdout, "%s: removed %d entries, %d left\n", *user, removed, eng.UserEntries())
	return nil
}

func runMerge(ctx context.Context, e *env, args []string) error {
	fsx := newFlags(e, "merge", "--model M --user U.overlay --out M2",
		"Writes a copy of the base model that also carries the user overlay, so that one file\n"+
			"holds both (the overlay is loaded when the copy is opened).")
	model := fsx.String("model", "", "base model file (default: the bundled default model)")
	user := fsx.String("user", "", "user overlay file (required)")
	out := fsx.String("out", "", "model file to write (required)")
	if _, err := parse(fsx, args); err != nil {
		return err
	}
	if *user == "" || *out == "" {
		return fmt.Errorf("%w: give --user and --out", errUsage)
	}
	path := *model
	if path == "" {
		p, err := defaultModelPath(ctx, e)
		if err != nil {
			return err
		}
		path = p
	}
	eng, err := openUser(ctx, e, path, *user, true, engineOptions())
	if err != nil {
		return err
	}
	defer eng.Close()
	base, err := os.ReadFile(path)
	if err != nil {
		return err
	}
	f, err := format.Parse(base)
	if err != nil {
		return err
	}
	var secs []format.Section
	for _, s := range f.Sections() {
		if s.Kind == format.KindOverlay {
			continue
		}
		data, _ := f.Section(s.Kind)
		secs = append(secs, format.Section{Kind: s.Kind, Data: data})
	}
	secs = append(secs, format.Section{Kind: format.KindOverlay, Data: eng.OverlayBytes()})
	data, err := format.Append(nil, secs)
	if err != nil {
		return err
	}
	if err := format.WriteFileAtomic(*out, data, 0o600); err != nil {
		return err
	}
	fmt.Fprintf(e.stdout, "wrote %s: %d bytes (base %d + overlay with %d n-grams)\n", *out, len(data), len(base), eng.UserEntries())
	return nil
}
