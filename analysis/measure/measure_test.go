package measure

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

const deg = math.Pi / 180

// ellipse returns n samples of the ellipse with semi-axes a (along the
// direction thetaRad) and b, starting on the major axis at t = 0. With n a
// multiple of 4 the samples include both ends of both axes.
func ellipse(a, b, thetaRad float64, n int) []complex128 {
	z := make([]complex128, n)
	r := cmplx.Rect(1, thetaRad)
	for k := range z {
		t := 2 * math.Pi * float64(k) / float64(n)
		z[k] = r * complex(a*math.Cos(t), b*math.Sin(t))
	}
	return z
}

// figureEight returns samples of z(t) = e^{jθ}(a sin t + j b sin t cos t),
// a figure-eight whose lobes lie along θ, for t = t0 + k·h, k = 0..n−1.
func figureEight(a, b, thetaRad, t0, h float64, n int) []complex128 {
	z := make([]complex128, n)
	r := cmplx.Rect(1, thetaRad)
	for k := range z {
		t := t0 + float64(k)*h
		z[k] = r * complex(a*math.Sin(t), b*math.Sin(t)*math.Cos(t))
	}
	return z
}

func TestPeakToPeakKnownFigures(t *testing.T) {
	t.Parallel()
	seg := make([]complex128, 11)
	for k := range seg {
		seg[k] = complex(1, 2) + complex(float64(k), 0)*complex(0.3, 0.4)
	}
	cases := []struct {
		name     string
		z        []complex128
		wantVpp  float64
		wantPh   float64 // radians
		wantI    int
		wantJ    int
		tol      float64
		checkIdx bool
	}{
		// Ellipse a = 3, b = 1 rotated 30°: the diameter is the major axis,
		// 2a = 6 (closed form), between t = 0 (index 0) and t = π (index
		// n/2); the direction from the earlier to the later endpoint is
		// −e^{j30°}, i.e. 210°.
		{"ellipse a=3 b=1 at 30deg", ellipse(3, 1, 30*deg, 400), 6, 210 * deg, 0, 200, 1e-12, true},
		// A very flat ellipse (b/a = 0.004) at −75°: neighbouring caliper
		// areas tie within rounding; the diameter is still 2a = 5.
		{"flat ellipse 4000 samples", ellipse(2.5, 0.01, -75*deg, 4000), 5, WrapRad(105 * deg), 0, 2000, 1e-12, true},
		// Figure-eight a = 2, b = 1 at θ = 40°, t = 2πk/n: centrally
		// symmetric, |z| is largest (= a) at t = π/2 and 3π/2 (|z|² =
		// sin²t (a² + b² cos²t), maximal at sin²t = 1 when a > b), so the
		// diameter is 2a = 4 between index n/4 and 3n/4, pointing from
		// +a e^{jθ} to −a e^{jθ}: 220°.
		{"figure-eight a=2 b=1 at 40deg", figureEight(2, 1, 40*deg, 0, 2*math.Pi/800, 800), 4, 220 * deg, 200, 600, 1e-12, true},
		// Straight segment from 1+2j in steps of 0.3+0.4j (|step| = 0.5):
		// the chord is the whole segment, 10·0.5 = 5 V at atan2(4, 3).
		{"straight segment", seg, 5, math.Atan2(4, 3), 0, 10, 1e-12, true},
		// Two samples: the chord is their difference.
		{"two samples", []complex128{1, 1 + 1i}, 1, 90 * deg, 0, 1, 1e-15, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			got := Vpp(c.z)
			if !scalar.EqualWithinAbsOrRel(got.Vpp, c.wantVpp, c.tol, c.tol) {
				t.Errorf("Vpp = %.15g, want %.15g (tol %g)", got.Vpp, c.wantVpp, c.tol)
			}
			if d := math.Abs(math.Remainder(got.PhaseRad-c.wantPh, 2*math.Pi)); d > 1e-9 {
				t.Errorf("phase = %.12g°, want %.12g° (tol 1e-9 rad)", got.PhaseRad/deg, c.wantPh/deg)
			}
			if c.checkIdx && (got.I != c.wantI || got.J != c.wantJ) {
				t.Errorf("endpoints = (%d, %d), want (%d, %d)", got.I, got.J, c.wantI, c.wantJ)
			}
		})
	}
}

func TestPeakToPeakDegenerate(t *testing.T) {
	t.Parallel()
	for _, c := range []struct {
		name string
		z    []complex128
	}{
		{"one sample", []complex128{2 + 3i}},
		{"all equal", []complex128{1i, 1i, 1i, 1i, 1i, 1i, 1i, 1i, 1i, 1i, 1i, 1i, 1i, 1i, 1i, 1i, 1i, 1i, 1i, 1i, 1i, 1i, 1i, 1i, 1i, 1i, 1i, 1i, 1i, 1i}},
	} {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			if got := Vpp(c.z); got.Vpp != 0 {
				t.Errorf("Vpp = %g, want 0", got.Vpp)
			}
		})
	}
}

// TestPeakToPeakAgainstAllPairs checks the hull-and-calipers diameter
// against the definition (the maximum over all n(n−1)/2 pairs) on random
// clouds, including collinear and repeated points.
func TestPeakToPeakAgainstAllPairs(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(1, 2))
	var p PeakToPeak
	for trial := 0; trial < 300; trial++ {
		n := 2 + rng.IntN(300)
		z := make([]complex128, n)
		for k := range z {
			switch trial % 3 {
			case 0:
				z[k] = complex(rng.NormFloat64(), rng.NormFloat64())
			case 1: // on a line, with repeats
				v := float64(rng.IntN(20))
				z[k] = complex(v, 2*v)
			default: // integer grid: many ties
				z[k] = complex(float64(rng.IntN(5)), float64(rng.IntN(5)))
			}
		}
		var want float64
		for i := range z {
			for j := i + 1; j < n; j++ {
				want = math.Max(want, cmplx.Abs(z[i]-z[j]))
			}
		}
		got := p.Measure(z)
		if !scalar.EqualWithinAbsOrRel(got.Vpp, want, 1e-12, 1e-12) {
			t.Fatalf("trial %d (n=%d): Vpp = %.15g, all-pairs maximum %.15g", trial, n, got.Vpp, want)
		}
		if d := cmplx.Abs(z[got.J] - z[got.I]); !scalar.EqualWithinAbsOrRel(d, got.Vpp, 1e-12, 1e-12) {
			t.Fatalf("trial %d: endpoints (%d, %d) are %g apart, Vpp %g", trial, got.I, got.J, d, got.Vpp)
		}
	}
}

func TestMaxRate(t *testing.T) {
	t.Parallel()
	// S-shaped middle of the figure-eight, t = −π/2 + kπ/n, n odd: the
	// steepest part of z(t) = e^{jθ}(a sin t + j b sin t cos t) is at t = 0
	// (|z'|² = a² cos²t + b² cos²2t is largest there). The step straddling
	// t = 0 runs from t = −h/2 to h/2 and equals
	// e^{jθ}(2a sin(h/2) + j b sin h), so its phase is
	// θ + atan2(b cos(h/2), a) (closed form).
	const n = 201
	h := math.Pi / n
	a, b, th := 2.0, 1.0, 40*deg
	z := figureEight(a, b, th, -math.Pi/2, h, n+1)
	got := MaxRate(z)
	wantPh := th + math.Atan2(b*math.Cos(h/2), a)
	wantMag := math.Hypot(2*a*math.Sin(h/2), b*math.Sin(h))
	if got.I != (n-1)/2 {
		t.Errorf("figure-eight: step index = %d, want %d", got.I, (n-1)/2)
	}
	if !scalar.EqualWithinAbsOrRel(got.PhaseRad, wantPh, 1e-12, 1e-12) {
		t.Errorf("figure-eight: phase = %.12g°, want %.12g°", got.PhaseRad/deg, wantPh/deg)
	}
	if !scalar.EqualWithinAbsOrRel(got.Magnitude, wantMag, 1e-12, 1e-12) {
		t.Errorf("figure-eight: magnitude = %.15g, want %.15g", got.Magnitude, wantMag)
	}

	// Straight segment with equal steps 0.3+0.4j: rate 0.5 V per sample at
	// atan2(4, 3) wherever the tie falls.
	seg := []complex128{0, 0.3 + 0.4i, 0.6 + 0.8i, 0.9 + 1.2i}
	r := MaxRate(seg)
	if !scalar.EqualWithinAbsOrRel(r.Magnitude, 0.5, 1e-12, 1e-12) || !scalar.EqualWithinAbsOrRel(r.PhaseRad, math.Atan2(4, 3), 1e-12, 1e-12) {
		t.Errorf("segment: got %+v, want magnitude 0.5 at %g rad", r, math.Atan2(4, 3))
	}
	// A single jump in a flat trace: the jump's direction, −1−1j → 225°.
	jump := []complex128{1, 1, 1, 0 - 1i, 0 - 1.01i}
	r = MaxRate(jump)
	if r.I != 2 || !scalar.EqualWithinAbsOrRel(r.PhaseRad, 225*deg, 1e-12, 1e-12) {
		t.Errorf("jump: got %+v, want I=2 at 225°", r)
	}
}

func TestSignalToNoise(t *testing.T) {
	t.Parallel()
	// Noise window spanning 0.25 V peak to peak: S/N of a 4 V signal is 16.
	noise := []complex128{0, 0.1, 0.25, 0.05i}
	if got := SignalToNoise(4, noise); !scalar.EqualWithinAbsOrRel(got, 4/math.Hypot(0.25, 0.05), 1e-12, 1e-12) {
		t.Errorf("S/N = %g, want %g", got, 4/math.Hypot(0.25, 0.05))
	}
	if got := SignalToNoise(4, []complex128{1, 1}); !math.IsInf(got, 1) {
		t.Errorf("S/N with flat noise = %g, want +Inf", got)
	}
	// RMS of ±1 about 0 is 1 (closed form).
	if got := RMS([]complex128{1, -1, 1i, -1i}); got != 1 {
		t.Errorf("RMS = %g, want 1", got)
	}
}

func ExampleVpp() {
	// A flaw-like figure: out along 40° and back through the origin.
	z := figureEight(2, 0.5, 40*deg, 0, 2*math.Pi/360, 360)
	c := Vpp(z)
	fmt.Printf("Vpp %.3f V at %.1f°\n", c.Vpp, c.PhaseRad/deg)
	// Output: Vpp 4.000 V at 220.0°
}

func BenchmarkPeakToPeak(b *testing.B) {
	rng := rand.New(rand.NewPCG(3, 4))
	for _, n := range []int{16, 64, 256, 1024} {
		z := make([]complex128, n)
		for k := range z {
			z[k] = complex(rng.NormFloat64(), rng.NormFloat64())
		}
		b.Run(fmt.Sprint(n), func(b *testing.B) {
			b.ReportAllocs()
			var p PeakToPeak
			for b.Loop() {
				p.Measure(z)
			}
		})
	}
}
