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

// Two consecutive blocks at once with AVX: a 256-bit register holds one
// running sum of one tone as (re, im) of block b in the low half and of
// block b+1 in the high half, so the additions of two blocks, which do not
// depend on each other, share one instruction and hide each other's
// latency. Same operations per lane as above, so the same bits. At the
// end the four running sums of each block are turned into its four
// segment sums by the matrix a (momentMatrix), in the order of
// combineMoments: ((a[k][0]·m1 + a[k][1]·m2) + a[k][2]·m3) + a[k][3]·m4.

// SEGSUM writes segment sum k of one tone, ((a[k][0]·m1 + a[k][1]·m2) +
// a[k][2]·m3) + a[k][3]·m4 for the running sums m1…m4, to off(DI); the
// matrix row a[k] is at row(R10).
#define SEGSUM(m1, m2, m3, m4, row, off) \
	VBROADCASTSD row(R10), Y12 \
	VMULPD m1, Y12, Y12 \
	VBROADCASTSD row+8(R10), Y13 \
	VMULPD m2, Y13, Y13 \
	VADDPD Y13, Y12, Y12 \
	VBROADCASTSD row+16(R10), Y13 \
	VMULPD m3, Y13, Y13 \
	VADDPD Y13, Y12, Y12 \
	VBROADCASTSD row+24(R10), Y13 \
	VMULPD m4, Y13, Y13 \
	VADDPD Y13, Y12, Y12 \
	VMOVUPD Y12, off(DI)

// SEGSUMS writes the four segment sums of one tone from off(DI) on.
#define SEGSUMS(m1, m2, m3, m4, off) \
	SEGSUM(m1, m2, m3, m4, 0, off) \
	SEGSUM(m1, m2, m3, m4, 32, off+32) \
	SEGSUM(m1, m2, m3, m4, 64, off+64) \
	SEGSUM(m1, m2, m3, m4, 96, off+96)

// func hasAVX() bool
TEXT ·hasAVX(SB), NOSPLIT, $0-1
	MOVL $1, AX
	XORL CX, CX
	CPUID
	ANDL $0x18000000, CX // OSXSAVE (bit 27) and AVX (bit 28)
	CMPL CX, $0x18000000
	JNE noavx
	XORL CX, CX
	XGETBV
	ANDL $6, AX // the OS saves the XMM and YMM state
	CMPL AX, $6
	JNE noavx
	MOVB $1, ret+0(FP)
	RET
noavx:
	MOVB $0, ret+0(FP)
	RET

// func pairSums1AVX(x []float64, d1 int, c []complex128, a *[4][4]float64, out *[16]float64)
TEXT ·pairSums1AVX(SB), NOSPLIT, $0-72
	MOVQ x_base+0(FP), SI
	MOVQ d1+24(FP), DX
	MOVQ c_base+32(FP), R8
	MOVQ a+56(FP), R10
	MOVQ out+64(FP), DI
	MOVQ DX, CX
	SHLQ $3, DX
	VXORPD Y1, Y1, Y1
	VXORPD Y2, Y2, Y2
	VXORPD Y3, Y3, Y3
	VXORPD Y4, Y4, Y4
	TESTQ CX, CX
	JEQ donep1
loopp1:
	VMOVDDUP (SI), X0
	VMOVDDUP (SI)(DX*1), X11
	VINSERTF128 $1, X11, Y0, Y0
	VBROADCASTF128 (R8), Y9
	VMULPD Y0, Y9, Y9
	VADDPD Y9, Y1, Y1
	VADDPD Y1, Y2, Y2
	VADDPD Y2, Y3, Y3
	VADDPD Y3, Y4, Y4
	ADDQ $8, SI
	ADDQ $16, R8
	DECQ CX
	JNE loopp1
donep1:
	SEGSUMS(Y1, Y2, Y3, Y4, 0)
	VZEROUPPER
	RET

// func pairSums2AVX(x []float64, d1 int, c1, c2 []complex128, a *[4][4]float64, out *[32]float64)
TEXT ·pairSums2AVX(SB), NOSPLIT, $0-96
	MOVQ x_base+0(FP), SI
	MOVQ d1+24(FP), DX
	MOVQ c1_base+32(FP), R8
	MOVQ c2_base+56(FP), R9
	MOVQ a+80(FP), R10
	MOVQ out+88(FP), DI
	MOVQ DX, CX
	SHLQ $3, DX
	VXORPD Y1, Y1, Y1
	VXORPD Y2, Y2, Y2
	VXORPD Y3, Y3, Y3
	VXORPD Y4, Y4, Y4
	VXORPD Y5, Y5, Y5
	VXORPD Y6, Y6, Y6
	VXORPD Y7, Y7, Y7
	VXORPD Y8, Y8, Y8
	TESTQ CX, CX
	JEQ donep2
loopp2:
	VMOVDDUP (SI), X0
	VMOVDDUP (SI)(DX*1), X11
	VINSERTF128 $1, X11, Y0, Y0
	VBROADCASTF128 (R8), Y9
	VBROADCASTF128 (R9), Y10
	VMULPD Y0, Y9, Y9
	VMULPD Y0, Y10, Y10
	VADDPD Y9, Y1, Y1
	VADDPD Y10, Y5, Y5
	VADDPD Y1, Y2, Y2
	VADDPD Y5, Y6, Y6
	VADDPD Y2, Y3, Y3
	VADDPD Y6, Y7, Y7
	VADDPD Y3, Y4, Y4
	VADDPD Y7, Y8, Y8
	ADDQ $8, SI
	ADDQ $16, R8
	ADDQ $16, R9
	DECQ CX
	JNE loopp2
donep2:
	SEGSUMS(Y1, Y2, Y3, Y4, 0)
	SEGSUMS(Y5, Y6, Y7, Y8, 128)
	VZEROUPPER
	RET
