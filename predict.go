package keyloom

import (
	"context"
	"io"

	"github.com/keyloom/keyloom/lm"
)

// Predict is the core of Suggest for simulators and measurement tools: it
// appends to dst up to k words (folded, without display casing) that may come
// next after history (the current sentence's folded words, oldest first)
// and start with prefix (folded; "" for a next-word prediction), most
// probable first, under the base model blended with the user overlay. It
// returns dst unchanged after Close.
func (e *Engine) Predict(history []string, prefix string, k int, dst []string) []string {
	if e.closed.Load() {
		return dst
	}
	var ib [lm.MaxOrder + 1]uint32
	var buf [lm.MaxK]lm.Scored
	q := e.query()
	top := q.topK(q.contextIDs(history, ib[:0]), prefix, k, buf[:0])
	for _, s := range top {
		dst = append(dst, q.word(s.ID))
	}
	return dst
}

// query is one keystroke's consistent view: the base model and, when the
// user has taught it anything, an overlay snapshot (whose IDs extend the
// base IDs and are valid only with that snapshot).
type query struct {
	e    *Engine
	view *lm.OverlayView // nil when the overlay is empty
}

func (e *Engine) query() query {
	q := query{e: e}
	if v := e.user.ov.Load().View(); !v.Empty() {
		q.view = v
	}
	return q
}

func (q query) id(w string) (uint32, bool) {
	if q.view != nil {
		return q.view.ID(w)
	}
	return q.e.model.Lex.ID(w)
}

func (q query) word(id uint32) string {
	if q.view != nil {
		return q.view.Word(id)
	}
	return q.e.model.Lex.Word(id)
}

// surface returns the display form of id.
func (q query) surface(id uint32) string {
	if q.view != nil && id >= uint32(q.e.model.LM.VocabSize()) {
		if s := q.view.Surface(id); s != "" {
			return s
		}
		return q.view.Word(id)
	}
	return q.e.model.Lex.Surface(id)
}

// contextIDs maps the sentence so far to IDs: <s>, then the last order−1
// words (unknown words become <unk>). It appends to dst.
func (q query) contextIDs(words []string, dst []uint32) []uint32 {
	m := q.e.model
	if k := m.LM.Order() - 1; len(words) > k {
		words = words[len(words)-k:]
	}
	bos, _, unk := m.LM.Specials()
	dst = append(dst, bos)
	for _, w := range words {
		id, ok := q.id(w)
		if !ok {
			id = unk
		}
		dst = append(dst, id)
	}
	return dst
}

// topK returns the k best words after ctx that start with the folded prefix.
func (q query) topK(ctx []uint32, prefix string, k int, dst []lm.Scored) []lm.Scored {
	m := q.e.model
	lo, hi := uint32(0), uint32(m.LM.VocabSize())
	if prefix != "" {
		lo, hi = m.Lex.PrefixRange(prefix)
	}
	if q.view != nil {
		return q.view.TopK(ctx, prefix, lo, hi, k, dst)
	}
	return m.LM.TopK(ctx, lo, hi, k, dst)
}

// Perplexity scores every sentence of r under the base model blended with the
// user overlay (see lm.Perplexity for the conventions).
func (e *Engine) Perplexity(ctx context.Context, r io.Reader, opts lm.ScanOptions) (lm.PerplexityResult, error) {
	if e.closed.Load() {
		return lm.PerplexityResult{}, ErrClosed
	}
	q := e.query()
	bos, eos, unk := e.model.LM.Specials()
	var sc lm.Scorer = e.model.LM
	if q.view != nil {
		sc = q.view
	}
	return lm.Perplexity(ctx, sc, func(w []byte) (uint32, bool) { return q.id(string(w)) }, bos, eos, unk, r, opts)
}
