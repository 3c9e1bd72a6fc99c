package evaluate

import (
	"context"
	"slices"
)

// Fixer is the corrector the noisy typist relies on: given the sentence so
// far (folded words) and a finished word as typed, it returns the word that
// ends up in the text (folded) — the replacement when the engine applies one
// on space, else typed.
type Fixer func(history []string, typed string) string

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
	Partial       bool    `json:"partial,omitempty"`
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
			final := fix(hist, typed)
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
