package lm

import (
	"errors"
	"fmt"
	"path/filepath"
	"strings"
	"testing"
)

func TestCheckValidSections(t *testing.T) {
	text := strings.Join(strings.SplitN(readFile(t, filepath.Join("testdata", "opticks-train.txt")), "\n", 801)[:800], "\n")
	for _, order := range []int{1, 2, 3, 5} {
		for _, q := range []int{0, 4, 8, 16} {
			t.Run(fmt.Sprintf("order%d/q%d", order, q), func(t *testing.T) {
				x := buildText(t, text, order, ScanOptions{Pretokenized: true}, q)
				if err := x.m.Check(); err != nil {
					t.Errorf("Check() = %v on a section AppendSection wrote", err)
				}
			})
		}
	}
}

// TestCheckFindsDamage changes values inside the arrays, which loading does
// not read; Check must report each one as ErrCorrupt.
func TestCheckFindsDamage(t *testing.T) {
	base, b := smallSection(t, 3, 8)
	V := len(b.Vocab)
	the, _ := b.ID("the")
	lo, hi, c, big := theGroup(t, base, b)
	top0 := getVal(t, base, tag(tagTop, 1), big*TopListLen)
	cases := []spoiler{
		{"word id out of range", func(s []byte) { setVal(t, s, tag(tagWords, 2), 0, uint64(V)) }},
		{"group unsorted", func(s []byte) {
			a, z := getVal(t, s, tag(tagWords, 2), lo), getVal(t, s, tag(tagWords, 2), lo+1)
			setVal(t, s, tag(tagWords, 2), lo, z)
			setVal(t, s, tag(tagWords, 2), lo+1, a)
		}},
		{"group repeats a word", func(s []byte) {
			setVal(t, s, tag(tagWords, 2), lo+1, getVal(t, s, tag(tagWords, 2), lo))
		}},
		{"start not rising", func(s []byte) { setVal(t, s, tag(tagStart, 1), c+1, uint64(lo)) }},
		{"start not from 0", func(s []byte) { setVal(t, s, tag(tagStart, 1), 0, 1) }},
		{"successor bit cleared", func(s []byte) { setVal(t, s, tag(tagHas, 1), int(the), 0) }},
		{"rank sample wrong", func(s []byte) {
			d := directory(t, s)[tag(tagHasRank, 1)]
			setVal(t, s, tag(tagHasRank, 1), int(d.n)-1, getVal(t, s, tag(tagHasRank, 1), int(d.n)-1)+1)
		}},
		{"top-list bit cleared", func(s []byte) { setVal(t, s, tag(tagBig, 1), c, 0) }},
		{"top-list offset outside group", func(s []byte) { setVal(t, s, tag(tagTop, 1), big*TopListLen, uint64(hi-lo)) }},
		{"top list out of order", func(s []byte) {
			// Swap the first two neighbours of the list whose probabilities differ.
			for i := big * TopListLen; i < (big+1)*TopListLen-1; i++ {
				a, z := getVal(t, s, tag(tagTop, 1), i), getVal(t, s, tag(tagTop, 1), i+1)
				if getVal(t, s, tag(tagProbs, 2), lo+int(a)) != getVal(t, s, tag(tagProbs, 2), lo+int(z)) {
					setVal(t, s, tag(tagTop, 1), i, z)
					setVal(t, s, tag(tagTop, 1), i+1, a)
					return
				}
			}
			t.Fatal("the top list of \"the\" has equal probabilities throughout")
		}},
		{"top list repeats", func(s []byte) { setVal(t, s, tag(tagTop, 1), big*TopListLen+1, top0) }},
		{"probability code past codebook", func(s []byte) {
			d := directory(t, s)[tag(tagProbBook, 2)]
			setVal(t, s, tag(tagProbs, 2), 0, d.n)
		}},
		{"weight code past codebook", func(s []byte) {
			d := directory(t, s)[tag(tagBowBook, 1)]
			setVal(t, s, tag(tagBow, 1), 0, d.n)
		}},
		{"tree maximum wrong", func(s []byte) { setVal(t, s, tag(tagTree+1, 1), 0, 0) }},
		{"tree code past codebook", func(s []byte) {
			d := directory(t, s)[tag(tagProbBook, 1)]
			setVal(t, s, tag(tagTree+1, 1), 0, d.n)
		}},
		{"top list's best lowered", func(s []byte) {
			// The most probable successor of "the" gets the lowest code.
			setVal(t, s, tag(tagProbs, 2), lo+int(top0), 0)
		}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			s := append([]byte(nil), base...)
			tc.spoil(s)
			m, err := LoadSection(s)
			if err != nil {
				t.Fatalf("LoadSection = %v; the damage is meant to pass loading", err)
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

// TestCheckFindsGroupDamage flips single bits inside a version-4 word
// group long enough to carry select samples (the successors of a frequent
// word in the Opticks order-3 model): a select sample, a bit of the high
// part, and the end of the group offsets. Loading or Check must report
// each as ErrCorrupt, and queries must not panic.
func TestCheckFindsGroupDamage(t *testing.T) {
	x := buildText(t, readFile(t, filepath.Join("testdata", "opticks-train.txt")), 3, ScanOptions{Pretokenized: true}, 8)
	base, err := AppendSection(nil, x.b, LayoutOptions{QuantBits: 8})
	if err != nil {
		t.Fatal(err)
	}
	m, err := LoadSection(base)
	if err != nil {
		t.Fatal(err)
	}
	// The first order-1 context with both kinds of samples.
	u := &m.lv[0]
	var g efGroup
	found := false
	for c := 0; c+1 < u.start.n && !found; c++ {
		lo, hi := int(u.start.at(c)), int(u.start.at(c+1))
		if sh := groupShape(hi-lo, m.vocab); sh.n1 > 0 && sh.n0 > 0 {
			found = g.open(nil, u.gstart.at(c), hi-lo, m.vocab, m.lv[1].efBits)
		}
	}
	if !found {
		t.Fatal("no word group with select samples in the Opticks model")
	}
	d := directory(t, base)[tag(tagGroups, 2)]
	flip := bitFlipper(d)
	cases := []spoiler{
		{"set-bit sample", flip(g.sbase)},
		{"clear-bit sample", flip(g.sbase + uint64(g.n1)*uint64(g.sw))},
		{"first high bit", flip(g.hbase)},
		{"last high bit", flip(g.hbase + g.hlen - 1)},
		{"group offsets end", func(s []byte) {
			e := directory(t, s)[tag(tagGroupLow, 1)]
			setVal(t, s, tag(tagGroupLow, 1), int(e.n)-1, getVal(t, s, tag(tagGroupLow, 1), int(e.n)-1)^1)
		}},
	}
	expectCorrupt(t, base, cases)
}

// TestCheckFindsRankDamage flips single bits inside a version-5 group of
// coded ranks that carries select samples: a set-bit sample, a clear-bit
// sample, a bit of the high part, and the group's form bit. Loading or
// Check must report each as ErrCorrupt, and queries must not panic.
func TestCheckFindsRankDamage(t *testing.T) {
	x := buildText(t, readFile(t, filepath.Join("testdata", "opticks-train.txt")), 3, ScanOptions{Pretokenized: true}, 8)
	base, err := AppendSection(nil, x.b, LayoutOptions{QuantBits: 8, Version: 5})
	if err != nil {
		t.Fatal(err)
	}
	m, err := LoadSection(base)
	if err != nil {
		t.Fatal(err)
	}
	keys, ok := m.levelKeys(2)
	if !ok {
		t.Fatal("levelKeys(2) fails on a valid section")
	}
	var g efGroup
	var form uint64 // bit offset of the group's form bit
	found := false
	for e := 0; e < m.lv[1].size && !found; e++ {
		nd, ok := m.groupNode(&m.lv[1], e, keys[2*e:2*e+2])
		if ok && nd.efRanks && nd.hi > efSample1 && m.lv[2].ranksOf(&nd, &g) && g.n0 > 0 {
			form = nd.base - uint64(nd.rw) - 1
			found = true
		}
	}
	if !found {
		t.Fatal("no group of coded ranks with both kinds of samples in the Opticks model")
	}
	d := directory(t, base)[tag(tagRecords, 3)]
	flip := bitFlipper(d)
	cases := []spoiler{
		{"set-bit sample", flip(g.sbase)},
		{"clear-bit sample", flip(g.sbase + uint64(g.n1)*uint64(g.sw))},
		{"high bit", flip(g.hbase + g.hlen/2)},
		{"form bit", flip(form)},
	}
	expectCorrupt(t, base, cases)
}

// spoiler names one way of damaging a section in place.
type spoiler struct {
	name  string
	spoil func([]byte)
}

// bitFlipper returns, for a bit offset into the array of directory entry
// d, a spoiler that flips that bit of a section.
func bitFlipper(d dirEntry) func(bit uint64) func([]byte) {
	return func(bit uint64) func([]byte) {
		return func(s []byte) { s[d.off+bit/8] ^= 1 << (bit % 8) }
	}
}

// expectCorrupt damages a copy of base with each case and requires that
// loading or Check reports ErrCorrupt, and that queries do not panic.
func expectCorrupt(t *testing.T, base []byte, cases []spoiler) {
	t.Helper()
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			s := append([]byte(nil), base...)
			tc.spoil(s)
			m, err := LoadSection(s)
			if err != nil {
				if !errors.Is(err, ErrCorrupt) {
					t.Fatalf("LoadSection = %v, want ErrCorrupt", err)
				}
				return
			}
			if err := exercise(t, m); !errors.Is(err, ErrCorrupt) {
				t.Errorf("Check() = %v, want ErrCorrupt", err)
			}
		})
	}
}
