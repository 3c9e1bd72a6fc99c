package correct

import (
	"bufio"
	"bytes"
	"math"
	"os"
	"sort"
	"strconv"
	"strings"
	"sync"
	"testing"

	"github.com/blevesearch/vellum"
	"github.com/keyloom/keyloom/trie"
)

// flatLex is a test lexicon: a plain trie in flat arrays with the same
// output convention as the project's FST (ID = sum of outputs along the
// path + final output = lexicographic rank).
type flatLex struct {
	words []string
	// node i has children first[i]..first[i+1]-1 in edge arrays.
	first []int32
	label []byte
	dest  []int32
	out   []uint32
	final []bool
}

func newFlatLex(words []string) *flatLex {
	words = sortedUnique(words)
	l := &flatLex{words: words}
	type bnode struct {
		kids  map[byte]*bnode
		final bool
		size  int
		id    int32
	}
	root := &bnode{kids: map[byte]*bnode{}}
	for _, w := range words {
		n := root
		n.size++
		for i := 0; i < len(w); i++ {
			k := n.kids[w[i]]
			if k == nil {
				k = &bnode{kids: map[byte]*bnode{}}
				n.kids[w[i]] = k
			}
			k.size++
			n = k
		}
		n.final = true
	}
	// Breadth-first numbering.
	queue := []*bnode{root}
	for i := 0; i < len(queue); i++ {
		queue[i].id = int32(i)
		keys := make([]byte, 0, len(queue[i].kids))
		for b := range queue[i].kids {
			keys = append(keys, b)
		}
		sort.Slice(keys, func(a, b int) bool { return keys[a] < keys[b] })
		for _, b := range keys {
			queue = append(queue, queue[i].kids[b])
		}
	}
	for _, n := range queue {
		l.first = append(l.first, int32(len(l.label)))
		l.final = append(l.final, n.final)
		keys := make([]byte, 0, len(n.kids))
		for b := range n.kids {
			keys = append(keys, b)
		}
		sort.Slice(keys, func(a, b int) bool { return keys[a] < keys[b] })
		before := 0
		if n.final {
			before = 1
		}
		for _, b := range keys {
			k := n.kids[b]
			l.label = append(l.label, b)
			l.dest = append(l.dest, k.id)
			l.out = append(l.out, uint32(before))
			before += k.size
		}
	}
	l.first = append(l.first, int32(len(l.label)))
	return l
}

func sortedUnique(words []string) []string {
	w := append([]string(nil), words...)
	sort.Strings(w)
	out := w[:0]
	for i, s := range w {
		if s != "" && (i == 0 || s != w[i-1]) {
			out = append(out, s)
		}
	}
	return out
}

func (l *flatLex) Len() int { return len(l.words) }
func (l *flatLex) ID(w string) (uint32, bool) {
	i := sort.SearchStrings(l.words, w)
	if i < len(l.words) && l.words[i] == w {
		return uint32(i), true
	}
	return 0, false
}
func (l *flatLex) AppendWord(dst []byte, id uint32) []byte {
	if int(id) >= len(l.words) {
		return dst
	}
	return append(dst, l.words[id]...)
}
func (l *flatLex) Start() int { return 0 }
func (l *flatLex) Step(s int, b byte) (int, uint64, bool) {
	lo, hi := l.first[s], l.first[s+1]
	for i := lo; i < hi; i++ {
		if l.label[i] == b {
			return int(l.dest[i]), uint64(l.out[i]), true
		}
		if l.label[i] > b {
			break
		}
	}
	return 0, 0, false
}

// AppendEdges implements EdgeLister.
func (l *flatLex) AppendEdges(dst []Edge, s int) []Edge {
	for i := l.first[s]; i < l.first[s+1]; i++ {
		dst = append(dst, Edge{Byte: l.label[i], Next: int(l.dest[i]), Out: uint64(l.out[i])})
	}
	return dst
}
func (l *flatLex) Final(s int) (bool, uint64) { return l.final[s], 0 }
func (l *flatLex) CanMatch(s int) bool        { return s >= 0 && s < len(l.final) }

// vellumLex adapts a vellum FST mapping each word to its rank.
type vellumLex struct {
	fst   *vellum.FST
	words []string
}

func newVellumLex(t testing.TB, words []string) *vellumLex {
	t.Helper()
	words = sortedUnique(words)
	var buf bytes.Buffer
	b, err := vellum.New(&buf, nil)
	if err != nil {
		t.Fatalf("vellum.New: %v", err)
	}
	for i, w := range words {
		if err := b.Insert([]byte(w), uint64(i)); err != nil {
			t.Fatalf("Insert(%q): %v", w, err)
		}
	}
	if err := b.Close(); err != nil {
		t.Fatalf("Close: %v", err)
	}
	f, err := vellum.Load(buf.Bytes())
	if err != nil {
		t.Fatalf("vellum.Load: %v", err)
	}
	return &vellumLex{fst: f, words: words}
}

func (l *vellumLex) Len() int { return len(l.words) }
func (l *vellumLex) ID(w string) (uint32, bool) {
	v, ok, err := l.fst.Get([]byte(w))
	return uint32(v), ok && err == nil
}
func (l *vellumLex) AppendWord(dst []byte, id uint32) []byte {
	if int(id) >= len(l.words) {
		return dst
	}
	return append(dst, l.words[id]...)
}
func (l *vellumLex) Start() int { return l.fst.Start() }
func (l *vellumLex) Step(s int, b byte) (int, uint64, bool) {
	n, out := l.fst.AcceptWithVal(s, b)
	return n, out, l.fst.CanMatch(n)
}
func (l *vellumLex) Final(s int) (bool, uint64) { return l.fst.IsMatchWithVal(s) }
func (l *vellumLex) CanMatch(s int) bool        { return l.fst.CanMatch(s) }

// corpusData is the development lexicon: SUBTLEX-US words with their counts
// (Brysbaert & New 2009) plus SCOWL large (Atkinson) with a pseudo-count.
type corpusData struct {
	words      []string // sorted, lower-case, unique: SUBTLEX ∪ SCOWL
	subtlex    []string // SUBTLEX words by falling count
	count      map[string]float64
	total      float64
	subtlexLex []string // sorted SUBTLEX-only word list (about 74k words)
}

// scowlPseudoCount is the count given to SCOWL words (common practice, no
// source: a word a dictionary lists but subtitles never show is rarer
// than anything seen once).
const scowlPseudoCount = 0.5

var loadCorpus = sync.OnceValues(func() (*corpusData, error) {
	d := &corpusData{count: map[string]float64{}}
	f, err := os.Open("../corpora/subtlex-us-word-counts.tsv")
	if err != nil {
		return nil, err
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	seen := map[string]bool{}
	for sc.Scan() {
		line := sc.Text()
		if strings.HasPrefix(line, "#") {
			continue
		}
		w, c, ok := strings.Cut(line, "\t")
		if !ok {
			continue
		}
		n, err := strconv.ParseFloat(c, 64)
		if err != nil {
			continue
		}
		w = strings.ToLower(w)
		d.count[w] += n
		if !seen[w] {
			seen[w] = true
			d.subtlex = append(d.subtlex, w)
		}
	}
	if err := sc.Err(); err != nil {
		return nil, err
	}
	d.subtlexLex = sortedUnique(d.subtlex)
	sort.SliceStable(d.subtlex, func(i, j int) bool { return d.count[d.subtlex[i]] > d.count[d.subtlex[j]] })
	g, err := os.ReadFile("../corpora/scowl-american-english-large.txt")
	if err != nil {
		return nil, err
	}
	all := append([]string(nil), d.subtlex...)
	for _, w := range strings.Split(string(g), "\n") {
		w = strings.ToLower(strings.TrimSpace(w))
		if w == "" {
			continue
		}
		d.count[w] += scowlPseudoCount
		all = append(all, w)
	}
	d.words = sortedUnique(all)
	for _, c := range d.count {
		d.total += c
	}
	return d, nil
})

func corpus(t testing.TB) *corpusData {
	t.Helper()
	d, err := loadCorpus()
	if err != nil {
		t.Fatalf("load corpora: %v", err)
	}
	return d
}

// unigramScorer returns a context-free scorer over a sorted word list.
func (d *corpusData) unigramScorer(words []string) Scorer {
	lp := make([]float64, len(words))
	for i, w := range words {
		lp[i] = math.Log(d.count[w] / d.total)
	}
	return func(_ []uint32, id uint32) float64 {
		if int(id) >= len(lp) {
			return math.Inf(-1)
		}
		return lp[id]
	}
}

var fullLex = sync.OnceValue(func() *flatLex {
	d, err := loadCorpus()
	if err != nil {
		return nil
	}
	return newFlatLex(d.words)
})

// devCorrector builds a corrector over SUBTLEX ∪ SCOWL with a unigram scorer.
func devCorrector(t testing.TB, opts Options) (*Corrector, *flatLex, *corpusData) {
	t.Helper()
	d := corpus(t)
	lex := fullLex()
	c, err := New(lex, d.unigramScorer(lex.words), opts)
	if err != nil {
		t.Fatalf("New: %v", err)
	}
	return c, lex, d
}

// trieLex adapts the project's lexicon section (a vellum FST read by the
// trie package's own decoder, as the engine uses it) to Lexicon and
// EdgeLister.
type trieLex struct {
	*trie.Lexicon
	words []string
}

func newTrieLex(t testing.TB, words []string) *trieLex {
	t.Helper()
	words = sortedUnique(words)
	entries := make([]trie.Entry, len(words))
	for i, w := range words {
		entries[i] = trie.Entry{Word: w}
	}
	b, err := trie.AppendSection(nil, entries)
	if err != nil {
		t.Fatalf("trie.AppendSection: %v", err)
	}
	l, err := trie.LoadSection(b)
	if err != nil {
		t.Fatalf("trie.LoadSection: %v", err)
	}
	return &trieLex{Lexicon: l, words: words}
}

// subtlexTrieCorrector returns a Corrector with the default options over
// the SUBTLEX-US lexicon as the engine reads it (newTrieLex), ranked by
// unigram frequency, and that lexicon.
func subtlexTrieCorrector(t testing.TB) (*Corrector, *trieLex) {
	t.Helper()
	d := corpus(t)
	lex := newTrieLex(t, d.subtlexLex)
	c, err := New(lex, d.unigramScorer(lex.words), Options{})
	if err != nil {
		t.Fatal(err)
	}
	return c, lex
}

// AppendEdges implements EdgeLister.
func (l *trieLex) AppendEdges(dst []Edge, state int) []Edge {
	var buf [64]trie.Transition
	for _, tr := range l.AppendTransitions(buf[:0], state) {
		dst = append(dst, Edge{Byte: tr.Byte, Next: tr.Next, Out: tr.Out})
	}
	return dst
}
