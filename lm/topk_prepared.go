package lm

// The base model's top-k over context groups the caller has already found.
//
// The blended search (blend_topk.go) walks the base model's contexts of a
// history once when it prepares the history, and asks the base model for
// its top list right after; topKNodes answers from those groups instead
// of finding them again, and can hand back every candidate it scored, so
// that the blended search knows their exact base probabilities without
// scoring them a second time.

// baseCands holds base candidates with their exact log probabilities, as
// Model.score gives them for the groups they were scored over.
type baseCands struct {
	n int
	s [baseCandMax]Scored
}

// baseCandMax is the number of candidates a baseCands keeps; later ones are
// dropped (a next-word top list of k+1 words over three groups and the
// unigrams meets at most 4(k+1)).
const baseCandMax = 48

// add records s when there is room.
func (c *baseCands) add(s Scored) {
	if c.n < len(c.s) {
		c.s[c.n] = s
		c.n++
	}
}

// logP returns the recorded log probability of id.
func (c *baseCands) logP(id uint32) (float64, bool) {
	for _, s := range c.s[:c.n] {
		if s.ID == id {
			return s.LogP, true
		}
	}
	return 0, false
}

// topKNodes is TopK over the successor groups nodes of a history, as
// contexts returns them; k and [lo, hi) must already be checked as TopK
// checks them. When cands is not nil it also receives every candidate
// scored, the results included.
func (m *Model) topKNodes(nodes []node, lo, hi uint32, k int, dst []Scored, cands *baseCands) []Scored {
	var seen [MaxK * (MaxOrder + 1)]uint32
	ns := 0
	addCand := func(id uint32) bool {
		if id >= uint32(m.vocab) || id == m.bos || id == m.eos || id == m.unk { // only a corrupt section stores an id ≥ vocab
			return false
		}
		for _, x := range seen[:ns] {
			if x == id {
				return true
			}
		}
		if ns < len(seen) {
			seen[ns] = id
			ns++
		}
		return true
	}
	// Candidates from each successor group.
	for i := range nodes {
		m.groupTop(&nodes[i], lo, hi, k, addCand)
	}
	if lo == 0 && hi == uint32(m.vocab) && k <= len(m.uniTop) {
		for _, id := range m.uniTop[:k] {
			addCand(id)
		}
	} else {
		m.unigramTop(lo, hi, k, addCand)
	}
	var res topBuf
	res.k = k
	for _, id := range seen[:ns] {
		s := Scored{ID: id, LogP: m.score(nodes, id)}
		res.push(s)
		if cands != nil {
			cands.add(s)
		}
	}
	return append(dst, res.buf[:res.n]...)
}
