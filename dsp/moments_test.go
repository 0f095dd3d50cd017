package dsp

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestBlockMomentsMatchGo: the block-moment kernels (assembly on amd64)
// give exactly the bits of the portable Go form, for every block length
// from 0 to 70 and for carriers of two frequencies. Bit equality is the
// reference: both round each product and each sum once, in the same order.
func TestBlockMomentsMatchGo(t *testing.T) {
	t.Parallel()
	rnd := rand.New(rand.NewPCG(7, 11))
	const d1 = 70
	x := make([]float64, d1)
	for i := range x {
		x[i] = rnd.NormFloat64()
	}
	car := func(w float64) []complex128 {
		c := make([]complex128, d1)
		for p := range c {
			sn, cs := math.Sincos(w * float64(p))
			c[p] = complex(cs, sn)
		}
		return c
	}
	c1, c2 := car(-2*math.Pi*0.4), car(-2*math.Pi*0.021)
	for n := 0; n <= d1; n++ {
		var one [2 * splineOrder]float64
		mixMoments1(x[:n], c1, &one)
		if want := momentsGo1(x[:n], c1); one != want {
			t.Fatalf("one tone, %d samples: got %v, want %v", n, one, want)
		}
		var two [4 * splineOrder]float64
		mixMoments2(x[:n], c1, c2, &two)
		if want := momentsGo2(x[:n], c1, c2); two != want {
			t.Fatalf("two tones, %d samples: got %v, want %v", n, two, want)
		}
	}
}
