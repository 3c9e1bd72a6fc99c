package correct

import (
	"runtime"
	"slices"
	"strings"
	"testing"
	"time"
)

// eightLetterTyped returns the lower-case 8-letter misspellings of the
// development list, the words the corrector benchmarks type.
func eightLetterTyped(b *testing.B) []string {
	b.Helper()
	var typed []string
	for _, p := range devPairs(b) {
		if len(p.Typed) == 8 && strings.ToLower(p.Typed) == p.Typed {
			typed = append(typed, p.Typed)
		}
	}
	if len(typed) == 0 {
		b.Fatal("no 8-letter misspellings")
	}
	return typed
}

// BenchmarkCorrect8 corrects 8-letter misspellings from misspellings-dev.tsv
// against the SUBTLEX-US word list (74k words, about the 75k of the
// project's performance target) and reports median and p99 latency. The
// lexicons: flat (an in-memory trie that lists a state's edges), vellum
// (the vellum library's FST, probed one byte at a time through its public
// API, which decodes and allocates a state per call) and trie (the same
// FST bytes read by the trie package's decoder, as the engine does).
// The trie is also searched with the previous depth-first widest pass
// (trie-depthfirst; the widest pass restricted by skelFilter walks
// depth-first anyway, so this now differs from trie only in a second
// pass whose budget is Options.MaxCost), and both with the engine's cap
// (-cap);
// trie-cap-rowbound is the search before the letters-below bound (row
// minimum only, the previous cap of 15,000 states entered),
// trie-cap-noparent the search without the check of parentBound
// (parentbound.go) before a child's row is computed, and
// trie-cap-wholewide the previous widest pass (the whole lexicon, not
// only the words skelFilter keeps, skeleton.go), trie-cap-onewalk the
// widest pass in one walk with the keys as a filter instead of the keys'
// walk and then the weighted one (keywalk.go), trie-cap-midwhole the
// previous passes after the narrow one (the middle pass over the whole
// lexicon, then the widest pass, instead of the keys' pass, keysPass).
// Besides
// latency (wall and, where the thread's CPU clock is read, CPU time of
// the calling thread, which other processes disturb less) it reports the
// states visited and the DP rows computed per word, which do not depend
// on the machine's load.
func BenchmarkCorrect8(b *testing.B) {
	d := corpus(b)
	typed := eightLetterTyped(b)
	lexicons := []struct {
		name string
		lex  interface {
			Lexicon
			AppendWord([]byte, uint32) []byte
		}
		words      []string
		depthFirst bool
		cap        int
		rowBound   bool // the previous bound: no letters-below table
		noParent   bool // the previous search: no parentBound check
		fullWide   bool // the previous widest pass: the whole lexicon
		oneWalk    bool // the previous widest pass: one walk, the keys as a filter
		midWhole   bool // the previous passes: the whole lexicon's middle pass, then the widest
	}{
		{"flat", newFlatLex(d.subtlexLex), d.subtlexLex, false, 0, false, false, false, false, false},
		{"vellum", newVellumLex(b, d.subtlexLex), d.subtlexLex, false, 0, false, false, false, false, false},
		{"trie", newTrieLex(b, d.subtlexLex), d.subtlexLex, false, 0, false, false, false, false, false},
		{"trie-depthfirst", newTrieLex(b, d.subtlexLex), d.subtlexLex, true, 0, false, false, false, false, false},
		{"trie-cap", newTrieLex(b, d.subtlexLex), d.subtlexLex, false, benchCap, false, false, false, false, false},
		{"trie-cap-wholewide", newTrieLex(b, d.subtlexLex), d.subtlexLex, false, benchCap, false, false, true, false, false},
		{"trie-cap-onewalk", newTrieLex(b, d.subtlexLex), d.subtlexLex, false, benchCap, false, false, false, true, false},
		{"trie-cap-midwhole", newTrieLex(b, d.subtlexLex), d.subtlexLex, false, benchCap, false, false, false, false, true},
		{"trie-cap-noparent", newTrieLex(b, d.subtlexLex), d.subtlexLex, false, benchCap, false, true, false, false, false},
		{"trie-depthfirst-cap", newTrieLex(b, d.subtlexLex), d.subtlexLex, true, benchCap, false, false, false, false, false},
		{"trie-cap-rowbound", newTrieLex(b, d.subtlexLex), d.subtlexLex, false, prevBenchCap, true, false, false, false, false},
	}
	for _, l := range lexicons {
		b.Run(l.name, func(b *testing.B) {
			c, err := New(l.lex, d.unigramScorer(l.words), Options{MaxStates: l.cap})
			if err != nil {
				b.Fatal(err)
			}
			c.depthFirst = l.depthFirst
			c.noParent = l.noParent
			c.fullWide = l.fullWide
			c.oneWalk = l.oneWalk
			c.midWhole = l.midWhole
			if l.rowBound {
				c.below, c.capRows = nil, false
			}
			runtime.LockOSThread()
			defer runtime.UnlockOSThread()
			var buf []Candidate
			var lat, cpu []time.Duration
			cands, i := 0, 0
			b.ReportAllocs()
			for b.Loop() {
				w := typed[i%len(typed)]
				i++
				start, cpu0 := time.Now(), threadClock()
				buf, _ = c.Correct(w, nil, 3, buf)
				cpu = append(cpu, threadClock()-cpu0)
				lat = append(lat, time.Since(start))
			}
			var states, rows []int
			for _, w := range typed {
				cands += len(c.lastHits(w))
				st, r := c.work(w)
				states = append(states, st)
				rows = append(rows, r)
			}
			slices.Sort(states)
			slices.Sort(rows)
			b.ReportMetric(float64(states[len(states)/2]), "states-median")
			b.ReportMetric(float64(states[len(states)*99/100]), "states-p99")
			b.ReportMetric(float64(rows[len(rows)/2]), "rows-median")
			b.ReportMetric(float64(rows[len(rows)*9/10]), "rows-p90")
			b.ReportMetric(float64(rows[len(rows)*99/100]), "rows-p99")
			slices.Sort(lat)
			b.ReportMetric(float64(lat[len(lat)/2].Nanoseconds()), "median-ns")
			b.ReportMetric(float64(lat[len(lat)*99/100].Nanoseconds()), "p99-ns")
			slices.Sort(cpu)
			b.ReportMetric(float64(cpu[len(cpu)/2].Nanoseconds()), "cpu-median-ns")
			b.ReportMetric(float64(cpu[len(cpu)*99/100].Nanoseconds()), "cpu-p99-ns")
			b.ReportMetric(float64(cands)/float64(len(typed)), "candidates/word")
		})
	}
}

// benchCap is the cap of the -cap runs: the engine's default
// (keyloom.DefaultCorrectionStates, which this package cannot import).
const benchCap = 25000

// prevBenchCap is the engine's previous default, 15,000 states entered,
// used by trie-cap-rowbound: the search before the letters-below bound
// (below.go), kept selectable as the baseline.
const prevBenchCap = 15000

// work returns the lexicon states one correction of w visits and the DP
// rows it computes (deterministic; not timed).
func (c *Corrector) work(w string) (states, rows int) {
	var sc scratch
	id, inLex := c.lex.ID(w)
	sc.rk.start(c, nil, id, inLex, 8, nil)
	widest, _ := c.widestPass(w, id, inLex, inLex)
	_, states = c.searchUpTo(&sc.s, &sc.rk, w, widest, !c.depthFirst)
	return states, sc.s.rowsDone
}

// lastHits re-runs the widest search for w and returns the words found
// within budget (for the candidates/word metric; not timed).
func (c *Corrector) lastHits(w string) []hit {
	var s search
	s.reset(c.ch, c.lex, w, float32(c.opts.MaxCost), len(w)+maxExtra)
	s.run()
	return s.hits
}

// BenchmarkWidePass times the widest pass alone (13 nats, no cap) over
// the 8-letter misspellings of BenchmarkCorrect8 and the trie lexicon,
// walked depth-first and best-first with the row-minimum bound, and
// best-first with the letters-below bound (below.go), and reports the
// time per state each walk enters (best-first: per prefix queued), the
// states and the DP rows per word.
func BenchmarkWidePass(b *testing.B) {
	d := corpus(b)
	typed := eightLetterTyped(b)
	lex := newTrieLex(b, d.subtlexLex)
	c, err := New(lex, d.unigramScorer(lex.words), Options{})
	if err != nil {
		b.Fatal(err)
	}
	for _, v := range []struct {
		name             string
		bestFirst, below bool
	}{{"depthfirst", false, false}, {"bestfirst", true, false}, {"bestfirst-below", true, true}} {
		bestFirst := v.bestFirst
		b.Run(v.name, func(b *testing.B) {
			var s search
			if v.below {
				s.below = c.below
			}
			states, rows, i := 0, 0, 0
			b.ReportAllocs()
			for b.Loop() {
				w := typed[i%len(typed)]
				i++
				s.reset(c.ch, lex, w, float32(c.opts.MaxCost), len(w)+maxExtra)
				if bestFirst {
					s.runBest()
				} else {
					s.run()
				}
				states += s.visited
				rows += s.examined
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(max(states, 1)), "ns/state")
			b.ReportMetric(float64(states)/float64(i), "states/word")
			b.ReportMetric(float64(rows)/float64(i), "rows/word")
		})
	}
}

// BenchmarkCorrect8Easy corrects, with the engine's cap, only the 8-letter
// misspellings of BenchmarkCorrect8 whose DP rows (Corrector.work) are at
// or below the median: the words that set the median latency, for
// profiling them apart from the long tail. It reports the mean time per
// word and the typed-word setup alone (prepare) per word, and the words
// taken and their most rows. The rows are counted with the previous
// passes (midWhole): the keys' pass computes few weighted rows and does
// not count its keys' walk, so by its rows the set would take 8 words
// that reach it (round 16) instead of the one reaching the middle pass.
func BenchmarkCorrect8Easy(b *testing.B) {
	d := corpus(b)
	lex := newTrieLex(b, d.subtlexLex)
	c, err := New(lex, d.unigramScorer(d.subtlexLex), Options{MaxStates: benchCap})
	if err != nil {
		b.Fatal(err)
	}
	all := eightLetterTyped(b)
	rows := make([]int, len(all))
	c.midWhole = true // choose the words by the previous passes' rows
	for i, w := range all {
		_, rows[i] = c.work(w)
	}
	c.midWhole = false
	sorted := slices.Clone(rows)
	slices.Sort(sorted)
	med := sorted[len(sorted)/2]
	var easy []string
	for i, w := range all {
		if rows[i] <= med {
			easy = append(easy, w)
		}
	}
	b.Run("correct", func(b *testing.B) {
		var buf []Candidate
		i := 0
		b.ReportAllocs()
		for b.Loop() {
			buf, _ = c.Correct(easy[i%len(easy)], nil, 3, buf)
			i++
		}
		b.ReportMetric(float64(len(easy)), "words")
		b.ReportMetric(float64(med), "rows-max")
	})
	b.Run("prepare", func(b *testing.B) {
		var s search
		s.below = c.below
		i := 0
		b.ReportAllocs()
		for b.Loop() {
			s.reset(c.ch, c.lex, easy[i%len(easy)], float32(c.opts.MaxCost), len(easy[i%len(easy)])+maxExtra)
			i++
		}
	})
}

// BenchmarkParentBound compares, in one process, the search with and
// without the parentBound check (parentbound.go) on the 8-letter
// misspellings of BenchmarkCorrect8 with the engine's cap (see
// compareSearches). Run it for a few passes of each search:
// -benchtime=6x the 305 words.
func BenchmarkParentBound(b *testing.B) {
	compareSearches(b, [2]string{"without", "with"}, func(c *Corrector, m int) { c.noParent = m == 0 })
}

// BenchmarkMidPassRef compares, in one process, the previous trigger of
// the widest pass (the middle pass ends the search at passRefLogProb)
// with midPassRefLogProb on the 8-letter misspellings of
// BenchmarkCorrect8 with the engine's cap (see compareSearches). Run it
// for a few passes of each: -benchtime=6x the 305 words.
func BenchmarkMidPassRef(b *testing.B) {
	compareSearches(b, [2]string{"previous", "new"}, func(c *Corrector, m int) {
		c.midRef = 0
		if m == 0 {
			c.midRef = passRefLogProb
		}
	})
}

// BenchmarkSkeletonPass compares, in one process, the previous widest
// pass (the whole lexicon within the budget, best-first) with the one
// restricted by skelFilter (skeleton.go) on the 8-letter misspellings of
// BenchmarkCorrect8 with the engine's cap (see compareSearches). Run it
// for a few passes of each: -benchtime=6x the 305 words.
func BenchmarkSkeletonPass(b *testing.B) {
	compareSearches(b, [2]string{"whole", "skeleton"}, func(c *Corrector, m int) { c.fullWide = m == 0 })
}

// BenchmarkKeyWalk compares, in one process, the widest pass in one walk
// with the keys as a filter and in two (keywalk.go): see compareSearches.
func BenchmarkKeyWalk(b *testing.B) {
	compareSearches(b, [2]string{"onewalk", "twowalks"}, func(c *Corrector, m int) { c.oneWalk = m == 0 })
}

// compareSearches corrects the 8-letter misspellings of BenchmarkCorrect8
// with the engine's cap under two settings of the corrector (set puts
// setting m, 0 or 1, in place), one whole pass over the list with each
// setting after the other, and keeps each word's least CPU time per
// setting (so that the load of other processes, which moves whole
// benchmark runs by ±20 % on this project's shared machine, falls on
// both alike). It reports both settings' median, p99 and mean of those
// times and the median over words of their ratio (setting 1 / setting 0).
func compareSearches(b *testing.B, names [2]string, set func(c *Corrector, m int)) {
	b.Helper()
	c, typed := cappedCorrector(b)
	runtime.LockOSThread()
	defer runtime.UnlockOSThread()
	best := pairedBest(len(typed))
	var buf []Candidate
	k := 0
	b.ReportAllocs()
	for b.Loop() {
		i, m := k%len(typed), (k/len(typed))%2
		k++
		set(c, m)
		cpu0 := threadClock()
		buf, _ = c.Correct(typed[i], nil, 3, buf)
		best[m][i] = min(best[m][i], threadClock()-cpu0)
	}
	if k < 2*len(typed) {
		b.Logf("%d words corrected, fewer than a pass with each setting; no figures", k)
		return
	}
	reportPaired(b, names, best)
}

// pairedBest returns two lists of n least times (one per setting of a
// paired benchmark), each starting at the largest duration.
func pairedBest(n int) [2][]time.Duration {
	var best [2][]time.Duration
	for m := range best {
		best[m] = make([]time.Duration, n)
		for i := range best[m] {
			best[m][i] = 1<<63 - 1
		}
	}
	return best
}

// reportPaired reports, for each of the two settings of a paired
// benchmark, the median, p99 and mean of its least times per word, and
// the median over words of their ratio (setting 1 / setting 0).
func reportPaired(b *testing.B, names [2]string, best [2][]time.Duration) {
	b.Helper()
	var ratio []float64
	for i := range best[0] {
		ratio = append(ratio, float64(best[1][i])/float64(best[0][i]))
	}
	slices.Sort(ratio)
	for m, name := range names {
		x := slices.Clone(best[m])
		var sum time.Duration
		for _, v := range x {
			sum += v
		}
		slices.Sort(x)
		b.ReportMetric(float64(x[len(x)/2].Nanoseconds()), name+"-cpu-median-ns")
		b.ReportMetric(float64(x[len(x)*99/100].Nanoseconds()), name+"-cpu-p99-ns")
		b.ReportMetric(float64(sum.Nanoseconds())/float64(len(x)), name+"-cpu-mean-ns")
	}
	b.ReportMetric(ratio[len(ratio)/2], "ratio-median")
}

// BenchmarkPasses measures, for the 8-letter misspellings of
// BenchmarkCorrect8 with the engine's cap, the widening passes of
// searchUpTo one by one: the pass each word ends in, the prefixes each
// pass examines and its thread CPU time (each word's least over the
// loop's rounds), and the typed-word setup (prepare) apart. It reports
// the share of words reaching each pass, rows and time per pass (median
// over the words that run it), and the share of the time of words ending
// in a wider pass that goes to the narrower passes' prefixes, which the
// wider pass walks again. The second pass is the keys' pass (keysPass)
// for the words that get it, which then reach no third pass. Run it for
// a few rounds: -benchtime=3x.
func BenchmarkPasses(b *testing.B) {
	c, typed := cappedCorrector(b)
	runtime.LockOSThread()
	defer runtime.UnlockOSThread()
	const passes = 3
	type wordPass struct {
		last int // index of the last pass run
		rows [passes]int
		cpu  [passes]time.Duration
		prep time.Duration
	}
	per := make([]wordPass, len(typed))
	for i := range per {
		for p := range per[i].cpu {
			per[i].cpu[p] = 1<<63 - 1
		}
		per[i].prep = 1<<63 - 1
	}
	o := &c.opts
	var sc scratch
	b.ReportAllocs()
	for b.Loop() {
		// The passes as searchUpTo runs them, each timed apart.
		for i, w := range typed {
			id, inLex := c.lex.ID(w)
			sc.rk.start(c, nil, id, inLex, 8, sc.rk.top)
			widest, _ := c.widestPass(w, id, inLex, inLex)
			s := &sc.s
			s.below, s.capRows = c.below, c.capRows
			s.prepCh = nil
			t0 := threadClock()
			s.reset(c.ch, c.lex, w, float32(firstPass), len(w)+maxExtra)
			per[i].prep = min(per[i].prep, threadClock()-t0)
			used, last := 0, 0.0
			for p, budget := range [...]float64{firstPass, secondPass, o.MaxCost} {
				budget = min(budget, widest, o.MaxCost)
				if budget <= last || used >= o.MaxStates {
					break
				}
				last = budget
				keys := p == 1 && c.keysAfterNarrow(widest)
				if keys {
					budget = min(widest, o.MaxCost)
				}
				t0 := threadClock()
				s.reset(c.ch, c.lex, w, float32(budget), len(w)+maxExtra)
				s.limit = o.MaxStates - used
				s.rk = &sc.rk
				if keys {
					c.keysPass(s, &sc.rk, w)
				} else {
					c.runPass(s, w, p, budget, true)
				}
				per[i].cpu[p] = min(per[i].cpu[p], threadClock()-t0)
				per[i].rows[p] = s.spent()
				per[i].last = p
				used += s.spent()
				if keys || budget >= min(widest, o.MaxCost) || len(sc.rk.top) > 0 && sc.rk.top[0].Score >= c.passRef(p) {
					break
				}
			}
		}
	}
	median := func(x []float64) float64 {
		if len(x) == 0 {
			return 0
		}
		slices.Sort(x)
		return x[len(x)/2]
	}
	var prep []float64
	for _, wp := range per {
		prep = append(prep, float64(wp.prep.Nanoseconds()))
	}
	b.ReportMetric(median(prep), "prepare-median-ns")
	for p := range passes {
		var rows, cpu, rewalk []float64
		ends := 0
		for _, wp := range per {
			if wp.last == p {
				ends++
			}
			if wp.last < p {
				continue
			}
			rows = append(rows, float64(wp.rows[p]))
			cpu = append(cpu, float64(wp.cpu[p].Nanoseconds()))
			if wp.last == p && p > 0 {
				// Of this word's search time, the share the narrower
				// passes' prefixes take again in pass p (pass p-1's
				// time, which re-walked pass p-2's): an estimate.
				var total time.Duration
				for q := 0; q <= p; q++ {
					total += wp.cpu[q]
				}
				rewalk = append(rewalk, float64(wp.cpu[p-1])/float64(total+wp.prep))
			}
		}
		name := [...]string{"p1", "p2", "p3"}[p]
		b.ReportMetric(float64(len(rows))/float64(len(per)), name+"-reached")
		b.ReportMetric(float64(ends)/float64(len(per)), name+"-ends")
		b.ReportMetric(median(rows), name+"-rows-median")
		b.ReportMetric(median(cpu), name+"-cpu-median-ns")
		if p > 0 {
			b.ReportMetric(median(rewalk), name+"-rewalk-share-median")
		}
	}
	// Whole search time per word: median and p99, and the share of the
	// median word's time that re-walks.
	var tot []float64
	for _, wp := range per {
		t := wp.prep
		for q := 0; q <= wp.last; q++ {
			t += wp.cpu[q]
		}
		tot = append(tot, float64(t.Nanoseconds()))
	}
	slices.Sort(tot)
	b.ReportMetric(tot[len(tot)/2], "search-median-ns")
	b.ReportMetric(tot[len(tot)*99/100], "search-p99-ns")
}

// cappedCorrector returns a corrector over the SUBTLEX-US trie lexicon
// with the engine's cap and the 8-letter misspellings of BenchmarkCorrect8.
func cappedCorrector(b *testing.B) (*Corrector, []string) {
	b.Helper()
	d := corpus(b)
	c, err := New(newTrieLex(b, d.subtlexLex), d.unigramScorer(d.subtlexLex), Options{MaxStates: benchCap})
	if err != nil {
		b.Fatal(err)
	}
	return c, eightLetterTyped(b)
}
