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

// blockPairMoments writes the block moments of x[:d1] for every carrier to
// a and those of x[d1:2·d1] to b; it panics if x is shorter than 2·d1 or a
// carrier shorter than d1.
func blockPairMoments(x []float64, d1 int, cars [][]complex128, a, b [][2 * splineOrder]float64) {
	x = x[:2*d1]
	i := 0
	for ; i+1 < len(cars); i += 2 {
		var q [4 * splineOrder]float64
		mixMoments2(x[:d1], cars[i], cars[i+1], &q)
		a[i], a[i+1] = [2 * splineOrder]float64(q[:2*splineOrder]), [2 * splineOrder]float64(q[2*splineOrder:])
		mixMoments2(x[d1:], cars[i], cars[i+1], &q)
		b[i], b[i+1] = [2 * splineOrder]float64(q[:2*splineOrder]), [2 * splineOrder]float64(q[2*splineOrder:])
	}
	if i < len(cars) {
		mixMoments1(x[:d1], cars[i], &a[i])
		mixMoments1(x[d1:], cars[i], &b[i])
	}
}
