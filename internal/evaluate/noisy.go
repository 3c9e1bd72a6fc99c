package evaluate

import (
	"context"
	"slices"
)

// Fix is what the corrector did with one finished word.
type Fix struct {
	// Word is the word that ends up in the text (folded): the replacement
	// when one was applied on space, else the typed word.
	Word string
	// Applied is true when a replacement was applied on space.
	Applied bool
	// Offered holds the corrections offered, best first (folded).
	Offered []string
	// Known is true when the engine knows the typed word (lexicon or user).
	Known bool
}

// Fixer is the corrector the noisy typist relies on: given the sentence so
// far (folded words) and a finished word as typed, it says what the engine
// did with the word.
type Fixer func(history []string, typed string) Fix

// WordCorrector is what a Fixer asks of an engine for one finished word
// (keyloom's Engine.CorrectWord): the corrections offered, best first and
// folded, whether the first is applied on space, and whether the engine
// knows the typed word.
type WordCorrector func(history []string, typed string) (offered []string, apply, known bool, err error)

// NewFixer returns the Fixer of an engine's word corrector, and a function
// that returns the first error the corrector gave (RunNoisy goes on with
// such a word left as typed; report the error after the run, since a
// typist without corrections would mislead).
func NewFixer(c WordCorrector) (Fixer, func() error) {
	var first error // RunNoisy calls the Fixer from one goroutine
	fix := func(history []string, typed string) Fix {
		offered, apply, known, err := c(history, typed)
		if err != nil && first == nil {
			first = err
		}
		f := Fix{Word: typed, Offered: offered, Known: known}
		if apply && len(offered) > 0 {
			f.Word, f.Applied = offered[0], true
		}
		return f
	}
	return fix, func() error { return first }
}

// Misses breaks the words typed with errors down by what became of them,
// and the clean words broken by why. Each corrupted word is counted in
// exactly one of the first seven fields, in the order given.
type Misses struct {
	// Predicted: the intended word was among the suggestions while typing.
	Predicted int64 `json:"predicted"`
	// Applied: the right correction was applied on space.
	Applied int64 `json:"applied"`
	// WrongApplied: another word was applied on space.
	WrongApplied int64 `json:"wrong_applied"`
	// RealWord: the noise made another word the engine knows, left alone.
	RealWord int64 `json:"real_word"`
	// NotOffered: an unknown word whose right correction was not offered.
	NotOffered int64 `json:"not_offered"`
	// FirstNotApplied: the right word was the first correction offered but
	// the engine was not confident enough to apply it.
	FirstNotApplied int64 `json:"first_not_applied"`
	// RankedLower: the right word was offered, but not first.
	RankedLower int64 `json:"ranked_lower"`
	// BrokenKnown: clean words the engine knows that a correction replaced.
	BrokenKnown int64 `json:"broken_known"`
	// BrokenUnknown: clean words the engine does not know (names, rare
	// words) that a correction replaced.
	BrokenUnknown int64 `json:"broken_unknown"`
	// Examples holds up to five "intended/typed→final" examples per class
	// (the field names above in their JSON spelling), for reading.
	Examples map[string][]string `json:"examples,omitempty"`
}

// note adds one to *n, the class named key, and keeps an example.
func (m *Misses) note(n *int64, key, intended, typed, final string) {
	*n++
	if m.Examples == nil {
		m.Examples = map[string][]string{}
	}
	if len(m.Examples[key]) < 5 {
		m.Examples[key] = append(m.Examples[key], intended+"/"+typed+"→"+final)
	}
}

// NoisyReport holds the results of typing with errors.
type NoisyReport struct {
	Words     int64 `json:"words"`
	Corrupted int64 `json:"corrupted"` // words the noise changed
	// Repaired counts corrupted words that ended up right: picked from the
	// suggestions or corrected on space.
	Repaired int64 `json:"repaired"`
	// Broken counts words typed correctly that a correction made wrong.
	Broken int64 `json:"broken"`
	// KSROn and KSROff are net keystroke savings with correction on and off:
	// a word left wrong costs deleting it and typing it again.
	KSROn  float64 `json:"ksr_correction_on"`
	KSROff float64 `json:"ksr_correction_off"`
	// RepairedShare = Repaired/Corrupted; BrokenShare = Broken/(Words−Corrupted).
	RepairedShare float64 `json:"repaired_share"`
	BrokenShare   float64 `json:"broken_share"`
	// Misses breaks the outcomes down.
	Misses  Misses `json:"misses"`
	Partial bool   `json:"partial,omitempty"`
}

// RunNoisy types every sentence with errors: noisy(w) is what the typist's
// fingers produce for the intended word w. Before each typed letter the
// typist takes the intended word if it is among the k suggestions for the
// letters typed so far; otherwise it types the whole noisy word and a space,
// and fix decides what stays. A wrong word costs its deletion (one keystroke
// per letter) and the intended word typed again (letters + space). It runs
// in reading order on one goroutine (noisy is usually seeded and stateful).
func RunNoisy(ctx context.Context, p Predictor, fix Fixer, sentences [][]string, noisy func(string) string, k int) (NoisyReport, error) {
	if k <= 0 {
		k = 3
	}
	var r NoisyReport
	var on, off, base int64
	var buf []string
	for _, sent := range sentences {
		if ctx.Err() != nil {
			r.Partial = true
			break
		}
		for i, w := range sent {
			hist := sent[:i]
			typed := noisy(w)
			r.Words++
			n := int64(len([]rune(w)))
			base += n + 1
			corrupted := typed != w
			if corrupted {
				r.Corrupted++
			}
			// Suggestions while typing the noisy letters.
			picked := -1
			tr := []rune(typed)
			for L := 0; L < len(tr); L++ {
				buf = p.Predict(hist, string(tr[:L]), k, buf[:0])
				if slices.Contains(buf, w) {
					picked = L
					break
				}
			}
			if picked >= 0 {
				on += int64(picked) + 1
				off += int64(picked) + 1
				if corrupted {
					r.Repaired++
					r.Misses.Predicted++
				}
				continue
			}
			typedCost := int64(len(tr)) + 1
			// Correction off: the noisy word stays.
			off += typedCost
			if corrupted {
				off += int64(len(tr)) + n + 1
			}
			// Correction on.
			f := fix(hist, typed)
			final := f.Word
			on += typedCost
			if final != w {
				on += int64(len([]rune(final))) + n + 1
			}
			switch {
			case corrupted && final == w:
				r.Repaired++
			case !corrupted && final != w:
				r.Broken++
			}
			r.Misses.classify(w, typed, f)
		}
	}
	if base > 0 {
		r.KSROn = 1 - float64(on)/float64(base)
		r.KSROff = 1 - float64(off)/float64(base)
	}
	if r.Corrupted > 0 {
		r.RepairedShare = float64(r.Repaired) / float64(r.Corrupted)
	}
	if clean := r.Words - r.Corrupted; clean > 0 {
		r.BrokenShare = float64(r.Broken) / float64(clean)
	}
	return r, nil
}

// classify counts the outcome of one word that was not picked from the
// suggestions.
func (m *Misses) classify(w, typed string, f Fix) {
	final := f.Word
	if typed == w {
		switch {
		case final == w:
		case f.Known:
			m.note(&m.BrokenKnown, "broken_known", w, typed, final)
		default:
			m.note(&m.BrokenUnknown, "broken_unknown", w, typed, final)
		}
		return
	}
	switch rank := slices.Index(f.Offered, w); {
	case final == w:
		m.note(&m.Applied, "applied", w, typed, final)
	case f.Applied:
		m.note(&m.WrongApplied, "wrong_applied", w, typed, final)
	case f.Known:
		m.note(&m.RealWord, "real_word", w, typed, final)
	case rank < 0:
		m.note(&m.NotOffered, "not_offered", w, typed, final)
	case rank == 0:
		m.note(&m.FirstNotApplied, "first_not_applied", w, typed, final)
	default:
		m.note(&m.RankedLower, "ranked_lower", w, typed, final)
	}
}
