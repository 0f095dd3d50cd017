//go:build amd64.v3

package dsp

import "math"

// blockSums returns Σ_p c[p][i]·x[p] for the eight tap columns i, with
// fused multiply-adds (GOAMD64=v3 guarantees FMA, so math.FMA compiles to
// one VFMADD231SD and needs no fallback branch). A separate function so
// that its sums, the sample and the loop index have the registers to
// themselves. len(c) must equal len(x).
//
//go:noinline
func blockSums(c [][2 * splineOrder]float64, x []float64) [2 * splineOrder]float64 {
	var s0r, s0i, s1r, s1i, s2r, s2i, s3r, s3i float64
	c = c[:len(x)]
	// Two passes of four sums, so nothing spills to the stack.
	for p, v := range x {
		q := &c[p]
		s0r = math.FMA(q[0], v, s0r)
		s0i = math.FMA(q[1], v, s0i)
		s1r = math.FMA(q[2], v, s1r)
		s1i = math.FMA(q[3], v, s1i)
	}
	for p, v := range x {
		q := &c[p]
		s2r = math.FMA(q[4], v, s2r)
		s2i = math.FMA(q[5], v, s2i)
		s3r = math.FMA(q[6], v, s3r)
		s3i = math.FMA(q[7], v, s3i)
	}
	return [2 * splineOrder]float64{s0r, s0i, s1r, s1i, s2r, s2i, s3r, s3i}
}
