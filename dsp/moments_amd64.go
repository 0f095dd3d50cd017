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
