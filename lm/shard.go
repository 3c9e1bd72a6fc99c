package lm

import (
	"bufio"
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"slices"
	"strconv"
)

// Count shards: the line format any map/reduce engine can produce and that
// a Tally reads. The format is specified in SHARDS.md beside this file.

// casing record classes, in the order of the caseLower.. constants.
var caseNames = [4]string{"lower", "title", "upper", "other"}

// maxShardLine is the longest shard line accepted.
const maxShardLine = 1 << 20

// readShardLine returns the next line of br without its line end, using buf
// for lines longer than br's buffer. It returns io.EOF after the last line.
func readShardLine(br *bufio.Reader, buf []byte) ([]byte, []byte, error) {
	b, err := br.ReadSlice('\n')
	if err == bufio.ErrBufferFull {
		buf = append(buf[:0], b...)
		for err == bufio.ErrBufferFull {
			if len(buf) > maxShardLine {
				return nil, buf, fmt.Errorf("%w: line longer than %d bytes", ErrShard, maxShardLine)
			}
			b, err = br.ReadSlice('\n')
			buf = append(buf, b...)
		}
		b = buf
	}
	if err != nil && err != io.EOF {
		return nil, buf, err
	}
	if err == io.EOF && len(b) == 0 {
		return nil, buf, io.EOF
	}
	return bytes.TrimRight(b, "\r\n"), buf, nil
}

// splitShardLine splits "key<TAB>count".
func splitShardLine(line []byte) (key []byte, count uint64, ok bool) {
	tab := bytes.IndexByte(line, '\t')
	if tab <= 0 {
		return nil, 0, false
	}
	v, err := strconv.ParseUint(string(line[tab+1:]), 10, 64)
	if err != nil {
		return nil, 0, false
	}
	return line[:tab], v, true
}

// ReduceShard reads shard lines whose equal keys are adjacent (the input of
// a reducer: sorted by key) and writes each key once with the sum of its
// counts. It is the reducer of a map/reduce count and keeps one line in memory.
func ReduceShard(ctx context.Context, r io.Reader, w io.Writer) error {
	br := bufio.NewReaderSize(r, 1<<16)
	bw := bufio.NewWriterSize(w, 1<<16)
	var key, buf, out []byte
	var sum uint64
	have := false
	emit := func() error {
		out = append(append(append(out[:0], key...), '\t'), strconv.AppendUint(nil, sum, 10)...)
		out = append(out, '\n')
		_, err := bw.Write(out)
		return err
	}
	for lineNo := 1; ; lineNo++ {
		line, nbuf, err := readShardLine(br, buf)
		buf = nbuf
		if err == io.EOF {
			break
		}
		if err != nil {
			return fmt.Errorf("line %d: %w", lineNo, err)
		}
		if len(line) == 0 {
			continue
		}
		k, c, ok := splitShardLine(line)
		if !ok {
			return fmt.Errorf("%w: line %d: want n-gram<TAB>count", ErrShard, lineNo)
		}
		if have && bytes.Equal(k, key) {
			if sum+c < sum {
				return fmt.Errorf("%w: line %d: count overflows", ErrShard, lineNo)
			}
			sum += c
			continue
		}
		if have {
			if err := emit(); err != nil {
				return err
			}
		}
		key, sum, have = append(key[:0], k...), c, true
		if lineNo&8191 == 0 {
			if err := ctx.Err(); err != nil {
				return err
			}
		}
	}
	if have {
		if err := emit(); err != nil {
			return err
		}
	}
	return bw.Flush()
}

// WriteShard writes the counts of c as shard lines (see SHARDS.md): every
// n-gram of every order with its count, and the casing records of every
// word, in no particular order. It is the output of a mapper; the counts of
// several Counters written this way, summed by key, equal the counts of one
// Counter fed all their text.
func (c *Counter) WriteShard(w io.Writer) error {
	bw := bufio.NewWriterSize(w, 1<<16)
	var line []byte
	put := func(ids []uint32, cnt uint64) error {
		line = line[:0]
		for i, id := range ids {
			if i > 0 {
				line = append(line, ' ')
			}
			line = append(line, c.words[id]...)
		}
		line = append(line, '\t')
		line = strconv.AppendUint(line, cnt, 10)
		line = append(line, '\n')
		_, err := bw.Write(line)
		return err
	}
	for id, n := range c.uni {
		if n > 0 {
			if err := put([]uint32{uint32(id)}, n); err != nil {
				return err
			}
		}
	}
	for id := range c.casing {
		t := &c.casing[id]
		for cls := caseLower; cls < caseOther; cls++ {
			if t.n[cls] == 0 {
				continue
			}
			line = append(append(append(line[:0], EOS+" "...), caseNames[cls]...), ' ')
			line = append(append(line, c.words[id]...), '\t')
			line = append(strconv.AppendUint(line, uint64(t.n[cls]), 10), '\n')
			if _, err := bw.Write(line); err != nil {
				return err
			}
		}
		forms := make([]string, 0, len(t.others))
		for f := range t.others {
			forms = append(forms, f)
		}
		slices.Sort(forms)
		for _, f := range forms {
			line = append(append(line[:0], EOS+" other "...), c.words[id]...)
			line = append(append(append(line, ' '), f...), '\t')
			line = append(strconv.AppendUint(line, uint64(t.others[f]), 10), '\n')
			if _, err := bw.Write(line); err != nil {
				return err
			}
		}
	}
	var buf [MaxOrder]uint32
	for i, m := range c.short {
		for k, v := range m.all {
			if err := put(unpackKey(key2{k, 0}, i+2, buf[:0]), v); err != nil {
				return err
			}
		}
	}
	for i, m := range c.long {
		for k, v := range m {
			if err := put(unpackLong(k, i+4, buf[:0]), uint64(v)); err != nil {
				return err
			}
		}
	}
	return bw.Flush()
}

// shardEntryBytes is the memory charged per n-gram read from shards and not
// yet spilled (the entry and slice growth).
const shardEntryBytes = 32

// AddShards reads count shard lines (see SHARDS.md) and adds them to the
// counts. Lines may come in any order and keys may repeat (their counts add
// up); reduced, sorted shards are simply the smallest input. Shards must hold
// every order up to the Tally's: Counts reports ErrShard otherwise.
func (t *Tally) AddShards(ctx context.Context, r io.Reader) error {
	if t.shardEnts == nil {
		t.shardEnts = make([][]ent, max(0, t.order-1))
	}
	br := bufio.NewReaderSize(r, 1<<16)
	var buf []byte
	var words [][]byte
	var ids []uint32
	m := t.main
	intern := func(w []byte) (uint32, error) {
		if id, ok := m.index[string(w)]; ok {
			return id, nil
		}
		if len(m.words) >= MaxVocab {
			return 0, ErrVocabTooLarge
		}
		return m.intern(w), nil
	}
	for lineNo := 1; ; lineNo++ {
		line, nbuf, err := readShardLine(br, buf)
		buf = nbuf
		if err == io.EOF {
			return nil
		}
		if err != nil {
			return fmt.Errorf("line %d: %w", lineNo, err)
		}
		if len(line) == 0 {
			continue
		}
		bad := func(why string) error { return fmt.Errorf("%w: line %d: %s", ErrShard, lineNo, why) }
		key, cnt, ok := splitShardLine(line)
		if !ok {
			return bad("want n-gram<TAB>count")
		}
		words = words[:0]
		for w := range bytes.SplitSeq(key, []byte{' '}) {
			if len(w) == 0 {
				return bad("empty word (words are separated by single spaces)")
			}
			words = append(words, w)
		}
		t.shardLines++
		if string(words[0]) == EOS && len(words) > 1 {
			if err := t.addCaseRecord(words[1:], cnt, intern); err != nil {
				return bad(err.Error())
			}
			continue
		}
		n := len(words)
		if n > t.order {
			return bad(fmt.Sprintf("order-%d n-gram in an order-%d count", n, t.order))
		}
		t.shardMax = max(t.shardMax, n)
		ids = ids[:0]
		for i, w := range words {
			if string(w) == BOS && i > 0 || string(w) == EOS && i < n-1 {
				return bad("<s> may only start and </s> only end an n-gram")
			}
			id, err := intern(w)
			if err != nil {
				return err
			}
			ids = append(ids, id)
		}
		if n == 1 {
			m.uni[ids[0]] += cnt
			switch ids[0] {
			case tmpBOS:
				m.sents += int64(cnt)
			case tmpEOS:
			default:
				m.tokens += int64(cnt)
				t.tokens.Add(int64(cnt))
			}
			continue
		}
		t.shardEnts[n-2] = append(t.shardEnts[n-2], ent{packLong(ids), cnt})
		t.shardPending++
		if t.opts.MemBudget > 0 && t.shardPending*shardEntryBytes > t.opts.MemBudget {
			if err := t.flushShards(); err != nil {
				return err
			}
		}
		if lineNo&8191 == 0 {
			if err := ctx.Err(); err != nil {
				return err
			}
		}
	}
}

// addCaseRecord adds "</s> CLASS WORD [FORM]" (words without the </s>).
func (t *Tally) addCaseRecord(words [][]byte, cnt uint64, intern func([]byte) (uint32, error)) error {
	cls := slices.Index(caseNames[:], string(words[0]))
	if cls < 0 || cls == caseOther && len(words) != 3 || cls != caseOther && len(words) != 2 {
		return errors.New("want </s> lower|title|upper WORD or </s> other WORD FORM")
	}
	if cnt > 1<<32-1 {
		return errors.New("casing count too large")
	}
	id, err := intern(words[1])
	if err != nil {
		return err
	}
	var form []byte
	if cls == caseOther {
		form = words[2]
	}
	t.main.casing[id].add(cls, form, uint32(cnt))
	return nil
}

// flushShards files the n-grams read from shards as runs (see addRun).
func (t *Tally) flushShards() error {
	for i, ents := range t.shardEnts {
		if len(ents) == 0 {
			continue
		}
		if t.opts.MemBudget > 0 {
			sortEnts(ents) // run files must be sorted; Counts sorts in-memory runs
		}
		if err := t.addRun(i+2, ents); err != nil {
			return err
		}
		if t.opts.MemBudget > 0 {
			t.shardEnts[i] = ents[:0]
		} else {
			t.shardEnts[i] = nil
		}
	}
	t.shardPending = 0
	return nil
}

// MapOptions controls MapShard.
type MapOptions struct {
	// Order is the highest n-gram order (1..MaxOrder); 0 means 3.
	Order int
	// Scan tells how to read the text.
	Scan ScanOptions
	// MemBudget bounds the pre-aggregated counts in bytes: past it they are
	// written out and counting starts afresh. 0 means 256 MiB.
	MemBudget int64
}

// MapShard counts the text of r and writes the counts to w as shard lines,
// in no particular order: the mapper of a map/reduce count. Its output for
// several pieces of a text, sorted by key and summed by ReduceShard, holds
// the counts of the whole text, provided every piece ends where a sentence
// ends (at a line end for pretokenized text; at a blank line or a line that
// ends with '.', '!', '?' or '…' for running text).
func MapShard(ctx context.Context, r io.Reader, w io.Writer, opts MapOptions) error {
	if opts.Order == 0 {
		opts.Order = 3
	}
	budget := opts.MemBudget
	if budget <= 0 {
		budget = 256 << 20
	}
	c, err := NewCounter(opts.Order)
	if err != nil {
		return err
	}
	sc := NewScanner(r, opts.Scan)
	for i := 0; sc.Scan(); i++ {
		surf := sc.Surfaces()
		if opts.Scan.Pretokenized {
			surf = nil
		}
		if err := c.AddSentence(sc.Tokens(), surf); err != nil {
			return err
		}
		if i&1023 == 1023 {
			if err := ctx.Err(); err != nil {
				return err
			}
			if int64(c.entries()+len(c.words))*spillEntryBytes > budget {
				if err := c.WriteShard(w); err != nil {
					return err
				}
				c, _ = NewCounter(opts.Order)
			}
		}
	}
	if err := sc.Err(); err != nil {
		return err
	}
	return c.WriteShard(w)
}
