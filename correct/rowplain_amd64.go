//go:build amd64 && !purego

package correct

// rowPlain is the plain row of computeRow (no rule completed, no
// transposition) in amd64 assembly (rowplain_amd64.s): R[0] = P[0]+dc,
// R[j+1] = min(P[j]+sub[j], P[j+1]+dc), then the typed extras left to
// right, v = min(R[j+1], v+ins[j]); it returns the row's minimum. Each
// minimum is one MINSS, which gives what Go's min gives for operands that
// are neither NaN nor zeros of opposite signs (the row's entries are sums
// of non-negative prices from +0, so they never are); Go's min adds a
// second MINSS and an OR for those cases, in the left-to-right chain of
// the typed extras too, which made the median 8-letter misspelling about
// 1 % slower (measured, this project; BENCHMARKS.md, round 16). The
// caller guarantees len(R) and len(P) are len(sub)+1 and len(ins) is
// len(sub); TestRowPlainMatchesGo checks it bit for bit against
// rowPlainGo.
//
//go:noescape
func rowPlain(R, P, sub, ins []float32, dc float32) float32
