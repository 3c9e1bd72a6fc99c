package lm

import (
	"bufio"
	"bytes"
	"context"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"unicode"
	"unicode/utf8"
)

// MaxOrder is the highest n-gram order supported.
const MaxOrder = 5

// MaxVocab is the largest vocabulary a model may hold (word IDs use 21 bits while counting).
const MaxVocab = 1<<21 - 1

const (
	tmpBOS = 0
	tmpEOS = 1
	tmpUNK = 2
)

// casing classes of a surface form relative to its folded word.
const (
	caseLower = iota
	caseTitle
	caseUpper
	caseOther
)

type caseTally struct {
	n [4]uint32
	// others counts each mixed-case form ("iPhone") separately, so the form
	// shown is the most frequent one (ties: smallest in byte order) whatever
	// order the text was counted or merged in. nil until one is seen.
	others map[string]uint32
}

type key2 [2]uint64

// Counter accumulates n-gram counts up to a fixed order from sentences, plus
// unigram counts from word-count lists. A Counter is for one goroutine; merge
// the results of several with Merge.
type Counter struct {
	order  int
	index  map[string]uint32
	words  []string
	casing []caseTally
	uni    []uint64          // raw unigram counts by temporary id
	short  []*countMap       // orders 2..3, index n-2
	long   []map[key2]uint32 // orders 4..5, index n-4
	list   []float64         // word-count list counts by temporary id
	tokens int64
	sents  int64
	ids    []uint32
}

// NewCounter returns a Counter for n-grams up to the given order (1..MaxOrder).
func NewCounter(order int) (*Counter, error) {
	if order < 1 || order > MaxOrder {
		return nil, fmt.Errorf("%w: %d (want 1..%d)", ErrOrder, order, MaxOrder)
	}
	c := &Counter{order: order, index: make(map[string]uint32)}
	for _, w := range []string{BOS, EOS, UNK} {
		c.intern([]byte(w))
	}
	for n := 2; n <= order; n++ {
		if n <= 3 {
			c.short = append(c.short, newCountMap())
		} else {
			c.long = append(c.long, make(map[key2]uint32))
		}
	}
	return c, nil
}

// Order returns the highest order counted.
func (c *Counter) Order() int { return c.order }

// Tokens returns the number of word tokens added from text (sentence ends excluded).
func (c *Counter) Tokens() int64 { return c.tokens }

// Sentences returns the number of sentences added.
func (c *Counter) Sentences() int64 { return c.sents }

// Words returns the number of distinct words seen, special tokens included.
func (c *Counter) Words() int { return len(c.words) }

func (c *Counter) intern(w []byte) uint32 {
	if id, ok := c.index[string(w)]; ok {
		return id
	}
	id := uint32(len(c.words))
	s := string(w)
	c.index[s] = id
	c.words = append(c.words, s)
	c.casing = append(c.casing, caseTally{})
	c.uni = append(c.uni, 0)
	if c.list != nil {
		c.list = append(c.list, 0)
	}
	return id
}

// AddSentence counts one sentence given as folded tokens and, optionally, the
// surface forms they were typed in (nil or shorter means no casing evidence).
// It returns ErrVocabTooLarge once the vocabulary is full.
func (c *Counter) AddSentence(folded, surfaces [][]byte) error {
	if len(folded) == 0 {
		return nil
	}
	ids := append(c.ids[:0], tmpBOS)
	for i, w := range folded {
		if len(c.words) >= MaxVocab {
			if _, ok := c.index[string(w)]; !ok {
				return ErrVocabTooLarge
			}
		}
		id := c.intern(w)
		ids = append(ids, id)
		if i < len(surfaces) {
			c.noteCase(id, surfaces[i], w, i == 0)
		}
	}
	ids = append(ids, tmpEOS)
	c.ids = ids
	c.tokens += int64(len(folded))
	c.sents++
	for _, id := range ids {
		c.uni[id]++
	}
	if c.order >= 2 {
		m := c.short[0]
		for i := 0; i+2 <= len(ids); i++ {
			m.add(uint64(ids[i])<<21|uint64(ids[i+1]), 1)
		}
	}
	if c.order >= 3 {
		m := c.short[1]
		for i := 0; i+3 <= len(ids); i++ {
			m.add(uint64(ids[i])<<42|uint64(ids[i+1])<<21|uint64(ids[i+2]), 1)
		}
	}
	for n := 4; n <= c.order; n++ {
		m := c.long[n-4]
		for i := 0; i+n <= len(ids); i++ {
			m[packLong(ids[i:i+n])]++
		}
	}
	return nil
}

func packLong(ids []uint32) key2 {
	var k key2
	for j, id := range ids {
		if j < 3 {
			k[0] = k[0]<<21 | uint64(id)
		} else {
			k[1] = k[1]<<21 | uint64(id)
		}
	}
	return k
}

func (c *Counter) noteCase(id uint32, surface, folded []byte, initial bool) {
	if bytes.Equal(surface, folded) {
		c.casing[id].n[caseLower]++
		return
	}
	cls := classifyCase(surface)
	if initial && cls == caseTitle {
		return // a capital at the start of a sentence says nothing
	}
	c.casing[id].add(cls, surface, 1)
}

// add tallies n occurrences of a surface form of class cls.
func (t *caseTally) add(cls int, surface []byte, n uint32) {
	t.n[cls] += n
	if cls == caseOther {
		if t.others == nil {
			t.others = make(map[string]uint32, 1)
		}
		t.others[string(surface)] += n
	}
}

// merge adds the tallies of o.
func (t *caseTally) merge(o *caseTally) {
	for k := range 4 {
		t.n[k] += o.n[k]
	}
	for f, n := range o.others {
		t.add(caseOther, []byte(f), 0)
		t.others[f] += n
	}
}

// other returns the most frequent mixed-case form (ties: smallest in byte order).
func (t *caseTally) other() string {
	best, bn := "", uint32(0)
	for f, n := range t.others {
		if n > bn || n == bn && f < best {
			best, bn = f, n
		}
	}
	return best
}

func classifyCase(s []byte) int {
	upper, lower, first := 0, 0, true
	firstUpper := false
	for len(s) > 0 {
		r, w := utf8.DecodeRune(s)
		s = s[w:]
		switch {
		case unicode.IsUpper(r):
			upper++
			if first {
				firstUpper = true
			}
		case unicode.IsLower(r):
			lower++
		}
		if unicode.IsLetter(r) {
			first = false
		}
	}
	switch {
	case upper == 0:
		return caseLower
	case lower == 0 && upper > 1:
		return caseUpper
	case firstUpper && upper == 1:
		return caseTitle
	case lower == 0 && upper == 1:
		return caseTitle
	default:
		return caseOther
	}
}

// surfaceOf returns the usual display form of word id, or "" when it is the folded word.
func (c *Counter) surfaceOf(id uint32) string {
	t := c.casing[id]
	best, cls := t.n[caseLower], caseLower
	for k := caseTitle; k <= caseOther; k++ {
		if t.n[k] > best {
			best, cls = t.n[k], k
		}
	}
	w := c.words[id]
	switch cls {
	case caseTitle:
		r, size := utf8.DecodeRuneInString(w)
		return string(unicode.ToTitle(r)) + w[size:]
	case caseUpper:
		return toUpper(w)
	case caseOther:
		return t.other()
	}
	return ""
}

func toUpper(w string) string {
	b := make([]byte, 0, len(w))
	for _, r := range w {
		b = utf8.AppendRune(b, unicode.ToUpper(r))
	}
	return string(b)
}

// AddText tokenizes r and counts every sentence in it. It checks ctx every
// few thousand sentences and calls progress (if not nil) with the number of
// bytes consumed so far.
func (c *Counter) AddText(ctx context.Context, r io.Reader, opts ScanOptions, progress func(bytes int64)) error {
	cr := &countingReader{r: r}
	sc := NewScanner(cr, opts)
	for i := 0; sc.Scan(); i++ {
		surf := sc.Surfaces()
		if opts.Pretokenized {
			surf = nil
		}
		if err := c.AddSentence(sc.Tokens(), surf); err != nil {
			return err
		}
		if i&4095 == 4095 {
			if err := ctx.Err(); err != nil {
				return err
			}
			if progress != nil {
				progress(cr.n)
			}
		}
	}
	if progress != nil {
		progress(cr.n)
	}
	return sc.Err()
}

type countingReader struct {
	r io.Reader
	n int64
}

func (r *countingReader) Read(p []byte) (int, error) {
	n, err := r.r.Read(p)
	r.n += int64(n)
	return n, err
}

// AddWordCounts reads a word-count list, one "word<TAB>count" per line (lines
// starting with '#' and blank lines are skipped), and adds the counts to the
// list distribution that the unigram level backs off to (see Estimate). Words
// are folded to lower case; repeated words add up. Counts must be finite and ≥ 0.
func (c *Counter) AddWordCounts(r io.Reader) error {
	return c.addList(r, true, 0)
}

// AddWordList reads a plain word list, one word per line, adding every word
// to the vocabulary with the given pseudo-count in the list distribution.
func (c *Counter) AddWordList(r io.Reader, weight float64) error {
	if weight < 0 || math.IsNaN(weight) || math.IsInf(weight, 0) {
		return fmt.Errorf("%w: weight %v", ErrBadCounts, weight)
	}
	return c.addList(r, false, weight)
}

func (c *Counter) addList(r io.Reader, withCounts bool, weight float64) error {
	if c.list == nil {
		c.list = make([]float64, len(c.words))
	}
	br := bufio.NewReaderSize(r, 1<<16)
	var fold []byte
	for line := 1; ; line++ {
		b, err := br.ReadSlice('\n')
		if err == bufio.ErrBufferFull {
			return fmt.Errorf("%w: line %d longer than 64 KiB", ErrBadCounts, line)
		}
		t := bytes.TrimRight(b, "\r\n")
		if len(bytes.TrimSpace(t)) > 0 && t[0] != '#' {
			word, cnt := t, weight
			if withCounts {
				tab := bytes.IndexByte(t, '\t')
				if tab <= 0 {
					return fmt.Errorf("%w: line %d: want word<TAB>count", ErrBadCounts, line)
				}
				v, perr := strconv.ParseFloat(string(bytes.TrimSpace(t[tab+1:])), 64)
				if perr != nil || v < 0 || math.IsInf(v, 0) || math.IsNaN(v) {
					return fmt.Errorf("%w: line %d: bad count %q", ErrBadCounts, line, t[tab+1:])
				}
				word, cnt = t[:tab], v
			}
			word = bytes.TrimSpace(word)
			if !utf8.Valid(word) || len(word) == 0 || len(word) > DefaultMaxTokenBytes || bytes.ContainsAny(word, " \t") {
				if withCounts {
					return fmt.Errorf("%w: line %d: bad word", ErrBadCounts, line)
				}
			} else if w := string(word); w != BOS && w != EOS {
				fold = foldInto(fold[:0], word)
				if len(c.words) >= MaxVocab {
					if _, ok := c.index[string(fold)]; !ok {
						return ErrVocabTooLarge
					}
				}
				id := c.intern(fold)
				c.list[id] += cnt
				if !bytes.Equal(fold, word) && c.uni[id] == 0 {
					c.noteCase(id, word, fold, false)
				}
			}
		}
		if err != nil {
			if err == io.EOF {
				return nil
			}
			return err
		}
	}
}

func foldInto(dst, w []byte) []byte {
	for len(w) > 0 {
		if c := w[0]; c < utf8.RuneSelf {
			if 'A' <= c && c <= 'Z' {
				c += 'a' - 'A'
			}
			dst = append(dst, c)
			w = w[1:]
			continue
		}
		r, n := utf8.DecodeRune(w)
		dst = utf8.AppendRune(dst, unicode.ToLower(r))
		w = w[n:]
	}
	return dst
}

// Fold returns the folded (lower-case) form used as the vocabulary key of a
// word. A word that is already folded ASCII is returned as it is, without
// allocating.
func Fold(w string) string {
	for i := 0; i < len(w); i++ {
		if c := w[i]; c >= utf8.RuneSelf || 'A' <= c && c <= 'Z' {
			return string(foldInto(make([]byte, 0, len(w)), []byte(w)))
		}
	}
	return w
}

// Merge adds the counts of o (same order) into c.
func (c *Counter) Merge(o *Counter) error {
	if o.order != c.order {
		return fmt.Errorf("%w: merging order %d into %d", ErrOrder, o.order, c.order)
	}
	remap := make([]uint32, len(o.words))
	for id, w := range o.words {
		remap[id] = c.intern([]byte(w))
		nid := remap[id]
		c.casing[nid].merge(&o.casing[id])
		c.uni[nid] += o.uni[id]
	}
	if o.list != nil {
		if c.list == nil {
			c.list = make([]float64, len(c.words))
		}
		for id, v := range o.list {
			c.list[remap[id]] += v
		}
	}
	const m21 = 1<<21 - 1
	for i, m := range o.short {
		dst := c.short[i]
		n := i + 2
		for k, v := range m.all {
			var nk uint64
			for j := n - 1; j >= 0; j-- {
				nk = nk<<21 | uint64(remap[(k>>(21*uint(j)))&m21])
			}
			dst.add(nk, uint32(v))
		}
	}
	var buf [MaxOrder]uint32
	for i, m := range o.long {
		dst := c.long[i]
		n := i + 4
		for k, v := range m {
			ids := unpackLong(k, n, buf[:0])
			for j := range ids {
				ids[j] = remap[ids[j]]
			}
			dst[packLong(ids)] += v
		}
	}
	c.tokens += o.tokens
	c.sents += o.sents
	return nil
}

func unpackLong(k key2, n int, dst []uint32) []uint32 {
	const m21 = 1<<21 - 1
	for j := 2; j >= 0; j-- {
		dst = append(dst, uint32(k[0]>>(21*uint(j)))&m21)
	}
	for j := n - 4; j >= 0; j-- {
		dst = append(dst, uint32(k[1]>>(21*uint(j)))&m21)
	}
	return dst
}

// table is one order's n-grams in sorted order: ids holds n IDs per entry.
type table struct {
	n   int
	ids []uint32
	cnt []uint64
}

func (t *table) len() int { return len(t.cnt) }

func (t *table) key(i int) []uint32 { return t.ids[i*t.n : (i+1)*t.n] }

// find returns the index of the n-gram k, or -1.
func (t *table) find(k []uint32) int {
	lo, hi := 0, t.len()
	for lo < hi {
		mid := int(uint(lo+hi) >> 1)
		if slices.Compare(t.key(mid), k) < 0 {
			lo = mid + 1
		} else {
			hi = mid
		}
	}
	if lo < t.len() && slices.Equal(t.key(lo), k) {
		return lo
	}
	return -1
}

// snapshot converts the counts to final IDs (lexicographic ranks of the
// words) and returns the sorted vocabulary and per-order tables.
func (c *Counter) snapshot() (vocab []string, rank []uint32, tabs []table) {
	vocab, rank, _ = c.ranks()
	tabs = make([]table, c.order)
	tabs[0] = c.uniTable(rank)
	for i, m := range c.short {
		tabs[i+1] = buildTable(i+2, []gramSource{{grams: m, to: rank}}, len(rank), 1)
	}
	var buf [MaxOrder]uint32
	for i, m := range c.long {
		n := i + 4
		type kv struct {
			k key2
			v uint32
		}
		ents := make([]kv, 0, len(m))
		for k, v := range m {
			ids := unpackLong(k, n, buf[:0])
			for j := range ids {
				ids[j] = rank[ids[j]]
			}
			ents = append(ents, kv{packLong(ids), v})
		}
		slices.SortFunc(ents, func(a, b kv) int {
			if a.k[0] != b.k[0] {
				return cmpU64(a.k[0], b.k[0])
			}
			return cmpU64(a.k[1], b.k[1])
		})
		t := table{n: n, ids: make([]uint32, 0, len(ents)*n), cnt: make([]uint64, len(ents))}
		for e, kv := range ents {
			t.ids = append(t.ids, unpackLong(kv.k, n, buf[:0])...)
			t.cnt[e] = uint64(kv.v)
		}
		tabs[n-1] = t
	}
	return vocab, rank, tabs
}

// ranks sorts the vocabulary: vocab[r] is the word of final ID r, rank maps
// temporary to final IDs and order is its inverse.
func (c *Counter) ranks() (vocab []string, rank, order []uint32) {
	order = make([]uint32, len(c.words))
	for i := range order {
		order[i] = uint32(i)
	}
	slices.SortFunc(order, func(a, b uint32) int { return cmpString(c.words[a], c.words[b]) })
	rank = make([]uint32, len(c.words))
	vocab = make([]string, len(c.words))
	for r, id := range order {
		rank[id] = uint32(r)
		vocab[r] = c.words[id]
	}
	return vocab, rank, order
}

// uniTable returns the unigram table in final IDs.
func (c *Counter) uniTable(rank []uint32) table {
	uni := table{n: 1, ids: make([]uint32, len(rank)), cnt: make([]uint64, len(rank))}
	for id, n := range c.uni {
		uni.ids[rank[id]] = rank[id]
		uni.cnt[rank[id]] = n
	}
	return uni
}

// counts returns the counts in final-ID form (see Counts).
func (c *Counter) counts() *Counts {
	vocab, rank, tabs := c.snapshot()
	return c.finalCounts(vocab, rank, tabs)
}

// finalCounts wraps the vocabulary-sized parts of c (casing, word lists,
// totals) and the given tables as Counts.
func (c *Counter) finalCounts(vocab []string, rank []uint32, tabs []table) *Counts {
	cs := &Counts{order: c.order, vocab: vocab, tabs: tabs, tokens: c.tokens, bos: rank[tmpBOS]}
	cs.surface = make([]string, len(vocab))
	for old := range c.words {
		cs.surface[rank[old]] = c.surfaceOf(uint32(old))
	}
	if c.list != nil {
		cs.list = make([]float64, len(vocab))
		for old, v := range c.list {
			cs.list[rank[old]] = v
		}
	}
	return cs
}

func cmpU64(a, b uint64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

func cmpString(a, b string) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}
