package synth

import (
	"fmt"
	"math"
	"math/cmplx"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/integrate/quad"

	"whorl/impedance"
)

// TestSkinDepthField checks the standard depth of penetration used for
// the demo alloy at each demo frequency (and two more) against the worked
// values of FIELD.md §2.3 ("For Alloy 690, δ = 3.8 mm at 20 kHz, 1.71 mm
// at 100 kHz, 1.21 mm at 200 kHz, 0.99 mm at 300 kHz, 0.85 mm at 400 kHz
// and 0.73 mm at 550 kHz" [D], ρ = 115 µΩ·cm), and for the alternate
// 90/10 Cu-Ni tube against the same section's f90 table (f90 = 37 kHz at
// t = 1.24 mm, where t ≈ 1.09 δ, so δ ≈ 1.14 mm).
func TestSkinDepthField(t *testing.T) {
	t.Parallel()
	demo, err := New(Demo())
	if err != nil {
		t.Fatal(err)
	}
	alt := Alternate()
	cases := []struct {
		name    string
		freqHz  float64
		sigma   float64
		wantMM  float64
		tolRel  float64 // the worked values carry 2–3 significant figures
		fromGen bool
	}{
		{"alloy690-400kHz", 400e3, 0, 0.85, 0.006, true},
		{"alloy690-200kHz", 200e3, 0, 1.21, 0.005, true},
		{"alloy690-100kHz", 100e3, 0, 1.71, 0.005, true},
		{"alloy690-20kHz", 20e3, 0, 3.8, 0.013, true},
		{"alloy690-300kHz", 300e3, 1 / 115e-8, 0.99, 0.006, false},
		{"alloy690-550kHz", 550e3, 1 / 115e-8, 0.73, 0.007, false},
		{"cuni-f90-37kHz", 37e3, alt.Tube.ConductivitySPerM, 1.24 / 1.09, 0.02, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			var got float64
			if c.fromGen {
				i := -1
				for k, f := range demo.cfg.FreqsHz {
					if f == c.freqHz {
						i = k
					}
				}
				if i < 0 {
					t.Fatalf("demo has no %v Hz channel", c.freqHz)
				}
				got = demo.SkinDepthsM()[i] * 1e3
			} else {
				got = impedance.SkinDepthM(c.freqHz, c.sigma, 1) * 1e3
			}
			if !scalar.EqualWithinRel(got, c.wantMM, c.tolRel) {
				t.Errorf("δ(%v Hz) = %.4f mm, want %.3f mm (rel tol %v)", c.freqHz, got, c.wantMM, c.tolRel)
			}
		})
	}
}

// TestElementPhaseLag checks that a thin flaw element at distance x from
// the coil-side surface lags by exactly 2x/δ and is attenuated by e^{−2x/δ}
// (the plane-wave rule, Cecco, Van Drunen & Sharp, AECL-7523, 1983, from
// memory; FIELD.md §1.4): closed form e^{−2x/δ}(cos(2x/δ) − j sin(2x/δ)).
func TestElementPhaseLag(t *testing.T) {
	t.Parallel()
	const delta = 0.85e-3
	for _, x := range []float64{0, 0.1e-3, 0.545e-3, 1.09e-3, 2 * delta} {
		t.Run(fmt.Sprintf("x=%gmm", x*1e3), func(t *testing.T) {
			t.Parallel()
			got := ElementResponse(x, delta)
			a := 2 * x / delta
			want := complex(math.Exp(-a)*math.Cos(a), -math.Exp(-a)*math.Sin(a))
			if cmplx.Abs(got-want) > 1e-15 {
				t.Errorf("ElementResponse(%g, %g) = %v, want %v", x, delta, got, want)
			}
			if x > 0 && x < 1.5*delta { // within one turn: the phase itself
				if lag := -cmplx.Phase(got); !scalar.EqualWithinAbs(lag, a, 1e-14) {
					t.Errorf("lag = %v rad, want 2x/δ = %v", lag, a)
				}
			}
		})
	}
}

// TestLayerResponseIntegral checks the closed form of LayerResponse
// against adaptive-free numerical quadrature of ElementResponse (gonum
// quad.Fixed with 64-point Legendre rule, exact to rounding for this
// smooth integrand), and its thin-layer limit h·ElementResponse(x).
func TestLayerResponseIntegral(t *testing.T) {
	t.Parallel()
	cases := []struct{ x1, x2, delta float64 }{
		{0, 1.09e-3, 0.85e-3},            // through-wall
		{0.872e-3, 1.09e-3, 0.85e-3},     // 20 %TW OD
		{0, 0.109e-3, 3.8e-3},            // 10 %TW ID at 20 kHz
		{0.5e-3, 0.5e-3 + 1e-9, 0.85e-3}, // thin: series branch
	}
	for _, c := range cases {
		t.Run(fmt.Sprintf("%g-%g/%g", c.x1, c.x2, c.delta), func(t *testing.T) {
			t.Parallel()
			got := LayerResponse(c.x1, c.x2, c.delta)
			re := quad.Fixed(func(x float64) float64 { return real(ElementResponse(x, c.delta)) }, c.x1, c.x2, 64, quad.Legendre{}, 0)
			im := quad.Fixed(func(x float64) float64 { return imag(ElementResponse(x, c.delta)) }, c.x1, c.x2, 64, quad.Legendre{}, 0)
			want := complex(re, im)
			if cmplx.Abs(got-want) > 1e-12*cmplx.Abs(want) {
				t.Errorf("LayerResponse = %v, quadrature %v", got, want)
			}
		})
	}
	// Thin layer → h·ElementResponse(x), error O(h/δ).
	x, d, h := 0.3e-3, 0.85e-3, 1e-8
	got := LayerResponse(x, x+h, d) / complex(h, 0)
	want := ElementResponse(x, d)
	if cmplx.Abs(got-want) > 2*h/d*2 {
		t.Errorf("thin layer/h = %v, want %v", got, want)
	}
}

// TestDifferentialAntisymmetric checks D(z0+u) = −D(z0−u) for a symmetric
// feature, for short and long features and several coil widths (exact by
// the symmetry of B; rounding of z±s/2 only).
func TestDifferentialAntisymmetric(t *testing.T) {
	t.Parallel()
	for _, c := range []struct{ z0, l, sigma, s float64 }{
		{1.0, 1.3e-3, 1.7e-3, 3e-3},
		{2.5, 0.022, 1.7e-3, 3e-3},
		{0.4, 4.76e-3, 2.2e-3, 3.5e-3},
	} {
		t.Run(fmt.Sprintf("l=%g", c.l), func(t *testing.T) {
			t.Parallel()
			for u := 0.0; u < 0.02; u += 0.00037 {
				a := DifferentialShape(c.z0+u, c.z0-c.l/2, c.z0+c.l/2, c.sigma, c.s)
				b := DifferentialShape(c.z0-u, c.z0-c.l/2, c.z0+c.l/2, c.sigma, c.s)
				if math.Abs(a+b) > 1e-13 {
					t.Fatalf("u=%g: D(z0+u)=%g, D(z0−u)=%g, sum %g, want 0 (tol 1e-13)", u, a, b, a+b)
				}
			}
		})
	}
}

// TestAbsoluteShapeLimits checks B against its limits: 1 deep inside a
// long feature, and (z2−z1)·N(z; centre, σ) for a short one.
func TestAbsoluteShapeLimits(t *testing.T) {
	t.Parallel()
	if got := AbsoluteShape(0.5, 0, 1, 1e-3); got != 1 {
		t.Errorf("inside a long feature: %v, want 1", got)
	}
	sigma, l := 2e-3, 1e-6
	got := AbsoluteShape(1e-3, -l/2, l/2, sigma)
	want := l * math.Exp(-0.5*0.25) / (sigma * math.Sqrt(2*math.Pi)) // Gaussian pdf at z = σ/2
	if !scalar.EqualWithinRel(got, want, 1e-6) {
		t.Errorf("short feature: %v, want %v", got, want)
	}
}
