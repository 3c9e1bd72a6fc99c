package correct

import (
	"slices"
	"sort"
	"strings"
	"testing"
)

// The references in this file are the plain builds that newChannel and
// BuiltinErrorModel used before they were made to allocate less: reading
// the table through ParseErrorModel, one appended slice per β in a Go
// map, and one appended, stably sorted list per typed byte. The leaner
// builds must give exactly the same values. Cross-checks of two code
// paths of the project, no external source (the accuracy tests check the
// channel against the misspellings list).

// TestBuiltinErrorModelMatchesReader checks that BuiltinErrorModel, which
// slices the embedded table in place, reads the same backoff costs and
// rules as ParseErrorModel reading that table line by line, for the table
// as shipped and with CRLF line ends.
func TestBuiltinErrorModelMatchesReader(t *testing.T) {
	got, err := BuiltinErrorModel()
	if err != nil {
		t.Fatalf("BuiltinErrorModel: %v", err)
	}
	tests := []struct {
		name, text string
	}{
		{"as shipped", builtinErrorModel},
		{"crlf", strings.ReplaceAll(builtinErrorModel, "\n", "\r\n")},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			want, err := ParseErrorModel(strings.NewReader(tt.text))
			if err != nil {
				t.Fatalf("ParseErrorModel: %v", err)
			}
			if got.Backoff() != want.Backoff() {
				t.Errorf("backoff %+v, want %+v", got.Backoff(), want.Backoff())
			}
			if !slices.Equal(got.Rules(), want.Rules()) {
				t.Errorf("rules differ: %d rules, want %d", len(got.rules), len(want.rules))
			}
		})
	}
}

// TestParseErrorModelSortsRules checks that rules given out of order, or
// with a repeated pair, come back sorted by Intended, then Typed, as
// before.
func TestParseErrorModelSortsRules(t *testing.T) {
	const head = "@sub-vowel\t1\n@sub\t1\n@del\t1\n@del-double\t1\n@ins\t1\n@ins-double\t1\n@trans\t1\n"
	tests := []struct {
		name, rules string
		want        []Rule
	}{
		{"sorted", "a\tb\t1\nab\tba\t2\n", []Rule{{"a", "b", 1}, {"ab", "ba", 2}}},
		{"reversed", "ab\tba\t2\na\tb\t1\n", []Rule{{"a", "b", 1}, {"ab", "ba", 2}}},
		{"by typed side", "a\te\t3\na\t∅\t2\n", []Rule{{"a", "", 2}, {"a", "e", 3}}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			m, err := ParseErrorModel(strings.NewReader(head + tt.rules))
			if err != nil {
				t.Fatalf("ParseErrorModel: %v", err)
			}
			if got := m.Rules(); !slices.Equal(got, tt.want) {
				t.Errorf("rules %v, want %v", got, tt.want)
			}
		})
	}
}

// TestChannelListsMatchReference checks newChannel's rule index by β and
// its cost-sorted byte lists against plain appending builds, for the
// shipped model and for a model trained on part of the dev pairs.
func TestChannelListsMatchReference(t *testing.T) {
	builtin, err := BuiltinErrorModel()
	if err != nil {
		t.Fatalf("BuiltinErrorModel: %v", err)
	}
	pairs := devPairs(t)
	train, _ := SplitPairs(pairs, 0, 5)
	tests := []struct {
		name string
		em   *ErrorModel
	}{
		{"builtin", builtin},
		{"trained on four folds", TrainErrorModel(train, TrainOptions{})},
	}
	kb := qwertyChannelKeyboard(t)
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			ch := newChannel(kb, tt.em)
			want := map[string][]int32{}
			for i, r := range ch.rules {
				want[r.beta] = append(want[r.beta], int32(i))
			}
			if len(ch.byBeta) != len(want) {
				t.Fatalf("%d β keys, want %d", len(ch.byBeta), len(want))
			}
			for b, w := range want {
				got := ch.byBeta[b]
				if !slices.Equal(got, w) {
					t.Fatalf("byBeta[%q] = %v, want %v", b, got, w)
				}
				if cap(got) != len(got) {
					t.Fatalf("byBeta[%q] has spare capacity %d", b, cap(got)-len(got))
				}
			}
			var lens []int
			for b := range want {
				if !slices.Contains(lens, len(b)) {
					lens = append(lens, len(b))
				}
			}
			sort.Ints(lens)
			if !slices.Equal(ch.betaLens, lens) {
				t.Errorf("betaLens %v, want %v", ch.betaLens, lens)
			}
			sub := float32(tt.em.backoff.Sub)
			for tb := 0; tb < 256; tb++ {
				var l []costOpt
				for c := 0; c < 256; c++ {
					if c != tb && (isAlpha(byte(c)) || ch.sub[tb][c] < sub) {
						l = append(l, costOpt{byte(c), ch.sub[tb][c]})
					}
				}
				sort.SliceStable(l, func(i, j int) bool { return l[i].cost < l[j].cost })
				if got := ch.cheapSub[tb]; !slices.Equal(got, l) || cap(got) != len(got) {
					t.Fatalf("cheapSub[%d] = %v (cap %d), want %v", tb, got, cap(got), l)
				}
			}
		})
	}
}

// qwertyChannelKeyboard returns the default keyboard, as New uses it.
func qwertyChannelKeyboard(t *testing.T) *Keyboard {
	t.Helper()
	var o Options
	if err := o.defaults(); err != nil {
		t.Fatalf("defaults: %v", err)
	}
	kb, err := o.Layout.Keyboard()
	if err != nil {
		t.Fatalf("Keyboard: %v", err)
	}
	return kb
}

// BenchmarkNewChannel measures compiling the shipped error model and the
// default keyboard into a channel, with BuiltinErrorModel, and its
// allocations.
func BenchmarkNewChannel(b *testing.B) {
	var o Options
	if err := o.defaults(); err != nil {
		b.Fatal(err)
	}
	kb, err := o.Layout.Keyboard()
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	var ch *channel
	for b.Loop() {
		em, err := BuiltinErrorModel()
		if err != nil {
			b.Fatal(err)
		}
		ch = newChannel(kb, em)
	}
	b.ReportMetric(float64(len(ch.rules)), "rules")
}
