// Command keyloom builds, measures, inspects and queries Keyloom models:
// offline next-word prediction, word completion and autocorrect.
//
// Run "keyloom help" for the list of commands.
package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
)

// command is one subcommand.
type command struct {
	name    string
	summary string
	run     func(ctx context.Context, env *env, args []string) error
}

// env is what a command may touch: its streams. Tests supply their own.
type env struct {
	stdin          io.Reader
	stdout, stderr io.Writer
	// cacheDir overrides where the default model is kept (tests).
	cacheDir string
}

func commands() []command {
	return []command{
		{"demo", "build a model from the bundled invented corpus and show what it does", runDemo},
		{"build", "count text and word lists and write a model file", runBuild},
		{"count", "count n-grams as shard lines: mapper and reducer of a map/reduce build", runCount},
		{"suggest", "complete the word being typed or predict the next one", runSuggest},
		{"correct", "propose corrections of typed words", runCorrect},
		{"eval", "measure keystroke savings, accuracy, perplexity and corrections on test text", runEval},
		{"inspect", "print a model file's sections, sizes and checksums", runInspect},
		{"export", "write a model as ARPA text", runExport},
		{"learn", "teach a user overlay the user's own text", runLearn},
		{"forget", "remove words or phrases from a user overlay", runForget},
		{"merge", "copy a base model with a user overlay baked in", runMerge},
		{"prune", "shrink a model to a byte budget (relative-entropy pruning, quantization, vocabulary)", runPrune},
		{"serve", "answer keystrokes over HTTP with JSON (loopback only by default)", runServe},
		{"type", "try the engine live in a terminal line editor that learns as you type", runType},
	}
}

// errUsage marks a command-line mistake: the message is followed by usage.
var errUsage = errors.New("usage")

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	e := &env{stdin: os.Stdin, stdout: os.Stdout, stderr: os.Stderr}
	os.Exit(run(ctx, e, os.Args[1:]))
}

func run(ctx context.Context, e *env, args []string) int {
	if len(args) == 0 || args[0] == "help" || args[0] == "-h" || args[0] == "--help" {
		if len(args) > 1 {
			return run(ctx, e, []string{args[1], "--help"})
		}
		usage(e.stdout)
		return 0
	}
	for _, c := range commands() {
		if c.name == args[0] {
			err := c.run(ctx, e, args[1:])
			switch {
			case err == nil:
				return 0
			case errors.Is(err, errHelp):
				return 0
			case errors.Is(err, errUsage):
				fmt.Fprintf(e.stderr, "keyloom %s: %v\nrun 'keyloom %s --help' for usage\n", c.name, err, c.name)
				return 2
			case errors.Is(err, context.Canceled):
				fmt.Fprintf(e.stderr, "keyloom %s: interrupted\n", c.name)
				return 130
			default:
				fmt.Fprintf(e.stderr, "keyloom %s: %v\n", c.name, err)
				return 1
			}
		}
	}
	fmt.Fprintf(e.stderr, "keyloom: unknown command %q\n", args[0])
	usage(e.stderr)
	return 2
}

func usage(w io.Writer) {
	fmt.Fprintln(w, "keyloom — offline word prediction, completion and autocorrect")
	fmt.Fprintln(w, "\nusage: keyloom <command> [options] [arguments]\n\ncommands:")
	for _, c := range commands() {
		fmt.Fprintf(w, "  %-9s %s\n", c.name, c.summary)
	}
	fmt.Fprintln(w, "\nWithout --model, commands use the default English model built from the bundled corpora.")
	fmt.Fprintln(w, "Run 'keyloom <command> --help' for a command's options.")
}
