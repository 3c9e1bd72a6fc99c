package lm

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

func shardLines(t testing.TB, text string, opts MapOptions) []string {
	t.Helper()
	var out bytes.Buffer
	if err := MapShard(context.Background(), strings.NewReader(text), &out, opts); err != nil {
		t.Fatal(err)
	}
	return strings.Split(strings.TrimSuffix(out.String(), "\n"), "\n")
}

// TestMapShardByHand checks the mapper on one sentence against counts
// enumerated by hand from the definition of n-gram counts over a sentence
// padded as <s> w1 … wm </s> (Chen & Goodman 1998, TR-10-98 §2; Jurafsky &
// Martin, Speech and Language Processing, ch. 3 — from memory). "A" starts the
// sentence, so its capital is no casing evidence.
func TestMapShardByHand(t *testing.T) {
	got := shardLines(t, "A b a.", MapOptions{Order: 3})
	slices.Sort(got)
	want := []string{
		"<s>\t1", "<s> a\t1", "<s> a b\t1",
		"</s>\t1", "</s> lower a\t1", "</s> lower b\t1",
		"a\t2", "a </s>\t1", "a b\t1", "a b a\t1",
		"b\t1", "b a\t1", "b a </s>\t1",
	}
	slices.Sort(want)
	if !slices.Equal(got, want) {
		t.Errorf("MapShard(%q) =\n%q\nwant\n%q", "A b a.", got, want)
	}
}

// TestReduceShard sums adjacent equal keys; sums worked out by hand.
func TestReduceShard(t *testing.T) {
	in := "a\t1\na\t2\na b\t5\nb\t1\nb\t1\nb\t1\n\nc d e\t7"
	want := "a\t3\na b\t5\nb\t3\nc d e\t7\n"
	var out bytes.Buffer
	if err := ReduceShard(context.Background(), strings.NewReader(in), &out); err != nil {
		t.Fatal(err)
	}
	if out.String() != want {
		t.Errorf("ReduceShard = %q, want %q", out.String(), want)
	}
}

// TestMapSortReduceMatchesCounter runs the map/reduce pipeline locally — map
// three pieces cut at sentence ends, sort the lines by bytes (as the
// engine's shuffle does), reduce — and checks that the model estimated from
// the reduced shard equals the single-process model of the whole text.
func TestMapSortReduceMatchesCounter(t *testing.T) {
	cases := []struct {
		name  string
		text  string
		scan  ScanOptions
		order int
		mem   int64
	}{
		{"text/order3", casedText(t, 500), ScanOptions{}, 3, 0},
		{"text/order4/small-map-memory", casedText(t, 500), ScanOptions{}, 4, 20 << 10},
		{"tokenized/order3", readFile(t, filepath.Join("testdata", "opticks-train.txt"))[:50000], ScanOptions{Pretokenized: true}, 3, 0},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			want := counterSection(t, tc.text, tc.order, tc.scan)
			var lines []string
			rest := tc.text
			for i := range 3 {
				piece := rest
				if i < 2 {
					cut := safeCut([]byte(rest[:len(tc.text)/3]), tc.scan.Pretokenized)
					if cut == 0 {
						t.Fatal("no safe cut in a third of the text")
					}
					piece, rest = rest[:cut], rest[cut:]
				}
				lines = append(lines, shardLines(t, piece, MapOptions{Order: tc.order, Scan: tc.scan, MemBudget: tc.mem})...)
			}
			slices.Sort(lines)
			var reduced bytes.Buffer
			if err := ReduceShard(context.Background(), strings.NewReader(strings.Join(lines, "\n")+"\n"), &reduced); err != nil {
				t.Fatal(err)
			}
			for _, budget := range []int64{0, 4 << 10} {
				tl, err := NewTally(TallyOptions{Order: tc.order, MemBudget: budget, TempDir: t.TempDir()})
				if err != nil {
					t.Fatal(err)
				}
				defer tl.Close()
				if err := tl.AddShards(context.Background(), bytes.NewReader(reduced.Bytes())); err != nil {
					t.Fatal(err)
				}
				cs, err := tl.Counts(context.Background())
				if err != nil {
					t.Fatal(err)
				}
				if got := sectionOf(t, cs); !bytes.Equal(got, want) {
					t.Errorf("budget %d: model from shards differs from the single-process model", budget)
				}
			}
		})
	}
}

// TestAddShardsErrors feeds malformed lines and expects ErrShard.
func TestAddShardsErrors(t *testing.T) {
	cases := []struct {
		name string
		in   string
	}{
		{"no-tab", "a b 3\n"},
		{"bad-count", "a\tx\n"},
		{"negative-count", "a\t-1\n"},
		{"double-space", "a  b\t1\n"},
		{"leading-space", " a\t1\n"},
		{"order-too-high", "a b c d\t1\n"},
		{"bos-inside", "a <s>\t1\n"},
		{"eos-inside", "a </s> b\t1\n"},
		{"unknown-casing-class", "</s> sideways a\t1\n"},
		{"other-without-form", "</s> other a\t1\n"},
		{"lower-with-form", "</s> lower a A\t1\n"},
		{"missing-orders", "a\t1\na b\t1\n"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			tl, err := NewTally(TallyOptions{Order: 3})
			if err != nil {
				t.Fatal(err)
			}
			err = tl.AddShards(context.Background(), strings.NewReader(tc.in))
			if err == nil {
				_, err = tl.Counts(context.Background())
			}
			if !errors.Is(err, ErrShard) {
				t.Errorf("AddShards(%q) then Counts = %v, want ErrShard", tc.in, err)
			}
		})
	}
}

// TestAddShardsRepeatedKeys checks that an n-gram given on several shard
// lines gets the sum of their counts, with and without a memory budget, as
// SHARDS.md specifies ("keys may repeat; their counts add up"). Expected
// counts are worked by hand from the input. Without a budget the repeated
// key used to stay two entries of the table.
func TestAddShardsRepeatedKeys(t *testing.T) {
	const in = "a\t2\nb\t2\na b\t1\nb a\t1\na b\t1\n"
	for _, mem := range []int64{0, 1 << 20} {
		t.Run(fmt.Sprintf("mem=%d", mem), func(t *testing.T) {
			tl, err := NewTally(TallyOptions{Order: 2, MemBudget: mem, TempDir: t.TempDir()})
			if err != nil {
				t.Fatal(err)
			}
			defer tl.Close()
			if err := tl.AddShards(context.Background(), strings.NewReader(in)); err != nil {
				t.Fatal(err)
			}
			cs, err := tl.Counts(context.Background())
			if err != nil {
				t.Fatal(err)
			}
			id := func(w string) uint32 {
				i, ok := slices.BinarySearch(cs.vocab, w)
				if !ok {
					t.Fatalf("word %q missing from the vocabulary", w)
				}
				return uint32(i)
			}
			bi := cs.tabs[1]
			want := map[[2]string]uint64{{"a", "b"}: 2, {"b", "a"}: 1}
			if bi.len() != len(want) {
				t.Fatalf("Counts has %d bigrams, want %d", bi.len(), len(want))
			}
			for k, c := range want {
				if i := bi.find([]uint32{id(k[0]), id(k[1])}); i < 0 || bi.cnt[i] != c {
					t.Errorf("count(%s %s) at index %d, want %d", k[0], k[1], i, c)
				}
			}
		})
	}
}
