package trie

import (
	"sync"
	"testing"
)

// freshLexicon loads the SUBTLEX-US section again, so that the test starts
// from an empty word cache that no other test has filled.
func freshLexicon(t *testing.T) (*corpusLexicon, *Lexicon) {
	t.Helper()
	c := loadCorpus(t, subtlexPath)
	lex, err := LoadSection(c.section)
	if err != nil {
		t.Fatal(err)
	}
	return c, lex
}

// slotIndex returns the index of id's slot.
func slotIndex(c *wordCache, id uint32) int {
	s := c.slotFor(id)
	for i := range c.slots {
		if &c.slots[i] == s {
			return i
		}
	}
	return -1
}

// collidingIDs returns up to k ids of words that share one cache slot,
// preferring words of 17 to 24 bytes, which fill all three words of the
// slot, so that a torn read would show.
func collidingIDs(t *testing.T, words []string, k int) []uint32 {
	t.Helper()
	var c wordCache
	bySlot := make(map[int][]uint32)
	best := -1
	for id, w := range words {
		if len(w) <= 16 || len(w) > cacheMaxLen {
			continue
		}
		i := slotIndex(&c, uint32(id))
		bySlot[i] = append(bySlot[i], uint32(id))
		if best < 0 || len(bySlot[i]) > len(bySlot[best]) {
			best = i
		}
	}
	if best < 0 || len(bySlot[best]) < 2 {
		t.Fatalf("found no long words sharing a slot")
	}
	ids := bySlot[best]
	return ids[:min(k, len(ids))]
}

// TestWordCacheEveryID asks for every id of the SUBTLEX-US lexicon twice
// (a miss that fills the slot, then a hit) and checks both answers against
// the reference list sorted by Go's sort.Strings (id i is the i-th word in
// byte order by definition of the section) and against the uncached FST
// walk. Words of at most 24 bytes must be in the cache after the first
// call, longer ones never.
func TestWordCacheEveryID(t *testing.T) {
	c, lex := freshLexicon(t)
	buf := make([]byte, 0, MaxWordLen)
	ref := make([]byte, 0, MaxWordLen)
	for id, want := range c.words {
		for pass, name := range []string{"miss", "hit"} {
			buf = lex.AppendWord(buf[:0], uint32(id))
			if string(buf) != want {
				t.Fatalf("%s: AppendWord(%d) = %q, want %q (sort.Strings order)", name, id, buf, want)
			}
			ref = lex.fstWord(ref[:0], uint32(id))
			if string(ref) != string(buf) {
				t.Fatalf("%s: AppendWord(%d) = %q, fstWord gives %q", name, id, buf, ref)
			}
			if pass == 0 {
				_, cached := lex.cache.Load().appendWord(nil, uint32(id))
				if wantCached := len(want) <= cacheMaxLen; cached != wantCached {
					t.Fatalf("after AppendWord(%d) (%d bytes), cached = %v, want %v", id, len(want), cached, wantCached)
				}
			}
		}
	}
}

// TestWordCacheAppends checks that a hit appends to what dst holds, and
// that ids not below Len leave dst unchanged.
func TestWordCacheAppends(t *testing.T) {
	c, lex := freshLexicon(t)
	n := uint32(len(c.words))
	tests := []struct {
		name string
		id   uint32
		want string
	}{
		{name: "first", id: 0, want: "pre:" + c.words[0]},
		{name: "last", id: n - 1, want: "pre:" + c.words[n-1]},
		{name: "middle", id: n / 2, want: "pre:" + c.words[n/2]},
		{name: "len", id: n, want: "pre:"},
		{name: "max", id: ^uint32(0), want: "pre:"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			for _, pass := range []string{"miss", "hit"} {
				got := lex.AppendWord([]byte("pre:"), tc.id)
				if string(got) != tc.want {
					t.Fatalf("%s: AppendWord(pre:, %d) = %q, want %q", pass, tc.id, got, tc.want)
				}
			}
		})
	}
}

// TestWordCacheSlot drives one slot through the seqlock states: a reader
// must miss on an empty, busy or foreign slot, and a writer must not fill
// a busy slot or cache a word too long for it.
func TestWordCacheSlot(t *testing.T) {
	long := []byte("abcdefghijklmnopqrstuvwxyz") // 26 bytes, above cacheMaxLen
	tests := []struct {
		name    string
		prepare func(c *wordCache)
		id      uint32
		want    string // "" for a miss
	}{
		{name: "empty slot", prepare: func(*wordCache) {}, id: 0},
		{name: "stored", prepare: func(c *wordCache) { c.store(7, []byte("seven")) }, id: 7, want: "seven"},
		{name: "exactly full", prepare: func(c *wordCache) { c.store(7, long[:cacheMaxLen]) }, id: 7, want: string(long[:cacheMaxLen])},
		{name: "other id", prepare: func(c *wordCache) { c.store(7, []byte("seven")) }, id: 8},
		{name: "too long", prepare: func(c *wordCache) { c.store(7, long) }, id: 7},
		{name: "empty word", prepare: func(c *wordCache) { c.store(0, nil) }, id: 0},
		{name: "busy", prepare: func(c *wordCache) {
			c.store(7, []byte("seven"))
			s := c.slotFor(7)
			s.tag.Store(s.tag.Load() + 1) // a writer holds it
		}, id: 7},
		{name: "busy slot not filled", prepare: func(c *wordCache) {
			s := c.slotFor(7)
			s.tag.Store(1)
			c.store(7, []byte("seven"))
		}, id: 7},
		{name: "overwritten", prepare: func(c *wordCache) {
			c.store(7, []byte("seven"))
			c.store(7, []byte("sieben"))
		}, id: 7, want: "sieben"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			c := new(wordCache)
			tc.prepare(c)
			got, ok := c.appendWord(nil, tc.id)
			if ok != (tc.want != "") || string(got) != tc.want {
				t.Fatalf("appendWord(%d) = %q, %v, want %q, %v", tc.id, got, ok, tc.want, tc.want != "")
			}
		})
	}
}

// TestWordCacheConcurrent lets goroutines hammer the same slots: each asks,
// in its own order, for a set of ids that all map to one slot (so nearly
// every call overwrites what another goroutine reads), and for a spread of
// ids over the whole lexicon. Every answer must be the reference word;
// run it with -race to check the slots for data races.
func TestWordCacheConcurrent(t *testing.T) {
	c, lex := freshLexicon(t)
	n := uint32(len(c.words))
	same := collidingIDs(t, c.words, 8)
	const goroutines, rounds = 8, 5000
	var wg sync.WaitGroup
	errs := make(chan string, goroutines)
	for g := range goroutines {
		wg.Go(func() {
			buf := make([]byte, 0, MaxWordLen)
			for r := range rounds {
				id := same[(r+g)%len(same)]
				if r%3 == 2 {
					id = uint32(r*7919+g*104729) % n
				}
				buf = lex.AppendWord(buf[:0], id)
				if string(buf) != c.words[id] {
					errs <- string(buf) + " for " + c.words[id]
					return
				}
			}
		})
	}
	wg.Wait()
	close(errs)
	for e := range errs {
		t.Errorf("concurrent AppendWord gave %s", e)
	}
}

// TestWordCacheAllocs checks that AppendWord allocates nothing, once the
// cache exists, for a hit, for a miss that fills a slot, for ids that keep
// evicting each other and for a word too long to cache.
func TestWordCacheAllocs(t *testing.T) {
	c, lex := freshLexicon(t)
	n := uint32(len(c.words))
	same := collidingIDs(t, c.words, 2)
	longID := -1
	for i, w := range c.words {
		if len(w) > cacheMaxLen {
			longID = i
			break
		}
	}
	if longID < 0 {
		t.Fatalf("SUBTLEX-US has no word above %d bytes", cacheMaxLen)
	}
	buf := make([]byte, 0, MaxWordLen)
	lex.AppendWord(buf, 0) // makes the cache
	var next uint32
	tests := []struct {
		name string
		call func()
	}{
		{name: "hit", call: func() { buf = lex.AppendWord(buf[:0], 0) }},
		{name: "miss", call: func() {
			buf = lex.AppendWord(buf[:0], next)
			next = (next + 7919) % n
		}},
		{name: "evicting", call: func() {
			buf = lex.AppendWord(buf[:0], same[next%2])
			next++
		}},
		{name: "too long", call: func() { buf = lex.AppendWord(buf[:0], uint32(longID)) }},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if a := testing.AllocsPerRun(200, tc.call); a != 0 {
				t.Fatalf("AppendWord allocates %.1f times a call, want 0", a)
			}
		})
	}
}
