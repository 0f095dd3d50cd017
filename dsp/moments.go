package dsp

// Block moments of the first lock-in stage: the cascade of four complex
// running sums over the mixed samples of one block (see momentMatrix),
// for one tone or for two tones sharing one read of the samples.
//
// Each running sum is kept as a pair (re, im) and updated as
//
//	a1 += v·c[p];  a2 += a1;  a3 += a2;  a4 += a3
//
// with every product rounded before it is added (no fused multiply-add),
// so the assembly kernel of blockMoments1 and blockMoments2 (amd64, SSE2
// packed pairs: one multiplication and four additions per sample and
// tone, each acting on re and im at once) and the Go form below give the
// same bits. The result holds a1…a4 as re, im pairs: [a1r a1i a2r a2i a3r
// a3i a4r a4i], for blockMoments2 the first tone's eight values followed by
// the second's.

// momentsGo1 is the portable form of blockMoments1.
func momentsGo1(x []float64, c []complex128) (a [2 * splineOrder]float64) {
	cascade(&a, x, c, 0)
	return a
}

// momentsGo2 is the portable form of blockMoments2.
func momentsGo2(x []float64, c1, c2 []complex128) (a [4 * splineOrder]float64) {
	m1 := momentsGo1(x, c1)
	m2 := momentsGo1(x, c2)
	copy(a[:], m1[:])
	copy(a[2*splineOrder:], m2[:])
	return a
}

// extendMoments continues the running sums of a over k more samples of
// value zero (a block cut short by the end of the record).
func extendMoments(a *[2 * splineOrder]float64, k int) { cascade(a, nil, nil, k) }

// cascade continues the running sums of a over the samples x mixed with
// the carrier c (len(c) ≥ len(x)), then over zeros more samples of value
// zero.
func cascade(a *[2 * splineOrder]float64, x []float64, c []complex128, zeros int) {
	a1r, a1i, a2r, a2i, a3r, a3i, a4r, a4i := a[0], a[1], a[2], a[3], a[4], a[5], a[6], a[7]
	c = c[:len(x)]
	for p, v := range x {
		// The conversions round each product on its own, ruling out fused
		// multiply-adds, so all targets agree bit for bit.
		a1r += float64(v * real(c[p]))
		a1i += float64(v * imag(c[p]))
		a2r += a1r
		a2i += a1i
		a3r += a2r
		a3i += a2i
		a4r += a3r
		a4i += a3i
	}
	for range zeros {
		a2r += a1r
		a2i += a1i
		a3r += a2r
		a3i += a2i
		a4r += a3r
		a4i += a3i
	}
	*a = [2 * splineOrder]float64{a1r, a1i, a2r, a2i, a3r, a3i, a4r, a4i}
}

// mixMoments1 is blockMoments1 with the carrier's length checked.
func mixMoments1(x []float64, c []complex128, out *[2 * splineOrder]float64) {
	blockMoments1(x, c[:len(x)], out)
}

// mixMoments2 is blockMoments2 with the carriers' lengths checked.
func mixMoments2(x []float64, c1, c2 []complex128, out *[4 * splineOrder]float64) {
	blockMoments2(x, c1[:len(x)], c2[:len(x)], out)
}

// unpackPair splits the interleaved two-block values of one tone (see
// pairSums1AVX) into the first block's a and the second's b.
func unpackPair(q []float64, a, b *[2 * splineOrder]float64) {
	q = q[:4*splineOrder]
	for j := 0; j < splineOrder; j++ {
		a[2*j], a[2*j+1] = q[4*j], q[4*j+1]
		b[2*j], b[2*j+1] = q[4*j+2], q[4*j+3]
	}
}

// pairSumsGo is the portable form of blockPairSums.
func pairSumsGo(x []float64, d1 int, cars [][]complex128, a *[splineOrder][splineOrder]float64, sa, sb [][2 * splineOrder]float64) {
	for i, c := range cars {
		var m [2 * splineOrder]float64
		mixMoments1(x[:d1], c, &m)
		sa[i] = combineMoments(a, m)
		mixMoments1(x[d1:2*d1], c, &m)
		sb[i] = combineMoments(a, m)
	}
}
