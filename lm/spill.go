package lm

import (
	"bufio"
	"context"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"iter"
	"math/bits"
	"os"
	"path/filepath"
	"slices"
)

// Sorted runs: the bounded-memory half of counting.
//
// Memory model. A Tally keeps the vocabulary (words, unigram counts, casing
// tallies, word-list counts) in memory for the whole count: it is small next
// to the n-grams (a few million words at most, MaxVocab). The n-grams of
// orders 2..3 live in per-worker countMaps, those of orders 4..5 in Go maps,
// keyed by the worker's temporary word IDs. When the tables of a worker
// outgrow its share of the budget, the worker renames its words to the
// Tally's shared temporary IDs (first-seen order, never renumbered, so every
// run uses the same ID space), sorts the entries by packed key (orders 2..3
// as squeezed 8-byte words, see spillPacked) and writes one run file per
// order, then empties its tables. At the end the runs of each order are
// merged with a k-way heap merge that sums equal keys; the merged stream is
// renamed to final IDs (lexicographic ranks, known only once the vocabulary
// is complete), sorted once more and becomes the table that Estimate reads
// (finish.go). Without a budget nothing is sorted before that last step: each
// worker hands its tables over as they are. Estimation itself holds every
// distinct n-gram in memory (about 40 bytes per n-gram plus the model being
// built); the budget bounds counting, not estimation.

// ent is one n-gram count, its IDs packed as packLong packs them (orders
// 2..3 use k[0] only).
type ent struct {
	k key2
	c uint64
}

func cmpEnt(a, b ent) int {
	if a.k[0] != b.k[0] {
		return cmpU64(a.k[0], b.k[0])
	}
	return cmpU64(a.k[1], b.k[1])
}

// spillEntryBytes is the memory charged per n-gram held in a worker's
// tables: about 25 bytes of table (BenchmarkMapEntryBytes: 12-byte slots of
// a countMap between 3/8 and 3/4 full), the two 8-byte words of the sort
// buffers a spill needs (spillPacked), and slack for the moment a table
// doubles, when the old and the new table are both held (up to 48 bytes an
// n-gram).
const spillEntryBytes = 64

// unpackKey appends the n IDs packed in k to dst.
func unpackKey(k key2, n int, dst []uint32) []uint32 {
	if n >= 4 {
		return unpackLong(k, n, dst)
	}
	const m21 = 1<<21 - 1
	for j := n - 1; j >= 0; j-- {
		dst = append(dst, uint32(k[0]>>(21*uint(j)))&m21)
	}
	return dst
}

// entries returns the number of n-grams (orders ≥ 2) held in c's tables.
func (c *Counter) entries() int {
	total := 0
	for _, m := range c.short {
		total += m.len()
	}
	for _, m := range c.long {
		total += len(m)
	}
	return total
}

// drain moves the order-n entries of c into dst with every ID renamed
// through gid, sorts them by key when sorted is set and empties the map.
func (c *Counter) drain(n int, gid []uint32, dst []ent, sorted bool) []ent {
	if n <= 3 {
		m := c.short[n-2]
		dst = slices.Grow(dst[:0], m.len())
		for k, v := range m.all {
			dst = append(dst, ent{renameKey(key2{k, 0}, n, gid), v})
		}
		m.reset()
	} else {
		m := c.long[n-4]
		dst = slices.Grow(dst[:0], len(m))
		for k, v := range m {
			dst = append(dst, ent{renameKey(k, n, gid), uint64(v)})
		}
		clear(m)
	}
	if sorted {
		sortEnts(dst)
	}
	return dst
}

// renameKey returns the order-n key k with every ID i replaced by to[i].
func renameKey(k key2, n int, to []uint32) key2 {
	const m21 = 1<<21 - 1
	switch n {
	case 2:
		return key2{uint64(to[k[0]>>21&m21])<<21 | uint64(to[k[0]&m21]), 0}
	case 3:
		return key2{uint64(to[k[0]>>42&m21])<<42 | uint64(to[k[0]>>21&m21])<<21 | uint64(to[k[0]&m21]), 0}
	}
	var buf [MaxOrder]uint32
	ids := unpackKey(k, n, buf[:0])
	for j := range ids {
		ids[j] = to[ids[j]]
	}
	return packLong(ids)
}

// run is one run of an order: sorted entries in a file (a Tally with a
// memory budget) or, in memory, entries (unsorted unless they are handed to
// mergeRuns) or a worker's whole table of orders 2..3 with the worker's
// temporary-ID map (a Tally without a budget: Counts sorts once, in final IDs).
type run struct {
	mem   []ent
	path  string
	grams *countMap
	gid   []uint32 // worker temporary ID → Tally temporary ID, for grams
}

// writeRun writes sorted entries to a new file: per entry the uvarint
// difference of k[0] from the previous entry's, then k[1] and the count as
// uvarints.
func writeRun(path string, ents []ent) error {
	return writeRunSeq(path, func(yield func(key2, uint64) bool) {
		for _, e := range ents {
			if !yield(e.k, e.c) {
				return
			}
		}
	})
}

// writeRunSeq writes the sorted entries that seq yields to a new file in
// the format of writeRun.
func writeRunSeq(path string, seq iter.Seq2[key2, uint64]) (err error) {
	f, err := os.OpenFile(path, os.O_CREATE|os.O_EXCL|os.O_WRONLY, 0o600)
	if err != nil {
		return err
	}
	defer func() {
		if cerr := f.Close(); err == nil {
			err = cerr
		}
	}()
	bw := bufio.NewWriterSize(f, 1<<16)
	var buf [3 * binary.MaxVarintLen64]byte
	var prev uint64
	for k, c := range seq {
		b := binary.AppendUvarint(buf[:0], k[0]-prev)
		b = binary.AppendUvarint(b, k[1])
		b = binary.AppendUvarint(b, c)
		if _, err = bw.Write(b); err != nil {
			return err
		}
		prev = k[0]
	}
	return bw.Flush()
}

// spillPacked writes the order-n table m (n ≤ 3) as a sorted run file with
// every ID renamed through gid, then empties m. The keys are squeezed to
// just enough bits for the largest ID and sorted with their counts as
// 8-byte words (see finish.go), in the worker's buffers p and tmp, so a
// spill needs 16 bytes an n-gram beside the table. It returns false, having
// done nothing, when key and count do not fit in 64 bits together.
func (t *Tally) spillPacked(w *worker, n int) (bool, error) {
	m := w.c.short[n-2]
	if m.len() == 0 {
		return true, nil
	}
	maxc := m.maxCount()
	var top uint32
	for _, g := range w.gid {
		top = max(top, g)
	}
	b := uint(bits.Len32(top))
	keyBits := uint(n) * b
	cb := uint(bits.Len64(maxc))
	if keyBits+cb > 64 {
		return false, nil
	}
	p := w.p[:0]
	for k, c := range m.all {
		p = append(p, squeezeKey(k, n, b, w.gid)<<cb|c)
	}
	m.reset()
	if cap(w.ptmp) < len(p) {
		w.ptmp = make([]uint64, len(p))
	}
	w.p = p[:0]
	sorted := radixSortBits(p, w.ptmp, cb, keyBits)
	bmask := uint64(1)<<b - 1
	cmask := uint64(1)<<cb - 1
	return true, t.spillSeq(n, func(yield func(key2, uint64) bool) {
		for _, v := range sorted {
			sk := v >> cb
			var k uint64
			for j := range n {
				k |= (sk & bmask) << (21 * uint(j))
				sk >>= b
			}
			if !yield(key2{k, 0}, v&cmask) {
				return
			}
		}
	})
}

// runReader yields the entries of a run in order.
type runReader struct {
	mem  []ent
	f    *os.File
	br   *bufio.Reader
	prev uint64
	cur  ent
}

func openRun(r run) (*runReader, error) {
	if r.path == "" {
		return &runReader{mem: r.mem}, nil
	}
	f, err := os.Open(r.path)
	if err != nil {
		return nil, err
	}
	return &runReader{f: f, br: bufio.NewReaderSize(f, 1<<16)}, nil
}

// next loads the next entry into rr.cur; it returns false at the end.
func (rr *runReader) next() (bool, error) {
	if rr.br == nil {
		if len(rr.mem) == 0 {
			return false, nil
		}
		rr.cur, rr.mem = rr.mem[0], rr.mem[1:]
		return true, nil
	}
	d, err := binary.ReadUvarint(rr.br)
	if err == io.EOF {
		return false, nil
	}
	var k1, c uint64
	if err == nil {
		k1, err = binary.ReadUvarint(rr.br)
	}
	if err == nil {
		c, err = binary.ReadUvarint(rr.br)
	}
	if err != nil {
		if err == io.EOF {
			err = io.ErrUnexpectedEOF
		}
		return false, fmt.Errorf("lm: read run %s: %w", rr.f.Name(), err)
	}
	rr.prev += d
	rr.cur = ent{key2{rr.prev, k1}, c}
	return true, nil
}

func (rr *runReader) close() error {
	if rr.f != nil {
		return rr.f.Close()
	}
	return nil
}

// mergeRuns merges sorted runs with a k-way heap merge, summing the counts
// of equal keys, and appends the distinct entries in key order to dst. A
// single in-memory run is returned as it is when dst is empty: the caller
// then owns its entries.
func mergeRuns(ctx context.Context, runs []run, dst []ent) (out []ent, err error) {
	rs := make([]*runReader, 0, len(runs))
	defer func() {
		for _, r := range rs {
			if cerr := r.close(); err == nil && cerr != nil {
				err = cerr
			}
		}
	}()
	total := 0
	for _, r := range runs {
		rr, err := openRun(r)
		if err != nil {
			return dst, err
		}
		rs = append(rs, rr)
		total += len(r.mem)
	}
	if len(runs) == 1 && runs[0].path == "" {
		if len(dst) == 0 {
			return sumEqual(runs[0].mem), nil // the caller takes over the run
		}
		return append(dst, sumEqual(runs[0].mem)...), nil
	}
	dst = slices.Grow(dst, total)
	// h is a min-heap of readers ordered by their current entry.
	h := make([]*runReader, 0, len(rs))
	for _, rr := range rs {
		ok, err := rr.next()
		if err != nil {
			return dst, err
		}
		if ok {
			h = append(h, rr)
		}
	}
	less := func(i, j int) bool { return cmpEnt(h[i].cur, h[j].cur) < 0 }
	down := func(i int) {
		for {
			l := 2*i + 1
			if l >= len(h) {
				return
			}
			m := l
			if r := l + 1; r < len(h) && less(r, l) {
				m = r
			}
			if !less(m, i) {
				return
			}
			h[i], h[m] = h[m], h[i]
			i = m
		}
	}
	for i := len(h)/2 - 1; i >= 0; i-- {
		down(i)
	}
	for steps := 0; len(h) > 0; steps++ {
		top := h[0].cur
		if n := len(dst); n > 0 && dst[n-1].k == top.k {
			dst[n-1].c += top.c
		} else {
			dst = append(dst, top)
		}
		ok, err := h[0].next()
		if err != nil {
			return dst, err
		}
		if !ok {
			h[0] = h[len(h)-1]
			h = h[:len(h)-1]
		}
		down(0)
		if steps&65535 == 65535 {
			if err := ctx.Err(); err != nil {
				return dst, err
			}
		}
	}
	return dst, nil
}

// spillDir creates the temporary directory of runs on first use.
func (t *Tally) spillDir() (string, error) {
	if t.dir != "" {
		return t.dir, nil
	}
	d, err := os.MkdirTemp(t.opts.TempDir, "keyloom-runs-")
	if err != nil {
		return "", fmt.Errorf("lm: spill: %w", err)
	}
	t.dir = d
	return d, nil
}

// addRun files entries of order n as a run: written to disk when the Tally
// has a memory budget (the entries must then be sorted), kept in memory
// otherwise (in any order: Counts sorts them once, in final IDs). Safe for
// concurrent use.
func (t *Tally) addRun(n int, ents []ent) error {
	if len(ents) == 0 {
		return nil
	}
	if t.opts.MemBudget <= 0 {
		t.mu.Lock()
		t.runs[n-2] = append(t.runs[n-2], run{mem: ents})
		t.mu.Unlock()
		return nil
	}
	return t.spillSeq(n, func(yield func(key2, uint64) bool) {
		for _, e := range ents {
			if !yield(e.k, e.c) {
				return
			}
		}
	})
}

// spillSeq writes the sorted order-n entries that seq yields as a new run
// file. Safe for concurrent use.
func (t *Tally) spillSeq(n int, seq iter.Seq2[key2, uint64]) error {
	t.mu.Lock()
	dir, err := t.spillDir()
	num := t.nfiles
	t.nfiles++
	t.mu.Unlock()
	if err != nil {
		return err
	}
	path := filepath.Join(dir, fmt.Sprintf("run-%06d-order%d", num, n))
	if err := writeRunSeq(path, seq); err != nil {
		return fmt.Errorf("lm: spill: %w", err)
	}
	t.mu.Lock()
	t.runs[n-2] = append(t.runs[n-2], run{path: path})
	t.mu.Unlock()
	return nil
}

// removeRuns deletes the run files of order n.
func (t *Tally) removeRuns(n int) error {
	var errs []error
	for _, r := range t.runs[n-2] {
		if r.path != "" {
			errs = append(errs, os.Remove(r.path))
		}
	}
	t.runs[n-2] = nil
	return errors.Join(errs...)
}
