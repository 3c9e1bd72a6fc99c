package lm

import "math/bits"

// Final tables: the last step of counting.
//
// Counted n-grams carry temporary word IDs (first-seen order). Once the
// vocabulary is complete each word gets its final ID, its lexicographic
// rank, and every order's n-grams are renamed, sorted, their equal keys
// summed and laid out as a table. For orders up to 3 the renamed key is
// squeezed to n fields of just enough bits for the vocabulary and, when the
// largest count fits beside it, key and count travel as one 8-byte word
// through the radix sort (radixSortBits) and are decoded straight into the
// table: no 24-byte entry is written back.

// gramSource is a set of counted n-grams of one order, in any order and
// possibly repeating keys, whose IDs to maps to final IDs: entries, or a
// worker's table of orders 2..3.
type gramSource struct {
	ents  []ent
	grams *countMap
	to    []uint32
}

func (s gramSource) len() int {
	if s.grams != nil {
		return s.grams.len()
	}
	return len(s.ents)
}

// maxCount returns the largest count of s.
func (s gramSource) maxCount() uint64 {
	var mc uint64
	if s.grams != nil {
		return s.grams.maxCount()
	}
	for _, e := range s.ents {
		mc = max(mc, e.c)
	}
	return mc
}

// buildTable lays out the order-n n-grams of srcs as a table in final IDs,
// sorted by key with the counts of equal keys summed. vocab is the number of
// final IDs. For orders up to 3 up to workers goroutines share the work
// (but for the final layout), and the cost is O(total × key bits / 11)
// (radix sort); above, O(total log total) on one goroutine.
func buildTable(n int, srcs []gramSource, vocab, workers int) table {
	total := 0
	off := make([]int, len(srcs)) // where each source's entries start
	for i, s := range srcs {
		off[i] = total
		total += s.len()
	}
	workers = max(1, workers)
	maxcs := make([]uint64, len(srcs))
	eachSource(len(srcs), workers, func(i int) { maxcs[i] = srcs[i].maxCount() })
	var maxc uint64
	for _, mc := range maxcs {
		maxc = max(maxc, mc)
	}
	b := uint(bits.Len(uint(max(vocab, 1) - 1)))
	keyBits := uint(n) * b
	cb := uint(bits.Len64(maxc))
	if n > 3 || keyBits+cb > 64 {
		ents := make([]ent, 0, total)
		for _, s := range srcs {
			if s.grams != nil {
				for k, c := range s.grams.all {
					ents = append(ents, ent{renameKey(key2{k, 0}, n, s.to), c})
				}
				continue
			}
			for _, e := range s.ents {
				ents = append(ents, ent{renameKey(e.k, n, s.to), e.c})
			}
		}
		return layoutTable(n, ents)
	}
	p := make([]uint64, total)
	eachSource(len(srcs), workers, func(i int) {
		s, q := srcs[i], p[off[i]:off[i]]
		if s.grams != nil {
			for k, c := range s.grams.all {
				q = append(q, squeezeKey(k, n, b, s.to)<<cb|c)
			}
			return
		}
		for _, e := range s.ents {
			q = append(q, squeezeKey(e.k[0], n, b, s.to)<<cb|e.c)
		}
	})
	p = radixSortParallel(p, nil, cb, keyBits, workers)
	return decodeTable(n, p, b, cb)
}

// eachSource calls f(0) … f(n-1) on up to workers goroutines.
func eachSource(n, workers int, f func(i int)) {
	if workers <= 1 || n <= 1 {
		for i := range n {
			f(i)
		}
		return
	}
	parallelDo(min(workers, n), func(w int) {
		for i := w; i < n; i += workers {
			f(i)
		}
	})
}

// squeezeKey renames the IDs of the packed order-n key k (n ≤ 3, 21 bits
// an ID) through to and packs them again with b bits an ID.
func squeezeKey(k uint64, n int, b uint, to []uint32) uint64 {
	const m21 = 1<<21 - 1
	switch n {
	case 1:
		return uint64(to[k&m21])
	case 2:
		return uint64(to[k>>21&m21])<<b | uint64(to[k&m21])
	}
	return (uint64(to[k>>42&m21])<<b|uint64(to[k>>21&m21]))<<b | uint64(to[k&m21])
}

// decodeTable lays out sorted packed n-grams (key of n fields of b bits
// above a cb-bit count) as a table, summing the counts of equal keys.
func decodeTable(n int, p []uint64, b, cb uint) table {
	distinct := 0
	for i, v := range p {
		if i == 0 || v>>cb != p[i-1]>>cb {
			distinct++
		}
	}
	t := table{n: n, ids: make([]uint32, distinct*n), cnt: make([]uint64, distinct)}
	bmask := uint64(1)<<b - 1
	cmask := uint64(1)<<cb - 1
	e := -1
	for i, v := range p {
		if i > 0 && v>>cb == p[i-1]>>cb {
			t.cnt[e] += v & cmask
			continue
		}
		e++
		k := v >> cb
		ids := t.ids[e*n : e*n+n]
		for j := n - 1; j >= 0; j-- {
			ids[j] = uint32(k & bmask)
			k >>= b
		}
		t.cnt[e] = v & cmask
	}
	return t
}

// finishTable renames entries of order n to final IDs through rank, sorts
// them, sums the counts of equal keys and lays them out as a table.
func finishTable(n int, ents []ent, rank []uint32) table {
	return buildTable(n, []gramSource{{ents: ents, to: rank}}, len(rank), 1)
}

// layoutTable sorts entries of order n (in final IDs), sums the counts of
// equal keys and lays them out as a table. ents is used as scratch space.
func layoutTable(n int, ents []ent) table {
	sortEnts(ents)
	ents = sumEqual(ents)
	t := table{n: n, ids: make([]uint32, len(ents)*n), cnt: make([]uint64, len(ents))}
	for i, e := range ents {
		unpackKey(e.k, n, t.ids[i*n:i*n]) // appends in place
		t.cnt[i] = e.c
	}
	return t
}

// sumEqual sums the counts of equal neighbours of sorted entries in place
// (a run read from count shards may repeat keys) and returns the distinct
// entries.
func sumEqual(ents []ent) []ent {
	w := 0
	for i, e := range ents {
		if i > 0 && e.k == ents[w-1].k {
			ents[w-1].c += e.c
			continue
		}
		ents[w] = e
		w++
	}
	return ents[:w]
}
