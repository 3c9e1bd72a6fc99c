package lm

import (
	"context"
	"io"
	"math"
)

// Scorer is the query a perplexity evaluation needs: ln p(w | ctx).
type Scorer interface {
	LogProb(ctx []uint32, w uint32) float64
}

// PerplexityResult summarises how well a model predicts a text.
type PerplexityResult struct {
	// Perplexity is exp(−mean ln p) over in-vocabulary events.
	Perplexity float64 `json:"perplexity"`
	// PerplexityWithOOV also counts out-of-vocabulary words, scored as <unk>.
	PerplexityWithOOV float64 `json:"perplexity_with_oov"`
	// OOV is the number of out-of-vocabulary words.
	OOV int64 `json:"oov"`
	// Tokens is the number of events: every word and each sentence's </s>.
	Tokens int64 `json:"tokens"`
	// Sentences is the number of sentences read.
	Sentences int64 `json:"sentences"`
	// LogProb is the total natural-log probability of the in-vocabulary events.
	LogProb float64 `json:"log_prob"`
}

// Perplexity scores every sentence of r with m. Words are mapped to IDs by
// lookup (false = out of vocabulary); bos, eos and unk are the special IDs.
// Every word and each sentence's </s> is an event; out-of-vocabulary words
// are left out of Perplexity and scored as <unk> in PerplexityWithOOV, and
// they appear as <unk> in the contexts of later words.
func Perplexity(ctx context.Context, m Scorer, lookup func(word []byte) (uint32, bool), bos, eos, unk uint32, r io.Reader, opts ScanOptions) (PerplexityResult, error) {
	var res PerplexityResult
	var sumIn, sumAll float64
	var hist []uint32
	sc := NewScanner(r, opts)
	for i := 0; sc.Scan(); i++ {
		hist = append(hist[:0], bos)
		toks := sc.Tokens()
		for j := 0; j <= len(toks); j++ {
			w, known := eos, true
			if j < len(toks) {
				w, known = lookup(toks[j])
				if !known || w == bos || w == eos {
					w, known = unk, false
				}
			}
			lp := m.LogProb(hist, w)
			res.Tokens++
			sumAll += lp
			if known {
				sumIn += lp
			} else {
				res.OOV++
			}
			hist = append(hist, w)
		}
		res.Sentences++
		if i&1023 == 1023 {
			if err := ctx.Err(); err != nil {
				return res, err
			}
		}
	}
	if err := sc.Err(); err != nil {
		return res, err
	}
	if in := res.Tokens - res.OOV; in > 0 {
		res.Perplexity = math.Exp(-sumIn / float64(in))
	}
	if res.Tokens > 0 {
		res.PerplexityWithOOV = math.Exp(-sumAll / float64(res.Tokens))
	}
	res.LogProb = sumIn
	return res, nil
}
