package correct

// ranker keeps the best-scoring candidates one Correct call has found,
// scoring each word as the search reaches it.
type ranker struct {
	c       *Corrector
	context []uint32
	skip    uint32 // the typed word's ID, when skipOK
	skipOK  bool
	keep    int // candidates kept
	top     []Candidate
}

// start prepares the ranker for one typed word, keeping the best keep
// candidates in top[:0].
func (r *ranker) start(c *Corrector, context []uint32, skip uint32, skipOK bool, keep int, top []Candidate) {
	*r = ranker{c: c, context: context, skip: skip, skipOK: skipOK, keep: keep, top: top[:0]}
}

// add scores word id found at channel cost and keeps it if it ranks.
func (r *ranker) add(id uint32, cost float32) {
	if r.skipOK && id == r.skip || hasWord(r.top, id) {
		return // a wider pass finds the narrower pass's words again
	}
	score := -float64(cost) + r.c.opts.LMWeight*r.c.lm(r.context, id)
	r.top = insertTop(r.top, Candidate{ID: id, Kind: KindWord, Cost: float64(cost), Score: score}, r.keep)
}
