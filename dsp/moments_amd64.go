package dsp

// blockMoments1 writes the block moments of x mixed with the carrier c
// (len(c) ≥ len(x)) to out; see moments.go. Assembly: moments_amd64.s.
//
//go:noescape
func blockMoments1(x []float64, c []complex128, out *[2 * splineOrder]float64)

// blockMoments2 writes the block moments of x mixed with the carriers c1
// and c2 (both at least len(x) long) to out, reading each sample once;
// see moments.go. Assembly: moments_amd64.s.
//
//go:noescape
func blockMoments2(x []float64, c1, c2 []complex128, out *[4 * splineOrder]float64)

// hasAVX reports whether the processor and operating system support AVX
// (CPUID leaf 1, ECX bits 27 and 28; XGETBV: XMM and YMM state saved).
func hasAVX() bool

// pairSums1AVX writes the segment sums (see combineMoments, matrix a) of
// the two blocks x[:d1] and x[d1:2·d1] mixed with the carrier c to out,
// interleaved: sum k (0…3) of the first block at out[4k], out[4k+1] (re,
// im) and of the second at out[4k+2], out[4k+3]. Needs AVX, len(x) ≥ 2·d1,
// len(c) ≥ d1.
//
//go:noescape
func pairSums1AVX(x []float64, d1 int, c []complex128, a *[splineOrder][splineOrder]float64, out *[4 * splineOrder]float64)

// pairSums2AVX is pairSums1AVX for two carriers: the first tone's sixteen
// values, then the second's.
//
//go:noescape
func pairSums2AVX(x []float64, d1 int, c1, c2 []complex128, a *[splineOrder][splineOrder]float64, out *[8 * splineOrder]float64)

// pairKernel reports whether blockPairSums has a fast kernel here.
var pairKernel = hasAVX()

// blockPairSums writes the segment sums (combineMoments with the matrix
// a) of x[:d1] for every carrier to sa and those of x[d1:2·d1] to sb (the
// two blocks read together); it panics if x is shorter than 2·d1 or a
// carrier shorter than d1.
func blockPairSums(x []float64, d1 int, cars [][]complex128, a *[splineOrder][splineOrder]float64, sa, sb [][2 * splineOrder]float64) {
	x = x[:2*d1]
	if !pairKernel {
		pairSumsGo(x, d1, cars, a, sa, sb)
		return
	}
	var buf [8 * splineOrder]float64
	i := 0
	for ; i+1 < len(cars); i += 2 {
		pairSums2AVX(x, d1, cars[i][:d1], cars[i+1][:d1], a, &buf)
		unpackPair(buf[:4*splineOrder], &sa[i], &sb[i])
		unpackPair(buf[4*splineOrder:], &sa[i+1], &sb[i+1])
	}
	if i < len(cars) {
		pairSums1AVX(x, d1, cars[i][:d1], a, (*[4 * splineOrder]float64)(buf[:4*splineOrder]))
		unpackPair(buf[:4*splineOrder], &sa[i], &sb[i])
	}
}
