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

// TestBlockPairSumsMatchGo: two blocks read together (AVX kernel on
// amd64 when the processor has it) give exactly the segment sums of each
// block on its own in the portable Go form, for one to five tones.
func TestBlockPairSumsMatchGo(t *testing.T) {
	t.Parallel()
	rnd := rand.New(rand.NewPCG(3, 5))
	for _, d1 := range []int{8, 13, 50} {
		x := make([]float64, 2*d1)
		for i := range x {
			x[i] = rnd.NormFloat64()
		}
		for nf := 1; nf <= 5; nf++ {
			cars := make([][]complex128, nf)
			for i := range cars {
				cars[i] = make([]complex128, d1)
				w := -2 * math.Pi * rnd.Float64() / 2
				for p := range cars[i] {
					sn, cs := math.Sincos(w * float64(p))
					cars[i][p] = complex(cs, sn)
				}
			}
			sos, _ := ButterworthLowpass(4, 1e6/float64(d1)/50, 1e6/float64(d1))
			mm := &newDemodulator(d1, 8, sos).mom
			a := make([][2 * splineOrder]float64, nf)
			b := make([][2 * splineOrder]float64, nf)
			blockPairSums(x, d1, cars, mm, a, b)
			for i, c := range cars {
				if want := combineMoments(mm, momentsGo1(x[:d1], c)); a[i] != want {
					t.Fatalf("d1 %d, %d tones, tone %d, first block: got %v, want %v", d1, nf, i, a[i], want)
				}
				if want := combineMoments(mm, momentsGo1(x[d1:], c)); b[i] != want {
					t.Fatalf("d1 %d, %d tones, tone %d, second block: got %v, want %v", d1, nf, i, b[i], want)
				}
			}
		}
	}
}

// TestStage1RangesMatchWhole: the first stage computed over consecutive
// ranges of intermediate samples, split anywhere (also off the 64-block
// grid of exact block phases), gives exactly the samples of one pass.
func TestStage1RangesMatchWhole(t *testing.T) {
	t.Parallel()
	rnd := rand.New(rand.NewPCG(1, 2))
	v := make([]float64, 123457)
	for i := range v {
		v[i] = rnd.NormFloat64()
	}
	freqs := []float64{400e3, 123e3, 21e3}
	sos, _ := ButterworthLowpass(4, 400, 20e3)
	for _, d1 := range []int{5, 50} {
		dm := newDemodulator(d1, 10, sos)
		m1 := dm.stage1Len(len(v))
		whole := make([][]complex128, len(freqs))
		parts := make([][]complex128, len(freqs))
		for i := range whole {
			whole[i] = make([]complex128, m1)
			parts[i] = make([]complex128, m1)
		}
		dm.stage1(whole, v, freqs, 1e6)
		cuts := []int{0, 1, 63, 64, 65, 200, 777, m1 - 2, m1}
		for c := 0; c+1 < len(cuts); c++ {
			dm.stage1Range(parts, v, freqs, 1e6, cuts[c], cuts[c+1])
		}
		for i := range whole {
			for m := range whole[i] {
				if parts[i][m] != whole[i][m] {
					t.Fatalf("d1 %d tone %v Hz sample %d: ranges %v, whole %v", d1, freqs[i], m, parts[i][m], whole[i][m])
				}
			}
		}
	}
}

// TestFilterPairMatchesGo: the two-section loop (assembly on amd64 with
// AVX) gives exactly the bits of the portable Go form, out of place and in
// place, including the final section states.
func TestFilterPairMatchesGo(t *testing.T) {
	t.Parallel()
	rnd := rand.New(rand.NewPCG(9, 4))
	sos, _ := ButterworthLowpass(4, 400, 20e3)
	for _, n := range []int{0, 1, 7, 1000} {
		x := make([]complex128, n)
		for i := range x {
			x[i] = complex(rnd.NormFloat64(), rnd.NormFloat64())
		}
		zp0 := [2]complex128{complex(rnd.NormFloat64(), rnd.NormFloat64()), complex(rnd.NormFloat64(), 1)}
		zq0 := [2]complex128{complex(0.5, -0.25), complex(rnd.NormFloat64(), rnd.NormFloat64())}
		want := make([]complex128, n)
		wp, wq := zp0, zq0
		filterPairGo(sos[0], sos[1], want, x, &wp, &wq)
		got := append([]complex128(nil), x...)
		gp, gq := zp0, zq0
		filterPair(sos[0], sos[1], got, got, &gp, &gq)
		for i := range want {
			if got[i] != want[i] {
				t.Fatalf("%d samples, sample %d: got %v, want %v", n, i, got[i], want[i])
			}
		}
		if gp != wp || gq != wq {
			t.Fatalf("%d samples: states got %v %v, want %v %v", n, gp, gq, wp, wq)
		}
	}
}
