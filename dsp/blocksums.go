package dsp

// blockSums returns Σ_p c[p][i]·x[p] for the eight tap columns i (the
// first stage for blocks shorter than 8 samples, see momentMatrix). It is a
// separate function so that its sums, the sample and the loop index have
// the registers to themselves (inlined into stage1, the compiler spilled
// them to the stack on every sample). len(c) must equal len(x).
//
//go:noinline
func blockSums(c [][2 * splineOrder]float64, x []float64) [2 * splineOrder]float64 {
	var s0r, s0i, s1r, s1i, s2r, s2i, s3r, s3i float64
	c = c[:len(x)]
	// Two passes of four sums: eight sums and their products at once
	// exceed the registers Go's compiler allocates, and spill.
	for p, v := range x {
		q := &c[p]
		s0r += q[0] * v
		s0i += q[1] * v
		s1r += q[2] * v
		s1i += q[3] * v
	}
	for p, v := range x {
		q := &c[p]
		s2r += q[4] * v
		s2i += q[5] * v
		s3r += q[6] * v
		s3i += q[7] * v
	}
	return [2 * splineOrder]float64{s0r, s0i, s1r, s1i, s2r, s2i, s3r, s3i}
}
