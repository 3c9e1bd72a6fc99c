package lm

import (
	"cmp"
	"encoding/binary"
	"fmt"
	"math"
	"slices"
	"strings"
	"unicode/utf8"
)

// Layout of an overlay section, version 1 (all little-endian). Words are
// stored as strings, never as base IDs, so a saved overlay survives a new
// base model; everything is sorted, so equal overlays give equal bytes.
//
//	header  40 bytes: magic "kovl", version u16, flags u16 (bit 0: learning
//	        off), last day i32, days of use u32, then counts u32 of strings,
//	        unigrams, bigrams, trigrams, rejected pairs, and a zero u32
//	strings per string: folded length u8, folded bytes, surface length u8,
//	        surface bytes ("" = as folded); strictly increasing by folded
//	        bytes; "<s>" and "</s>" name the sentence marks
//	unigrams  per entry: string u32, times typed u32, last day i32, count f64
//	bigrams   per entry: string u32 ×2, last day i32, count f64
//	trigrams  per entry: string u32 ×3, last day i32, count f64
//	          n-grams strictly increasing by their string indexes; counts
//	          are decayed to the last day, finite and > 0
//	rejected  per pair: original u32, correction u32, day i32; strictly
//	          increasing by (original, correction) strings
//
// The recency cache is not saved: it describes the current session only.
const (
	overlayMagic      = "kovl"
	overlayVersion    = 1
	overlayHeaderSize = 40
	flagLearningOff   = 1
)

// AppendSection appends the overlay's current state in the layout above to
// dst. The output is deterministic. Cost: O(n log n) for n stored n-grams.
func (o *Overlay) AppendSection(dst []byte) []byte { return o.View().AppendSection(dst) }

// AppendSection appends the view's state as an overlay section (see Overlay.AppendSection).
func (v *OverlayView) AppendSection(dst []byte) []byte {
	grams := v.flatten(make([]gram, 0, v.entries))
	name := func(t uint32) string {
		switch {
		case t == v.bos:
			return BOS
		case t == v.eos:
			return EOS
		case t < v.V:
			return v.vocab.Word(t)
		}
		return v.words[t-v.V]
	}
	// Distinct tokens, named once each (a base word's name may cost an
	// allocation), then the string table: every name and rejected string,
	// sorted and without repeats.
	keep := grams[:0]
	var toks []uint32
	for _, g := range grams {
		if g.cnt >= minCount && !math.IsInf(g.cnt, 0) {
			keep = append(keep, g)
			toks = append(toks, g.toks[:g.n]...)
		}
	}
	slices.Sort(toks)
	toks = slices.Compact(toks)
	names := make([]string, len(toks))
	strs := make([]string, 0, len(toks)+2*len(v.rejects))
	for i, t := range toks {
		names[i] = name(t)
		if names[i] != "" && len(names[i]) <= 255 {
			strs = append(strs, names[i])
		}
	}
	for _, r := range v.rejects {
		if len(r.orig) <= 255 && len(r.corr) <= 255 {
			strs = append(strs, r.orig, r.corr)
		}
	}
	slices.Sort(strs)
	strs = slices.Compact(strs)
	strIndex := func(s string) uint32 {
		i, _ := slices.BinarySearch(strs, s)
		return uint32(i)
	}
	tokIndex := make([]uint32, len(toks)) // string index of each distinct token; MaxUint32: not storable
	for i, nm := range names {
		tokIndex[i] = math.MaxUint32
		if nm != "" && len(nm) <= 255 {
			tokIndex[i] = strIndex(nm)
		}
	}
	surface := func(s string) string {
		if pos, ok := v.findUser(s); ok {
			if sf := v.surf[v.byStr[pos]]; len(sf) <= 255 {
				return sf
			}
		}
		return ""
	}
	type row struct {
		n int
		k [3]uint32
		g gram
	}
	rows := make([]row, 0, len(keep))
	var counts [3]int
	for _, g := range keep {
		r := row{n: g.n, g: g}
		ok := true
		for j, t := range g.toks[:g.n] {
			i, _ := slices.BinarySearch(toks, t)
			if r.k[j] = tokIndex[i]; r.k[j] == math.MaxUint32 {
				ok = false
			}
		}
		if ok {
			rows = append(rows, r)
			counts[g.n-1]++
		}
	}
	slices.SortFunc(rows, func(a, b row) int {
		if c := cmp.Compare(a.n, b.n); c != 0 {
			return c
		}
		return slices.Compare(a.k[:a.n], b.k[:b.n])
	})
	var rej []reject
	for _, r := range v.rejects {
		if len(r.orig) <= 255 && len(r.corr) <= 255 {
			rej = append(rej, r)
		}
	}

	size := overlayHeaderSize + 12*len(rej)
	for _, s := range strs {
		size += 2 + 2*len(s)
	}
	for _, r := range rows {
		size += 4*r.n + 12
		if r.n == 1 {
			size += 4
		}
	}
	dst = slices.Grow(dst, size)
	le := binary.LittleEndian
	dst = append(dst, overlayMagic...)
	dst = le.AppendUint16(dst, overlayVersion)
	var flags uint16
	if !v.learning {
		flags |= flagLearningOff
	}
	dst = le.AppendUint16(dst, flags)
	dst = le.AppendUint32(dst, uint32(v.day))
	dst = le.AppendUint32(dst, uint32(v.useDays))
	for _, n := range []int{len(strs), counts[0], counts[1], counts[2], len(rej), 0} {
		dst = le.AppendUint32(dst, uint32(n))
	}
	for _, s := range strs {
		dst = append(dst, byte(len(s)))
		dst = append(dst, s...)
		sf := surface(s)
		dst = append(dst, byte(len(sf)))
		dst = append(dst, sf...)
	}
	for _, r := range rows {
		for _, k := range r.k[:r.n] {
			dst = le.AppendUint32(dst, k)
		}
		if r.n == 1 {
			dst = le.AppendUint32(dst, r.g.typed)
		}
		dst = le.AppendUint32(dst, uint32(r.g.day))
		dst = le.AppendUint64(dst, math.Float64bits(r.g.cnt))
	}
	for _, r := range rej {
		dst = le.AppendUint32(dst, strIndex(r.orig))
		dst = le.AppendUint32(dst, strIndex(r.corr))
		dst = le.AppendUint32(dst, uint32(r.day))
	}
	return dst
}

// OverlayError reports where overlay bytes are bad. It matches ErrOverlayCorrupt.
type OverlayError struct {
	Offset int    // byte offset inside the section
	Reason string // what was wrong
}

func (e *OverlayError) Error() string {
	return fmt.Sprintf("lm: corrupt user overlay at byte %d: %s", e.Offset, e.Reason)
}

// Is reports whether target is ErrOverlayCorrupt.
func (e *OverlayError) Is(target error) bool { return target == ErrOverlayCorrupt }

func badOverlay(off int, format string, args ...any) error {
	return &OverlayError{Offset: off, Reason: fmt.Sprintf(format, args...)}
}

// LoadOverlay reads an overlay section written by AppendSection and puts it
// on top of base (see NewOverlay). Words the base vocabulary now holds are
// attached to their base IDs; the others become user words. It copies what
// it needs from b. Bad bytes give an error matching ErrOverlayCorrupt (or
// ErrOverlayVersion), never a panic.
func LoadOverlay(b []byte, base *Model, vocab Vocab, opts OverlayOptions) (*Overlay, error) {
	o, err := NewOverlay(base, vocab, opts)
	if err != nil {
		return nil, err
	}
	le := binary.LittleEndian
	if len(b) < overlayHeaderSize {
		return nil, badOverlay(0, "%d bytes, shorter than the header", len(b))
	}
	if string(b[:4]) != overlayMagic {
		return nil, badOverlay(0, "bad magic")
	}
	if ver := le.Uint16(b[4:]); ver != overlayVersion {
		return nil, fmt.Errorf("%w: version %d", ErrOverlayVersion, ver)
	}
	flags := le.Uint16(b[6:])
	if flags&^flagLearningOff != 0 {
		return nil, badOverlay(6, "unknown flags %#x", flags)
	}
	day := int32(le.Uint32(b[8:]))
	useDays := le.Uint32(b[12:])
	if useDays > math.MaxInt32 {
		return nil, badOverlay(12, "days of use %d", useDays)
	}
	var n [6]int
	for i := range n {
		n[i] = int(le.Uint32(b[16+4*i:]))
	}
	if n[5] != 0 {
		return nil, badOverlay(36, "reserved field not zero")
	}
	off := overlayHeaderSize
	rest := len(b) - off
	// Every string takes ≥ 3 bytes, every entry ≥ 12: check before allocating.
	need := 3*n[0] + 20*n[1] + 20*n[2] + 24*n[3] + 12*n[4]
	if n[0] > rest/3 || n[1] > rest/20 || n[2] > rest/20 || n[3] > rest/24 || n[4] > rest/12 || need > rest {
		return nil, badOverlay(16, "counts need more than the %d bytes left", rest)
	}
	strs := make([]string, n[0])
	surfs := make([]string, n[0])
	readStr := func() (string, error) {
		if off >= len(b) {
			return "", badOverlay(off, "string length past the end")
		}
		l := int(b[off])
		if off+1+l > len(b) {
			return "", badOverlay(off, "string past the end")
		}
		s := string(b[off+1 : off+1+l])
		off += 1 + l
		return s, nil
	}
	for i := range strs {
		at := off
		s, err := readStr()
		if err != nil {
			return nil, err
		}
		if s == "" || !utf8.ValidString(s) || strings.ContainsAny(s, " \t\r\n") {
			return nil, badOverlay(at, "bad word %q", s)
		}
		if i > 0 && s <= strs[i-1] {
			return nil, badOverlay(at, "words not strictly increasing")
		}
		sf, err := readStr()
		if err != nil {
			return nil, err
		}
		if !utf8.ValidString(sf) {
			return nil, badOverlay(at, "bad surface")
		}
		strs[i], surfs[i] = s, sf
	}
	v := *o.cur.Load()
	v.learning = flags&flagLearningOff == 0
	v.hasDay = n[1]+n[2]+n[3] > 0 || day != 0 || useDays != 0
	v.day, v.useDays, v.epoch = day, int32(useDays), int32(useDays)
	// Resolve strings to extended IDs.
	w := &writer{v: &v}
	toks := make([]uint32, len(strs))
	for i, s := range strs {
		switch s {
		case BOS:
			toks[i] = v.bos
			continue
		case EOS:
			toks[i] = v.eos
			continue
		case UNK:
			toks[i] = noPrev
			continue
		}
		t, ok := w.resolve(s, true)
		if !ok {
			return nil, badOverlay(overlayHeaderSize, "too many words")
		}
		toks[i] = t
		if t >= v.V && surfs[i] != "" {
			v.surf[t-v.V] = surfs[i]
		}
	}
	grams := make([]gram, 0, n[1]+n[2]+n[3])
	var prev [3]uint32
	for order := 1; order <= 3; order++ {
		for i := 0; i < n[order]; i++ {
			size := 4*order + 12
			if order == 1 {
				size += 4
			}
			if off+size > len(b) {
				return nil, badOverlay(off, "%d-gram past the end", order)
			}
			at := off
			var k [3]uint32
			g := gram{n: order}
			for j := range order {
				k[j] = le.Uint32(b[off:])
				off += 4
				if int(k[j]) >= len(strs) {
					return nil, badOverlay(at, "word index %d out of range", k[j])
				}
				g.toks[j] = toks[k[j]]
				if g.toks[j] == noPrev || (j == order-1 && g.toks[j] == v.bos) || (j < order-1 && g.toks[j] == v.eos) {
					return nil, badOverlay(at, "sentence mark out of place")
				}
			}
			if i > 0 && slices.Compare(k[:order], prev[:order]) <= 0 {
				return nil, badOverlay(at, "%d-grams not strictly increasing", order)
			}
			prev = k
			if order == 1 {
				g.typed = le.Uint32(b[off:])
				off += 4
			}
			g.day = int32(le.Uint32(b[off:]))
			g.cnt = math.Float64frombits(le.Uint64(b[off+4:]))
			off += 12
			if !(g.cnt > 0) || math.IsInf(g.cnt, 0) {
				return nil, badOverlay(at, "count %v", g.cnt)
			}
			grams = append(grams, g)
		}
	}
	rejects := make([]reject, 0, n[4])
	for i := 0; i < n[4]; i++ {
		if off+12 > len(b) {
			return nil, badOverlay(off, "rejected pair past the end")
		}
		a, c := le.Uint32(b[off:]), le.Uint32(b[off+4:])
		if int(a) >= len(strs) || int(c) >= len(strs) {
			return nil, badOverlay(off, "rejected pair index out of range")
		}
		r := reject{orig: strs[a], corr: strs[c], day: int32(le.Uint32(b[off+8:]))}
		if i > 0 && cmpReject(rejects[i-1], r) >= 0 {
			return nil, badOverlay(off, "rejected pairs not strictly increasing")
		}
		rejects = append(rejects, r)
		off += 12
	}
	if off != len(b) {
		return nil, badOverlay(off, "%d bytes after the end", len(b)-off)
	}
	v.rejects = rejects
	nv := v.rebuild(grams)
	o.publish(nv)
	return o, nil
}
