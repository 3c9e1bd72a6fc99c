package correct

import (
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"
	"time"

	"github.com/agnivade/levenshtein"
)

func TestTailDistance(t *testing.T) {
	// Reference: github.com/agnivade/levenshtein (plain edit distance) on
	// random endings where no adjacent transposition can apply.
	seed := uint64(time.Now().UnixNano())
	t.Logf("seed %d", seed)
	rng := rand.New(rand.NewPCG(seed, 2))
	word := func() string {
		b := make([]byte, rng.IntN(familyMaxTail+3))
		for i := range b {
			b[i] = "abcd"[rng.IntN(4)]
		}
		return string(b)
	}
	compared := 0
	for range 2000 {
		a, b := word(), word()
		if hasSwap(a, b) {
			continue
		}
		compared++
		if got, want := tailDistance(a, b), levenshtein.ComputeDistance(a, b); got != want {
			t.Fatalf("tailDistance(%q, %q) = %d, want %d (seed %d)", a, b, got, want, seed)
		}
	}
	if compared < 300 {
		t.Fatalf("only %d swap-free pairs compared", compared)
	}
	// Worked by hand from the definition of optimal string alignment
	// distance; "ca"/"abc" is the usual example where it differs from
	// unrestricted Damerau-Levenshtein (3, not 2; from memory).
	tests := []struct {
		name, a, b string
		want       int
	}{
		{"swap counts one", "ei", "ie", 1},
		{"ated for ed", "ated", "ed", 2},
		{"ly for nothing", "ly", "", 2},
		{"ca abc", "ca", "abc", 3},
		{"long endings count their extra bytes", "abcdefghij", "abcdefgh", 2},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := tailDistance(tc.a, tc.b); got != tc.want {
				t.Errorf("tailDistance(%q, %q) = %d, want %d", tc.a, tc.b, got, tc.want)
			}
		})
	}
}

func TestIsAffixError(t *testing.T) {
	// Pairs from the development half of the Wikipedia list of common
	// misspellings (corpora/misspellings-dev.tsv) and the Wikipedia list's
	// own kind of entry; the answers follow the definition by hand.
	tests := []struct {
		name, typed, intended string
		want                  bool
	}{
		{"wrong derivational ending", "oftenly", "often", true},
		{"wrong inflection", "examinated", "examined", true},
		{"suffix swap", "flourishment", "flourishing", true},
		{"one edit is the letter model's", "arguement", "argument", false},
		{"stem too short", "teh", "the", false},
		{"shared prefix too short", "recieved", "received", false},
		{"ending too long", "abcdxxxxxxx", "abcd", false},
		{"clitic is no ending", "amira's", "amira", false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := isAffixError(tc.typed, tc.intended); got != tc.want {
				t.Errorf("isAffixError(%q, %q) = %v, want %v", tc.typed, tc.intended, got, tc.want)
			}
		})
	}
}

func TestTrainWordErrorCosts(t *testing.T) {
	// One whole-word error of the class among four pairs: the Laplace
	// estimate (n+1)/(N+2) that TrainErrorModel documents for its class
	// costs gives 2/6 per pair, a cost of ln 3 (worked by hand). The moved
	// cost is per move: N counts the moves (movedWindow) the intended
	// words allow, worked by hand: that 4 (tha→hat, ath; hat→ath, tha),
	// the 2, receive 8 (rec, cei, eiv, ive two each; ece none: each moves
	// an e across an e), which 6; 2/22, a cost of ln 11. "teh" and
	// "recieve" are adjacent swaps and "wich" a deletion, not moves.
	tests := []struct {
		name  string
		typed string // the pair of the class, intended word want
		want  string
		cost  func(Backoff) float64
		nats  float64
	}{
		{"affix", "oftenly", "often", func(b Backoff) float64 { return b.Affix }, math.Log(3)},
		{"irregular", "teached", "taught", func(b Backoff) float64 { return b.Irregular }, math.Log(3)},
		{"moved", "tath", "that", func(b Backoff) float64 { return b.Moved }, math.Log(11)},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			pairs := []Pair{
				{Typed: tc.typed, Intended: []string{tc.want}},
				{Typed: "teh", Intended: []string{"the"}},
				{Typed: "recieve", Intended: []string{"receive"}},
				{Typed: "wich", Intended: []string{"which"}},
			}
			m := TrainErrorModel(pairs, TrainOptions{})
			if got := tc.cost(m.Backoff()); math.Abs(got-tc.nats) > 1e-9 {
				t.Errorf("%s cost = %v, want %v", tc.name, got, tc.nats)
			}
		})
	}
}

func TestParseErrorModelWordCosts(t *testing.T) {
	classic := "@sub-vowel\t1\n@sub\t1\n@del\t1\n@del-double\t1\n@ins\t1\n@ins-double\t1\n@trans\t1\n"
	affix := func(b Backoff) float64 { return b.Affix }
	irregular := func(b Backoff) float64 { return b.Irregular }
	moved := func(b Backoff) float64 { return b.Moved }
	tests := []struct {
		name, table string
		wantErr     bool
		cost        func(Backoff) float64
		want        float64
	}{
		{"affix given", classic + "@affix\t4.5\n", false, affix, 4.5},
		{"affix missing: a table older than the line", classic, false, affix, DefaultAffixCost},
		{"a classic line missing", classic[len("@sub-vowel\t1\n"):] + "@affix\t4.5\n", true, affix, 0},
		{"affix negative", classic + "@affix\t-1\n", true, affix, 0},
		{"irregular given", classic + "@affix\t1\n@irregular\t4.5\n", false, irregular, 4.5},
		{"irregular missing: a table older than the line", classic + "@affix\t1\n", false, irregular, DefaultIrregularCost},
		{"irregular negative", classic + "@affix\t1\n@irregular\t-1\n", true, irregular, 0},
		{"irregular with a rule's fields", classic + "@affix\t1\n@irregular\tx\t1\n", true, irregular, 0},
		{"moved given", classic + "@affix\t1\n@irregular\t1\n@moved\t4.5\n", false, moved, 4.5},
		{"moved missing: a table older than the line", classic + "@affix\t1\n@irregular\t1\n", false, moved, DefaultMovedCost},
		{"moved missing with affix and irregular", classic, false, moved, DefaultMovedCost},
		{"moved negative", classic + "@moved\t-1\n", true, moved, 0},
		{"moved twice the fields", classic + "@moved\t1\t1\n", true, moved, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			m, err := ParseErrorModel(strings.NewReader(tc.table))
			if tc.wantErr {
				if !errors.Is(err, ErrErrorModel) {
					t.Fatalf("err = %v, want ErrErrorModel", err)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if got := tc.cost(m.Backoff()); got != tc.want {
				t.Errorf("cost = %v, want %v", got, tc.want)
			}
		})
	}
}

func TestFamilyCandidates(t *testing.T) {
	words := []string{"exam", "examination", "examine", "examined", "examiner", "often", "oftentimes", "other"}
	lex := newFlatLex(words)
	flat := func([]uint32, uint32) float64 { return math.Log(1.0 / 8) }
	em, err := BuiltinErrorModel()
	if err != nil {
		t.Fatal(err)
	}
	c, err := New(lex, flat, Options{ErrorModel: em})
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name, typed string
		want        []string // in this order among the candidates
		absent      []string
	}{
		// Endings worked by hand: "ated" is 2 edits from "ed" and 3 from
		// "e", "er" and "ation", so with equal word probabilities examined
		// comes first.
		{"inflection", "examinated", []string{"examined"}, nil},
		{"derivation", "oftenly", []string{"often"}, []string{"other"}},
		// A word the lexicon knows gets no family.
		{"known word", "examine", nil, []string{"examination"}},
		// A possessive is a clitic, not an ending.
		{"clitic", "examiner's", nil, []string{"examiner", "examine"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got := correctedWords(c, tc.typed)
			if len(tc.want) > 0 && (len(got) == 0 || got[0] != tc.want[0]) {
				t.Errorf("Correct(%q) = %v, want %q first", tc.typed, got, tc.want[0])
			}
			for _, w := range tc.absent {
				if slices.Contains(got, w) {
					t.Errorf("Correct(%q) = %v, want no %q", tc.typed, got, w)
				}
			}
		})
	}
	// Bad input: nothing to walk, no panic.
	var rk ranker
	for _, w := range []string{"", "abc", strings.Repeat("x", 200), "\xff\xfe\xfd\xfc\xfb"} {
		rk.start(c, nil, 0, false, 8, nil)
		if n := c.addFamily(&rk, w); n > familyMaxStates {
			t.Errorf("addFamily(%q) visited %d states, want ≤ %d", w[:min(len(w), 8)], n, familyMaxStates)
		}
	}
}

// BenchmarkFamily measures what the word-family walk and the sound
// feature add to Correct, for the 8-letter misspellings of
// BenchmarkCorrect8 over the SUBTLEX-US lexicon (trie): each word's
// search runs untimed, then addFamily and addSound are timed. It reports
// the lexicon states the family walk visits per word (deterministic) and
// the median and p99 time of the two steps.
func BenchmarkFamily(b *testing.B) {
	d := corpus(b)
	typed := eightLetterTyped(b)
	lex := newTrieLex(b, d.subtlexLex)
	c, err := New(lex, d.unigramScorer(lex.words), Options{MaxStates: benchCap})
	if err != nil {
		b.Fatal(err)
	}
	var sc scratch
	var states []int
	var lat []time.Duration
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		w := typed[i%len(typed)]
		i++
		b.StopTimer()
		id, in := lex.ID(w)
		sc.rk.start(c, nil, id, in, 8, sc.top)
		widest, _ := c.widestPass(w, id, in, in)
		c.searchUpTo(&sc.s, &sc.rk, w, widest, true)
		b.StartTimer()
		start := time.Now()
		n := c.addFamily(&sc.rk, w)
		sc.rk.addSound(w)
		lat = append(lat, time.Since(start))
		sc.top = sc.rk.top
		if i <= len(typed) {
			states = append(states, n)
		}
	}
	slices.Sort(states)
	slices.Sort(lat)
	b.ReportMetric(float64(states[len(states)/2]), "states-median")
	b.ReportMetric(float64(states[len(states)*99/100]), "states-p99")
	b.ReportMetric(float64(lat[len(lat)/2].Nanoseconds()), "median-ns")
	b.ReportMetric(float64(lat[len(lat)*99/100].Nanoseconds()), "p99-ns")
}

// TestFamilyTableMatchesLexicon checks that the family walk over the
// corrector's copy of the lexicon automaton (belowTable) offers exactly
// the words, at exactly the costs, and visits exactly the states of the
// walk through the lexicon itself (the trie package's decoder, the
// previous code path), for every typed word of the development
// misspellings list (corpora/misspellings-dev.tsv, a public list of real
// misspellings) over the SUBTLEX-US lexicon.
func TestFamilyTableMatchesLexicon(t *testing.T) {
	d := corpus(t)
	lex := newTrieLex(t, d.subtlexLex)
	withTable, err := New(lex, d.unigramScorer(lex.words), Options{})
	if err != nil {
		t.Fatal(err)
	}
	withLex, err := New(lex, d.unigramScorer(lex.words), Options{})
	if err != nil {
		t.Fatal(err)
	}
	if withTable.below == nil {
		t.Fatal("no automaton copy for a lexicon that lists edges")
	}
	withLex.below = nil
	var a, b ranker
	offered := 0
	for _, p := range devPairs(t) {
		w := strings.ToLower(p.Typed)
		id, in := lex.ID(w)
		a.start(withTable, nil, id, in, 8, nil)
		b.start(withLex, nil, id, in, 8, nil)
		na, nb := withTable.addFamily(&a, w), withLex.addFamily(&b, w)
		if na != nb {
			t.Errorf("addFamily(%q) visited %d states over the table, %d over the lexicon", w, na, nb)
		}
		if !slices.Equal(a.top, b.top) {
			t.Errorf("addFamily(%q) offered %v over the table, %v over the lexicon", w, a.top, b.top)
		}
		offered += len(b.top)
	}
	if offered < 1000 {
		t.Errorf("%d words offered in all; the comparison is too thin", offered)
	}
}

// correctedWords returns the words of c's first five candidates for
// typed, with no context.
func correctedWords(c *Corrector, typed string) []string {
	cands, _ := c.Correct(typed, nil, 5, nil)
	got := make([]string, 0, len(cands))
	for _, cand := range cands {
		got = append(got, cand.Word)
	}
	return got
}

// The defaults a table older than the "@irregular" or "@moved" line gets
// are documented as the built-in table's values: a check that the
// constants and the generated table agree.
func TestDefaultWordCostsAreBuiltin(t *testing.T) {
	em, err := BuiltinErrorModel()
	if err != nil {
		t.Fatal(err)
	}
	b := em.Backoff()
	tests := []struct {
		name          string
		builtin, want float64
	}{
		{"irregular", b.Irregular, DefaultIrregularCost},
		{"moved", b.Moved, DefaultMovedCost},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if tc.builtin != tc.want {
				t.Errorf("built-in %s cost = %v, default constant = %v: regenerate or update the constant", tc.name, tc.builtin, tc.want)
			}
		})
	}
}
