package main

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/keyloom/keyloom"
	"github.com/keyloom/keyloom/corpora"
	"github.com/keyloom/keyloom/internal/bundle"
)

// heldOutRecipe names the build of a held-out model; change it whenever
// the build below or defaultSources changes so that cached copies are
// rebuilt.
const heldOutRecipe = "held-out-3"

// heldOutSources returns the default model's sources with every demo
// document whose text is one of tests left out, and the names of the
// documents left out. A test text that is no demo document leaves nothing
// out: the default model has not seen it anyway.
func heldOutSources(tests [][]byte) ([]bundle.Source, []string) {
	var kept []string
	var left []string
	for _, d := range corpora.Demo() {
		seen := false
		for _, t := range tests {
			seen = seen || sameBytes(t, []byte(d.Text))
		}
		if seen {
			left = append(left, d.Name)
			continue
		}
		kept = append(kept, strings.TrimRight(d.Text, "\r\n"))
	}
	src := defaultSources()
	src[0] = bundle.Source{
		Name: "corpora/demo (invented) without " + strings.Join(left, ", "),
		R:    strings.NewReader(strings.Join(kept, "\n\n") + "\n"),
		Kind: bundle.SourceText,
	}
	return src, left
}

// openHeldOut opens a model built as the default model is, but without the
// demo files among paths (leave-one-file-out), so that measurements on
// those files use a model with context that has not seen them. The model
// is cached beside the default model. It returns the engine and the demo
// documents left out.
func openHeldOut(ctx context.Context, e *env, paths []string, opts keyloom.Options) (*keyloom.Engine, []string, error) {
	var tests [][]byte
	for _, p := range paths {
		b, err := os.ReadFile(p)
		if err != nil {
			return nil, nil, err
		}
		tests = append(tests, b)
	}
	src, left := heldOutSources(tests)
	path, err := cachedModel(ctx, e, cachedBuild{
		recipe: heldOutRecipe,
		key: func(h io.Writer) {
			io.WriteString(h, heldOutRecipe+"\x00"+defaultRecipe+"\x00"+strings.Join(left, "\x00"))
			io.WriteString(h, corpora.DemoText())
		},
		label:  "held-out model",
		what:   fmt.Sprintf("a model without %v", left),
		corpus: "held out: " + src[0].Name + " + SUBTLEX-US word counts + SCOWL word list",
		src:    func() []bundle.Source { return src },
	})
	if err != nil {
		return nil, nil, err
	}
	eng, err := keyloom.Open(path, opts)
	return eng, left, err
}

// sameBytes reports whether a and b hold the same text up to trailing line
// breaks.
func sameBytes(a, b []byte) bool {
	return bytes.Equal(bytes.TrimRight(a, "\r\n"), bytes.TrimRight(b, "\r\n"))
}
