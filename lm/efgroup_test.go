package lm

import (
	"fmt"
	"math/rand/v2"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// randomGroup returns n distinct sorted word IDs below V, drawn with rng.
func randomGroup(rng *rand.Rand, n, V int) []uint64 {
	seen := make(map[uint64]bool, n)
	ws := make([]uint64, 0, n)
	for len(ws) < n {
		w := uint64(rng.IntN(V))
		if !seen[w] {
			seen[w] = true
			ws = append(ws, w)
		}
	}
	slices.Sort(ws)
	return ws
}

// TestWordGroupRoundTrip codes groups of many lengths and densities and
// reads them back. The reference is the input itself (every word reads back
// at its index) and the standard library's slices.BinarySearch (the index a
// lower-bound search must return, and whether the word is present).
func TestWordGroupRoundTrip(t *testing.T) {
	seed := uint64(7)
	t.Logf("seed %d", seed)
	rng := rand.New(rand.NewPCG(seed, 3))
	for _, V := range []int{3, 40, 1000, 237_133, MaxVocab} {
		for _, n := range []int{1, 2, 3, 63, 127, 128, 129, 300, 1000, 5000} {
			if n > V {
				continue
			}
			for _, shape := range []string{"random", "dense", "tail"} {
				t.Run(fmt.Sprintf("V=%d/n=%d/%s", V, n, shape), func(t *testing.T) {
					var ws []uint64
					switch shape {
					case "random":
						ws = randomGroup(rng, n, V)
					case "dense": // the n lowest IDs
						for i := range n {
							ws = append(ws, uint64(i))
						}
					case "tail": // the n highest IDs
						for i := range n {
							ws = append(ws, uint64(V-n+i))
						}
					}
					checkGroup(t, ws, V, rng)
				})
			}
		}
	}
}

// checkGroup codes ws after a random prefix of bits (groups start anywhere
// in a stream) and checks every read against ws.
func checkGroup(t *testing.T, ws []uint64, V int, rng *rand.Rand) {
	t.Helper()
	var s bitStream
	pad := uint(rng.IntN(64))
	if pad > 0 {
		s.put(rng.Uint64(), pad)
	}
	base := s.n
	putGroup(&s, ws, V)
	sh := groupShape(len(ws), V)
	if got := s.n - base; got != sh.size {
		t.Fatalf("putGroup wrote %d bits, groupShape says %d", got, sh.size)
	}
	s.put(^uint64(0), 64) // ones after the group must not leak into it
	var g efGroup
	if !g.open(s.words(), base, len(ws), V, s.n) {
		t.Fatalf("open refuses a group that fits")
	}
	for i, w := range ws {
		if got := g.at(i); got != w {
			t.Fatalf("at(%d) = %d, want %d", i, got, w)
		}
	}
	probes := make([]uint64, 0, 3*len(ws)+4)
	for _, w := range ws {
		probes = append(probes, w, w+1, max(w, 1)-1)
	}
	probes = append(probes, 0, uint64(V-1), uint64(V), uint64(V)+1000)
	if V <= 2000 {
		for w := range uint64(V + 1) {
			probes = append(probes, w)
		}
	}
	for _, w := range probes {
		want, wantFound := slices.BinarySearch(ws, w) // stdlib reference
		if got, found := g.lower(w); got != want || found != wantFound {
			t.Fatalf("lower(%d) = %d, %v; slices.BinarySearch gives %d, %v", w, got, found, want, wantFound)
		}
	}
}

// TestWordGroupSize checks groupShape's size against the Elias-Fano bound
// of at most 2 + ⌈log2(U/n)⌉ bits per value for n values below U (Elias
// 1974; the bound as stated by Vigna 2013, "Quasi-succinct indices",
// section 3 — quoted from memory), the select samples apart, and that
// groups of 100 words or more take fewer bits than plain IDs of
// bitsFor(V − 1) bits, samples included.
func TestWordGroupSize(t *testing.T) {
	for _, V := range []int{3, 1000, 237_133, MaxVocab} {
		for _, n := range []int{1, 2, 10, 100, 1000, 10_000} {
			if n > V {
				continue
			}
			sh := groupShape(n, V)
			ef := sh.size - uint64(sh.n1+sh.n0)*uint64(sh.sw)
			c := uint64(0) // ⌈log2(V/n)⌉
			for uint64(n)<<c < uint64(V) {
				c++
			}
			if bound := uint64(n) * (2 + c); ef > bound {
				t.Errorf("V=%d n=%d: %d bits without samples, the Elias-Fano bound is %d", V, n, ef, bound)
			}
			plain := uint64(n) * uint64(bitsFor(uint64(V-1)))
			if n >= 100 && n*4 <= V && sh.size >= plain {
				t.Errorf("V=%d n=%d: %d bits, plain IDs take %d", V, n, sh.size, plain)
			}
		}
	}
}

// TestWordGroupDamage reads groups whose bits (samples included) are
// random: no read may panic, and lower stays within [0, n].
func TestWordGroupDamage(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 5))
	for _, n := range []int{1, 5, 129, 700} {
		V := 5000
		sh := groupShape(n, V)
		w := make([]uint64, (sh.size+63)/64+1)
		for trial := range 50 {
			for i := range w[:len(w)-1] {
				w[i] = rng.Uint64()
				if trial%2 == 1 { // mostly ones or mostly zeros
					w[i] = -(w[i] & 1)
				}
			}
			var g efGroup
			if !g.open(w, 0, n, V, uint64(64*(len(w)-1))) {
				t.Fatal("open refuses a group that fits")
			}
			for i := range n {
				g.at(i)
			}
			for _, x := range []uint64{0, 1, uint64(V / 2), uint64(V - 1), uint64(V)} {
				if i, _ := g.lower(x); i < 0 || i > n {
					t.Fatalf("n=%d: lower(%d) = %d outside [0, %d]", n, x, i, n)
				}
			}
		}
	}
}

// TestCodedRanksAgree lays the Opticks order-3 model out as versions 3, 4
// and 5 and checks that versions 4 and 5 answer exactly as version 3 does
// (itself checked against version 1 by TestLayoutVersionsAgree) for
// contexts of the test text, and that version 5 codes the ranks of some
// groups, among them groups long enough for select samples.
func TestCodedRanksAgree(t *testing.T) {
	x := buildText(t, readFile(t, filepath.Join("testdata", "opticks-train.txt")), 3, ScanOptions{Pretokenized: true}, 8)
	var models []*Model
	for _, v := range []int{3, 4, 5} {
		sec, err := AppendSection(nil, x.b, LayoutOptions{QuantBits: 8, Version: v})
		if err != nil {
			t.Fatal(err)
		}
		m, err := LoadSection(sec)
		if err != nil {
			t.Fatal(err)
		}
		if err := m.Check(); err != nil {
			t.Fatalf("version %d: Check: %v", v, err)
		}
		models = append(models, m)
	}
	m5 := models[2]
	keys, ok := m5.levelKeys(2)
	if !ok {
		t.Fatal("levelKeys(2) fails on a valid section")
	}
	coded, sampled := 0, 0
	for e := range m5.lv[1].size {
		nd, ok := m5.groupNode(&m5.lv[1], e, keys[2*e:2*e+2])
		if ok && nd.efRanks {
			coded++
			if nd.hi > efSample1 {
				sampled++
			}
		}
	}
	t.Logf("version 5: %d groups of coded ranks, %d of them with select samples", coded, sampled)
	if coded == 0 || sampled == 0 {
		t.Fatalf("version 5 codes %d groups of ranks (%d with samples); the test needs both kinds", coded, sampled)
	}
	test := strings.Fields(readFile(t, filepath.Join("testdata", "opticks-test.txt")))
	V := uint32(m5.VocabSize())
	for i := 2; i < min(len(test), 80); i++ {
		ctx := x.ids(t, test[i-2:i])
		for w := range V {
			a := models[0].LogProb(ctx, w)
			for j, m := range models[1:] {
				if b := m.LogProb(ctx, w); a != b {
					t.Fatalf("LogProb(%v, %d): version 3 %v, version %d %v", ctx, w, a, j+4, b)
				}
			}
		}
		for _, r := range [][2]uint32{{0, V}, {V / 3, V / 2}, {ctx[1], min(ctx[1]+50, V)}} {
			a := models[0].TopK(ctx, r[0], r[1], 8, nil)
			for j, m := range models[1:] {
				if b := m.TopK(ctx, r[0], r[1], 8, nil); !slices.Equal(a, b) {
					t.Fatalf("TopK(%v, %v): version 3 %v, version %d %v", ctx, r, a, j+4, b)
				}
			}
		}
	}
}
