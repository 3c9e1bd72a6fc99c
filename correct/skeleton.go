package correct

// The widest search pass and the kinds of error it is for. Under the
// package's 5-fold cross-validation on corpora/misspellings-dev.tsv (each
// fold's error model trained on the other four), 19 words owed their
// top-3 hit to the widest pass (the intended word 9 to 13 nats away),
// and they were mostly two plain edits from the intended word: vowel
// trouble with at most one consonant wrong ("resteraunt", "exerternal",
// "maintinaing") or scrambled letters ("hvea", "lveo", "thigsn"); the
// root package's simulated typist adds double keyboard slips. Of the
// 49 dev pairs whose intended word costs 9 to 13 nats, 46 have a
// consonant skeleton (below) within one plain edit of the typed word's,
// 38 are within two plain edits of the typed word, 48 one or the other;
// but only 5 are within one plain edit (measured, this project;
// BENCHMARKS.md). So the widest pass looks only there (skelFilter): keys
// of a different kind from the weighted channel, cheap to check on each
// prefix of the walk, which computes the channel's exact cost of every
// word they keep. Since round 16 the middle budget's words of an unknown
// word are searched under the same keys, in the same walk (keysPass,
// corrector.go).

// The consonant skeleton of a word: its bytes without the vowels a e i o
// u, y, h and w, and with a byte equal to the skeleton's previous one left
// out ("resteraunt" and "restaurant" → rstrnt; "banana" → bn).

// inSkeleton reports whether byte c belongs to a word's consonant
// skeleton.
func inSkeleton(c byte) bool {
	// One shift instead of a switch: the bits of the left-out letters,
	// from 'a' up; a byte below 'a' wraps to a shift of 64 or more (no
	// bit, in Go), and one above 'y' finds none either.
	const out = uint64(1)<<('a'-'a') | 1<<('e'-'a') | 1<<('i'-'a') | 1<<('o'-'a') |
		1<<('u'-'a') | 1<<('y'-'a') | 1<<('h'-'a') | 1<<('w'-'a')
	return out>>(c-'a')&1 == 0
}

// appendSkeleton appends the consonant skeleton of w to dst.
func appendSkeleton(dst []byte, w string) []byte {
	start := len(dst)
	for i := 0; i < len(w); i++ {
		c := w[i]
		if !inSkeleton(c) || len(dst) > start && dst[len(dst)-1] == c {
			continue
		}
		dst = append(dst, c)
	}
	return dst
}

// skelFilter restricts a depth-first walk to the words whose consonant
// skeleton is within one plain edit (insertion, deletion, substitution or
// swap of adjacent bytes: the optimal string alignment distance) of the
// typed word's, and to the words within plainEdits plain edits of the
// typed word itself. For each key it keeps the unit-cost DP rows of the
// path against the typed key (unitRows; for the skeleton one row per
// skeleton byte, for the word one per byte) and, by depth, whether a word
// below may still be within reach of it. Cost per step: for each key
// still within reach, one row as bit vectors (bitrows.go: a few word
// operations per edit allowed) and a test of the row against the
// letters and lengths below (unitRows.reach). It walks with the search
// (search.skel), which computes the channel's exact costs of the words
// it keeps.
type skelFilter struct {
	skel    unitRows    // the skeleton's rows, by skeleton bytes walked
	plain   unitRows    // the word's rows, by depth
	k       []int32     // by depth: skeleton bytes of the path to that depth
	skelOK  []bool      // by depth: a word below may have a skeleton in reach
	plainOK []bool      // by depth: a word below may be within plainEdits
	skMiss  []uint32    // by depth: the typed skeleton's letters missing below, when skelOK
	skRest  []uint8     // by depth: the longest skeleton tail below (restLens.skel), when skelOK
	skMask  [][4]uint64 // by skeleton bytes walked: the byte mask (mask) of keyTrie.skelWalk
	skLead  []uint32    // by skeleton bytes walked: the letters of skMask and of the skeleton's last byte (setSkMask)
	buf     []byte      // the typed skeleton
	tw      []byte      // the typed word
}

// skelEdits is how many plain edits from the typed word's skeleton the
// skeleton of a word the widest pass keeps may be. In the package's
// cross-validation (the skeleton as the only key) two edits found 2,105
// of 2,173 top-3 hits against one edit's 2,106, the larger candidate
// lists crowding out right ones; with the plain key beside it, allowing
// two edits from skeletons of 6, 7 or 8 letters up changed nothing
// (measured, this project; BENCHMARKS.md).
const skelEdits = 1

// shortSkeleton is the longest typed skeleton that a kept word's skeleton
// must match exactly (no edit): one edit from a skeleton of one or two
// consonants lets through most words of one to three consonants
// ("harrases" → rs, "wherease" → rs, "athenean" → tn), which made them the
// slowest words of the keys' walk (about 15,000 children stepped into and
// a 7,400-node trie for "harrases"); after that, three-consonant
// skeletons ("assasins" → sns, "anyother" → ntr) were the slowest (10,700
// to 13,800 steps). At 2, package cross-validation on
// corpora/misspellings-dev.tsv (5 and 10 folds) and the engine's (5 and
// 10 folds) found the same top-1 and top-3 counts as with one edit. At 3
// each lost one word of top-3 and of top-1 (engine 5 folds 2,115 to
// 2,114 of 2,173, 10 folds 2,116 to 2,115; package 5 folds 2,114 to
// 2,113), the typist of the root tests repaired 86.82 % instead of
// 86.78 %, and the CPU p99 of BenchmarkCorrect8/trie-cap fell from
// 0.98-1.05 ms to 0.88-0.90 ms (3 pairs in turn): the p99 goal of 1 ms
// met with room on a loaded machine, for one word of the five above the
// 97 % goal (measured, this project; BENCHMARKS.md, rounds 16 and 17).
const shortSkeleton = 3

// skelEditsFor returns how many plain edits from a typed skeleton of n
// bytes a kept word's skeleton may be: skelEdits, or none for a skeleton
// of at most shortSkeleton bytes.
func skelEditsFor(n int) uint8 {
	if n <= shortSkeleton {
		return 0
	}
	return skelEdits
}

// plainEdits is how many plain edits from the typed word a word the
// widest pass keeps may be, whatever its skeleton: two keyboard slips
// (two neighbouring keys hit, say) can take a short word's skeleton two
// edits away, and the simulated typist of the root package's tests
// (TestTypistHeldOut) makes them often: with the skeleton alone it
// repaired 85.1 % of its corrupted words instead of 86.6 % (measured,
// this project; BENCHMARKS.md). Two edits are also the usual reach of a
// candidate generator (common practice, no source).
const plainEdits = 2

// reset prepares the filter for typed (lower-cased) and walks of at most
// maxDepth bytes.
func (f *skelFilter) reset(typed string, maxDepth int) {
	f.buf = appendSkeleton(f.buf[:0], typed)
	f.skel.reset(f.buf, maxDepth, skelEditsFor(len(f.buf)))
	f.tw = append(f.tw[:0], typed...)
	f.plain.reset(f.tw, maxDepth, plainEdits)
	f.k = grow(f.k, maxDepth+1)
	f.k[0] = 0
	f.skelOK = grow(f.skelOK, maxDepth+1)
	f.plainOK = grow(f.plainOK, maxDepth+1)
	f.skelOK[0], f.plainOK[0] = true, true
	f.skMiss = grow(f.skMiss, maxDepth+1)
	f.skRest = grow(f.skRest, maxDepth+1)
	f.skMiss[0] = ^uint32(0) // no reach test at the empty prefix
	f.skMask = grow(f.skMask, f.skel.nrows)
	f.skLead = grow(f.skLead, f.skel.nrows)
}

// step extends the path at depth d by byte c to depth d+1; below is the
// set of letters (belowBit) on the paths below the new prefix and rest
// the lengths of the rests below it (restLens). It reports false when no
// word below can be kept: for each key, the distance of every word below
// is over its limit (by unitRows.reach). A key once out of reach stays so
// below (the words below a prefix are among those below its parent), and
// its rows are no longer computed.
func (f *skelFilter) step(d int, c byte, below uint32, rest restLens) bool {
	return f.stepPlain(d, c, below, rest, f.plainOK[d])
}

// stepPlain is step with p in place of f.plainOK[d]: false when the plain
// key is out of reach at depth d+1 whatever its row (keyTrie.keyWalk
// passes false for a byte out of the plain key's own mask, plainMask),
// which spares the plain key's row.
func (f *skelFilter) stepPlain(d int, c byte, below uint32, rest restLens, p bool) bool {
	if p {
		f.plain.push(d, c)
		p = f.plain.reach(d+1, below, rest.min, rest.max)
	}
	f.plainOK[d+1] = p
	k := int(f.k[d])
	sk := f.skelOK[d]
	if sk {
		moved := false
		if inSkeleton(c) && (k == 0 || f.skel.path[k-1] != c) && k+1 < f.skel.nrows {
			f.skel.push(k, c)
			k++
			moved = true
		}
		miss := f.skel.tall &^ below
		// A byte the skeleton leaves out, with the same letters missing
		// below and the same longest skeleton tail, gives the answer of
		// reach the parent had, which let it through.
		if moved || miss != f.skMiss[d] || rest.skel != f.skRest[d] {
			sk = f.skel.reach(k, below, 0, rest.skel)
		}
		f.skMiss[d+1], f.skRest[d+1] = miss, rest.skel
	}
	f.k[d+1] = int32(k)
	f.skelOK[d+1] = sk
	return p || sk
}

// mask returns a superset of the bytes c for which step(d, c, ·) can
// report true, so that the walk can skip the other children of a prefix
// without a step each: a key within reach lets through every byte while
// it has an edit to spare, else only the typed bytes its row can match
// (or swap) next; the skeleton also lets through the bytes that leave it
// as it is.
func (f *skelFilter) mask(d int) (m [4]uint64) {
	all := [4]uint64{^uint64(0), ^uint64(0), ^uint64(0), ^uint64(0)}
	if f.plainOK[d] && f.plain.nextMask(d, &m) {
		return all
	}
	if f.skelOK[d] {
		k := int(f.k[d])
		if f.skel.nextMask(k, &m) {
			return all
		}
		for i := range m {
			m[i] |= notSkeleton[i]
		}
		if k > 0 {
			c := f.skel.path[k-1]
			m[c>>6] |= 1 << (c & 63)
		}
	}
	return m
}

// plainMask returns mask's bytes for the plain key alone, with all true
// when it lets through every byte: a byte out of it leaves the plain key
// out of reach at depth d+1 (unitRows.nextMask), so that its row need not
// be computed. The plain key must be within reach at depth d.
func (f *skelFilter) plainMask(d int) (m [4]uint64, all bool) {
	all = f.plain.nextMask(d, &m)
	return m, all
}

// notSkeleton is the set of bytes inSkeleton rejects.
var notSkeleton = func() (m [4]uint64) {
	for c := range 256 {
		if !inSkeleton(byte(c)) {
			m[c>>6] |= 1 << (c & 63)
		}
	}
	return m
}()

// accepts reports whether the word spelled by the path to depth d is
// kept.
func (f *skelFilter) accepts(d int) bool {
	return f.skelOK[d] && f.skel.final(int(f.k[d])) || f.plainOK[d] && f.plain.final(d)
}
