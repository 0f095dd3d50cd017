#include "textflag.h"

// Two second-order sections in transposed direct form II over complex
// samples, with AVX on (re, im) pairs: the operations and their order are
// those of filterPairGo (butter.go), so the bits are the same. The ten
// coefficients are at c, each duplicated into a pair: pb0 pb1 pb2 pa1 pa2
// qb0 qb1 qb2 qa1 qa2.

// func filterPairAVX(c *[10][2]float64, dst, x []complex128, zp, zq *[2]complex128)
TEXT ·filterPairAVX(SB), NOSPLIT, $0-72
	MOVQ c+0(FP), R9
	MOVQ dst_base+8(FP), DI
	MOVQ x_base+32(FP), SI
	MOVQ x_len+40(FP), CX
	MOVQ zp+56(FP), R10
	MOVQ zq+64(FP), R11
	VMOVUPD 0(R10), X10
	VMOVUPD 16(R10), X11
	VMOVUPD 0(R11), X12
	VMOVUPD 16(R11), X13
	TESTQ CX, CX
	JEQ donef
loopf:
	VMOVUPD (SI), X0
	// Section p: y = b0·v + z1; z1 = (b1·v + z2) − a1·y; z2 = b2·v − a2·y.
	VMULPD 0(R9), X0, X1
	VADDPD X10, X1, X1
	VMULPD 16(R9), X0, X3
	VADDPD X11, X3, X3
	VMULPD 48(R9), X1, X4
	VSUBPD X4, X3, X10
	VMULPD 32(R9), X0, X5
	VMULPD 64(R9), X1, X6
	VSUBPD X6, X5, X11
	// Section q on y.
	VMULPD 80(R9), X1, X2
	VADDPD X12, X2, X2
	VMULPD 96(R9), X1, X3
	VADDPD X13, X3, X3
	VMULPD 128(R9), X2, X4
	VSUBPD X4, X3, X12
	VMULPD 112(R9), X1, X5
	VMULPD 144(R9), X2, X6
	VSUBPD X6, X5, X13
	VMOVUPD X2, (DI)
	ADDQ $16, SI
	ADDQ $16, DI
	DECQ CX
	JNE loopf
donef:
	VMOVUPD X10, 0(R10)
	VMOVUPD X11, 16(R10)
	VMOVUPD X12, 0(R11)
	VMOVUPD X13, 16(R11)
	RET
