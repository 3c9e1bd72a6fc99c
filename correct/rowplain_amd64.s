//go:build amd64 && !purego

#include "textflag.h"

// rowPlain: see rowplain_amd64.go. Registers: DI R, SI P, DX sub, R8 ins,
// CX len(sub), AX j, X7 dc, X0 v, X3 m.
//
// func rowPlain(R, P, sub, ins []float32, dc float32) float32
TEXT ·rowPlain(SB), NOSPLIT, $0-108
	MOVQ  R_base+0(FP), DI
	MOVQ  P_base+24(FP), SI
	MOVQ  sub_base+48(FP), DX
	MOVQ  sub_len+56(FP), CX
	MOVQ  ins_base+72(FP), R8
	MOVSS dc+96(FP), X7

	// R[0] = P[0] + dc
	MOVSS (SI), X0
	ADDSS X7, X0
	MOVSS X0, (DI)
	XORQ  AX, AX

first:
	// R[j+1] = min(P[j]+sub[j], P[j+1]+dc)
	CMPQ  AX, CX
	JGE   second
	MOVSS (SI)(AX*4), X1
	ADDSS (DX)(AX*4), X1
	MOVSS 4(SI)(AX*4), X2
	ADDSS X7, X2
	MINSS X2, X1
	MOVSS X1, 4(DI)(AX*4)
	INCQ  AX
	JMP   first

second:
	// v = R[0] in X0, m = v in X3; then v = min(R[j+1], v+ins[j]),
	// R[j+1] = v, m = min(m, v).
	MOVAPS X0, X3
	XORQ   AX, AX

loop:
	CMPQ   AX, CX
	JGE    done
	ADDSS  (R8)(AX*4), X0
	MOVSS  4(DI)(AX*4), X1
	MINSS  X0, X1
	MOVAPS X1, X0
	MOVSS  X1, 4(DI)(AX*4)
	MINSS  X1, X3
	INCQ   AX
	JMP    loop

done:
	MOVSS X3, ret+104(FP)
	RET
