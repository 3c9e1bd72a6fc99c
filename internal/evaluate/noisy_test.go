package evaluate_test

import (
	"context"
	"errors"
	"testing"

	"github.com/keyloom/keyloom/internal/evaluate"
)

// TestNoisyMisses types one word per case with a scripted typo and a
// scripted corrector outcome and checks the class it is counted in. The
// classes follow the definitions in NoisyReport and Misses (project
// definitions): a corrupted word is repaired when it ends up right, and a
// clean word is broken when a correction makes it wrong.
func TestNoisyMisses(t *testing.T) {
	tests := []struct {
		name      string
		intended  string
		typed     string
		suggested bool // the intended word is suggested while typing
		fix       evaluate.Fix
		want      func(m evaluate.Misses) int64
		repaired  bool
		broken    bool
	}{
		{"predicted", "house", "hoise", true, evaluate.Fix{}, func(m evaluate.Misses) int64 { return m.Predicted }, true, false},
		{"applied", "house", "hoise", false, evaluate.Fix{Word: "house", Applied: true, Offered: []string{"house"}}, func(m evaluate.Misses) int64 { return m.Applied }, true, false},
		{"wrong applied", "house", "hoise", false, evaluate.Fix{Word: "noise", Applied: true, Offered: []string{"noise", "house"}}, func(m evaluate.Misses) int64 { return m.WrongApplied }, false, false},
		{"real word", "house", "horse", false, evaluate.Fix{Word: "horse", Known: true}, func(m evaluate.Misses) int64 { return m.RealWord }, false, false},
		{"not offered", "house", "hoise", false, evaluate.Fix{Word: "hoise", Offered: []string{"noise"}}, func(m evaluate.Misses) int64 { return m.NotOffered }, false, false},
		{"first not applied", "house", "hoise", false, evaluate.Fix{Word: "hoise", Offered: []string{"house", "noise"}}, func(m evaluate.Misses) int64 { return m.FirstNotApplied }, false, false},
		{"ranked lower", "house", "hoise", false, evaluate.Fix{Word: "hoise", Offered: []string{"noise", "house"}}, func(m evaluate.Misses) int64 { return m.RankedLower }, false, false},
		{"broken known", "house", "house", false, evaluate.Fix{Word: "horse", Applied: true, Known: true}, func(m evaluate.Misses) int64 { return m.BrokenKnown }, false, true},
		{"broken unknown", "wren", "wren", false, evaluate.Fix{Word: "when", Applied: true}, func(m evaluate.Misses) int64 { return m.BrokenUnknown }, false, true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			p := evaluate.PredictorFunc(func(h []string, prefix string, k int, dst []string) []string {
				if tc.suggested {
					dst = append(dst, tc.intended)
				}
				return dst
			})
			fix := func(h []string, typed string) evaluate.Fix {
				f := tc.fix
				if f.Word == "" {
					f.Word = typed
				}
				return f
			}
			noisy := func(string) string { return tc.typed }
			r, err := evaluate.RunNoisy(context.Background(), p, fix, [][]string{{tc.intended}}, noisy, 3)
			if err != nil {
				t.Fatal(err)
			}
			if got := tc.want(r.Misses); got != 1 {
				t.Errorf("RunNoisy(%s typed %s) misses = %+v, want 1 in class %s", tc.intended, tc.typed, r.Misses, tc.name)
			}
			m := r.Misses
			total := m.Predicted + m.Applied + m.WrongApplied + m.RealWord + m.NotOffered + m.FirstNotApplied + m.RankedLower + m.BrokenKnown + m.BrokenUnknown
			if total != 1 {
				t.Errorf("RunNoisy counted %d classes, want exactly 1: %+v", total, m)
			}
			if (r.Repaired == 1) != tc.repaired || (r.Broken == 1) != tc.broken {
				t.Errorf("RunNoisy repaired %d broken %d, want %v %v", r.Repaired, r.Broken, tc.repaired, tc.broken)
			}
		})
	}
}

// TestNewFixer checks how a word corrector's answer becomes a Fix: the
// first offer replaces the word only when applied, and the first error is
// the one kept.
func TestNewFixer(t *testing.T) {
	errFirst, errLater := errors.New("first"), errors.New("later")
	answers := map[string]struct {
		offered      []string
		apply, known bool
		err          error
	}{
		"teh":   {[]string{"the", "ten"}, true, false, nil},
		"form":  {[]string{"from"}, false, true, nil},
		"zzxq":  {nil, false, false, errFirst},
		"qqzx":  {nil, true, false, errLater},
		"fine.": {nil, false, true, nil},
	}
	fix, firstErr := evaluate.NewFixer(func(_ []string, typed string) ([]string, bool, bool, error) {
		a := answers[typed]
		return a.offered, a.apply, a.known, a.err
	})
	tests := []struct {
		typed   string
		word    string
		applied bool
		known   bool
	}{
		{"teh", "the", true, false},
		{"form", "form", false, true},
		{"zzxq", "zzxq", false, false},
		{"qqzx", "qqzx", false, false}, // apply without an offer changes nothing
		{"fine.", "fine.", false, true},
	}
	for _, tc := range tests {
		t.Run(tc.typed, func(t *testing.T) {
			f := fix(nil, tc.typed)
			if f.Word != tc.word || f.Applied != tc.applied || f.Known != tc.known {
				t.Errorf("fix(%q) = %+v, want word %q applied %v known %v", tc.typed, f, tc.word, tc.applied, tc.known)
			}
		})
	}
	if err := firstErr(); err != errFirst {
		t.Errorf("first error = %v, want %v", err, errFirst)
	}
}
