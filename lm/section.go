package lm

import (
	"encoding/binary"
	"fmt"
	"math"
	"slices"

	"github.com/keyloom/keyloom/internal/format"
)

// Layout of an n-gram section (all little-endian; see FORMAT.md in this directory):
//
//	header   40 bytes: version, order, vocab size, quantization bits, top-list
//	                   length, IDs of <s>, </s>, <unk>, directory length, zero
//	directory 32 bytes per array: tag, width, count, offset, words
//	arrays   8-byte aligned packed vectors (64-bit words, one spare word each)
const (
	// sectionVersion is the newest layout written. Version 3 stores the
	// highest order of a suffix-closed model as ranks among the successors
	// of each context's suffix (ranked records, ranked.go); version 4 adds
	// the words of the orders between the unigrams and the highest order as
	// one Elias-Fano code per successor group (efgroup.go); version 5 lets
	// each group of ranked records code its ranks so too when that is
	// shorter; version 6 stores the highest order's counts instead of its
	// probability codes (counted.go) when the model carries them. Version 5
	// is written for suffix-closed models without counts, version 2
	// (Elias-Fano successor starts, plain word IDs) for models that are not
	// suffix-closed or of order below 3; versions 1 to 5 are still read and
	// can be written on request.
	sectionVersion = 6
	headerSize     = 40
	dirEntrySize   = 32
	// TopListLen is the number of best successors kept in probability order
	// for every context with more successors than that.
	TopListLen = 8
	// topListMin is the group length above which a version-3 context has a
	// top list (versions 1 and 2: TopListLen). Shorter groups are scanned,
	// which costs little next to the lists' bytes.
	topListMin = 32
	// treeFanout is the branching factor of the unigram maximum tree.
	treeFanout = 32
)

// Array tags: kind<<8 | order.
const (
	tagProbBook  = 1
	tagBowBook   = 2
	tagWords     = 3
	tagProbs     = 4
	tagHas       = 5 // per entry: has successors at the next order
	tagHasRank   = 6
	tagStart     = 7  // per context: first successor (context count + 1 values); version 1
	tagStartLow  = 12 // Elias-Fano low bits of the starts (version 2)
	tagStartHigh = 13 // Elias-Fano high bits (width 1)
	tagStartSel  = 14 // Elias-Fano select samples
	tagBow       = 8  // per context: back-off weight code
	tagBig       = 9  // per context: has a top list
	tagBigRank   = 10
	tagTop       = 11 // top lists: offsets inside the successor group
	tagTree      = 16 // 16+level: unigram maximum tree
	tagRecords   = 40 // highest order of a version-3 section: rank and probability code per entry
	tagRecCount  = 41 // number of entries in the ranked records
	tagGroups    = 42 // orders 2..N−1 of a version-4 or -5 section: the words as Elias-Fano groups
	tagGroupLow  = 43 // Elias-Fano low bits of the groups' bit offsets (parent order)
	tagGroupHigh = 44 // their high bits
	tagGroupSel  = 45 // their select samples
)

func tag(kind, order int) uint32 { return uint32(kind<<8 | order) }

// LayoutOptions controls AppendSection.
type LayoutOptions struct {
	// QuantBits is the code width of log-probabilities and back-off weights:
	// 4..16 quantizes through per-order codebooks, 0 stores float64 values
	// losslessly. The zero value means lossless; build tools default to 8.
	QuantBits int
	// Version selects the layout version: 0 means the newest one the model
	// allows (6 for a suffix-closed model of order ≥ 3 that carries its
	// highest order's counts, as Estimate's do; 5 for other suffix-closed
	// models of order ≥ 3; else 2); 1 to 5 write the older layouts (plain
	// successor starts; plain word IDs at every order; plain word IDs below
	// the ranked highest order; ranks always of fixed width; probability
	// codes at the highest order), for compatibility tests and comparisons.
	// A model without counts is written as version 5 when 6 is asked for,
	// and one that is not suffix-closed, or of order below 3, as version 2
	// when 3 to 6 is.
	Version int
}

type arr struct {
	tag   uint32
	width uint
	n     int
	words []uint64
}

// AppendSection lays b out as an n-gram section and appends it to dst.
func AppendSection(dst []byte, b *Backoff, opts LayoutOptions) ([]byte, error) {
	q := opts.QuantBits
	version := uint32(sectionVersion)
	switch opts.Version {
	case 0, 6:
	case 1, 2, 3, 4, 5:
		version = uint32(opts.Version)
	default:
		return nil, fmt.Errorf("%w: layout version %d", ErrSectionVersion, opts.Version)
	}
	if q != 0 && (q < 4 || q > 16) {
		return nil, fmt.Errorf("%w: %d (want 0 or 4..16)", ErrQuantBits, q)
	}
	N := b.Order()
	if N < 1 || N > MaxOrder {
		return nil, fmt.Errorf("%w: %d", ErrOrder, N)
	}
	V := len(b.Vocab)
	if V > MaxVocab {
		return nil, ErrVocabTooLarge
	}
	bos, eos, unk := b.specials()
	var arrs []arr
	add := func(t uint32, width uint, vals []uint64) {
		arrs = append(arrs, arr{tag: t, width: width, n: len(vals), words: packVec(vals, width)})
	}
	wbits := bitsFor(uint64(max(V-1, 0)))
	// Version 6: the highest order as counted records, when the model
	// carries its counts; it needs no probability codes there.
	var recs bitStream
	var recStart []uint64
	var bowW []float64 // version 6: weights of the order N − 1 back-off codebook
	if version == 6 {
		ok := N >= 3
		if ok {
			bowW = make([]float64, b.Levels[N-2].Len())
			recs, recStart, ok = rankRecords(b, nil, 0, 6, bowW)
		}
		if !ok {
			version = 5
		}
	}
	counted := version == 6
	// Probability codebooks and codes of every level, computed once: a
	// level's codes are also needed to order its parent's top lists.
	books := make([]codebook, N)
	allCodes := make([][]uint64, N)
	for n := range N {
		if counted && n == N-1 {
			break
		}
		lv := &b.Levels[n]
		if q > 0 {
			books[n] = trainCodebook(lv.LogP, q)
		}
		allCodes[n] = make([]uint64, lv.Len())
		for i, x := range lv.LogP {
			allCodes[n][i] = books[n].encode(x)
		}
	}
	// Versions 3 to 5: the highest order as ranked records, when the model allows.
	if version >= 3 && version <= 5 {
		var ok bool
		recs, recStart, ok = rankRecords(b, allCodes[N-1], books[N-1].width(), int(version), nil)
		if !ok {
			version = 2
		}
	}
	ranked := version >= 3
	grouped := version >= 4 // orders 2..N−1 as word groups
	topMin := TopListLen
	if version >= 3 {
		topMin = topListMin
	}
	var unigramCodes []uint64
	var probBook0 codebook
	for n := 1; n <= N; n++ {
		lv := &b.Levels[n-1]
		pb, codes := books[n-1], allCodes[n-1]
		var bb codebook
		if q > 0 {
			if counted && n == N-1 {
				// The weights of these contexts also scale every
				// highest-order probability (counted.go).
				var vals, wts []float64
				for i, w := range bowW {
					if w > 0 {
						vals, wts = append(vals, lv.Bow[i]), append(wts, w)
					}
				}
				bb = trainWeightedCodebook(append(vals, 0), append(wts, 1), q)
			} else {
				var bows []float64
				for i, x := range lv.Bow {
					if x != 0 || (n < N && hasChildren(b, n, i)) {
						bows = append(bows, x)
					}
				}
				bb = trainCodebook(append(bows, 0), q)
			}
			if !counted || n < N {
				add(tag(tagProbBook, n), 64, floatBits(pb))
			}
			add(tag(tagBowBook, n), 64, floatBits(bb))
		}
		switch {
		case n == 1:
			unigramCodes, probBook0 = codes, pb
		case n == N && ranked:
			arrs = append(arrs, arr{tag: tag(tagRecords, n), width: 1, n: int(recs.n), words: recs.words()})
			add(tag(tagRecCount, n), 64, []uint64{uint64(lv.Len())})
			if counted {
				add(tag(tagDiscounts, n), 64, floatBits(codebook(b.Discounts[N-1][:])))
			}
		case grouped:
			// The words are written with the parent's groups (below).
		default:
			ws := make([]uint64, lv.Len())
			for i := range ws {
				ws[i] = uint64(lv.Key(i)[n-1])
			}
			add(tag(tagWords, n), wbits, ws)
		}
		if n < N || !ranked {
			add(tag(tagProbs, n), pb.width(), codes)
		}
		if n == N {
			continue
		}
		// Successor groups of this level's entries in the next level.
		next := &b.Levels[n]
		has := make([]bool, lv.Len())
		var start, bows []uint64
		var big []bool
		var top []uint64
		maxGroup := 0
		type grp struct{ lo, hi int }
		var groups []grp
		for g := 0; g < next.Len(); {
			h := next.Key(g)[:n]
			e := g
			for e < next.Len() && equalIDs(next.Key(e)[:n], h) {
				e++
			}
			p := lv.Find(h)
			if p < 0 {
				return nil, fmt.Errorf("lm: %d-gram %v has successors but is not in the model", n, h)
			}
			has[p] = true
			groups = append(groups, grp{g, e})
			maxGroup = max(maxGroup, e-g)
			g = e
		}
		// groups are in entry order because both levels are sorted.
		nextCodes, nb := allCodes[n], books[n]
		gi := 0
		for p := range lv.Len() {
			if !has[p] {
				continue
			}
			g := groups[gi]
			gi++
			start = append(start, uint64(g.lo))
			bows = append(bows, bb.encode(lv.Bow[p]))
			isBig := g.hi-g.lo > topMin
			big = append(big, isBig)
			if isBig {
				idx := make([]int, g.hi-g.lo)
				for i := range idx {
					idx[i] = i
				}
				val := func(i int) float64 { return nb.value(nextCodes[g.lo+i]) }
				if counted && n == N-1 {
					// The order the reader's values give (topLogProb).
					vals := countedValues(b, g.lo, g.hi, bb.value(bb.encode(lv.Bow[p])), pb, codes)
					val = func(i int) float64 { return vals[i] }
				}
				slices.SortStableFunc(idx, func(x, y int) int {
					vx, vy := val(x), val(y)
					switch {
					case vx > vy:
						return -1
					case vx < vy:
						return 1
					}
					return x - y // IDs ascend inside a group
				})
				for _, i := range idx[:TopListLen] {
					top = append(top, uint64(i))
				}
			}
		}
		start = append(start, uint64(next.Len()))
		if ranked && n == N-1 {
			start = recStart // bit offsets of the groups in the ranked records
		}
		if grouped && n+1 < N {
			var gs bitStream
			var gstart []uint64
			for _, g := range groups {
				gstart = append(gstart, gs.n)
				ws := make([]uint64, g.hi-g.lo)
				for i := range ws {
					ws[i] = uint64(next.Key(g.lo + i)[n])
				}
				putGroup(&gs, ws, V)
			}
			gstart = append(gstart, gs.n)
			arrs = append(arrs, arr{tag: tag(tagGroups, n+1), width: 1, n: int(gs.n), words: gs.words()})
			lw, lb, hw, hb, sel := encodeMono(gstart, monoSampleDense)
			arrs = append(arrs, arr{tag: tag(tagGroupLow, n), width: lb, n: len(gstart), words: lw})
			arrs = append(arrs, arr{tag: tag(tagGroupHigh, n), width: 1, n: hb, words: hw})
			add(tag(tagGroupSel, n), bitsFor(uint64(hb)), sel)
		}
		hw, hs := buildRank(has)
		arrs = append(arrs, arr{tag: tag(tagHas, n), width: 1, n: len(has), words: hw})
		add(tag(tagHasRank, n), 32, hs)
		if version == 1 {
			add(tag(tagStart, n), bitsFor(uint64(next.Len())), start)
		} else {
			lw, lb, hw, hb, sel := encodeMono(start, monoSample)
			arrs = append(arrs, arr{tag: tag(tagStartLow, n), width: lb, n: len(start), words: lw})
			arrs = append(arrs, arr{tag: tag(tagStartHigh, n), width: 1, n: hb, words: hw})
			add(tag(tagStartSel, n), bitsFor(uint64(hb)), sel)
		}
		add(tag(tagBow, n), bb.width(), bows)
		bw, bs := buildRank(big)
		arrs = append(arrs, arr{tag: tag(tagBig, n), width: 1, n: len(big), words: bw})
		add(tag(tagBigRank, n), 32, bs)
		add(tag(tagTop, n), bitsFor(uint64(max(maxGroup-1, 0))), top)
	}
	// Unigram maximum tree: level l holds the best code of each run of 32 nodes below.
	below := unigramCodes
	for lvl := 1; len(below) > treeFanout; lvl++ {
		up := make([]uint64, (len(below)+treeFanout-1)/treeFanout)
		for i := range up {
			best := below[i*treeFanout]
			for _, c := range below[i*treeFanout : min((i+1)*treeFanout, len(below))] {
				if probBook0.value(c) > probBook0.value(best) {
					best = c
				}
			}
			up[i] = best
		}
		add(tag(tagTree+lvl, 1), probBook0.width(), up)
		below = up
	}

	// Serialize.
	base := len(dst)
	off := headerSize + dirEntrySize*len(arrs)
	off = (off + 7) &^ 7
	var hdr [headerSize]byte
	le := binary.LittleEndian
	for i, v := range []uint32{version, uint32(N), uint32(V), uint32(q), TopListLen, bos, eos, unk, uint32(len(arrs)), headerTopMin(version, topMin)} {
		le.PutUint32(hdr[4*i:], v)
	}
	dst = append(dst, hdr[:]...)
	for _, a := range arrs {
		var d [dirEntrySize]byte
		le.PutUint32(d[0:], a.tag)
		le.PutUint32(d[4:], uint32(a.width))
		le.PutUint64(d[8:], uint64(a.n))
		le.PutUint64(d[16:], uint64(off))
		le.PutUint64(d[24:], uint64(len(a.words)))
		dst = append(dst, d[:]...)
		off += 8 * len(a.words)
	}
	for (len(dst)-base)%8 != 0 {
		dst = append(dst, 0)
	}
	for _, a := range arrs {
		for _, w := range a.words {
			dst = le.AppendUint64(dst, w)
		}
	}
	return dst, nil
}

func hasChildren(b *Backoff, n, i int) bool {
	next := &b.Levels[n]
	k := b.Levels[n-1].Key(i)
	lo, hi := 0, next.Len()
	for lo < hi {
		mid := int(uint(lo+hi) >> 1)
		if slices.Compare(next.Key(mid)[:n], k) < 0 {
			lo = mid + 1
		} else {
			hi = mid
		}
	}
	return lo < next.Len() && equalIDs(next.Key(lo)[:n], k)
}

func floatBits(cb codebook) []uint64 {
	out := make([]uint64, len(cb))
	for i, x := range cb {
		out[i] = math.Float64bits(x)
	}
	return out
}

// LoadSection returns a Model reading the n-gram section b in place: no table
// is copied, so b must stay valid (and unchanged) while the Model is used.
// Opening checks the header and every array's bounds; the values inside the
// arrays are range-checked as they are read, and Check verifies them all.
func LoadSection(b []byte) (*Model, error) {
	le := binary.LittleEndian
	if len(b) < headerSize {
		return nil, corrupt(0, "section of %d bytes is shorter than its header", len(b))
	}
	var h [10]uint32
	for i := range h {
		h[i] = le.Uint32(b[4*i:])
	}
	if h[0] < 1 || h[0] > sectionVersion {
		return nil, fmt.Errorf("%w: section version %d, this library reads 1 to %d", ErrSectionVersion, h[0], sectionVersion)
	}
	version := h[0]
	N, V, q, topT := int(h[1]), int(h[2]), int(h[3]), int(h[4])
	switch {
	case N < 1 || N > MaxOrder:
		return nil, corrupt(4, "order %d", N)
	case V < 3 || V > MaxVocab:
		return nil, corrupt(8, "vocabulary size %d", V)
	case q != 0 && (q < 4 || q > 16):
		return nil, corrupt(12, "quantization bits %d", q)
	case topT != TopListLen:
		return nil, corrupt(16, "top list length %d", topT)
	case version >= 3 && h[9] != topListMin:
		return nil, corrupt(36, "top-list threshold %d (want %d)", h[9], topListMin)
	case version >= 3 && N < 3:
		return nil, corrupt(4, "order %d in a version-%d section (ranked records need order 3 or more)", N, version)
	case int(h[5]) >= V || int(h[6]) >= V || int(h[7]) >= V:
		return nil, corrupt(20, "special token id out of range")
	}
	nd := int(h[8])
	if nd > (len(b)-headerSize)/dirEntrySize {
		return nil, corrupt(32, "directory of %d entries does not fit", nd)
	}
	dirEnd := headerSize + nd*dirEntrySize
	arrays := make(map[uint32]vec, nd)
	for i := range nd {
		d := b[headerSize+i*dirEntrySize:]
		t, width := le.Uint32(d), uint(le.Uint32(d[4:]))
		n, off, words := le.Uint64(d[8:]), le.Uint64(d[16:]), le.Uint64(d[24:])
		at := headerSize + i*dirEntrySize
		switch {
		case width == 0 || width > 64:
			return nil, corrupt(at, "array %#x: width %d", t, width)
		case n > uint64(len(b))*8:
			return nil, corrupt(at, "array %#x: %d values cannot fit", t, n)
		case off%8 != 0 || off < uint64(dirEnd) || off > uint64(len(b)):
			return nil, corrupt(at, "array %#x: offset %d", t, off)
		case words > (uint64(len(b))-off)/8:
			return nil, corrupt(at, "array %#x: %d words past the end", t, words)
		case words < uint64(vecWords(int(n), width)):
			return nil, corrupt(at, "array %#x: %d words hold fewer than %d values", t, words, n)
		}
		if _, dup := arrays[t]; dup {
			return nil, corrupt(at, "array %#x repeated", t)
		}
		w := format.Uint64s(b[off : off+words*8])
		arrays[t] = newVec(w, int(n), width)
	}
	m := &Model{order: N, vocab: V, qbits: q, bos: h[5], eos: h[6], unk: h[7], topMin: TopListLen, version: int(version)}
	if version >= 3 {
		m.topMin = int(h[9])
	}
	m.lv = make([]level, N)
	need := func(t uint32, n int, width uint) (vec, error) {
		v, ok := arrays[t]
		if !ok {
			return vec{}, corrupt(0, "array %#x missing", t)
		}
		if n >= 0 && v.n != n {
			return vec{}, corrupt(0, "array %#x holds %d values, want %d", t, v.n, n)
		}
		if width > 0 && v.width != width {
			return vec{}, corrupt(0, "array %#x has width %d, want %d", t, v.width, width)
		}
		return v, nil
	}
	for n := 1; n <= N; n++ {
		l := &m.lv[n-1]
		l.n = n
		var err error
		counted := version >= 6 && n == N
		if q > 0 {
			if !counted {
				if l.probBook, err = loadBook(need, tag(tagProbBook, n), q); err != nil {
					return nil, err
				}
			}
			if l.bowBook, err = loadBook(need, tag(tagBowBook, n), q); err != nil {
				return nil, err
			}
		}
		cw := l.probBook.width()
		if n == 1 {
			if l.probs, err = need(tag(tagProbs, 1), V, cw); err != nil {
				return nil, err
			}
			l.size = V
		} else if version >= 3 && n == N {
			rv, err := need(tag(tagRecords, n), -1, 1)
			if err != nil {
				return nil, err
			}
			cv, err := need(tag(tagRecCount, n), 1, 64)
			if err != nil {
				return nil, err
			}
			// A record holds at least one rank bit and its code (version 6:
			// at least one rank bit).
			if counted {
				cw = 0
			}
			if cnt := cv.at(0); cnt > uint64(rv.n)/(uint64(cw)+1) {
				return nil, corrupt(0, "order %d: %d ranked records cannot fit %d bits", n, cnt, rv.n)
			}
			l.ranked, l.recs, l.recBits, l.recCode = true, rv.w, uint64(rv.n), cw
			l.choose = version >= 5
			if counted {
				dv, err := need(tag(tagDiscounts, n), 3, 64)
				if err != nil {
					return nil, err
				}
				for i := range l.disc {
					l.disc[i] = math.Float64frombits(dv.at(i))
				}
				if !validDiscounts(l.disc) {
					return nil, corrupt(0, "order %d: discounts %v", n, l.disc)
				}
				l.counted = true
			}
			l.size = int(cv.at(0))
		} else if version >= 4 {
			gv, err := need(tag(tagGroups, n), -1, 1)
			if err != nil {
				return nil, err
			}
			l.ef, l.efw, l.efBits = true, gv.w, uint64(gv.n)
			if l.probs, err = need(tag(tagProbs, n), -1, cw); err != nil {
				return nil, err
			}
			l.size = l.probs.n
		} else {
			if l.words, err = need(tag(tagWords, n), -1, 0); err != nil {
				return nil, err
			}
			if l.probs, err = need(tag(tagProbs, n), l.words.n, cw); err != nil {
				return nil, err
			}
			l.size = l.words.n
		}
		if n == N {
			continue
		}
		hv, err := need(tag(tagHas, n), l.size, 1)
		if err != nil {
			return nil, err
		}
		hr, err := need(tag(tagHasRank, n), l.size/512+1, 32)
		if err != nil {
			return nil, err
		}
		l.has = rankBits{w: hv.w, samples: hr, n: l.size}
		if version == 1 {
			v, err := need(tag(tagStart, n), -1, 0)
			if err != nil {
				return nil, err
			}
			l.start = monoSeq{n: v.n, plain: true, vals: v}
		} else if l.start, err = loadMono(need, n, tagStartLow, false, "successor starts"); err != nil {
			return nil, err
		}
		C := l.start.n - 1
		if C < 0 {
			return nil, corrupt(0, "order %d: empty start array", n)
		}
		if version >= 4 && n+1 < N {
			if l.gstart, err = loadMono(need, n, tagGroupLow, true, "word-group offsets"); err != nil {
				return nil, err
			}
			if l.gstart.n != l.start.n {
				return nil, corrupt(0, "order %d: %d word-group offsets for %d contexts", n, l.gstart.n, C)
			}
		}
		if l.bow, err = need(tag(tagBow, n), C, l.bowBook.width()); err != nil {
			return nil, err
		}
		bv, err := need(tag(tagBig, n), C, 1)
		if err != nil {
			return nil, err
		}
		br, err := need(tag(tagBigRank, n), C/512+1, 32)
		if err != nil {
			return nil, err
		}
		l.big = rankBits{w: bv.w, samples: br, n: C}
		if l.top, err = need(tag(tagTop, n), -1, 0); err != nil {
			return nil, err
		}
	}
	if m.lv[N-1].counted {
		m.lv[N-2].expTables()
	}
	// Successor counts must agree with the next level's size.
	for n := 1; n < N; n++ {
		l := &m.lv[n-1]
		end := m.lv[n].size
		if m.lv[n].ranked {
			end = int(m.lv[n].recBits)
		}
		if int(l.start.at(l.start.n-1)) != end {
			return nil, corrupt(0, "order %d: successor table ends at %d, order %d needs %d", n, l.start.at(l.start.n-1), n+1, end)
		}
		if m.lv[n].ef {
			if e := l.gstart.at(l.gstart.n - 1); e != m.lv[n].efBits {
				return nil, corrupt(0, "order %d: word-group offsets end at %d, the groups of order %d hold %d bits", n, e, n+1, m.lv[n].efBits)
			}
		}
	}
	for lvl, size := 1, V; size > treeFanout; lvl++ {
		size = (size + treeFanout - 1) / treeFanout
		v, err := need(tag(tagTree+lvl, 1), size, m.lv[0].probBook.width())
		if err != nil {
			return nil, err
		}
		m.tree = append(m.tree, v)
	}
	m.unigramTop(0, uint32(V), MaxK, func(id uint32) bool {
		if id == m.bos || id == m.eos || id == m.unk {
			return false
		}
		m.uniTop = append(m.uniTop, id)
		return true
	})
	return m, nil
}

// loadMono returns the Elias-Fano sequence of order n whose low bits have
// kind lowKind (high bits and select samples: the next two kinds), with a
// sample every monoSampleDense values if dense, else every monoSample.
func loadMono(need func(uint32, int, uint) (vec, error), n int, lowKind int, dense bool, what string) (monoSeq, error) {
	every := monoSample
	if dense {
		every = monoSampleDense
	}
	low, err := need(tag(lowKind, n), -1, 0)
	if err != nil {
		return monoSeq{}, err
	}
	hi, err := need(tag(lowKind+1, n), -1, 1)
	if err != nil {
		return monoSeq{}, err
	}
	sel, err := need(tag(lowKind+2, n), (low.n+every-1)/every, 0)
	if err != nil {
		return monoSeq{}, err
	}
	if low.width > 40 || hi.n < low.n {
		return monoSeq{}, corrupt(0, "order %d: %s: %d low bits, %d high bits for %d values", n, what, low.width, hi.n, low.n)
	}
	return monoSeq{n: low.n, low: low, lbits: low.width, high: hi.w[:(hi.n+63)/64], hbits: hi.n, sample: sel, dense: dense}, nil
}

func loadBook(need func(uint32, int, uint) (vec, error), t uint32, q int) (codebook, error) {
	v, err := need(t, -1, 64)
	if err != nil {
		return nil, err
	}
	if v.n < 1 || v.n > 1<<q {
		return nil, corrupt(0, "codebook %#x has %d entries", t, v.n)
	}
	cb := make(codebook, v.n)
	for i := range cb {
		cb[i] = math.Float64frombits(v.at(i))
		if math.IsNaN(cb[i]) || (i > 0 && cb[i] < cb[i-1]) {
			return nil, corrupt(0, "codebook %#x is not sorted", t)
		}
	}
	return cb, nil
}

// headerTopMin is the header's last field: the top-list threshold in
// version 3, zero (reserved) before.
func headerTopMin(version uint32, topMin int) uint32 {
	if version < 3 {
		return 0
	}
	return uint32(topMin)
}
