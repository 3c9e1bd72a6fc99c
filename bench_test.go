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

	"github.com/keyloom/keyloom/internal/bundle"
)

// syntheticModel builds a model file of roughly the given size from random
// Zipf-distributed word sequences over the Opticks vocabulary, so that
// n-grams keep growing with the text (fixed seed).
func syntheticModel(b *testing.B, tokens int) (string, []byte) {
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
	path, data := syntheticModel(b, 2_500_000)
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
	raw, err := os.ReadFile("lm/testdata/opticks-test.txt")
	if err != nil {
		b.Fatal(err)
	}
	// Every keystroke of the first sentences: the text before the cursor.
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
