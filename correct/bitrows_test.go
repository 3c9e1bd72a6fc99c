package correct

import (
	"math/rand/v2"
	"testing"
	"time"

	"github.com/agnivade/levenshtein"
)

// osaMatrix returns the optimal-string-alignment DP of walked against
// typed, D[k][j] for walked prefix k and typed prefix j, computed
// directly from the recurrence (insertion, deletion, substitution, swap
// of adjacent bytes; the restricted Damerau-Levenshtein distance).
func osaMatrix(walked, typed string) [][]int {
	D := make([][]int, len(walked)+1)
	for k := range D {
		D[k] = make([]int, len(typed)+1)
		for j := range D[k] {
			switch {
			case k == 0:
				D[k][j] = j
			case j == 0:
				D[k][j] = k
			default:
				sub := 1
				if walked[k-1] == typed[j-1] {
					sub = 0
				}
				D[k][j] = min(D[k-1][j-1]+sub, D[k-1][j]+1, D[k][j-1]+1)
				if k > 1 && j > 1 && walked[k-1] == typed[j-2] && walked[k-2] == typed[j-1] {
					D[k][j] = min(D[k][j], D[k-2][j-2]+1)
				}
			}
		}
	}
	return D
}

// rowsOf returns unitRows for typed, reset for maxd and pushed with every
// byte of walked.
func rowsOf(t *testing.T, walked, typed string, maxd uint8) *unitRows {
	t.Helper()
	var u unitRows
	u.reset([]byte("some other typed key"), 3, 2) // reset over a used value
	u.reset([]byte(typed), len(walked), maxd)
	for k := range len(walked) {
		u.push(k, walked[k])
	}
	return &u
}

// TestBitRowsDistance checks the bit rows against independent
// computations on random strings: every entry of every row against a
// direct OSA DP (osaMatrix), the last entry uncapped against
// github.com/agnivade/levenshtein (a reference library for plain edit
// distance) where no swap of adjacent bytes can help, and never above
// it, and a few worked examples.
func TestBitRowsDistance(t *testing.T) {
	seed := uint64(time.Now().UnixNano())
	t.Logf("seed %d", seed)
	rng := rand.New(rand.NewPCG(seed, 2))
	word := func(alphabet string, maxLen int) string {
		b := make([]byte, rng.IntN(maxLen+1))
		for i := range b {
			b[i] = alphabet[rng.IntN(len(alphabet))]
		}
		return string(b)
	}
	cases := []struct {
		name     string
		alphabet string
		maxLen   int
		maxd     int // -1: large enough that no entry is capped
	}{
		{"five letters, exact", "abcde", 10, -1},
		{"two letters, exact", "ab", 12, -1},
		{"letters, exact", "abcdefghijklmnopqrstuvwxyz'-", 16, -1},
		{"five letters, capped at 1", "abcde", 10, 1},
		{"five letters, capped at 2", "abcde", 10, 2},
		{"three letters, capped at 2", "abc", 14, 2},
		{"long typed keys, capped at 2", "abcd", 63, 2},
		{"nothing allowed", "abc", 6, 0},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			compared := 0
			for range 800 {
				a, b := word(tc.alphabet, tc.maxLen), word(tc.alphabet, tc.maxLen)
				maxd := tc.maxd
				if maxd < 0 {
					maxd = len(a) + len(b)
				}
				u := rowsOf(t, a, b, uint8(maxd))
				D := osaMatrix(a, b)
				for k := range len(a) + 1 {
					R := u.row(k)
					for e := range maxd + 1 {
						var want uint64
						for j := range len(b) + 1 {
							if D[k][j] <= e {
								want |= 1 << j
							}
						}
						if R[e] != want {
							t.Fatalf("walked %q typed %q maxd %d: row %d entries ≤ %d %b, want %b (seed %d)", a, b, maxd, k, e, R[e], want, seed)
						}
					}
				}
				if got, want := u.final(len(a)), D[len(a)][len(b)] <= maxd; got != want {
					t.Fatalf("walked %q typed %q: final %v, want %v (seed %d)", a, b, got, want, seed)
				}
				if tc.maxd >= 0 {
					continue
				}
				got := distanceOf(u, len(a))
				// Reference: github.com/agnivade/levenshtein (plain edit
				// distance); a swap can only lower it.
				lev := levenshtein.ComputeDistance(a, b)
				if got > lev {
					t.Fatalf("distance(%q, %q) = %d above Levenshtein %d (seed %d)", a, b, got, lev, seed)
				}
				if !hasSwap(a, b) {
					compared++
					if got != lev {
						t.Fatalf("distance(%q, %q) = %d, Levenshtein %d (seed %d)", a, b, got, lev, seed)
					}
				}
			}
			if tc.maxd < 0 && compared < 100 {
				t.Fatalf("only %d swap-free pairs compared with Levenshtein", compared)
			}
		})
	}
	examples := []struct {
		walked, typed string
		want          int
		source        string
	}{
		{"the", "hte", 1, "Damerau 1964: an adjacent transposition is one error"},
		{"sitting", "kitten", 3, "the classic Levenshtein example, from memory"},
		{"abc", "ca", 3, "OSA edits no substring twice, so not 2 as unrestricted Damerau-Levenshtein; common example, from memory"},
		{"", "abc", 3, "empty against three letters: three insertions"},
	}
	for _, ex := range examples {
		if got := distanceOf(rowsOf(t, ex.walked, ex.typed, 10), len(ex.walked)); got != ex.want {
			t.Errorf("distance(%q, %q) = %d, want %d (%s)", ex.walked, ex.typed, got, ex.want, ex.source)
		}
	}
}

// distanceOf returns the last entry of row k: the least e whose set holds
// the typed key's length, or maxd+1.
func distanceOf(u *unitRows, k int) int {
	R := u.row(k)
	for e, s := range R {
		if s>>len(u.t)&1 != 0 {
			return e
		}
	}
	return len(R)
}

// TestBitRowsMatchBanded checks the questions the keys ask of the rows
// (final, nextMask, reach) against the banded byte rows the walk used
// before (refUnitRows, bitrowsref_test.go), on random typed keys, walks,
// sets of letters below and rest lengths: the same answers everywhere, so
// that the walk prunes the same prefixes.
func TestBitRowsMatchBanded(t *testing.T) {
	seed := uint64(time.Now().UnixNano())
	t.Logf("seed %d", seed)
	rng := rand.New(rand.NewPCG(seed, 3))
	const letters = "abcdefghijklmnopqrstuvwxyz'-"
	var u unitRows
	var r refUnitRows
	checked, reached := 0, 0
	for _, maxd := range []uint8{1, 2} {
		for range 1500 {
			alpha := letters[:2+rng.IntN(len(letters)-1)]
			typed := make([]byte, rng.IntN(13))
			for i := range typed {
				typed[i] = alpha[rng.IntN(len(alpha))]
			}
			walked := make([]byte, rng.IntN(len(typed)+4))
			for i := range walked {
				if i < len(typed) && rng.IntN(3) > 0 {
					walked[i] = typed[i] // near the typed key, so rows stay in reach
				} else {
					walked[i] = alpha[rng.IntN(len(alpha))]
				}
			}
			u.reset(typed, len(walked), maxd)
			r.reset(typed, len(walked), maxd)
			for k := 0; ; k++ {
				if got, want := u.final(k), r.final(k); got != want {
					t.Fatalf("typed %q walked %q maxd %d row %d: final %v, want %v (seed %d)", typed, walked[:k], maxd, k, got, want, seed)
				}
				var gm, wm [4]uint64
				gAll, wAll := u.nextMask(k, &gm), r.nextMask(k, &wm)
				if gAll != wAll || !gAll && gm != wm {
					t.Fatalf("typed %q walked %q maxd %d row %d: nextMask %v %x, want %v %x (seed %d)", typed, walked[:k], maxd, k, gAll, gm, wAll, wm, seed)
				}
				for range 8 {
					below := rng.Uint32() & (1<<28 - 1)
					if rng.IntN(2) == 0 {
						below |= r.tall &^ (1 << rng.IntN(28)) // most typed letters below
					}
					lo := uint8(rng.IntN(6))
					hi := lo + uint8(rng.IntN(10))
					if rng.IntN(4) == 0 {
						hi = 255
					}
					checked++
					got, want := u.reach(k, below, lo, hi), r.bound(k, below, lo, hi) <= maxd
					if got {
						reached++
					}
					if got != want {
						t.Fatalf("typed %q walked %q maxd %d row %d below %x lengths %d–%d: reach %v, want %v (seed %d)", typed, walked[:k], maxd, k, below, lo, hi, got, want, seed)
					}
				}
				if k == len(walked) {
					break
				}
				u.push(k, walked[k])
				r.push(k, walked[k])
			}
		}
	}
	if reached == 0 || reached == checked {
		t.Fatalf("reach %d of %d: the comparison tests one answer only", reached, checked)
	}
}
