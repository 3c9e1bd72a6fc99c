package lm

import (
	"bufio"
	"cmp"
	"fmt"
	"math"
	"slices"
	"strings"
	"sync"
	"sync/atomic"
)

// Vocab maps folded words to the base model's word IDs and back. The
// project's lexicon satisfies it; IDs must be the same as the base model's.
type Vocab interface {
	// ID returns the ID of a folded word, and false when the word is not in the base vocabulary.
	ID(word string) (uint32, bool)
	// Word returns the folded word with the given ID ("" when out of range).
	Word(id uint32) string
}

// Defaults of OverlayOptions, tuned on the development setup described in
// blend_test.go (learn the first 60 % of the demo corpus, measure keystroke
// savings on the next 20 %; the last 20 % is kept for the reported figures).
const (
	DefaultMinTyped     = 2
	DefaultHalfLifeDays = 90
	DefaultMaxEntries   = 50000
	DefaultUserWeight   = 0.7
	DefaultCacheWeight  = 0.15
	DefaultCacheTokens  = 150
	DefaultUserPrior    = 1.0
	DefaultCachePrior   = 2.0
	// MaxRejects is the number of rejected corrections kept; the oldest go first.
	MaxRejects = 1024
	// maxUserWords caps the table of words not in the base vocabulary.
	maxUserWords = 1 << 22
)

// OverlayOptions controls a user overlay. The zero value gives the defaults.
type OverlayOptions struct {
	// MinTyped is how many times a word outside the base vocabulary must be
	// typed before it is suggested or reported Known (default DefaultMinTyped).
	MinTyped int
	// HalfLifeDays is the number of days of use (days on which anything was
	// learned) after which a count has halved (default DefaultHalfLifeDays;
	// math.Inf(1) disables decay).
	HalfLifeDays float64
	// MaxEntries caps the number of stored n-grams of all orders; past it the
	// weakest (lowest decayed count, then least recently used) are evicted
	// down to 90 % of the cap (default DefaultMaxEntries).
	MaxEntries int
	// UserWeight is λ, the weight of the user model in the blend (default DefaultUserWeight).
	UserWeight float64
	// CacheWeight is μ, the weight of the recency cache (default DefaultCacheWeight).
	CacheWeight float64
	// DisableCache turns the recency cache off (its weight goes to the base model).
	DisableCache bool
	// CacheTokens is τ, the number of tokens over which a cache count decays
	// by a factor e (default DefaultCacheTokens).
	CacheTokens float64
	// UserPrior is the Witten-Bell multiplier β of the user model: a context
	// seen T times with N distinct successors keeps βN/(T+βN) of its mass for
	// the lower order (default DefaultUserPrior).
	UserPrior float64
	// CachePrior is κ, the pseudo-count with which the cache's bigram
	// distribution falls back to its unigram distribution (default DefaultCachePrior).
	CachePrior float64
}

// ovConfig holds resolved options; it is shared by every view of an overlay.
type ovConfig struct {
	minTyped   uint32
	halfLife   float64
	maxEntries int
	lambda, mu float64
	tau        float64
	beta       float64
	kappa      float64
}

func (o OverlayOptions) resolve() (*ovConfig, error) {
	bad := func(name string, v float64) error {
		return fmt.Errorf("%w: %s = %v", ErrOverlayOptions, name, v)
	}
	def := func(v, d float64) float64 {
		if v == 0 {
			return d
		}
		return v
	}
	c := &ovConfig{
		minTyped:   DefaultMinTyped,
		maxEntries: DefaultMaxEntries,
		halfLife:   def(o.HalfLifeDays, DefaultHalfLifeDays),
		lambda:     def(o.UserWeight, DefaultUserWeight),
		mu:         def(o.CacheWeight, DefaultCacheWeight),
		tau:        def(o.CacheTokens, DefaultCacheTokens),
		beta:       def(o.UserPrior, DefaultUserPrior),
		kappa:      def(o.CachePrior, DefaultCachePrior),
	}
	if o.MinTyped < 0 || o.MaxEntries < 0 {
		return nil, fmt.Errorf("%w: MinTyped = %d, MaxEntries = %d", ErrOverlayOptions, o.MinTyped, o.MaxEntries)
	}
	if o.MinTyped > 0 {
		c.minTyped = uint32(min(o.MinTyped, math.MaxUint32))
	}
	if o.MaxEntries > 0 {
		c.maxEntries = o.MaxEntries
	}
	for _, f := range []struct {
		name string
		v    float64
	}{{"HalfLifeDays", c.halfLife}, {"UserWeight", c.lambda}, {"CacheWeight", c.mu},
		{"CacheTokens", c.tau}, {"UserPrior", c.beta}, {"CachePrior", c.kappa}} {
		if !(f.v > 0) {
			return nil, bad(f.name, f.v)
		}
		if math.IsInf(f.v, 1) && f.name != "HalfLifeDays" {
			return nil, bad(f.name, f.v)
		}
	}
	if o.DisableCache {
		c.mu = 0
	}
	if !(c.lambda+c.mu < 1) {
		return nil, fmt.Errorf("%w: UserWeight + CacheWeight = %v, want < 1", ErrOverlayOptions, c.lambda+c.mu)
	}
	return c, nil
}

// growth returns the stored units per effective count after the given number of days of use.
func (c *ovConfig) growth(days int32) float64 {
	if math.IsInf(c.halfLife, 1) {
		return 1
	}
	return math.Exp2(float64(days) / c.halfLife)
}

// Overlay holds one user's learned counts on top of a shared, read-only base
// model, and blends the two at query time (see OverlayView.LogProb).
//
// Learn, Commit, Forget, Wipe, Reject and SetLearning may be called from any
// goroutine; they are serialized among themselves. Queries go through View,
// which returns the current immutable snapshot without waiting: a reader
// never blocks a writer or the reverse.
type Overlay struct {
	cfg   *ovConfig
	base  *Model
	vocab Vocab
	cur   atomic.Pointer[OverlayView]

	mu sync.Mutex // serializes writers; guards the scratch below
	// writer scratch
	owned    [ovShardCount]uint64
	batch    uint64
	ups      []ovUpdate
	refs     []groupRef // apply's nodes, one per key
	touch    uint64     // sink of apply's warming reads, so that they are kept
	spans    [][2]int
	toks     []uint32
	cscratch []cacheEnt
	words    []string
	surfs    []string
	cat      []byte    // a sentence's folded and typed tokens, made one string
	sc       *Scanner  // reused by learnPiece
	slab     []ovEntry // patch entries, handed out once each
	pslab    []ovPatch
	bslab    []ovBest
	br       *bufio.Reader // reused by the tokenizer (NewScanner keeps a large enough bufio.Reader)
	sr       strings.Reader
}

// OverlayView is an immutable snapshot of an overlay: the state after some
// sequence of changes. It is safe for concurrent use. Word IDs handed to and
// returned by a view are "extended IDs": below the base model's VocabSize
// they are base IDs; from VocabSize up they name the overlay's own words
// (see Word). Extended IDs of user words are valid only with the view they
// came from, since Forget and eviction renumber them.
type OverlayView struct {
	base          *Model
	vocab         Vocab
	cfg           *ovConfig
	V             uint32
	bos, eos, unk uint32

	words []string // user words: ID V+i
	surf  []string // display form of each user word ("" = as folded)
	byStr []uint32 // user word indexes sorted by word

	shards   *[ovShardCount]*ovShard
	delta    *ovDelta // changes not yet folded into shards (nil: none)
	ver      uint64   // version: the delta's patches past it are not part of the view
	entries  int      // stored n-grams of all orders
	uniTypes int      // distinct unigrams
	uniTotal float64  // Σ unigram counts, stored units
	top      [uniTopLen]topEntry
	nTop     int

	hasDay  bool
	day     int32 // last day seen
	useDays int32 // days of use so far
	epoch   int32 // useDays when stored units equalled counts
	grow    float64

	cache    ovCache
	rejects  []reject
	learning bool
	memo     *memoSlot // set when the view is published; nil for a view never published
}

type reject struct {
	orig, corr string
	day        int32
}

// NewOverlay returns an empty overlay on top of base, whose word IDs vocab
// maps. Learning starts on.
func NewOverlay(base *Model, vocab Vocab, opts OverlayOptions) (*Overlay, error) {
	if base == nil || vocab == nil {
		return nil, fmt.Errorf("%w: nil model or vocabulary", ErrOverlayOptions)
	}
	cfg, err := opts.resolve()
	if err != nil {
		return nil, err
	}
	o := &Overlay{cfg: cfg, base: base, vocab: vocab}
	o.publish(o.empty(true))
	return o, nil
}

func (o *Overlay) empty(learning bool) *OverlayView {
	v := &OverlayView{base: o.base, vocab: o.vocab, cfg: o.cfg, V: uint32(o.base.VocabSize()),
		shards: new([ovShardCount]*ovShard), grow: 1, learning: learning}
	v.bos, v.eos, v.unk = o.base.Specials()
	v.cache.grow = 1
	return v
}

// View returns the current snapshot. It never waits and does not allocate.
func (o *Overlay) View() *OverlayView { return o.cur.Load() }

// SetLearning turns learning on or off. While off, Learn, Commit and Reject
// do nothing; Forget and Wipe still work. The setting is saved with the overlay.
func (o *Overlay) SetLearning(on bool) {
	o.mu.Lock()
	defer o.mu.Unlock()
	nv := *o.cur.Load()
	nv.learning = on
	o.publish(&nv)
}

// Learning reports whether learning is on.
func (o *Overlay) Learning() bool { return o.cur.Load().learning }

// Known reports whether the user has typed word (any case) at least
// MinTyped times, so that a corrector should leave it alone.
func (o *Overlay) Known(word string) bool { return o.cur.Load().Known(word) }

// Rejected reports whether the user undid the correction of original into correction.
func (o *Overlay) Rejected(original, correction string) bool {
	return o.cur.Load().Rejected(original, correction)
}

// Entries returns the number of stored n-grams of all orders.
func (o *Overlay) Entries() int { return o.cur.Load().entries }

// clampDay converts a caller's day number to the stored width.
func clampDay(day int) int32 {
	return int32(max(min(day, math.MaxInt32), math.MinInt32))
}

// begin starts a change on a private copy of the current view, advancing
// the day of use. It returns nil when learning is off.
func (o *Overlay) begin(day int, needLearning bool) *writer {
	s := o.cur.Load()
	if needLearning && !s.learning {
		return nil
	}
	nv := *s
	d := clampDay(day)
	switch {
	case !nv.hasDay:
		nv.hasDay, nv.day = true, d
	case d > nv.day:
		nv.day = d
		nv.useDays++
	}
	nv.grow = o.cfg.growth(nv.useDays - nv.epoch)
	o.batch++
	nv.ver = o.batch
	w := &writer{v: &nv, o: o, owned: &o.owned, batch: o.batch}
	if nv.grow > 1<<40 { // restart the decay epoch before stored units grow too large
		w.v = nv.rebuild(nv.flatten(nil))
		w.copied = true
		o.batch++
		w.batch = o.batch
		w.v.ver = o.batch
	}
	return w
}

// finish evicts past the cap and publishes the change.
func (o *Overlay) finish(w *writer) {
	if w.v.delta != nil && w.v.delta.n >= deltaFoldKeys {
		w.fold()
	}
	v := w.v
	if v.entries > o.cfg.maxEntries {
		v = v.evict(o.cfg.maxEntries * 9 / 10)
	}
	o.publish(v)
}

// evict returns a rebuilt view keeping the target strongest n-grams.
func (v *OverlayView) evict(target int) *OverlayView {
	grams := v.flatten(nil)
	slices.SortFunc(grams, func(a, b gram) int {
		if c := cmp.Compare(b.cnt, a.cnt); c != 0 {
			return c
		}
		if c := cmp.Compare(b.day, a.day); c != 0 {
			return c
		}
		if c := cmp.Compare(a.n, b.n); c != 0 {
			return c
		}
		return slices.Compare(a.toks[:a.n], b.toks[:b.n])
	})
	if len(grams) > target {
		grams = grams[:target]
	}
	return v.rebuild(grams)
}

// Learn adds the counts of text to the overlay: its words (words outside
// the base vocabulary are kept by their folded string) and its n-grams up
// to trigrams, with sentence starts and ends, all dated day (a day number of
// the caller's choosing, such as days since 1970; a day later than the last
// one seen counts as one more day of use for decay). Spans that look secret
// (see LooksSecret and the rules in secret.go) are dropped and break the
// n-gram chain: no n-gram spans them. It does nothing while learning is off.
// Cost: one tokenizer pass, one small patch per touched context in the
// delta (overlay_delta.go) and a merge of the recent cache entries; about
// one Learn in thirty also folds the delta into the main store.
func (o *Overlay) Learn(text string, day int) {
	o.mu.Lock()
	defer o.mu.Unlock()
	w := o.begin(day, true)
	if w == nil {
		return
	}
	o.ups = o.ups[:0]
	o.spans = secretSpans(text, o.spans[:0])
	prev := 0
	for i := 0; i <= len(o.spans); i++ {
		end, next := len(text), len(text)
		if i < len(o.spans) {
			end, next = o.spans[i][0], o.spans[i][1]
		}
		o.learnPiece(w, text[prev:end], i > 0, i < len(o.spans))
		prev = next
	}
	w.apply(o.ups)
	o.finish(w)
}

// learnPiece learns the sentences of a piece of text that holds no secret.
// openStart: the first sentence continues past a dropped secret (no <s>);
// openEnd: the last one is cut by a secret (no </s>).
func (o *Overlay) learnPiece(w *writer, piece string, openStart, openEnd bool) {
	if strings.TrimSpace(piece) == "" {
		return
	}
	o.sr.Reset(piece)
	if o.br == nil {
		o.br = bufio.NewReaderSize(&o.sr, 1<<16)
	} else {
		o.br.Reset(&o.sr)
	}
	sc := o.scanner()
	first := true
	pending := false
	for sc.Scan() {
		if pending {
			o.learnChain(w, o.words, o.surfs, first && openStart, false)
			first = false
		}
		// One string holds the sentence's folded then typed tokens; the
		// words are slices of it (a word kept by the overlay is cloned).
		o.cat = o.cat[:0]
		for _, f := range sc.Tokens() {
			o.cat = append(o.cat, f...)
		}
		for _, s := range sc.Surfaces() {
			o.cat = append(o.cat, s...)
		}
		all := string(o.cat)
		o.words, o.surfs = o.words[:0], o.surfs[:0]
		off := 0
		for _, f := range sc.Tokens() {
			o.words = append(o.words, all[off:off+len(f)])
			off += len(f)
		}
		for _, s := range sc.Surfaces() {
			o.surfs = append(o.surfs, all[off:off+len(s)])
			off += len(s)
		}
		pending = true
	}
	if pending {
		o.learnChain(w, o.words, o.surfs, first && openStart, openEnd)
	}
}

// scanner returns the overlay's tokenizer, reset to read o.br, with the
// buffers of its earlier uses kept (under o.mu).
func (o *Overlay) scanner() *Scanner {
	if o.sc == nil {
		o.sc = NewScanner(o.br, ScanOptions{})
		return o.sc
	}
	sc := o.sc
	*sc = Scanner{r: o.br, opts: sc.opts, folded: sc.folded[:0], surface: sc.surface[:0],
		fbuf: sc.fbuf[:0], sbuf: sc.sbuf[:0], spans: sc.spans[:0], tmp: sc.tmp[:0]}
	return sc
}

// learnChain queues the counts of one chain of words.
func (o *Overlay) learnChain(w *writer, words, surfs []string, openStart, openEnd bool) {
	v := w.v
	toks := o.toks[:0]
	if !openStart {
		toks = append(toks, v.bos)
	}
	for i, f := range words {
		t, ok := w.resolve(f, true)
		if !ok {
			// No room for another word: learn what came before, restart after.
			o.queueChain(w, toks)
			toks = toks[:0]
			continue
		}
		if t >= v.V && (i > 0 || openStart) && surfs[i] != f {
			w.setSurface(t, surfs[i])
		}
		toks = append(toks, t)
	}
	if !openEnd {
		toks = append(toks, v.eos)
	}
	o.queueChain(w, toks)
	o.toks = toks
}

// queueChain queues unigram, bigram and trigram counts of toks (which may
// start with <s> and end with </s>) and feeds the recency cache.
func (o *Overlay) queueChain(w *writer, toks []uint32) {
	v := w.v
	inc := v.grow
	for i, t := range toks {
		if t == v.bos {
			continue
		}
		typed := uint32(1)
		if t == v.eos {
			typed = 0
		}
		o.ups = append(o.ups, ovUpdate{key: uniKey(t), tok: t, typed: typed, delta: inc})
		if i >= 1 {
			o.ups = append(o.ups, ovUpdate{key: biKey(toks[i-1]), tok: t, delta: inc})
		}
		if i >= 2 {
			o.ups = append(o.ups, ovUpdate{key: triKey(toks[i-2], toks[i-1]), tok: t, delta: inc})
		}
	}
	if o.cfg.mu > 0 {
		v.cache, o.cscratch = v.cache.add(toks, v.bos, o.cfg.tau, o.cscratch)
	}
}

// resolve returns the extended ID of a folded word, adding it to the user
// word table when create is set and it is new.
func (w *writer) resolve(word string, create bool) (uint32, bool) {
	v := w.v
	if id, ok := v.vocab.ID(word); ok && id < v.V && id != v.bos && id != v.eos && id != v.unk {
		return id, true
	}
	pos, found := v.findUser(word)
	if found {
		return v.V + v.byStr[pos], true
	}
	if !create || len(v.words) >= maxUserWords || uint64(v.V)+uint64(len(v.words)) >= 1<<ovTokenBits-1 {
		return 0, false
	}
	idx := uint32(len(v.words))
	// Appending past the length shared with older views is safe: they never read it.
	v.words = append(v.words, strings.Clone(word))
	v.surf = append(v.surf, "")
	bs := make([]uint32, len(v.byStr)+1)
	copy(bs, v.byStr[:pos])
	bs[pos] = idx
	copy(bs[pos+1:], v.byStr[pos:])
	v.byStr = bs
	return v.V + idx, true
}

// setSurface records the display form of a user word (copy-on-write).
func (w *writer) setSurface(t uint32, s string) {
	v := w.v
	i := int(t - v.V)
	if i >= len(v.surf) || v.surf[i] == s {
		return
	}
	cp := make([]string, len(v.surf), cap(v.surf))
	copy(cp, v.surf)
	cp[i] = strings.Clone(s)
	v.surf = cp
}

// findUser returns the position of word in byStr, or where it would go.
func (v *OverlayView) findUser(word string) (int, bool) {
	return slices.BinarySearchFunc(v.byStr, word, func(i uint32, w string) int { return strings.Compare(v.words[i], w) })
}

// Commit learns one word the user has just finished, given the words before
// it (oldest first; "<s>" marks a sentence start; only the last two matter).
// It adds the word's unigram and its bigram and trigram with the context,
// without sentence ends: a keyboard calls it word by word while Learn takes
// whole texts. Secret-looking words are dropped, and a secret-looking context
// word cuts the context. It does nothing while learning is off.
func (o *Overlay) Commit(word string, context []string, day int) {
	word = strings.TrimSpace(word)
	if word == "" || LooksSecret(word) || strings.ContainsFunc(word, isSpaceRune) {
		return
	}
	o.mu.Lock()
	defer o.mu.Unlock()
	w := o.begin(day, true)
	if w == nil {
		return
	}
	v := w.v
	var ctx [2]uint32
	n := 0
	for i := len(context) - 1; i >= 0 && n < 2; i-- {
		c := strings.TrimSpace(context[i])
		if c == BOS {
			ctx[1-n] = v.bos
			n++
			break
		}
		if c == "" || LooksSecret(c) || strings.ContainsFunc(c, isSpaceRune) {
			break
		}
		t, ok := w.resolve(Fold(c), true)
		if !ok {
			break
		}
		ctx[1-n] = t
		n++
	}
	t, ok := w.resolve(Fold(word), true)
	if !ok {
		return
	}
	if t >= v.V && n > 0 && ctx[1] != v.bos && word != Fold(word) {
		w.setSurface(t, word)
	}
	toks := append(o.toks[:0], ctx[2-n:]...)
	toks = append(toks, t)
	o.toks = toks
	o.ups = o.ups[:0]
	inc := v.grow
	o.ups = append(o.ups, ovUpdate{key: uniKey(t), tok: t, typed: 1, delta: inc})
	if n >= 1 {
		o.ups = append(o.ups, ovUpdate{key: biKey(toks[n-1]), tok: t, delta: inc})
	}
	if n >= 2 {
		o.ups = append(o.ups, ovUpdate{key: triKey(toks[0], toks[1]), tok: t, delta: inc})
	}
	if o.cfg.mu > 0 {
		v.cache, o.cscratch = v.cache.add(toks, v.bos, o.cfg.tau, o.cscratch)
	}
	w.apply(o.ups)
	o.finish(w)
}

func isSpaceRune(r rune) bool { return r == ' ' || r == '\t' || r == '\n' || r == '\r' }

// Forget removes every n-gram that contains phrase (one word or several,
// any case, tokenized like Learn's text) as a contiguous run, the word
// itself when phrase is one word, the recency cache entries that contain
// it, and rejected corrections that mention it. Words no longer used by any
// n-gram leave the word table, so a saved overlay holds no trace of them. It
// returns the number of n-grams removed. Cost: a rebuild of the snapshot, O(n log n).
func (o *Overlay) Forget(phrase string) int {
	var words []string
	sc := NewScanner(strings.NewReader(phrase), ScanOptions{})
	for sc.Scan() {
		for _, f := range sc.Tokens() {
			words = append(words, string(f))
		}
	}
	if len(words) == 0 {
		return 0
	}
	o.mu.Lock()
	defer o.mu.Unlock()
	s := o.cur.Load()
	nv := *s
	// Rejected pairs are kept by string.
	if len(words) == 1 {
		nv.rejects = slices.DeleteFunc(slices.Clone(s.rejects), func(r reject) bool {
			return Fold(r.orig) == words[0] || Fold(r.corr) == words[0]
		})
	}
	toks := make([]uint32, len(words))
	w := &writer{v: &nv}
	for i, f := range words {
		t, ok := w.resolve(f, false)
		if !ok { // an unknown word: no n-gram can hold the phrase
			o.publish(&nv)
			return 0
		}
		toks[i] = t
	}
	grams := s.flatten(nil)
	kept := grams[:0]
	removed := 0
	for _, g := range grams {
		if containsRun(g.toks[:g.n], toks) {
			removed++
			continue
		}
		kept = append(kept, g)
	}
	nv.cache = s.cache.without(func(prev, tok uint32) bool {
		if len(toks) == 1 {
			return prev == toks[0] || tok == toks[0]
		}
		return len(toks) == 2 && prev == toks[0] && tok == toks[1]
	})
	o.publish(nv.rebuild(kept))
	return removed
}

// containsRun reports whether run occurs in s as a contiguous sub-slice.
func containsRun(s, run []uint32) bool {
	for i := 0; i+len(run) <= len(s); i++ {
		if slices.Equal(s[i:i+len(run)], run) {
			return true
		}
	}
	return false
}

// Wipe removes everything the overlay has learned, including rejected
// corrections and the recency cache. The learning setting is kept.
func (o *Overlay) Wipe() {
	o.mu.Lock()
	defer o.mu.Unlock()
	o.publish(o.empty(o.cur.Load().learning))
}

// Reject records that the user undid the correction of original into
// correction, so that a corrector can ask Rejected before offering it
// again. Pairs are kept as given (case-sensitive); at most MaxRejects, the
// oldest dropped first. It does nothing while learning is off or when
// either string looks secret.
func (o *Overlay) Reject(original, correction string, day int) {
	if original == "" || LooksSecret(original) || LooksSecret(correction) {
		return
	}
	o.mu.Lock()
	defer o.mu.Unlock()
	s := o.cur.Load()
	if !s.learning {
		return
	}
	nv := *s
	r := reject{orig: original, corr: correction, day: clampDay(day)}
	pos, found := slices.BinarySearchFunc(s.rejects, r, cmpReject)
	rs := slices.Clone(s.rejects)
	if found {
		rs[pos].day = r.day
	} else {
		rs = slices.Insert(rs, pos, r)
	}
	if len(rs) > MaxRejects {
		oldest := 0
		for i := range rs {
			if rs[i].day < rs[oldest].day {
				oldest = i
			}
		}
		rs = slices.Delete(rs, oldest, oldest+1)
	}
	nv.rejects = rs
	o.publish(&nv)
}

func cmpReject(a, b reject) int {
	if c := strings.Compare(a.orig, b.orig); c != 0 {
		return c
	}
	return strings.Compare(a.corr, b.corr)
}

// Rejected reports whether the user undid the correction of original into correction.
func (v *OverlayView) Rejected(original, correction string) bool {
	_, found := slices.BinarySearchFunc(v.rejects, reject{orig: original, corr: correction}, cmpReject)
	return found
}

// Known reports whether the user has typed word (any case) at least MinTyped times.
func (v *OverlayView) Known(word string) bool {
	id, ok := v.ID(Fold(word))
	if !ok {
		return false
	}
	e := v.uniEntry(id)
	return e != nil && e.typed >= v.cfg.minTyped
}

// suggestible reports whether a token may be offered: base words always,
// user words once typed MinTyped times; never the special tokens.
func (v *OverlayView) suggestible(tok, typed uint32) bool {
	if tok == v.bos || tok == v.eos || tok == v.unk {
		return false
	}
	return tok < v.V || typed >= v.cfg.minTyped
}
