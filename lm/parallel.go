package lm

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"os"
	"sync"
	"sync/atomic"
	"unicode"
	"unicode/utf8"
)

// TallyOptions controls a Tally. The zero value counts order-3 n-grams on
// the calling goroutine with no memory bound.
type TallyOptions struct {
	// Order is the highest n-gram order (1..MaxOrder); 0 means 3.
	Order int
	// Workers is the number of goroutines that count text; 0 means 1.
	Workers int
	// MemBudget bounds, in bytes, the n-gram tables of all workers together
	// (charged at a fixed cost per n-gram that includes the sort buffer of a
	// spill). Past it a worker writes its n-grams to disk as sorted runs.
	// 0 means no bound: runs stay in memory.
	MemBudget int64
	// TempDir is where the temporary directory of runs is made; "" means the
	// system default. The directory is removed by Close.
	TempDir string
	// ChunkBytes is the size of the pieces of text handed to workers; 0
	// picks one from the budget (at most 1 MiB). Pieces end only where a
	// sentence cannot continue, so the counts never depend on it.
	ChunkBytes int
}

// Tally counts n-grams with several goroutines and within a memory budget,
// from text (AddText), count shards (AddShards) and word lists. Its Counts are
// identical to those of one Counter fed the same input in the same order,
// whatever the number of workers, the budget or the chunk size.
//
// A Tally is driven by one goroutine (its methods are not safe for concurrent
// use); it starts and waits for its own workers. Close it to remove its
// temporary files, also after an error or a cancelled context.
type Tally struct {
	opts   TallyOptions
	order  int
	mu     sync.Mutex // guards main's vocabulary, runs and nfiles while workers run
	main   *Counter   // vocabulary, unigram counts, casing, word lists, totals
	runs   [][]run    // per order n at index n-2
	dir    string
	nfiles int
	tokens atomic.Int64

	shardEnts    [][]ent // n-grams read from shards, not yet filed as runs
	shardPending int64
	shardLines   int64
	shardMax     int
}

// NewTally returns an empty Tally.
func NewTally(opts TallyOptions) (*Tally, error) {
	if opts.Order == 0 {
		opts.Order = 3
	}
	if opts.Workers <= 0 {
		opts.Workers = 1
	}
	if opts.MemBudget < 0 {
		opts.MemBudget = 0
	}
	c, err := NewCounter(opts.Order)
	if err != nil {
		return nil, err
	}
	return &Tally{opts: opts, order: opts.Order, main: c, runs: make([][]run, max(0, opts.Order-1))}, nil
}

// Tokens returns the number of word tokens counted so far; it may be called
// from any goroutine (for progress reports).
func (t *Tally) Tokens() int64 { return t.tokens.Load() }

// Spills returns the number of run files written to disk so far.
func (t *Tally) Spills() int { return t.nfiles }

// Close removes the temporary files. It is safe to call more than once.
func (t *Tally) Close() error {
	if t.dir == "" {
		return nil
	}
	err := os.RemoveAll(t.dir)
	t.dir = ""
	for i := range t.runs {
		t.runs[i] = nil
	}
	return err
}

// AddWordCounts adds a word-count list (see Counter.AddWordCounts).
func (t *Tally) AddWordCounts(r io.Reader) error { return t.main.AddWordCounts(r) }

// AddWordList adds a plain word list (see Counter.AddWordList).
func (t *Tally) AddWordList(r io.Reader, weight float64) error { return t.main.AddWordList(r, weight) }

// worker is one counting goroutine's private state.
type worker struct {
	c       *Counter
	gid     []uint32 // worker temporary ID → Tally temporary ID
	tmp     []ent    // sort buffer of a spill (orders above 3)
	p, ptmp []uint64 // sort buffers of a spill (orders 2..3, see spillPacked)
}

// AddText tokenizes r and counts every sentence in it with the Tally's
// workers. Text is cut into pieces only after a blank line or a line that
// ends a sentence (pretokenized text: after any line), so no sentence is
// split. progress, if not nil, is called from this goroutine with the
// number of bytes read so far.
func (t *Tally) AddText(ctx context.Context, r io.Reader, opts ScanOptions, progress func(bytes int64)) error {
	W := t.opts.Workers
	share := int64(0)
	if t.opts.MemBudget > 0 {
		share = max(1, t.opts.MemBudget/int64(W))
	}
	chunk := t.opts.ChunkBytes
	if chunk <= 0 {
		chunk = 1 << 20
		if share > 0 {
			chunk = int(min(int64(chunk), max(4<<10, share/spillEntryBytes)))
		}
	}
	ctx, cancel := context.WithCancelCause(ctx)
	defer cancel(nil)
	jobs := make(chan []byte, W)
	free := make(chan []byte, 2*W)
	var wg sync.WaitGroup
	var firstErr error
	var errOnce sync.Once
	fail := func(err error) {
		errOnce.Do(func() { firstErr = err; cancel(err) })
	}
	for range W {
		wg.Add(1)
		go func() {
			defer wg.Done()
			c, _ := NewCounter(t.order)
			w := &worker{c: c}
			for b := range jobs {
				if ctx.Err() != nil {
					continue // drain
				}
				before := c.tokens
				if err := c.AddText(ctx, bytes.NewReader(b), opts, nil); err != nil {
					fail(err)
					continue
				}
				t.tokens.Add(c.tokens - before)
				select {
				case free <- b[:0]:
				default:
				}
				if share > 0 && int64(c.entries())*spillEntryBytes > share {
					if err := t.flush(w); err != nil {
						fail(err)
					}
				}
			}
			if ctx.Err() == nil {
				if err := t.flush(w); err != nil {
					fail(err)
				}
			}
		}()
	}
	rerr := t.readChunks(ctx, r, opts.Pretokenized, chunk, jobs, free, progress)
	close(jobs)
	wg.Wait()
	if firstErr != nil {
		return firstErr
	}
	if rerr != nil {
		return rerr
	}
	return ctx.Err()
}

// readChunks cuts r into pieces of about size bytes at safe places and
// sends them on jobs.
func (t *Tally) readChunks(ctx context.Context, r io.Reader, tokenized bool, size int, jobs chan<- []byte, free <-chan []byte, progress func(int64)) error {
	var pending []byte
	var read int64
	eof := false
	for !eof {
		if err := ctx.Err(); err != nil {
			return nil // the cause is reported by AddText
		}
		// Fill pending up to size (more if no safe cut was found yet).
		want := max(size, len(pending)+max(size/2, 4<<10))
		if cap(pending) < want {
			p := make([]byte, len(pending), want)
			copy(p, pending)
			pending = p
		}
		for len(pending) < want && !eof {
			n, err := r.Read(pending[len(pending):want])
			pending = pending[:len(pending)+n]
			read += int64(n)
			if err == io.EOF {
				eof = true
			} else if err != nil {
				return err
			}
		}
		cut := len(pending)
		if !eof {
			cut = safeCut(pending, tokenized)
			if cut == 0 {
				continue // no safe place yet: read more
			}
		}
		var out []byte
		select {
		case out = <-free:
		default:
		}
		out = append(out[:0], pending[:cut]...)
		select {
		case jobs <- out:
		case <-ctx.Done():
			return nil
		}
		pending = append(pending[:0], pending[cut:]...)
		if progress != nil {
			progress(read - int64(len(pending)))
		}
	}
	return nil
}

// safeCut returns the end of the last line of b after which the Scanner
// starts afresh, or 0 if there is none. For pretokenized text that is any
// line end. For running text it is a line that is blank or whose last
// non-space character ends a sentence ('.', '!', '?', '…'): the Scanner has
// then finished every sentence and keeps no state into the next line.
func safeCut(b []byte, tokenized bool) int {
	end := bytes.LastIndexByte(b, '\n')
	for end >= 0 {
		if tokenized {
			return end + 1
		}
		start := bytes.LastIndexByte(b[:end], '\n') + 1
		line := bytes.TrimRightFunc(b[start:end], unicode.IsSpace)
		if len(line) == 0 {
			return end + 1
		}
		r, _ := utf8.DecodeLastRune(line)
		if r == '.' || r == '!' || r == '?' || r == '…' {
			return end + 1
		}
		end = start - 1
	}
	return 0
}

// flush moves a worker's counts into the Tally: its new words are given
// shared temporary IDs, its vocabulary-sized tallies are added to the
// Tally's, and its n-grams become one sorted run per order.
func (t *Tally) flush(w *worker) error {
	c := w.c
	t.mu.Lock()
	m := t.main
	for id := len(w.gid); id < len(c.words); id++ {
		word := c.words[id]
		g, ok := m.index[word]
		if !ok {
			if len(m.words) >= MaxVocab {
				t.mu.Unlock()
				return ErrVocabTooLarge
			}
			g = m.intern([]byte(word))
		}
		w.gid = append(w.gid, g)
	}
	for id, g := range w.gid {
		m.uni[g] += c.uni[id]
		c.uni[id] = 0
		if ct := &c.casing[id]; ct.n != [4]uint32{} {
			m.casing[g].merge(ct)
			*ct = caseTally{}
		}
	}
	m.tokens += c.tokens
	m.sents += c.sents
	c.tokens, c.sents = 0, 0
	t.mu.Unlock()
	for n := 2; n <= t.order; n++ {
		budget := t.opts.MemBudget > 0
		switch {
		case !budget && n <= 3:
			// No budget: this is the worker's last flush. Its table
			// becomes the run as it is; Counts renames and sorts it.
			t.mu.Lock()
			t.runs[n-2] = append(t.runs[n-2], run{grams: c.short[n-2], gid: w.gid})
			t.mu.Unlock()
			c.short[n-2] = newCountMap()
			continue
		case budget && n <= 3:
			done, err := t.spillPacked(w, n)
			if err != nil {
				return err
			}
			if done {
				continue
			}
		}
		ents := c.drain(n, w.gid, w.tmp, budget)
		if budget {
			w.tmp = ents[:0]
		}
		if err := t.addRun(n, ents); err != nil {
			return err
		}
	}
	return nil
}

// Counts merges everything counted into final-ID form. The runs are
// consumed: the Tally holds no n-grams afterwards (Close it).
//
// Without a memory budget the in-memory runs of each order (the workers'
// tables) are renamed to final IDs, sorted once and summed: the orders side
// by side, and each order's renaming and radix sort split among Workers
// goroutines, so that little of the work is left to one core. With a budget
// the run files of each order are merged one order after the other, so that
// only one order's entries are in memory at a time besides the tables
// already made.
func (t *Tally) Counts(ctx context.Context) (*Counts, error) {
	if t.shardLines > 0 && t.shardMax < t.order {
		return nil, fmt.Errorf("%w: shards hold n-grams up to order %d, the build asks for order %d", ErrShard, t.shardMax, t.order)
	}
	if err := t.flushShards(); err != nil {
		return nil, err
	}
	vocab, rank, _ := t.main.ranks()
	tabs := make([]table, t.order)
	tabs[0] = t.main.uniTable(rank)
	if t.opts.MemBudget <= 0 {
		sem := make(chan struct{}, t.opts.Workers)
		var wg sync.WaitGroup
		for n := 2; n <= t.order; n++ {
			runs := t.runs[n-2]
			t.runs[n-2] = nil
			sem <- struct{}{}
			wg.Go(func() {
				defer func() { <-sem }()
				srcs := make([]gramSource, len(runs))
				for i, r := range runs {
					srcs[i] = gramSource{ents: r.mem, grams: r.grams, to: rank}
					if r.grams != nil {
						to := make([]uint32, len(r.gid))
						for id, g := range r.gid {
							to[id] = rank[g]
						}
						srcs[i].to = to
					}
				}
				tabs[n-1] = buildTable(n, srcs, len(rank), t.opts.Workers)
			})
		}
		wg.Wait()
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		return t.main.finalCounts(vocab, rank, tabs), nil
	}
	for n := 2; n <= t.order; n++ {
		ents, err := mergeRuns(ctx, t.runs[n-2], nil)
		if err != nil {
			return nil, err
		}
		if err := t.removeRuns(n); err != nil {
			return nil, fmt.Errorf("lm: spill: %w", err)
		}
		tabs[n-1] = finishTable(n, ents, rank)
		if err := ctx.Err(); err != nil {
			return nil, err
		}
	}
	return t.main.finalCounts(vocab, rank, tabs), nil
}
