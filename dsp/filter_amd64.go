package dsp

// filterPairAVX is filterPairGo in assembly (filter_amd64.s); it needs AVX
// and len(dst) ≥ len(x).
//
//go:noescape
func filterPairAVX(c *[10][2]float64, dst, x []complex128, zp, zq *[2]complex128)

// filterPair runs the sections p then q (states zp, zq) over x into dst
// in one loop, with the operations of filterState's single-section loop:
// the AVX kernel when the processor has it, filterPairGo otherwise, with
// the same bits.
func filterPair(p, q Section, dst, x []complex128, zp, zq *[2]complex128) {
	if !pairKernel {
		filterPairGo(p, q, dst, x, zp, zq)
		return
	}
	var c [10][2]float64
	for i, v := range [10]float64{p.B[0], p.B[1], p.B[2], p.A[1], p.A[2], q.B[0], q.B[1], q.B[2], q.A[1], q.A[2]} {
		c[i] = [2]float64{v, v}
	}
	filterPairAVX(&c, dst[:len(x)], x, zp, zq)
}
