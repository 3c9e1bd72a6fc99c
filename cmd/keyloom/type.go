package main

import (
	"context"
	"errors"
	"fmt"
	"path/filepath"
	"strings"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/keyloom/keyloom"
)

func runType(ctx context.Context, e *env, args []string) error {
	fsx := newFlags(e, "type", "",
		"Opens a line editor in the terminal that shows, as you type, completions of the word\n"+
			"being typed, next-word predictions after a space and correction proposals, with the\n"+
			"time the engine took. Enter finishes a line and learns it; with --user what was\n"+
			"learned is loaded at start and saved on exit (mode 0600, written atomically).\n\n"+
			"keys: Tab takes the first suggestion, Alt+1..9 or F1..F9 take one by number,\n"+
			"Ctrl+R takes the proposed correction (a safe one is made when Space or . , ; : ! ?\n"+
			"ends the word; Backspace right after takes it back and the engine leaves that word\n"+
			"alone from then on), Enter learns the line, Ctrl+L turns learning off and on,\n"+
			"Ctrl+W/Ctrl+U delete a word/to the start, Esc or Ctrl+C quits.")
	model := fsx.String("model", "", "model file (default: the bundled default model)")
	user := fsx.String("user", "", "user overlay file to load and save on exit (created if missing)")
	k := fsx.Int("k", keyloom.DefaultSuggestions, fmt.Sprintf("number of suggestions shown (1-%d)", maxTypeSlots))
	noLearn := fsx.Bool("no-learn", false, "start with learning off (Ctrl+L turns it on)")
	pos, err := parse(fsx, args)
	if err != nil {
		return err
	}
	if len(pos) > 0 {
		return fmt.Errorf("%w: unexpected argument %q", errUsage, pos[0])
	}
	if *k < 1 || *k > maxTypeSlots {
		return fmt.Errorf("%w: --k %d, want 1..%d", errUsage, *k, maxTypeSlots)
	}
	eng, err := openUser(ctx, e, *model, *user, false, keyloom.Options{Suggestions: *k})
	if err != nil {
		return err
	}
	defer eng.Close()
	name := "default model"
	if *model != "" {
		name = strings.TrimSuffix(filepath.Base(*model), ".klm")
	}
	p := newPad(eng, name, *k, !*noLearn, newPadLook(e.stdout))
	prog := tea.NewProgram(p, tea.WithInput(e.stdin), tea.WithOutput(e.stdout), tea.WithContext(ctx))
	_, runErr := prog.Run()
	if *user != "" {
		if err := eng.Save(*user); err != nil {
			return errors.Join(runErr, err)
		}
		fmt.Fprintf(e.stdout, "saved %s: %d n-grams\n", *user, eng.UserEntries())
	}
	if runErr != nil && ctx.Err() != nil {
		return ctx.Err()
	}
	return runErr
}
