//go:build !amd64

package dsp

// blockMoments1 writes the block moments of x mixed with the carrier c
// (len(c) ≥ len(x)) to out; see moments.go.
func blockMoments1(x []float64, c []complex128, out *[2 * splineOrder]float64) {
	*out = momentsGo1(x, c)
}

// blockMoments2 writes the block moments of x mixed with the carriers c1
// and c2 (both at least len(x) long) to out; see moments.go.
func blockMoments2(x []float64, c1, c2 []complex128, out *[4 * splineOrder]float64) {
	*out = momentsGo2(x, c1, c2)
}

// blockPairSums writes the segment sums (combineMoments with the matrix
// a) of x[:d1] for every carrier to sa and those of x[d1:2·d1] to sb; it
// panics if x is shorter than 2·d1 or a carrier shorter than d1.
func blockPairSums(x []float64, d1 int, cars [][]complex128, a *[splineOrder][splineOrder]float64, sa, sb [][2 * splineOrder]float64) {
	pairSumsGo(x[:2*d1], d1, cars, a, sa, sb)
}
