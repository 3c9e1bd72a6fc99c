package lm

import (
	"bufio"
	"context"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
)

// Sorted runs: the bounded-memory half of counting.
//
// Memory model. A Tally keeps the vocabulary (words, unigram counts, casing
// tallies, word-list counts) in memory for the whole count: it is small next
// to the n-grams (a few million words at most, MaxVocab). The n-grams of
// orders 2..N live in per-worker hash maps keyed by temporary word IDs. When
// the maps of a worker outgrow its share of the budget, the worker renames
// its words to the Tally's shared temporary IDs (first-seen order, never
// renumbered, so every run uses the same ID space), sorts the entries by
// packed key and writes one run file per order, then empties its maps. At the
// end the runs of each order are merged with a k-way heap merge that sums
// equal keys; the merged stream is renamed to final IDs (lexicographic ranks,
// known only once the vocabulary is complete), sorted once more and becomes
// the table that Estimate reads. Estimation itself holds every distinct
// n-gram in memory (about 40 bytes per n-gram plus the model being built); the
// budget bounds counting, not estimation.

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

// spillEntryBytes is the memory charged per n-gram held in a worker's maps:
// about 25 bytes of map (BenchmarkMapEntryBytes, Go 1.26), the 24-byte entry
// of the sort buffer a spill needs, and slack for map growth.
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

// entries returns the number of n-grams (orders ≥ 2) held in c's maps.
func (c *Counter) entries() int {
	total := 0
	for _, m := range c.short {
		total += len(m)
	}
	for _, m := range c.long {
		total += len(m)
	}
	return total
}

// drain moves the order-n entries of c into dst with every ID renamed
// through gid, sorts them by key and empties the map.
func (c *Counter) drain(n int, gid []uint32, dst []ent) []ent {
	var buf [MaxOrder]uint32
	if n <= 3 {
		m := c.short[n-2]
		dst = slices.Grow(dst[:0], len(m))
		for k, v := range m {
			ids := unpackKey(key2{k, 0}, n, buf[:0])
			for j := range ids {
				ids[j] = gid[ids[j]]
			}
			dst = append(dst, ent{packLong(ids), uint64(v)})
		}
		clear(m)
	} else {
		m := c.long[n-4]
		dst = slices.Grow(dst[:0], len(m))
		for k, v := range m {
			ids := unpackLong(k, n, buf[:0])
			for j := range ids {
				ids[j] = gid[ids[j]]
			}
			dst = append(dst, ent{packLong(ids), uint64(v)})
		}
		clear(m)
	}
	sortEnts(dst)
	return dst
}

// run is one sorted run of an order: in memory or in a file.
type run struct {
	mem  []ent
	path string
}

// writeRun writes sorted entries to a new file: per entry the uvarint
// difference of k[0] from the previous entry's, then k[1] and the count as
// uvarints.
func writeRun(path string, ents []ent) (err error) {
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
	for _, e := range ents {
		b := binary.AppendUvarint(buf[:0], e.k[0]-prev)
		b = binary.AppendUvarint(b, e.k[1])
		b = binary.AppendUvarint(b, e.c)
		if _, err := bw.Write(b); err != nil {
			return err
		}
		prev = e.k[0]
	}
	return bw.Flush()
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
// of equal keys, and appends the distinct entries in key order to dst.
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
		return append(dst, runs[0].mem...), nil
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

// finishTable renames merged entries of order n to final IDs, sorts them
// and lays them out as a table. ents is used as scratch space.
func finishTable(n int, ents []ent, rank []uint32) table {
	var buf [MaxOrder]uint32
	for i := range ents {
		ids := unpackKey(ents[i].k, n, buf[:0])
		for j := range ids {
			ids[j] = rank[ids[j]]
		}
		ents[i].k = packLong(ids)
	}
	sortEnts(ents)
	t := table{n: n, ids: make([]uint32, 0, len(ents)*n), cnt: make([]uint64, len(ents))}
	for i, e := range ents {
		t.ids = unpackKey(e.k, n, t.ids)
		t.cnt[i] = e.c
	}
	return t
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

// addRun files sorted entries of order n as a run: written to disk when the
// Tally has a memory budget, kept in memory otherwise. Safe for concurrent use.
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
	t.mu.Lock()
	dir, err := t.spillDir()
	seq := t.nfiles
	t.nfiles++
	t.mu.Unlock()
	if err != nil {
		return err
	}
	path := filepath.Join(dir, fmt.Sprintf("run-%06d-order%d", seq, n))
	if err := writeRun(path, ents); err != nil {
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
