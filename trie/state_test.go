package trie

import (
	"bytes"
	"sort"
	"testing"

	"github.com/agnivade/levenshtein"
	"github.com/blevesearch/vellum"
	vlev "github.com/blevesearch/vellum/levenshtein"
)

// TestWalkEveryWord walks Start/Step/Final over every SUBTLEX-US word and
// checks that the outputs sum to the word's position in the sorted list
// (sort.SearchStrings, the reference), and that vellum's own Get on the
// same FST (a reference implementation of the format) agrees.
func TestWalkEveryWord(t *testing.T) {
	c := loadCorpus(t, subtlexPath)
	f := c.lex.FST()
	for _, w := range c.words {
		s := c.lex.Start()
		var sum uint64
		for i := 0; i < len(w); i++ {
			if !c.lex.CanMatch(s) {
				t.Fatalf("CanMatch false on the path of %q after %d bytes", w, i)
			}
			next, out, ok := c.lex.Step(s, w[i])
			if !ok {
				t.Fatalf("Step on byte %d of %q failed", i, w)
			}
			s, sum = next, sum+out
		}
		final, out := c.lex.Final(s)
		want := uint64(sort.SearchStrings(c.words, w)) // Go stdlib: rank in byte order
		if !final || sum+out != want {
			t.Fatalf("walk of %q = %v, %d, want true, %d", w, final, sum+out, want)
		}
		v, ok, err := f.Get([]byte(w)) // vellum's reader as the reference
		if err != nil || !ok || v != want {
			t.Fatalf("vellum Get(%q) = %d, %v, %v, want %d", w, v, ok, err, want)
		}
	}
}

// TestStepMissing checks transitions that do not exist, and ints that are
// not states.
func TestStepMissing(t *testing.T) {
	sec, lex := build(t, "ab", "ac", "b")
	tests := []struct {
		name  string
		state int
		b     byte
	}{
		{"no-byte", lex.Start(), 'z'},
		{"negative", -5, 'a'},
		{"header", 3, 'a'},
		{"past-end", len(sec) * 2, 'a'},
		{"empty-final", 0, 'a'},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if next, out, ok := lex.Step(tt.state, tt.b); ok {
				t.Errorf("Step(%d, %q) = %d, %d, true, want false", tt.state, tt.b, next, out)
			}
		})
	}
	if lex.CanMatch(-1) {
		t.Errorf("CanMatch(-1) = true, want false")
	}
	if ok, _ := lex.Final(-1); ok {
		t.Errorf("Final(-1) = true, want false")
	}
}

// TestAppendTransitions checks that the transitions of the root and of the
// state after one byte list exactly the next bytes that occur in the
// SUBTLEX-US words (found by a scan of the list), in increasing order, and
// that each matches Step.
func TestAppendTransitions(t *testing.T) {
	c := loadCorpus(t, subtlexPath)
	for _, prefix := range []string{"", "a", "q", "th", "zz"} {
		t.Run(prefix, func(t *testing.T) {
			want := map[byte]bool{}
			for _, w := range c.words {
				if len(w) > len(prefix) && w[:len(prefix)] == prefix {
					want[w[len(prefix)]] = true
				}
			}
			s := c.lex.Start()
			for i := 0; i < len(prefix); i++ {
				s, _, _ = c.lex.Step(s, prefix[i])
			}
			ts := c.lex.AppendTransitions(nil, s)
			if len(ts) != len(want) {
				t.Fatalf("AppendTransitions after %q gives %d transitions, want %d", prefix, len(ts), len(want))
			}
			for i, tr := range ts {
				if !want[tr.Byte] || (i > 0 && tr.Byte <= ts[i-1].Byte) {
					t.Fatalf("transition %d after %q is %q: unexpected or out of order", i, prefix, tr.Byte)
				}
				next, out, ok := c.lex.Step(s, tr.Byte)
				if !ok || next != tr.Next || out != tr.Out {
					t.Fatalf("Step(%q) = %d, %d, %v, transition says %d, %d", tr.Byte, next, out, ok, tr.Next, tr.Out)
				}
			}
		})
	}
}

// TestVellumLevenshtein runs vellum's Levenshtein automaton over FST() and
// compares the words it finds with a brute-force scan of the SUBTLEX-US
// list using github.com/agnivade/levenshtein (both are independent
// reference implementations of Levenshtein distance; neither allows
// transpositions here).
func TestVellumLevenshtein(t *testing.T) {
	c := loadCorpus(t, subtlexPath)
	lb, err := vlev.NewLevenshteinAutomatonBuilder(1, false)
	if err != nil {
		t.Fatal(err)
	}
	for _, q := range []string{"recieve", "teh", "hapen", "xylophone", "a"} {
		t.Run(q, func(t *testing.T) {
			dfa, err := lb.BuildDfa(q, 1)
			if err != nil {
				t.Fatal(err)
			}
			got := map[string]uint64{}
			it, err := c.lex.FST().Search(dfa, nil, nil)
			for err == nil {
				k, v := it.Current()
				got[string(k)] = v
				err = it.Next()
			}
			want := 0
			for i, w := range c.words {
				if levenshtein.ComputeDistance(q, w) <= 1 {
					want++
					if v, ok := got[w]; !ok || v != uint64(i) {
						t.Errorf("vellum search for %q misses %q (id %d), got %d, %v", q, w, i, v, ok)
					}
				}
			}
			if len(got) != want {
				t.Errorf("vellum search for %q finds %d words, brute force %d", q, len(got), want)
			}
		})
	}
}

// TestStepAllBytes builds, with vellum directly, an FST whose keys are
// {c, c, c} for every byte c (so every byte appears on single-transition
// states, stored by code or in full) with value 3c, and checks that this
// package's state reader finds every key with vellum's value (vellum's Get
// is the reference).
func TestStepAllBytes(t *testing.T) {
	var buf bytes.Buffer
	bld, err := vellum.New(&buf, nil)
	if err != nil {
		t.Fatal(err)
	}
	for c := 0; c < 256; c++ {
		if err := bld.Insert([]byte{byte(c), byte(c), byte(c)}, uint64(3*c)); err != nil {
			t.Fatal(err)
		}
	}
	if err := bld.Close(); err != nil {
		t.Fatal(err)
	}
	d := buf.Bytes()
	f, err := vellum.Load(d)
	if err != nil {
		t.Fatal(err)
	}
	codes, err := byteCodes()
	if err != nil {
		t.Fatal(err)
	}
	root, err := fstRoot(d)
	if err != nil {
		t.Fatal(err)
	}
	for c := 0; c < 256; c++ {
		key := []byte{byte(c), byte(c), byte(c)}
		want, ok, err := f.Get(key)
		if err != nil || !ok {
			t.Fatalf("vellum Get(%x) = %d, %v, %v", key, want, ok, err)
		}
		s, sum := root, uint64(0)
		for _, b := range key {
			next, out, ok := stepAt(d, codes, s, b)
			if !ok {
				t.Fatalf("stepAt on %x failed", key)
			}
			s, sum = next, sum+out
		}
		st, ok := decodeState(d, codes, s)
		if !ok || !st.final || sum+st.finalOut != want {
			t.Fatalf("walk of %x = %d (final %v), vellum says %d", key, sum+st.finalOut, st.final, want)
		}
		if _, _, ok := stepAt(d, codes, root, byte(c)); !ok {
			t.Fatalf("no root transition on %#x", c)
		}
	}
}
