package keyloom

import (
	"bufio"
	"bytes"
	"context"
	"math/rand/v2"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/keyloom/keyloom/corpora"
	"github.com/keyloom/keyloom/internal/bundle"
)

// syntheticModel builds a model file of roughly the given size from random
// Zipf-distributed word sequences over the Opticks vocabulary, so that
// n-grams keep growing with the text (fixed seed).
func syntheticModel(b testing.TB, tokens int) (string, []byte) {
	b.Helper()
	raw, err := os.ReadFile("lm/testdata/opticks-train.txt")
	if err != nil {
		b.Fatal(err)
	}
	vocab := map[string]bool{}
	var words []string
	for _, w := range strings.Fields(string(raw)) {
		if !vocab[w] {
			vocab[w] = true
			words = append(words, w)
		}
	}
	rng := rand.New(rand.NewPCG(1, 2))
	z := rand.NewZipf(rng, 1.1, 2, uint64(len(words)-1))
	var buf bytes.Buffer
	for i := 0; i < tokens; i++ {
		buf.WriteString(words[z.Uint64()])
		if rng.IntN(15) == 0 {
			buf.WriteByte('\n')
		} else {
			buf.WriteByte(' ')
		}
	}
	_, data, err := bundle.Build(context.Background(), []bundle.Source{{Name: "synthetic", R: &buf, Kind: bundle.SourceTokenized}}, bundle.BuildOptions{Order: 3})
	if err != nil {
		b.Fatal(err)
	}
	path := filepath.Join(b.TempDir(), "synthetic.klm")
	if err := os.WriteFile(path, data, 0o644); err != nil {
		b.Fatal(err)
	}
	return path, data
}

// evict drops path's pages from the page cache (Linux; best effort), so
// that the next open is measured cold rather than against whole page-cache
// folios the kernel may map in one go.
func evict(b *testing.B, path string) {
	f, err := os.Open(path)
	if err != nil {
		b.Fatal(err)
	}
	defer f.Close()
	_ = f.Sync() // dirty pages cannot be dropped
	_ = fadviseDontNeed(f)
}

func rssKB() int64 { return statusKB("RssFile:") }

// statusKB reads one field of /proc/self/status in kB (0 when unavailable).
func statusKB(field string) int64 {
	f, err := os.Open("/proc/self/status")
	if err != nil {
		return 0
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		if v, ok := strings.CutPrefix(sc.Text(), field); ok {
			n, _ := strconv.ParseInt(strings.Fields(v)[0], 10, 64)
			return n
		}
	}
	return 0
}

// BenchmarkOpen opens a ~10 MB model file by mapping it (Close is not
// timed) and reports the resident memory one open adds before the first
// query: the file-backed pages it touched (RssFile of /proc/self/status,
// Linux only), after a warm-up open has paid the one-time setup.
func BenchmarkOpen(b *testing.B) {
	path, data := syntheticModel(b, 5_000_000)
	warm, err := Open(path, Options{})
	if err != nil {
		b.Fatal(err)
	}
	warm.Close()
	evict(b, path) // a cold open, as after a reboot or on a phone
	runtime.GC()
	before := rssKB()
	e, err := Open(path, Options{})
	if err != nil {
		b.Fatal(err)
	}
	grew := rssKB() - before
	e.Close()
	b.ReportAllocs()
	for b.Loop() {
		e, err := Open(path, Options{})
		if err != nil {
			b.Fatal(err)
		}
		b.StopTimer()
		e.Close()
		b.StartTimer()
	}
	b.ReportMetric(float64(len(data))/1e6, "fileMB")
	b.ReportMetric(float64(grew), "fileRSS-kB")
}

// BenchmarkSuggest types the Opticks test text through the facade and
// reports the cost per keystroke, from the mapped file and from a heap copy.
func BenchmarkSuggest(b *testing.B) {
	path, data := syntheticModel(b, 300_000)
	inputs := suggestInputs(b)
	mapped, err := Open(path, Options{})
	if err != nil {
		b.Fatal(err)
	}
	defer mapped.Close()
	heap, err := OpenBytes(append([]byte(nil), data...), Options{})
	if err != nil {
		b.Fatal(err)
	}
	for _, c := range []struct {
		name string
		e    *Engine
	}{{"mapped", mapped}, {"heap", heap}} {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			i := 0
			times := make([]time.Duration, 0, 1<<16)
			for b.Loop() {
				t0 := time.Now()
				if _, err := c.e.Suggest(inputs[i%len(inputs)]); err != nil {
					b.Fatal(err)
				}
				if len(times) < cap(times) {
					times = append(times, time.Since(t0))
				}
				i++
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/1e3, "µs/keystroke")
			slices.Sort(times)
			b.ReportMetric(float64(times[len(times)/2].Nanoseconds())/1e3, "median-µs")
			b.ReportMetric(float64(times[len(times)*99/100].Nanoseconds())/1e3, "p99-µs")
		})
	}
}

// suggestInputs returns the text before the cursor at every keystroke of
// the first 39 Opticks test sentences.
func suggestInputs(b *testing.B) []string {
	b.Helper()
	raw, err := os.ReadFile("lm/testdata/opticks-test.txt")
	if err != nil {
		b.Fatal(err)
	}
	var inputs []string
	text := ""
	for _, line := range strings.SplitN(string(raw), "\n", 40)[:39] {
		for _, w := range strings.Fields(line) {
			for i := 0; i <= len(w); i++ {
				inputs = append(inputs, text+w[:i])
			}
			text += w + " "
		}
		text = ""
	}
	return inputs
}

// BenchmarkSuggestOverlay types the keystrokes of BenchmarkSuggest into two
// engines on the same synthetic model, one without a user overlay and one
// whose overlay has learned the invented demo corpus and the Opticks
// training text (about 40 k n-grams, many words the model lacks), timing
// both on the same keystroke in turn so that both see the same machine
// load. It reports each one's median and their ratio (target: ≤ 1.5), and
// the ratio of medians by keystroke class (next word; 1, 2, 3 or more
// letters typed).
func BenchmarkSuggestOverlay(b *testing.B) {
	_, data := syntheticModel(b, 300_000)
	inputs := suggestInputs(b)
	plain, err := OpenBytes(data, Options{})
	if err != nil {
		b.Fatal(err)
	}
	defer plain.Close()
	user, err := OpenBytes(data, Options{MaxUserEntries: 60_000})
	if err != nil {
		b.Fatal(err)
	}
	defer user.Close()
	raw, err := os.ReadFile("lm/testdata/opticks-train.txt")
	if err != nil {
		b.Fatal(err)
	}
	for _, text := range []string{corpora.DemoText(), string(raw)} {
		for line := range strings.Lines(text) {
			if err := user.Learn(line); err != nil {
				b.Fatal(err)
			}
		}
	}
	// Keystroke classes by the length of the typed part: 0 (next word), 1, 2, 3 or more.
	class := make([]int, len(inputs))
	for j, in := range inputs {
		class[j] = min(len(parseCursor(in, 2).prefix), 3)
	}
	b.ReportAllocs()
	var tPlain, tUser []time.Duration
	var cPlain, cUser [4][]time.Duration
	i := 0
	for b.Loop() {
		in := inputs[i%len(inputs)]
		t0 := time.Now()
		if _, err := plain.Suggest(in); err != nil {
			b.Fatal(err)
		}
		t1 := time.Now()
		if _, err := user.Suggest(in); err != nil {
			b.Fatal(err)
		}
		t2 := time.Now()
		if len(tPlain) < 1<<16 {
			tPlain = append(tPlain, t1.Sub(t0))
			tUser = append(tUser, t2.Sub(t1))
			c := class[i%len(inputs)]
			cPlain[c] = append(cPlain[c], t1.Sub(t0))
			cUser[c] = append(cUser[c], t2.Sub(t1))
		}
		i++
	}
	slices.Sort(tPlain)
	slices.Sort(tUser)
	mp, mu := tPlain[len(tPlain)/2], tUser[len(tUser)/2]
	b.ReportMetric(float64(mp.Nanoseconds())/1e3, "plain-median-µs")
	b.ReportMetric(float64(mu.Nanoseconds())/1e3, "overlay-median-µs")
	b.ReportMetric(float64(mu)/float64(mp), "median-ratio")
	for c, name := range []string{"next", "typed1", "typed2", "typed3+"} {
		if len(cPlain[c]) == 0 {
			continue
		}
		slices.Sort(cPlain[c])
		slices.Sort(cUser[c])
		n := len(cPlain[c]) / 2
		b.ReportMetric(float64(cUser[c][n])/float64(cPlain[c][n]), "ratio-"+name)
	}
	b.ReportMetric(float64(tUser[len(tUser)*99/100].Nanoseconds())/1e3, "overlay-p99-µs")
	b.ReportMetric(float64(user.UserEntries()), "user-ngrams")
}

// BenchmarkSaveOverlay saves a user overlay of about 10 k n-grams (the
// demo corpus learned under a cap of 11 k entries): "encode" builds the
// file's bytes (SaveBytes), "save" writes them atomically with fsync of
// the file and the directory (Save). Target: ≤ 20 ms.
func BenchmarkSaveOverlay(b *testing.B) {
	_, data := syntheticModel(b, 300_000)
	e, err := OpenBytes(data, Options{MaxUserEntries: 11_000})
	if err != nil {
		b.Fatal(err)
	}
	defer e.Close()
	for line := range strings.Lines(corpora.DemoText()) {
		if err := e.Learn(line); err != nil {
			b.Fatal(err)
		}
	}
	path := filepath.Join(b.TempDir(), "user.klo")
	b.Run("encode", func(b *testing.B) {
		b.ReportAllocs()
		n := 0
		for b.Loop() {
			out, err := e.SaveBytes()
			if err != nil {
				b.Fatal(err)
			}
			n = len(out)
		}
		b.ReportMetric(float64(e.UserEntries()), "ngrams")
		b.ReportMetric(float64(n), "bytes")
	})
	b.Run("save", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			if err := e.Save(path); err != nil {
				b.Fatal(err)
			}
		}
		b.ReportMetric(float64(e.UserEntries()), "ngrams")
	})
}
