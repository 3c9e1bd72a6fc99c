package keyloom

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"

	"github.com/keyloom/keyloom/internal/modeltest"
)

const shedText = `See you at the shed. See you at the shed tomorrow. See you at the hall.
Thanks for the ladder. Thanks for the help. NASA called. Wren called too.`

func openTest(t *testing.T) *Engine {
	t.Helper()
	path, _ := modeltest.Build(t, shedText, 3, 8)
	e, err := Open(path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { e.Close() })
	return e
}

func words(s []Suggestion) []string {
	out := make([]string, len(s))
	for i, x := range s {
		out[i] = x.Word
	}
	return out
}

func TestSuggest(t *testing.T) {
	e := openTest(t)
	cases := []struct {
		before    string
		wantFirst string
		complete  bool
	}{
		{"see you at the ", "shed", false},
		{"see you at the sh", "shed", true},
		{"see you at the SH", "SHED", true},
		{"See you at the H", "Hall", true},
		{"It is done. ", "See", false}, // sentence start: capitalised
		{"thanks for the l", "ladder", true},
		{"", "See", false},
		{"wren c", "called", true},
		{"zzqx", "", true}, // no word has this prefix
	}
	for _, c := range cases {
		t.Run(c.before, func(t *testing.T) {
			res, err := e.Suggest(c.before)
			if err != nil {
				t.Fatal(err)
			}
			list := res.Predictions
			if c.complete {
				list = res.Completions
			}
			got := ""
			if len(list) > 0 {
				got = list[0].Word
			}
			if got != c.wantFirst {
				t.Errorf("Suggest(%q) = %v / %v, want %q first", c.before, words(res.Completions), words(res.Predictions), c.wantFirst)
			}
		})
	}
}

func TestSuggestBadInput(t *testing.T) {
	e := openTest(t)
	for _, in := range []string{strings.Repeat("a", 1<<20), "\xff\xfe\xfd", "Привет ми", strings.Repeat("word ", 10000), "   ", "'''", "--"} {
		if _, err := e.Suggest(in); err != nil {
			t.Errorf("Suggest(%.20q) error %v", in, err)
		}
	}
}

func TestClosed(t *testing.T) {
	path, _ := modeltest.Build(t, shedText, 2, 8)
	e, err := Open(path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if err := e.Close(); err != nil {
		t.Fatal(err)
	}
	if _, err := e.Suggest("see "); !errors.Is(err, ErrClosed) {
		t.Errorf("Suggest after Close: err = %v, want ErrClosed", err)
	}
	if err := e.Close(); err != nil {
		t.Errorf("second Close: %v", err)
	}
}

func TestOpenErrors(t *testing.T) {
	dir := t.TempDir()
	write := func(name string, b []byte) string {
		p := dir + "/" + name
		os.WriteFile(p, b, 0o644)
		return p
	}
	_, good := modeltest.Build(t, shedText, 2, 8)
	cases := []struct {
		name string
		path string
		want error
	}{
		{"text", write("a.txt", []byte("just some text, not a model at all")), ErrNotModel},
		{"empty", write("e.klm", nil), ErrNotModel},
		{"truncated", write("t.klm", good[:len(good)/2]), ErrCorrupt},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if _, err := Open(c.path, Options{}); !errors.Is(err, c.want) {
				t.Errorf("Open(%s) = %v, want %v", c.name, err, c.want)
			}
		})
	}
	if _, err := Open(dir+"/missing.klm", Options{}); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("missing file: %v", err)
	}
	if _, err := OpenBytes(good, Options{Suggestions: 99}); err == nil {
		t.Errorf("Suggestions 99 accepted")
	}
}

func TestOpenBytesMatchesOpen(t *testing.T) {
	path, data := modeltest.Build(t, shedText, 3, 8)
	a, err := Open(path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer a.Close()
	b, err := OpenBytes(data, Options{VerifyChecksums: true})
	if err != nil {
		t.Fatal(err)
	}
	for _, in := range []string{"see you at ", "thanks f", ""} {
		ra, _ := a.Suggest(in)
		rb, _ := b.Suggest(in)
		if strings.Join(words(ra.Predictions), ",") != strings.Join(words(rb.Predictions), ",") ||
			strings.Join(words(ra.Completions), ",") != strings.Join(words(rb.Completions), ",") {
			t.Errorf("Suggest(%q): Open %v, OpenBytes %v", in, ra, rb)
		}
	}
}

func TestConcurrentSuggest(t *testing.T) {
	e := openTest(t)
	var wg sync.WaitGroup
	for g := range 8 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range 200 {
				if _, err := e.Suggest([]string{"see you at the ", "thanks f", "wren "}[(g+i)%3]); err != nil {
					t.Error(err)
					return
				}
			}
		}()
	}
	wg.Wait()
}

// TestOpenReleasedModels opens every model file of a released format
// version (testdata/models/README.md): a new reader must read them all.
func TestOpenReleasedModels(t *testing.T) {
	paths, _ := filepath.Glob("testdata/models/*.klm")
	if len(paths) == 0 {
		t.Fatal("no released model fixtures")
	}
	for _, p := range paths {
		e, err := Open(p, Options{VerifyChecksums: true})
		if err != nil {
			t.Errorf("Open(%s): %v", p, err)
			continue
		}
		if res, err := e.Suggest("see you at the "); err != nil || len(res.Predictions) == 0 {
			t.Errorf("%s: Suggest = %v, %v", p, res, err)
		}
		e.Close()
	}
}

// TestLearnWhileSuggesting runs Learn, Forget and Reject while other
// goroutines call Suggest and Correct; run with -race (CI does).
func TestLearnWhileSuggesting(t *testing.T) {
	e := openTest(t)
	var wg sync.WaitGroup
	stop := make(chan struct{})
	for g := range 4 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := 0; ; i++ {
				select {
				case <-stop:
					return
				default:
				}
				in := []string{"see you at the ", "meet the quin", "thanks f", "teh "}[(g+i)%4]
				if _, err := e.Suggest(in); err != nil {
					t.Error(err)
					return
				}
				if _, err := e.Correct(in); err != nil {
					t.Error(err)
					return
				}
			}
		}()
	}
	for i := range 200 {
		e.Learn("Meet the quince growers at the shed. Thanks for the quince jam.")
		if i%20 == 0 {
			e.Forget("quince")
			e.Reject("teh", "the")
		}
	}
	close(stop)
	wg.Wait()
}
