package lm

import (
	"encoding/binary"
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"strings"
	"testing"
)

// smallText is a corpus small enough to damage a section byte by byte, with
// a context ("the") that has more than TopListLen successors, so top lists
// and the maximum tree (more than 32 words) are present.
func smallText(t testing.TB) string {
	t.Helper()
	lines := strings.SplitN(readFile(t, filepath.Join("testdata", "opticks-train.txt")), "\n", 13)
	return readFile(t, filepath.Join("testdata", "reference", "toy-train.txt")) + strings.Join(lines[:12], "\n")
}

// smallSection returns a section built from smallText and its vocabulary,
// in the version-1 layout (plain successor starts, which the damage tests
// edit value by value); the current layout has its own tests in
// monotone_test.go and is fuzzed.
func smallSection(t testing.TB, order, qbits int) ([]byte, *Backoff) {
	t.Helper()
	return smallSectionV(t, order, qbits, 1)
}

// smallSectionV is smallSection in a chosen layout version.
func smallSectionV(t testing.TB, order, qbits, version int) ([]byte, *Backoff) {
	t.Helper()
	x := buildText(t, smallText(t), order, ScanOptions{Pretokenized: true}, qbits)
	sec, err := AppendSection(nil, x.b, LayoutOptions{QuantBits: qbits, Version: version})
	if err != nil {
		t.Fatal(err)
	}
	return sec, x.b
}

// dirEntry is a directory entry of a section, as FORMAT.md lays it out.
type dirEntry struct {
	pos           int // byte offset of the entry
	width         uint
	n, off, words uint64
}

func directory(t testing.TB, sec []byte) map[uint32]dirEntry {
	t.Helper()
	le := binary.LittleEndian
	nd := int(le.Uint32(sec[32:]))
	out := make(map[uint32]dirEntry, nd)
	for i := range nd {
		p := headerSize + i*dirEntrySize
		out[le.Uint32(sec[p:])] = dirEntry{pos: p, width: uint(le.Uint32(sec[p+4:])),
			n: le.Uint64(sec[p+8:]), off: le.Uint64(sec[p+16:]), words: le.Uint64(sec[p+24:])}
	}
	return out
}

// getVal and setVal read and write value i of the packed array with tag tg, in place.
func getVal(t testing.TB, sec []byte, tg uint32, i int) uint64 {
	t.Helper()
	d, ok := directory(t, sec)[tg]
	if !ok || uint64(i) >= d.n {
		t.Fatalf("array %#x has no value %d", tg, i)
	}
	w := make([]uint64, d.words)
	for j := range w {
		w[j] = binary.LittleEndian.Uint64(sec[int(d.off)+8*j:])
	}
	v := newVec(w, int(d.n), d.width)
	return v.at(i)
}

func setVal(t testing.TB, sec []byte, tg uint32, i int, x uint64) {
	t.Helper()
	d, ok := directory(t, sec)[tg]
	if !ok || uint64(i) >= d.n {
		t.Fatalf("array %#x has no value %d", tg, i)
	}
	mask := ^uint64(0)
	if d.width < 64 {
		mask = 1<<d.width - 1
	}
	x &= mask
	b := uint(i) * d.width
	wi, off := int(b>>6), b&63
	le := binary.LittleEndian
	p := int(d.off) + 8*wi
	le.PutUint64(sec[p:], le.Uint64(sec[p:])&^(mask<<off)|x<<off)
	if off+d.width > 64 {
		le.PutUint64(sec[p+8:], le.Uint64(sec[p+8:])&^(mask>>(64-off))|x>>(64-off))
	}
}

// exercise runs every query on a loaded model; it must not panic, whatever
// the bytes. It returns the error of Check.
func exercise(t testing.TB, m *Model) error {
	t.Helper()
	V := uint32(m.VocabSize())
	probe := []uint32{0, 2, V / 2, V - 1, V, math.MaxUint32}
	var dst [MaxK]Scored
	for _, a := range probe {
		for _, b := range probe {
			for _, w := range probe {
				m.LogProb([]uint32{a, b}, w)
			}
			m.TopK([]uint32{a, b}, 0, V, 5, dst[:0])
		}
		m.LogProb(nil, a)
		m.TopK([]uint32{a}, 0, V, MaxK, dst[:0])
		m.TopK([]uint32{a}, min(a, V), min(a+9, V), 3, dst[:0])
	}
	m.Backoff(make([]string, m.VocabSize()))
	return m.Check()
}

// isLoadError reports whether err is one of the errors LoadSection documents.
func isLoadError(err error) bool {
	return errors.Is(err, ErrCorrupt) || errors.Is(err, ErrSectionVersion)
}

// TestLoadSectionTruncated cuts a valid section at every length (as
// compress/flate's TestTruncatedStreams does for streams): each prefix must
// be refused with ErrCorrupt, since the last array reaches the last byte.
func TestLoadSectionTruncated(t *testing.T) {
	for _, c := range []struct{ q, version int }{{0, 1}, {8, 1}, {8, 3}, {8, 4}, {0, sectionVersion}, {8, sectionVersion}} {
		q := c.q
		sec, _ := smallSectionV(t, 3, q, c.version)
		for i := range len(sec) {
			m, err := LoadSection(sec[:i])
			if !errors.Is(err, ErrCorrupt) {
				t.Fatalf("q%d: LoadSection(first %d of %d bytes) = %v, %v; want ErrCorrupt", q, i, len(sec), m != nil, err)
			}
			var se *SectionError
			if !errors.As(err, &se) {
				t.Fatalf("q%d: error %v is not a *SectionError", q, err)
			}
		}
	}
}

// TestLoadSectionFlipped damages every byte of small sections in two ways:
// all bits, and one bit (a different one from byte to byte).
// Loading must fail with a documented error or give a model that answers
// every query without panicking.
func TestLoadSectionFlipped(t *testing.T) {
	for _, c := range []struct{ order, q, version int }{{3, 8, 1}, {2, 0, 1}, {2, 4, 1}, {3, 8, 3}, {3, 8, 4}, {3, 8, sectionVersion}, {3, 0, sectionVersion}, {4, 8, sectionVersion}} {
		t.Run(fmt.Sprintf("order%d/q%d/v%d", c.order, c.q, c.version), func(t *testing.T) {
			sec, _ := smallSectionV(t, c.order, c.q, c.version)
			var refused, loaded, caught int
			buf := make([]byte, len(sec))
			for i := range sec {
				for _, mask := range []byte{0xff, 1 << (i % 8)} {
					copy(buf, sec)
					buf[i] ^= mask
					m, err := LoadSection(buf)
					if err != nil {
						if !isLoadError(err) {
							t.Fatalf("byte %d ^ %#x: LoadSection error %v is not ErrCorrupt or ErrSectionVersion", i, mask, err)
						}
						refused++
						continue
					}
					loaded++
					if err := exercise(t, m); err != nil {
						if !errors.Is(err, ErrCorrupt) {
							t.Fatalf("byte %d ^ %#x: Check error %v is not ErrCorrupt", i, mask, err)
						}
						caught++
					}
				}
			}
			t.Logf("%d bytes × 2 flips: %d refused at load, %d loaded (%d of them failed Check)", len(sec), refused, loaded, caught)
		})
	}
}

// TestLoadSectionHeader overwrites one header or directory field at a time;
// each case expects its own sentinel.
func TestLoadSectionHeader(t *testing.T) {
	le := binary.LittleEndian
	base, _ := smallSection(t, 3, 8)
	dir := directory(t, base)
	words2 := dir[tag(tagWords, 2)]
	set32 := func(off int, v uint32) func([]byte) { return func(b []byte) { le.PutUint32(b[off:], v) } }
	set64 := func(off int, v uint64) func([]byte) { return func(b []byte) { le.PutUint64(b[off:], v) } }
	cases := []struct {
		name  string
		spoil func([]byte)
		want  error
	}{
		{"newer version", set32(0, sectionVersion+1), ErrSectionVersion},
		{"version 0", set32(0, 0), ErrSectionVersion},
		{"order 0", set32(4, 0), ErrCorrupt},
		{"order 6", set32(4, 6), ErrCorrupt},
		{"order 2 of 3", set32(4, 2), nil}, // a lower order is readable: the extra arrays are ignored
		{"order 4 of 3", set32(4, 4), ErrCorrupt},
		{"vocabulary 2", set32(8, 2), ErrCorrupt},
		{"vocabulary huge", set32(8, 1<<30), ErrCorrupt},
		{"vocabulary one more", func(b []byte) { le.PutUint32(b[8:], le.Uint32(b[8:])+1) }, ErrCorrupt},
		{"qbits 3", set32(12, 3), ErrCorrupt},
		{"qbits 17", set32(12, 17), ErrCorrupt},
		{"qbits 0 for 8", set32(12, 0), ErrCorrupt},
		{"top list 7", set32(16, 7), ErrCorrupt},
		{"bos out of range", set32(20, 1<<20), ErrCorrupt},
		{"eos out of range", set32(24, math.MaxUint32), ErrCorrupt},
		{"unk out of range", set32(28, 1<<25), ErrCorrupt},
		{"directory too long", set32(32, 1<<20), ErrCorrupt},
		{"directory empty", set32(32, 0), ErrCorrupt},
		{"array missing", set32(words2.pos, 0x7777), ErrCorrupt},
		{"array repeated", func(b []byte) { copy(b[words2.pos:words2.pos+4], b[words2.pos+dirEntrySize:]) }, ErrCorrupt},
		{"width 0", set32(words2.pos+4, 0), ErrCorrupt},
		{"width 65", set32(words2.pos+4, 65), ErrCorrupt},
		{"count huge", set64(words2.pos+8, 1<<62), ErrCorrupt},
		{"count one less", set64(words2.pos+8, words2.n-1), ErrCorrupt},
		{"offset misaligned", set64(words2.pos+16, words2.off+4), ErrCorrupt},
		{"offset inside directory", set64(words2.pos+16, headerSize), ErrCorrupt},
		{"offset past end", set64(words2.pos+16, uint64(len(base))+8), ErrCorrupt},
		{"offset huge", set64(words2.pos+16, math.MaxUint64-7), ErrCorrupt},
		{"words huge", set64(words2.pos+24, math.MaxUint64/8), ErrCorrupt},
		{"words too few", set64(words2.pos+24, 1), ErrCorrupt},
		{"start ends short", func(b []byte) {
			d := directory(t, b)[tag(tagStart, 1)]
			setVal(t, b, tag(tagStart, 1), int(d.n)-1, 1)
		}, ErrCorrupt},
		{"codebook unsorted", func(b []byte) {
			setVal(t, b, tag(tagProbBook, 2), 0, math.Float64bits(0))
		}, ErrCorrupt},
		{"codebook NaN", func(b []byte) {
			setVal(t, b, tag(tagProbBook, 1), 1, math.Float64bits(math.NaN()))
		}, ErrCorrupt},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			b := append([]byte(nil), base...)
			c.spoil(b)
			m, err := LoadSection(b)
			if c.want == nil {
				if err != nil {
					t.Fatalf("LoadSection = %v, want success", err)
				}
				exercise(t, m)
				return
			}
			if !errors.Is(err, c.want) {
				t.Fatalf("LoadSection = %v, %v; want %v", m != nil, err, c.want)
			}
		})
	}
}

// theGroup returns the successor group [lo, hi) of "the" at order 2, its
// context index c among order-1 contexts and the number of top lists before it.
func theGroup(t testing.TB, sec []byte, b *Backoff) (lo, hi, c, big int) {
	t.Helper()
	the, ok := b.ID("the")
	if !ok {
		t.Fatal(`no "the" in the small text`)
	}
	for e := range int(the) {
		if hasChildren(b, 1, e) {
			c++
		}
	}
	lo = int(getVal(t, sec, tag(tagStart, 1), c))
	hi = int(getVal(t, sec, tag(tagStart, 1), c+1))
	if hi-lo <= TopListLen {
		t.Fatalf(`"the" has %d successors, want more than %d`, hi-lo, TopListLen)
	}
	for i := range c {
		if getVal(t, sec, tag(tagBig, 1), i) == 1 {
			big++
		}
	}
	return lo, hi, c, big
}

// rawArray is an array of a section, unpacked for rewriting.
type rawArray struct {
	tag   uint32
	width uint
	vals  []uint64
}

// splitSection returns the header and the arrays of a valid section.
func splitSection(t testing.TB, sec []byte) ([]byte, []rawArray) {
	t.Helper()
	var out []rawArray
	le := binary.LittleEndian
	nd := int(le.Uint32(sec[32:]))
	for i := range nd {
		p := headerSize + i*dirEntrySize
		tg := le.Uint32(sec[p:])
		d := directory(t, sec)[tg]
		a := rawArray{tag: tg, width: d.width, vals: make([]uint64, d.n)}
		for j := range a.vals {
			a.vals[j] = getVal(t, sec, tg, j)
		}
		out = append(out, a)
	}
	return append([]byte(nil), sec[:headerSize]...), out
}

// joinSection lays a header and arrays out as AppendSection does.
func joinSection(hdr []byte, arrs []rawArray) []byte {
	le := binary.LittleEndian
	out := append([]byte(nil), hdr...)
	le.PutUint32(out[32:], uint32(len(arrs)))
	off := headerSize + dirEntrySize*len(arrs)
	var body []byte
	for _, a := range arrs {
		w := packVec(a.vals, a.width)
		var d [dirEntrySize]byte
		le.PutUint32(d[0:], a.tag)
		le.PutUint32(d[4:], uint32(a.width))
		le.PutUint64(d[8:], uint64(len(a.vals)))
		le.PutUint64(d[16:], uint64(off+len(body)))
		le.PutUint64(d[24:], uint64(len(w)))
		out = append(out, d[:]...)
		for _, x := range w {
			body = le.AppendUint64(body, x)
		}
	}
	return append(out, body...)
}

// widen rewrites the array with tag tg of a valid section at 64 bits, with value i set to val.
func widen(t testing.TB, sec []byte, tg uint32, i int, val uint64) []byte {
	t.Helper()
	h, as := splitSection(t, sec)
	for k := range as {
		if as[k].tag == tg {
			as[k].width = 64
			as[k].vals[i] = val
		}
	}
	return joinSection(h, as)
}

// TestLoadSectionWideArrays rewrites arrays whose width the loader does not
// fix (words, start, top lists) at 64 bits, holding values that do not fit an
// int or a uint32. Loading may refuse them; if it does not, every query must
// run without panicking and Check must report the damage.
func TestLoadSectionWideArrays(t *testing.T) {
	base, b := smallSection(t, 3, 8)
	V := uint64(len(b.Vocab))
	lo, _, _, big := theGroup(t, base, b)
	best := lo + int(getVal(t, base, tag(tagTop, 1), big*TopListLen)) // most probable successor of "the"
	hdr, arrs := splitSection(t, base)
	if got := joinSection(hdr, arrs); string(got) != string(base) {
		t.Fatal("splitSection and joinSection do not reproduce the section")
	}
	cases := []struct {
		name string
		tag  uint32
		i    int
		val  uint64
	}{
		{"start above 2^63", tag(tagStart, 1), 1, 1<<63 + 5},
		{"start first above 2^63", tag(tagStart, 1), 0, 1 << 63},
		{"start first -2^40 as int", tag(tagStart, 1), 0, ^uint64(1<<40 - 1)},
		{"top offset above 2^63", tag(tagTop, 1), 0, 1<<63 + 1},
		{"top offset -2^40 as int", tag(tagTop, 1), 0, ^uint64(1<<40 - 1)},
		{"top offset 2^32", tag(tagTop, 1), 0, 1 << 32},
		{"word above 2^32", tag(tagWords, 2), 0, 1<<32 + 1},
		{"word above 2^63", tag(tagWords, 3), 0, 1 << 63},
		{"word 2^32 + 2^20", tag(tagWords, 2), 5, 1<<32 + 1<<20},
		{"best word 2^32 + V + 100", tag(tagWords, 2), best, 1<<32 + V + 100},
		{"best word V + 100", tag(tagWords, 2), best, V + 100},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			m, err := LoadSection(widen(t, base, c.tag, c.i, c.val))
			if err != nil {
				if !errors.Is(err, ErrCorrupt) {
					t.Fatalf("LoadSection = %v, want ErrCorrupt", err)
				}
				return
			}
			var dst [MaxK]Scored
			for w := range uint32(m.VocabSize()) { // every one-word context
				m.TopK([]uint32{w}, 0, uint32(m.VocabSize()), 3, dst[:0])
				m.LogProb([]uint32{w}, w)
			}
			if err := exercise(t, m); !errors.Is(err, ErrCorrupt) {
				t.Errorf("Check() = %v, want ErrCorrupt", err)
			}
		})
	}
}
