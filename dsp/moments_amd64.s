#include "textflag.h"

// Block moments of the first lock-in stage (see moments.go) with SSE2
// packed pairs: a running sum's re and im share one register, the sample
// is broadcast to both halves, and each tone costs one MULPD and four
// ADDPD per sample. Every operation rounds as the scalar Go form does.

// func blockMoments1(x []float64, c []complex128, out *[8]float64)
TEXT ·blockMoments1(SB), NOSPLIT, $0-56
	MOVQ x_base+0(FP), SI
	MOVQ x_len+8(FP), CX
	MOVQ c_base+24(FP), R8
	MOVQ out+48(FP), DI
	XORPD X1, X1
	XORPD X2, X2
	XORPD X3, X3
	XORPD X4, X4
	TESTQ CX, CX
	JEQ done1
loop1:
	MOVSD (SI), X0
	UNPCKLPD X0, X0
	MOVUPD (R8), X9
	MULPD X0, X9
	ADDPD X9, X1
	ADDPD X1, X2
	ADDPD X2, X3
	ADDPD X3, X4
	ADDQ $8, SI
	ADDQ $16, R8
	DECQ CX
	JNE loop1
done1:
	MOVUPD X1, 0(DI)
	MOVUPD X2, 16(DI)
	MOVUPD X3, 32(DI)
	MOVUPD X4, 48(DI)
	RET

// func blockMoments2(x []float64, c1, c2 []complex128, out *[16]float64)
TEXT ·blockMoments2(SB), NOSPLIT, $0-80
	MOVQ x_base+0(FP), SI
	MOVQ x_len+8(FP), CX
	MOVQ c1_base+24(FP), R8
	MOVQ c2_base+48(FP), R9
	MOVQ out+72(FP), DI
	XORPD X1, X1
	XORPD X2, X2
	XORPD X3, X3
	XORPD X4, X4
	XORPD X5, X5
	XORPD X6, X6
	XORPD X7, X7
	XORPD X8, X8
	TESTQ CX, CX
	JEQ done2
loop2:
	MOVSD (SI), X0
	UNPCKLPD X0, X0
	MOVUPD (R8), X9
	MOVUPD (R9), X10
	MULPD X0, X9
	MULPD X0, X10
	ADDPD X9, X1
	ADDPD X10, X5
	ADDPD X1, X2
	ADDPD X5, X6
	ADDPD X2, X3
	ADDPD X6, X7
	ADDPD X3, X4
	ADDPD X7, X8
	ADDQ $8, SI
	ADDQ $16, R8
	ADDQ $16, R9
	DECQ CX
	JNE loop2
done2:
	MOVUPD X1, 0(DI)
	MOVUPD X2, 16(DI)
	MOVUPD X3, 32(DI)
	MOVUPD X4, 48(DI)
	MOVUPD X5, 64(DI)
	MOVUPD X6, 80(DI)
	MOVUPD X7, 96(DI)
	MOVUPD X8, 112(DI)
	RET
