package main

import (
	"bufio"
	"bytes"
	"context"
	"fmt"
	"hash/crc32"
	"io"
	"os"
	"path/filepath"
	"strings"

	"github.com/keyloom/keyloom"
	"github.com/keyloom/keyloom/corpora"
	"github.com/keyloom/keyloom/internal/bundle"
	"github.com/keyloom/keyloom/internal/format"
)

// defaultRecipe names the build of the default model; change it whenever the
// build below or the file layout it writes changes so that cached copies
// are rebuilt.
const defaultRecipe = "default-english-4"

// contractionPieces are SUBTLEX-US entries that are halves of contractions
// split by its tokenizer ("don" + "t"); the project's tokenizer keeps
// contractions whole, so these would only be noise.
var contractionPieces = map[string]bool{
	"s": true, "t": true, "m": true, "d": true, "ll": true, "re": true, "ve": true,
	"don": true, "didn": true, "doesn": true, "isn": true, "wasn": true, "aren": true,
	"weren": true, "couldn": true, "wouldn": true, "shouldn": true, "haven": true,
	"hasn": true, "hadn": true, "ain": true, "c": true, "o": true,
}

// defaultListWeight mixes the SUBTLEX-US frequencies into the default
// model's unigrams: its running text (one invented person's notes) is too
// small and narrow to stand for general English word frequency, which the
// corrector's prior needs (lm.EstimateOptions.ListWeight).
const defaultListWeight = 0.5

// defaultSources returns the inputs of the default model.
func defaultSources() []bundle.Source {
	var counts bytes.Buffer
	sc := bufio.NewScanner(corpora.WordCounts())
	for sc.Scan() {
		line := sc.Text()
		w, _, _ := strings.Cut(line, "\t")
		if contractionPieces[strings.ToLower(w)] {
			continue
		}
		counts.WriteString(line)
		counts.WriteByte('\n')
	}
	return []bundle.Source{
		{Name: "corpora/demo (invented)", R: strings.NewReader(corpora.DemoText()), Kind: bundle.SourceText},
		{Name: "corpora/subtlex-us-word-counts.tsv", R: &counts, Kind: bundle.SourceWordCounts},
		{Name: "corpora/scowl-american-english-large.txt", R: corpora.WordList(), Kind: bundle.SourceWordList, Weight: 0.5},
	}
}

// defaultModelPath returns the path of the default model, building it into
// the user's cache directory on first use.
func defaultModelPath(ctx context.Context, e *env) (string, error) {
	key := func(h io.Writer) {
		io.WriteString(h, defaultRecipe)
		io.WriteString(h, corpora.DemoText())
		io.Copy(h, corpora.WordCounts())
		io.Copy(h, corpora.WordList())
	}
	return cachedModel(ctx, e, cachedBuild{
		recipe: defaultRecipe,
		key:    key,
		label:  "default model",
		what:   "the default model",
		corpus: "default English: invented demo corpus + SUBTLEX-US word counts + SCOWL word list",
		src:    defaultSources,
	})
}

// cachedBuild describes a model that commands build from bundled data into
// the user's cache directory once and reuse afterwards.
type cachedBuild struct {
	recipe string          // file name prefix; see defaultRecipe
	key    func(io.Writer) // writes everything the model depends on
	label  string          // error prefix
	what   string          // the model in the progress line
	corpus string          // stored description of the training data
	src    func() []bundle.Source
}

// cachedModel returns the path of the model b describes, named by its
// recipe and a CRC-32 of its key, building it on first use.
func cachedModel(ctx context.Context, e *env, b cachedBuild) (string, error) {
	dir := e.cacheDir
	if dir == "" {
		d, err := os.UserCacheDir()
		if err != nil {
			d = os.TempDir()
		}
		dir = filepath.Join(d, "keyloom")
	}
	h := crc32.NewIEEE()
	b.key(h)
	path := filepath.Join(dir, fmt.Sprintf("%s-%08x.klm", b.recipe, h.Sum32()))
	if _, err := os.Stat(path); err == nil {
		return path, nil
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return "", fmt.Errorf("%s: %w", b.label, err)
	}
	fmt.Fprintf(e.stderr, "keyloom: building %s into %s (once)…\n", b.what, path)
	_, data, err := bundle.Build(ctx, b.src(), bundle.BuildOptions{
		Order:      3,
		ListWeight: defaultListWeight,
		Corpus:     b.corpus,
	})
	if err != nil {
		return "", fmt.Errorf("%s: %w", b.label, err)
	}
	if err := format.WriteFileAtomic(path, data, 0o644); err != nil {
		return "", fmt.Errorf("%s: %w", b.label, err)
	}
	return path, nil
}

// openModel opens --model, or the default model when path is empty.
func openModel(ctx context.Context, e *env, path string, opts keyloom.Options) (*keyloom.Engine, error) {
	if path == "" {
		p, err := defaultModelPath(ctx, e)
		if err != nil {
			return nil, err
		}
		path = p
	}
	return keyloom.Open(path, opts)
}

// engineOptions returns the engine options every command uses.
func engineOptions() keyloom.Options { return keyloom.Options{} }
