//go:build !amd64 || purego

package correct

// rowPlain is the plain row of computeRow (no rule completed, no
// transposition): R[0] = P[0]+dc, R[j+1] = min(P[j]+sub[j], P[j+1]+dc),
// then the typed extras left to right, v = min(R[j+1], v+ins[j]); it
// returns the row's minimum. The caller guarantees len(R) and len(P) are
// len(sub)+1 and len(ins) is len(sub). (On amd64 without the purego tag
// it is in assembly, rowplain_amd64.s.)
func rowPlain(R, P, sub, ins []float32, dc float32) float32 {
	return rowPlainGo(R, P, sub, ins, dc)
}
