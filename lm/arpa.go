package lm

import (
	"bufio"
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"
	"unicode/utf8"
)

// ARPA text is the usual interchange form of back-off n-gram models:
//
//	\data\
//	ngram 1=<count>
//	…
//	\1-grams:
//	<log10 p>	<w1>	[<log10 bow>]
//	…
//	\2-grams:
//	<log10 p>	<w1> <w2>	[<log10 bow>]
//	…
//	\end\
const (
	// arpaZero is the log10 value that stands for probability zero ("-99"
	// for <s>, which is context only). Read values at or below it become -Inf.
	arpaZero = -99
	// arpaMissingLog10 is the log10 probability given to </s> and <unk> when a
	// file does not list them. It is small enough not to disturb the other
	// probabilities (the total grows by at most 2·10⁻¹⁰) and keeps the score
	// of out-of-vocabulary words finite.
	arpaMissingLog10 = -10
	// arpaMaxAbs bounds every number read (log10 units), so that sums of a
	// few of them stay finite.
	arpaMaxAbs = 1e9
	// arpaMaxLine is the longest line ReadARPA accepts, in bytes.
	arpaMaxLine = 1 << 20
	// arpaDecimals is the number of decimals WriteARPA writes: the rounding
	// error is at most 5·10⁻⁸ in log10, about 1.2·10⁻⁷ in natural log.
	arpaDecimals = 7
	// arpaSlack is how far above ln 1 a value ReadARPA derives may fall by
	// floating-point rounding before it counts as a probability above 1.
	arpaSlack = 1e-9
)

// WriteARPA writes b as ARPA text: a \data\ header with the number of
// n-grams per order, one section per order with the n-grams in ID order
// (which is the byte order of the words), and \end\. Values are converted
// from natural logs to log10 and written with seven decimals; <s> and any
// zero probability (or one below 10⁻⁹⁹) are written as the customary -99. A
// back-off weight is written only when it does not round to zero and the
// order is not the highest. The
// output depends only on b, so equal models give identical bytes.
//
// WriteARPA returns an error when b is not well formed (IDs out of range,
// levels of the wrong length, NaN values) or holds a word that would not read
// back as one field (empty, or containing a space, tab, CR or LF).
func WriteARPA(w io.Writer, b *Backoff) error {
	if err := checkWritable(b); err != nil {
		return err
	}
	N := b.Order()
	bos, hasBOS := b.ID(BOS)
	bw := bufio.NewWriter(w)
	bw.WriteString("\\data\\\n")
	for n := 1; n <= N; n++ {
		fmt.Fprintf(bw, "ngram %d=%d\n", n, b.Levels[n-1].Len())
	}
	var line []byte
	for n := 1; n <= N; n++ {
		fmt.Fprintf(bw, "\n\\%d-grams:\n", n)
		lv := &b.Levels[n-1]
		for i := range lv.Len() {
			key := lv.Key(i)
			p := lv.LogP[i]
			if n == 1 && hasBOS && key[0] == bos {
				p = math.Inf(-1)
			}
			line = appendLog10(line[:0], p, true)
			line = append(line, '\t')
			for j, id := range key {
				if j > 0 {
					line = append(line, ' ')
				}
				line = append(line, b.Vocab[id]...)
			}
			if n < N && lv.Bow[i] != 0 {
				// A weight that rounds to zero is left out too, so that the
				// text read back writes the same bytes again.
				k := len(line)
				line = appendLog10(append(line, '\t'), lv.Bow[i], false)
				if z := strings.TrimLeft(string(line[k+1:]), "-0."); z == "" {
					line = line[:k]
				}
			}
			line = append(line, '\n')
			if _, err := bw.Write(line); err != nil {
				return err
			}
		}
	}
	bw.WriteString("\n\\end\\\n")
	return bw.Flush()
}

// appendLog10 appends a natural-log value in log10 units; a probability at
// or below 10⁻⁹⁹ is written as -99.
func appendLog10(dst []byte, ln float64, prob bool) []byte {
	x := ln / math.Ln10
	if prob && x <= arpaZero {
		return append(dst, "-99"...)
	}
	return strconv.AppendFloat(dst, x, 'f', arpaDecimals, 64)
}

func checkWritable(b *Backoff) error {
	N := b.Order()
	if N < 1 || N > MaxOrder {
		return fmt.Errorf("lm: write arpa: %w: %d", ErrOrder, N)
	}
	for _, w := range b.Vocab {
		if w == "" || strings.ContainsAny(w, " \t\r\n") {
			return fmt.Errorf("lm: write arpa: word %q cannot be written as one field", w)
		}
	}
	for n := 1; n <= N; n++ {
		lv := &b.Levels[n-1]
		if lv.N != n || len(lv.IDs) != n*len(lv.LogP) || len(lv.Bow) != len(lv.LogP) {
			return fmt.Errorf("lm: write arpa: order %d is not well formed", n)
		}
		for _, id := range lv.IDs {
			if int(id) >= len(b.Vocab) {
				return fmt.Errorf("lm: write arpa: order %d holds word id %d of %d", n, id, len(b.Vocab))
			}
		}
		for i := range lv.LogP {
			if math.IsNaN(lv.LogP[i]) || math.IsInf(lv.LogP[i], 1) || math.IsNaN(lv.Bow[i]) || math.IsInf(lv.Bow[i], 0) {
				return fmt.Errorf("lm: write arpa: order %d entry %d holds a value that is not a log probability", n, i)
			}
		}
	}
	return nil
}

// arpaEntries holds the n-grams of one order while ARPA text is read.
type arpaEntries struct {
	n    int
	ids  []uint32 // n per entry
	logp []float64
	bow  []float64
	line []int // source line (0 for entries ReadARPA adds)
}

func (e *arpaEntries) len() int           { return len(e.logp) }
func (e *arpaEntries) key(i int) []uint32 { return e.ids[i*e.n : (i+1)*e.n] }
func (e *arpaEntries) add(k []uint32, p, bow float64, line int) {
	e.ids = append(e.ids, k...)
	e.logp = append(e.logp, p)
	e.bow = append(e.bow, bow)
	e.line = append(e.line, line)
}

// sorted returns the entries in key order.
func (e *arpaEntries) sorted() *arpaEntries {
	idx := make([]int, e.len())
	for i := range idx {
		idx[i] = i
	}
	slices.SortStableFunc(idx, func(a, b int) int { return slices.Compare(e.key(a), e.key(b)) })
	out := &arpaEntries{n: e.n, ids: make([]uint32, 0, len(e.ids)), logp: make([]float64, 0, e.len()),
		bow: make([]float64, 0, e.len()), line: make([]int, 0, e.len())}
	for _, i := range idx {
		out.add(e.key(i), e.logp[i], e.bow[i], e.line[i])
	}
	return out
}

func (e *arpaEntries) level() Level {
	return Level{N: e.n, IDs: e.ids, LogP: e.logp, Bow: e.bow}
}

// arpaReader reads ARPA text line by line.
type arpaReader struct {
	sc   *bufio.Scanner
	line int
	text []byte
	eof  bool
}

func (r *arpaReader) next() error {
	if !r.sc.Scan() {
		r.eof = true
		if err := r.sc.Err(); err != nil {
			if errors.Is(err, bufio.ErrTooLong) {
				return &ARPAError{Line: r.line + 1, Reason: fmt.Sprintf("line longer than %d bytes", arpaMaxLine)}
			}
			return fmt.Errorf("lm: read arpa: %w", err)
		}
		return nil
	}
	r.line++
	r.text = r.sc.Bytes()
	if !utf8.Valid(r.text) {
		return r.errf("invalid UTF-8")
	}
	return nil
}

func (r *arpaReader) errf(format string, args ...any) error {
	return &ARPAError{Line: r.line, Reason: fmt.Sprintf(format, args...)}
}

// isSep reports whether c separates fields of an ARPA line.
func isSep(c byte) bool { return c == ' ' || c == '\t' || c == '\r' }

// fields splits a line at runs of separators.
func arpaFields(dst [][]byte, line []byte) [][]byte {
	dst = dst[:0]
	for i := 0; i < len(line); {
		for i < len(line) && isSep(line[i]) {
			i++
		}
		j := i
		for j < len(line) && !isSep(line[j]) {
			j++
		}
		if j > i {
			dst = append(dst, line[i:j])
		}
		i = j
	}
	return dst
}

func trimSep(b []byte) []byte {
	for len(b) > 0 && isSep(b[0]) {
		b = b[1:]
	}
	for len(b) > 0 && isSep(b[len(b)-1]) {
		b = b[:len(b)-1]
	}
	return b
}

// parseLog10 reads a finite log10 number within ±arpaMaxAbs and returns it in natural log.
func parseLog10(f []byte) (float64, bool) {
	x, err := strconv.ParseFloat(string(f), 64)
	if err != nil || math.IsNaN(x) || math.IsInf(x, 0) || math.Abs(x) > arpaMaxAbs {
		return 0, false
	}
	return x * math.Ln10, true
}

// ReadARPA reads a back-off model from ARPA text and checks it completely.
// Any text before the \data\ line is ignored, and so is anything after \end\.
// Fields are separated by spaces, tabs or CRs; blank lines are skipped.
//
// Every fault is reported as an *ARPAError with its line number (it matches
// ErrARPA): the \N-grams: sections must follow the header's orders 1..N
// (N ≤ MaxOrder) in sequence and hold exactly the counts it announces; every
// word of a higher order must be listed among the unigrams; no n-gram may
// appear twice; numbers must be finite with |x| ≤ 10⁹ (log10), log
// probabilities must not exceed 0, and the highest order has no back-off
// weights; the text must be UTF-8.
//
// The result follows the conventions of Backoff: Vocab is the unigram list
// sorted in byte order, levels are sorted by ID, Surface is all "", and
// Discounts and Tokens are empty. Log probabilities at or below -99 (log10)
// are read as zero probability (-Inf). When the file lacks <s>, it is added
// with probability zero (context only); when it lacks </s> or <unk>, they are
// added with log10 probability -10, so the distribution's total grows by at
// most 2·10⁻¹⁰ and out-of-vocabulary words keep a finite score.
//
// Models made elsewhere (pruned ones, typically) may list an n-gram whose
// context or suffix is not listed. The back-off rule still defines every
// probability, and ReadARPA keeps exactly those probabilities:
//   - A missing suffix needs nothing: the rule looks each order up on its own.
//   - A missing context h = w1…w(n-1) is added, since the compact layout
//     reaches successors through their context: its log probability is the
//     back-off value p(w(n-1) | w1…w(n-2)) and its back-off weight is 0 (ln 1),
//     which is what the rule used for it while it was missing.
//   - An n-gram below the highest order with a non-zero back-off weight but no
//     successor gets one, h </s>, whose probability is the back-off value
//     bow(h)·p(</s> | suffix of h), so that the compact layout (which keeps
//     weights of contexts only) keeps the weight.
//
// An added entry whose value works out above probability 1 is an error (the
// file's weights are then inconsistent). ReadARPA checks ctx every few
// thousand lines. Cost: O(n log n) in the number of n-grams.
func ReadARPA(ctx context.Context, r io.Reader) (*Backoff, error) {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 0, 64<<10), arpaMaxLine)
	rd := &arpaReader{sc: sc}

	// Preamble up to \data\.
	for {
		if err := rd.next(); err != nil {
			return nil, err
		}
		if rd.eof {
			return nil, &ARPAError{Line: rd.line + 1, Reason: `no \data\ line`}
		}
		if string(trimSep(rd.text)) == `\data\` {
			break
		}
	}
	// Header: ngram n=count, up to the first section marker.
	var counts []int
	for {
		if err := rd.next(); err != nil {
			return nil, err
		}
		if rd.eof {
			return nil, &ARPAError{Line: rd.line + 1, Reason: "text ends inside the header"}
		}
		t := trimSep(rd.text)
		if len(t) == 0 {
			continue
		}
		if t[0] == '\\' {
			break
		}
		rest, ok := bytes.CutPrefix(t, []byte("ngram"))
		if !ok || len(rest) == 0 || !isSep(rest[0]) {
			return nil, rd.errf("want an \"ngram N=count\" line")
		}
		ns, cs, ok := bytes.Cut(trimSep(rest), []byte("="))
		if !ok {
			return nil, rd.errf("want an \"ngram N=count\" line")
		}
		n, err1 := strconv.Atoi(string(trimSep(ns)))
		c, err2 := strconv.ParseInt(string(trimSep(cs)), 10, 64)
		switch {
		case err1 != nil || err2 != nil:
			return nil, rd.errf("want an \"ngram N=count\" line")
		case n < 1 || n > MaxOrder:
			return nil, rd.errf("order %d outside 1..%d", n, MaxOrder)
		case n != len(counts)+1:
			return nil, rd.errf("order %d out of sequence (want %d)", n, len(counts)+1)
		case c < 0:
			return nil, rd.errf("negative count %d", c)
		case n == 1 && c > MaxVocab:
			return nil, rd.errf("%d unigrams, more than %d", c, MaxVocab)
		}
		counts = append(counts, int(c))
	}
	if len(counts) == 0 {
		return nil, rd.errf("no ngram counts before the first section")
	}
	N := len(counts)

	// Sections.
	index := make(map[string]uint32) // unigram → position in file order
	var words []string
	raw := make([]*arpaEntries, N)
	var fs [][]byte
	key := make([]uint32, N)
	for n := 1; n <= N; n++ {
		// rd.text holds the section marker.
		if want := fmt.Sprintf(`\%d-grams:`, n); string(trimSep(rd.text)) != want {
			return nil, rd.errf("want %q", want)
		}
		e := &arpaEntries{n: n}
		raw[n-1] = e
		pre := min(counts[n-1], 1<<16)
		e.ids, e.logp, e.bow, e.line = make([]uint32, 0, pre*n), make([]float64, 0, pre), make([]float64, 0, pre), make([]int, 0, pre)
		for {
			if err := rd.next(); err != nil {
				return nil, err
			}
			if rd.eof {
				return nil, &ARPAError{Line: rd.line + 1, Reason: fmt.Sprintf(`text ends inside the %d-grams (no \end\)`, n)}
			}
			if rd.line&4095 == 0 {
				if err := ctx.Err(); err != nil {
					return nil, err
				}
			}
			fs = arpaFields(fs, rd.text)
			if len(fs) == 0 {
				continue
			}
			if fs[0][0] == '\\' {
				break
			}
			if len(fs) != n+1 && len(fs) != n+2 {
				return nil, rd.errf("%d fields, want %d or %d for a %d-gram", len(fs), n+1, n+2, n)
			}
			if len(fs) == n+2 && n == N {
				return nil, rd.errf("back-off weight at the highest order %d", N)
			}
			if e.len() == counts[n-1] {
				return nil, rd.errf("more %d-grams than the %d the header announces", n, counts[n-1])
			}
			p, ok := parseLog10(fs[0])
			if !ok {
				return nil, rd.errf("log probability %q is not a finite number within ±1e9", fs[0])
			}
			if p > 0 {
				return nil, rd.errf("log probability %s is above 0", fs[0])
			}
			if p <= arpaZero*math.Ln10 {
				p = math.Inf(-1)
			}
			bow := 0.0
			if len(fs) == n+2 {
				if bow, ok = parseLog10(fs[n+1]); !ok {
					return nil, rd.errf("back-off weight %q is not a finite number within ±1e9", fs[n+1])
				}
			}
			for j := range n {
				w := fs[1+j]
				if n == 1 {
					if _, dup := index[string(w)]; dup {
						return nil, rd.errf("unigram %q listed twice", w)
					}
					index[string(w)] = uint32(len(words))
					words = append(words, string(w))
				}
				id, ok := index[string(w)]
				if !ok {
					return nil, rd.errf("word %q is not in the unigram list", w)
				}
				key[j] = id
			}
			e.add(key[:n], p, bow, rd.line)
		}
		if e.len() != counts[n-1] {
			return nil, rd.errf("%d %d-grams, the header announces %d", e.len(), n, counts[n-1])
		}
	}
	if string(trimSep(rd.text)) != `\end\` {
		return nil, rd.errf(`want \end\`)
	}
	return buildFromARPA(raw, words)
}

// buildFromARPA turns the entries read (IDs in file order) into a Backoff.
func buildFromARPA(raw []*arpaEntries, words []string) (*Backoff, error) {
	N := len(raw)
	// Vocabulary: the unigrams plus missing specials, in byte order.
	uni := raw[0]
	file := len(words)
	extra := map[string]float64{}
	for _, s := range []string{BOS, EOS, UNK} {
		if !slices.Contains(words, s) {
			words = append(words, s)
			if s == BOS {
				extra[s] = math.Inf(-1)
			} else {
				extra[s] = arpaMissingLog10 * math.Ln10
			}
		}
	}
	order := make([]int, len(words))
	for i := range order {
		order[i] = i
	}
	slices.SortFunc(order, func(a, b int) int { return strings.Compare(words[a], words[b]) })
	rank := make([]uint32, len(words))
	vocab := make([]string, len(words))
	for r, i := range order {
		rank[i] = uint32(r)
		vocab[r] = words[i]
	}
	V := len(vocab)
	b := &Backoff{Vocab: vocab, Surface: make([]string, V), Levels: make([]Level, N)}
	l0 := &arpaEntries{n: 1, ids: make([]uint32, V), logp: make([]float64, V), bow: make([]float64, V), line: make([]int, V)}
	for i := range l0.ids {
		l0.ids[i] = uint32(i)
	}
	for i := range file {
		r := rank[i]
		l0.logp[r], l0.bow[r], l0.line[r] = uni.logp[i], uni.bow[i], uni.line[i]
	}
	for s, p := range extra {
		r, _ := slices.BinarySearch(vocab, s)
		l0.logp[r] = p
	}
	lv := make([]*arpaEntries, N)
	lv[0] = l0
	for n := 2; n <= N; n++ {
		e := raw[n-1]
		for i := range e.ids {
			e.ids[i] = rank[e.ids[i]]
		}
		s := e.sorted()
		for i := 1; i < s.len(); i++ {
			if slices.Equal(s.key(i-1), s.key(i)) {
				return nil, &ARPAError{Line: max(s.line[i-1], s.line[i]), Reason: fmt.Sprintf("%d-gram listed twice", n)}
			}
		}
		lv[n-1] = s
	}
	for n := range N {
		b.Levels[n] = lv[n].level()
	}
	if N == 1 {
		return b, nil
	}

	// Missing contexts, found from the top down (an added context may lack its own).
	missing := make([]*arpaEntries, N)
	for n := N; n >= 2; n-- {
		m := &arpaEntries{n: n - 1}
		for _, src := range []*arpaEntries{lv[n-1], missing[n-1]} {
			if src == nil {
				continue
			}
			for i := range src.len() {
				h := src.key(i)[:n-1]
				if n-1 == 1 || b.Levels[n-2].Find(h) >= 0 {
					continue // every word is a unigram
				}
				m.add(h, 0, 0, src.line[i])
			}
		}
		if m.len() > 0 {
			m = m.sorted()
			d := &arpaEntries{n: n - 1}
			for i := range m.len() {
				if i == 0 || !slices.Equal(m.key(i), m.key(i-1)) {
					d.add(m.key(i), 0, 0, m.line[i])
				}
			}
			missing[n-2] = d
		}
	}
	// Their values, from the bottom up: each is the back-off value it had while missing.
	for n := 2; n < N; n++ {
		m := missing[n-1]
		if m == nil {
			continue
		}
		for i := range m.len() {
			k := m.key(i)
			p := b.LogProb(k[:n-1], k[n-1])
			if p > arpaSlack {
				return nil, &ARPAError{Line: m.line[i], Reason: fmt.Sprintf("the missing context of this %d-gram works out above probability 1", n+1)}
			}
			m.logp[i] = min(p, 0)
		}
		lv[n-1] = merge(lv[n-1], m)
		b.Levels[n-1] = lv[n-1].level()
	}
	// Successors for weights of n-grams that are not contexts.
	eos, _ := b.ID(EOS)
	anchors := make([]*arpaEntries, N)
	for n := 1; n < N; n++ {
		cur := lv[n-1]
		a := &arpaEntries{n: n + 1}
		for i := range cur.len() {
			if cur.bow[i] == 0 || hasChildren(b, n, i) {
				continue
			}
			k := cur.key(i)
			p := b.LogProb(k, eos)
			if p > arpaSlack {
				return nil, &ARPAError{Line: cur.line[i], Reason: "this back-off weight makes p(</s>) exceed 1"}
			}
			a.add(append(slices.Clone(k), eos), min(p, 0), 0, 0)
		}
		anchors[n] = a
	}
	for n := 2; n <= N; n++ {
		if a := anchors[n-1]; a != nil && a.len() > 0 {
			lv[n-1] = merge(lv[n-1], a)
			b.Levels[n-1] = lv[n-1].level()
		}
	}
	return b, nil
}

// merge returns the entries of a and b (disjoint keys) in key order.
func merge(a, b *arpaEntries) *arpaEntries {
	out := &arpaEntries{n: a.n}
	out.ids = append(slices.Clone(a.ids), b.ids...)
	out.logp = append(slices.Clone(a.logp), b.logp...)
	out.bow = append(slices.Clone(a.bow), b.bow...)
	out.line = append(slices.Clone(a.line), b.line...)
	return out.sorted()
}
