package lm

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
	"unicode"
	"unicode/utf8"
)

// casedText turns the first lines of the Opticks training text (lower-case,
// one sentence per line) into running text with sentence capitals,
// punctuation, paragraphs, lines that break inside sentences and, for a
// fixed-seed random choice of words, Title, UPPER and several mixed-case
// forms, so casing tallies are exercised.
func casedText(t testing.TB, lines int) string {
	t.Helper()
	src := strings.Split(readFile(t, filepath.Join("testdata", "opticks-train.txt")), "\n")
	rng := rand.New(rand.NewPCG(7, 11))
	var sb strings.Builder
	for i, line := range src[:min(lines, len(src))] {
		words := strings.Fields(line)
		for j, w := range words {
			switch r := rng.IntN(40); {
			case j == 0 || r == 0:
				rr, n := utf8.DecodeRuneInString(w)
				w = string(unicode.ToUpper(rr)) + w[n:]
			case r == 1:
				w = strings.ToUpper(w)
			case r == 2 && len(w) > 2:
				w = w[:1] + strings.ToUpper(w[1:2]) + w[2:]
			case r == 3 && len(w) > 3:
				w = w[:2] + strings.ToUpper(w[2:3]) + w[3:]
			}
			if j > 0 {
				if rng.IntN(12) == 0 {
					sb.WriteByte('\n')
				} else {
					sb.WriteByte(' ')
				}
			}
			sb.WriteString(w)
		}
		sb.WriteString([]string{".", "!", "?", ".", "."}[i%5])
		if rng.IntN(6) == 0 {
			sb.WriteString("\n\n")
		} else {
			sb.WriteByte(' ')
		}
	}
	return sb.String()
}

// sectionOf estimates counts and lays them out losslessly.
func sectionOf(t testing.TB, cs *Counts) []byte {
	t.Helper()
	b, err := EstimateCounts(context.Background(), cs, EstimateOptions{})
	if err != nil {
		t.Fatal(err)
	}
	sec, err := AppendSection(nil, b, LayoutOptions{})
	if err != nil {
		t.Fatal(err)
	}
	// The surfaces go to the lexicon, not the n-gram section: append them.
	return append(sec, strings.Join(b.Surface, "\x00")...)
}

// counterSection is the reference: one Counter fed the whole text.
func counterSection(t testing.TB, text string, order int, opts ScanOptions) []byte {
	t.Helper()
	c, err := NewCounter(order)
	if err != nil {
		t.Fatal(err)
	}
	if err := c.AddText(context.Background(), strings.NewReader(text), opts, nil); err != nil {
		t.Fatal(err)
	}
	return sectionOf(t, c.counts())
}

func tallySection(t testing.TB, text string, opts TallyOptions, scan ScanOptions) ([]byte, *Tally) {
	t.Helper()
	tl, err := NewTally(opts)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { tl.Close() })
	if err := tl.AddText(context.Background(), strings.NewReader(text), scan, nil); err != nil {
		t.Fatal(err)
	}
	cs, err := tl.Counts(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	return sectionOf(t, cs), tl
}

// TestTallySpillMatchesCounter checks that counting within a tiny budget,
// which forces many sorted runs to disk and a k-way merge, gives exactly the
// model of the in-memory count (a property of the method: the merge only
// regroups sums, so the counts and everything estimated from them are equal).
func TestTallySpillMatchesCounter(t *testing.T) {
	text := casedText(t, 800)
	tok := readFile(t, filepath.Join("testdata", "opticks-train.txt"))
	tok = tok[:len(tok)/4]
	cases := []struct {
		name      string
		text      string
		order     int
		tokenized bool
		budget    int64
		minSpills int
	}{
		{"text/order3/budget64KB", text, 3, false, 64 << 10, 10},
		{"text/order5/budget64KB", text, 5, false, 64 << 10, 10},
		{"tokenized/order4/budget32KB", tok, 4, true, 32 << 10, 10},
		{"text/order2/budget1", text, 2, false, 1, 10},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			scan := ScanOptions{Pretokenized: tc.tokenized}
			want := counterSection(t, tc.text, tc.order, scan)
			dir := t.TempDir()
			got, tl := tallySection(t, tc.text, TallyOptions{Order: tc.order, MemBudget: tc.budget, TempDir: dir}, scan)
			if tl.Spills() < tc.minSpills {
				t.Errorf("Spills() = %d, want at least %d", tl.Spills(), tc.minSpills)
			}
			if !bytes.Equal(got, want) {
				t.Errorf("spilled count: model differs from the in-memory count (%d vs %d bytes)", len(got), len(want))
			}
			if err := tl.Close(); err != nil {
				t.Fatal(err)
			}
			if left, _ := os.ReadDir(dir); len(left) != 0 {
				t.Errorf("after Close the temporary directory holds %d entries", len(left))
			}
		})
	}
}

// TestTallyCancelRemovesRuns cancels a bounded count midway and checks that
// the error is the context's and Close leaves no file behind.
func TestTallyCancelRemovesRuns(t *testing.T) {
	text := strings.Repeat(casedText(t, 400), 8)
	dir := t.TempDir()
	tl, err := NewTally(TallyOptions{Order: 3, Workers: 2, MemBudget: 16 << 10, TempDir: dir})
	if err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	err = tl.AddText(ctx, strings.NewReader(text), ScanOptions{}, func(n int64) {
		if n > int64(len(text)/3) {
			cancel()
		}
	})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("AddText after cancel = %v, want context.Canceled", err)
	}
	if tl.Spills() == 0 {
		t.Errorf("no run was spilled before the cancel; the test does not exercise cleanup")
	}
	if err := tl.Close(); err != nil {
		t.Fatal(err)
	}
	if left, _ := os.ReadDir(dir); len(left) != 0 {
		t.Errorf("after cancel and Close the temporary directory holds %d entries", len(left))
	}
}

// TestMergeRuns merges hand-made runs, in memory and on disk; the expected
// sums are worked out by hand.
func TestMergeRuns(t *testing.T) {
	k := func(a, b uint64) key2 { return key2{a, b} }
	runsIn := [][]ent{
		{{k(1, 0), 2}, {k(3, 0), 1}, {k(3, 7), 4}, {k(9, 0), 1}},
		{{k(1, 0), 5}, {k(3, 7), 1}, {k(1<<62, 3), 1 << 40}},
		{},
		{{k(0, 0), 1}, {k(9, 0), 9}},
	}
	want := []ent{{k(0, 0), 1}, {k(1, 0), 7}, {k(3, 0), 1}, {k(3, 7), 5}, {k(9, 0), 10}, {k(1<<62, 3), 1 << 40}}
	for _, onDisk := range []bool{false, true} {
		t.Run(fmt.Sprintf("disk=%v", onDisk), func(t *testing.T) {
			var runs []run
			for i, r := range runsIn {
				if !onDisk {
					runs = append(runs, run{mem: r})
					continue
				}
				p := filepath.Join(t.TempDir(), fmt.Sprint(i))
				if err := writeRun(p, r); err != nil {
					t.Fatal(err)
				}
				runs = append(runs, run{path: p})
			}
			got, err := mergeRuns(context.Background(), runs, nil)
			if err != nil {
				t.Fatal(err)
			}
			if !slices.Equal(got, want) {
				t.Errorf("mergeRuns = %v, want %v", got, want)
			}
		})
	}
}

// TestRunTruncated checks that a run file cut inside an entry is reported,
// not read as a shorter run.
func TestRunTruncated(t *testing.T) {
	p := filepath.Join(t.TempDir(), "run")
	if err := writeRun(p, []ent{{key2{1 << 40, 0}, 1 << 20}}); err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	for cut := 1; cut < len(b); cut++ {
		if err := os.WriteFile(p, b[:cut], 0o600); err != nil {
			t.Fatal(err)
		}
		if _, err := mergeRuns(context.Background(), []run{{path: p}, {path: p}}, nil); err == nil {
			t.Errorf("run cut at %d of %d bytes: no error", cut, len(b))
		}
	}
}

// TestSpillPacked checks the run file spillPacked writes from a worker's
// trigram table against the table's n-grams renamed one ID at a time and
// sorted with the standard library (the reference), and that it declines,
// leaving the table as it was, when the largest ID and count need more than
// 64 bits together.
func TestSpillPacked(t *testing.T) {
	for _, tc := range []struct {
		name   string
		top    uint32 // largest Tally ID
		maxCnt int
		packed bool
	}{
		{"small-vocab", 5000, 100, true},
		{"full-vocab-count-1", MaxVocab - 1, 1, true}, // 63 + 1 bits
		{"full-vocab-count-2", MaxVocab - 1, 2, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			tl, err := NewTally(TallyOptions{Order: 3, MemBudget: 1 << 20, TempDir: t.TempDir()})
			if err != nil {
				t.Fatal(err)
			}
			defer tl.Close()
			c, _ := NewCounter(3)
			w := &worker{c: c, gid: make([]uint32, 64)}
			rng := rand.New(rand.NewPCG(3, uint64(tc.top)))
			for i := range w.gid {
				w.gid[i] = tc.top - uint32(rng.IntN(int(min(tc.top, 1000))))
			}
			m := c.short[1]
			want := map[key2]uint64{}
			for range 2000 {
				var ids [3]uint32
				for j := range ids {
					ids[j] = uint32(rng.IntN(len(w.gid)))
				}
				k := packLong(ids[:])
				if m.get(k[0]) >= uint32(tc.maxCnt) {
					continue
				}
				m.add(k[0], 1)
				want[packLong([]uint32{w.gid[ids[0]], w.gid[ids[1]], w.gid[ids[2]]})]++
			}
			before := m.len()
			done, err := tl.spillPacked(w, 3)
			if err != nil {
				t.Fatal(err)
			}
			if done != tc.packed {
				t.Fatalf("spillPacked = %v, want %v", done, tc.packed)
			}
			if !done {
				if m.len() != before {
					t.Fatalf("declined spillPacked left %d n-grams, want %d", m.len(), before)
				}
				return
			}
			if m.len() != 0 || len(tl.runs[1]) != 1 {
				t.Fatalf("after spillPacked: %d n-grams in the table, %d runs; want 0, 1", m.len(), len(tl.runs[1]))
			}
			var wantEnts []ent
			for k, c := range want {
				wantEnts = append(wantEnts, ent{k, c})
			}
			slices.SortFunc(wantEnts, cmpEnt)
			got, err := mergeRuns(context.Background(), []run{tl.runs[1][0], {}}, nil)
			if err != nil {
				t.Fatal(err)
			}
			if !slices.Equal(got, wantEnts) {
				t.Fatalf("run holds %d entries, want %d (or other keys or counts)", len(got), len(wantEnts))
			}
		})
	}
}
