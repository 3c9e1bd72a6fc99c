package trie

import (
	"testing"
)

// TestSkipWalkAgrees checks that a lexicon opened without the load-time walk
// answers exactly like a fully checked one (reference: the checked loader,
// itself tested against sort.SearchStrings).
func TestSkipWalkAgrees(t *testing.T) {
	words := []string{"a", "about", "above", "cat", "caterpillar", "dog", "zebra", "é", "ébène"}
	sec, full := build(t, words...)
	fast, err := LoadSectionWith(sec, LoadOptions{SkipWalk: true})
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range append(words, "ab", "zz", "") {
		id1, ok1 := full.ID(w)
		id2, ok2 := fast.ID(w)
		if id1 != id2 || ok1 != ok2 {
			t.Errorf("ID(%q) = %d,%v fast, %d,%v full", w, id2, ok2, id1, ok1)
		}
		lo1, hi1 := full.PrefixRange(w)
		lo2, hi2 := fast.PrefixRange(w)
		if lo1 != lo2 || hi1 != hi2 {
			t.Errorf("PrefixRange(%q) = %d,%d fast, %d,%d full", w, lo2, hi2, lo1, hi1)
		}
	}
	for id := range uint32(len(words)) {
		if fast.Word(id) != full.Word(id) {
			t.Errorf("Word(%d) = %q fast, %q full", id, fast.Word(id), full.Word(id))
		}
	}
	if fast.FST() == nil {
		t.Errorf("FST() = nil on a valid section")
	}
}

// TestSkipWalkDamageNoPanic flips every byte of a small section: queries on
// whatever loads without the walk must not panic (the project's rule that bad
// bytes never panic).
func TestSkipWalkDamageNoPanic(t *testing.T) {
	sec, _ := build(t, "a", "about", "above", "cat", "caterpillar", "dog", "zebra")
	for i := range sec {
		for _, x := range []byte{0x01, 0x80, 0xff} {
			b := append([]byte(nil), sec...)
			b[i] ^= x
			l, err := LoadSectionWith(b, LoadOptions{SkipWalk: true})
			if err != nil {
				continue
			}
			for _, w := range []string{"a", "cat", "zebra", "q", ""} {
				l.ID(w)
				l.PrefixRange(w)
			}
			for id := range uint32(l.Len() + 2) {
				l.Word(id)
				l.Surface(id)
			}
			_ = l.FST()
		}
	}
}
