package keyloom

import "github.com/keyloom/keyloom/lm"

// Predict is the core of Suggest for simulators and measurement tools: it
// appends to dst up to k words (folded, without display casing) that may come
// next after history (the current sentence's folded words, oldest first)
// and start with prefix (folded; "" for a next-word prediction), most
// probable first. It returns dst unchanged after Close.
func (e *Engine) Predict(history []string, prefix string, k int, dst []string) []string {
	if e.closed.Load() {
		return dst
	}
	var ib [lm.MaxOrder + 1]uint32
	ctx := e.contextIDs(history, ib[:0])
	var buf [lm.MaxK]lm.Scored
	top := e.topK(ctx, prefix, k, buf[:0])
	for _, s := range top {
		dst = append(dst, e.model.Lex.Word(s.ID))
	}
	return dst
}

// contextIDs maps the sentence so far to IDs: <s>, then the last order−1
// words (unknown words become <unk>). It appends to dst.
func (e *Engine) contextIDs(words []string, dst []uint32) []uint32 {
	m := e.model
	if k := m.LM.Order() - 1; len(words) > k {
		words = words[len(words)-k:]
	}
	if bos, ok := m.Lex.ID(lm.BOS); ok {
		dst = append(dst, bos)
	}
	_, _, unk := m.LM.Specials()
	for _, w := range words {
		id, ok := m.Lex.ID(w)
		if !ok {
			id = unk
		}
		dst = append(dst, id)
	}
	return dst
}

// topK returns the k best words after ctx that start with the folded prefix.
func (e *Engine) topK(ctx []uint32, prefix string, k int, dst []lm.Scored) []lm.Scored {
	m := e.model
	lo, hi := uint32(0), uint32(m.LM.VocabSize())
	if prefix != "" {
		lo, hi = m.Lex.PrefixRange(prefix)
	}
	return m.LM.TopK(ctx, lo, hi, k, dst)
}
