package impedance

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/integrate/quad"
)

func TestMagneticReynolds(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name              string
		sigma, v, l, want float64
		tol               float64
	}{
		// Bobbin probe in stainless tube, σ ≈ 1.4 MS/m, L ≈ 10 mm, 1 m/s:
		// Rm ≈ 0.018 (worked example of the speed-effect notes, rounded).
		{"bobbin in stainless 1 m/s", 1.4e6, 1, 0.01, 0.018, 0.03},
		// Copper bar, 58 MS/m, through an encircling coil at 5 m/s, L = 10 mm:
		// Rm ≈ 3.6 (same notes, rounded).
		{"copper bar 5 m/s", 58e6, 5, 0.01, 3.6, 0.02},
	}
	for _, tc := range tests {
		tc := tc
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			got := MagneticReynolds(tc.sigma, 1, tc.v, tc.l)
			if !scalar.EqualWithinRel(got, tc.want, tc.tol) {
				t.Errorf("MagneticReynolds(%g S/m, %g m/s, %g m) = %.4g, want %g ± %g rel", tc.sigma, tc.v, tc.l, got, tc.want, tc.tol)
			}
		})
	}
}

func TestThinSheetForcesLimits(t *testing.T) {
	t.Parallel()
	// Aluminium sheet, 1 mm of 35 MS/m: w = 2/(μ0σd) = 45.5 m/s.
	w := RecessionSpeedMPS(35e6, 1e-3)
	if !scalar.EqualWithinRel(w, 2/(4e-7*math.Pi*35e6*1e-3), 1e-9) {
		t.Fatalf("RecessionSpeedMPS = %g", w)
	}
	const fImage = 2.5 // N
	t.Run("drag over lift is w over v", func(t *testing.T) {
		t.Parallel()
		// Ratio w/v for any magnet (energy argument; Saslow 1992).
		for _, v := range []float64{0.01 * w, 0.3 * w, w, 7 * w, 300 * w} {
			lift, drag := ThinSheetForces(fImage, v, w)
			if !scalar.EqualWithinRel(drag/lift, w/v, 1e-12) {
				t.Errorf("v = %g: drag/lift = %g, want w/v = %g", v, drag/lift, w/v)
			}
		}
	})
	t.Run("fast magnet sees its perfect image", func(t *testing.T) {
		t.Parallel()
		lift, drag := ThinSheetForces(fImage, 1e6*w, w)
		if !scalar.EqualWithinRel(lift, fImage, 2e-6) {
			t.Errorf("lift at v = 1e6 w = %g, want F_image = %g", lift, fImage)
		}
		if !scalar.EqualWithinRel(drag, fImage*1e-6, 1e-5) {
			t.Errorf("drag at v = 1e6 w = %g, want F_image·w/v = %g", drag, fImage*1e-6)
		}
	})
	t.Run("slow magnet", func(t *testing.T) {
		t.Parallel()
		// Series of 1 − 1/√(1+u²): lift ≈ F u²/2, drag ≈ F u/2 for u = v/w → 0.
		u := 1e-4
		lift, drag := ThinSheetForces(fImage, u*w, w)
		if !scalar.EqualWithinRel(lift, fImage*u*u/2, 1e-7) || !scalar.EqualWithinRel(drag, fImage*u/2, 1e-7) {
			t.Errorf("u = %g: lift %g drag %g, want %g and %g", u, lift, drag, fImage*u*u/2, fImage*u/2)
		}
		if l, d := ThinSheetForces(fImage, 0, w); l != 0 || d != 0 {
			t.Errorf("at rest: lift %g drag %g, want 0", l, d)
		}
	})
	t.Run("drag peak", func(t *testing.T) {
		t.Parallel()
		// Closed form: d/du[(1 − (1+u²)^(−1/2))/u] = 0 gives √(1+u²) = φ, the
		// golden ratio, so u* = √φ = 1.27202 and the peak is φ^(−5/2)·F.
		phi := (1 + math.Sqrt(5)) / 2
		best, bestV := 0.0, 0.0
		for i := 1; i <= 40000; i++ {
			v := float64(i) * 1e-4 * w
			if _, d := ThinSheetForces(fImage, v, w); d > best {
				best, bestV = d, v
			}
		}
		if !scalar.EqualWithinAbs(bestV/w, math.Sqrt(phi), 2e-4) {
			t.Errorf("drag peaks at v/w = %.5f, want √φ = %.5f", bestV/w, math.Sqrt(phi))
		}
		if !scalar.EqualWithinRel(best, fImage*math.Pow(phi, -2.5), 1e-7) {
			t.Errorf("peak drag %g, want φ^(−5/2)·F = %g", best, fImage*math.Pow(phi, -2.5))
		}
	})
}

// TestThinSheetForcesQuadrature checks the closed form against a direct
// numerical average over the direction θ of the wavevector of the
// thin-sheet reflection factor g = −i k_x v/(w k − i k_x v) (gonum
// integrate/quad, 64-point Gauss–Legendre on [0, π/2], four quarters by
// symmetry).
func TestThinSheetForcesQuadrature(t *testing.T) {
	t.Parallel()
	const w = 10.0
	for _, v := range []float64{0.5, 3, 10, 12.7, 40, 500} {
		liftAvg := quad.Fixed(func(th float64) float64 {
			c := math.Cos(th)
			g := complex(0, -c*v) / complex(w, -c*v)
			return real(g)
		}, 0, math.Pi/2, 64, quad.Legendre{}, 0) / (math.Pi / 2)
		dragAvg := quad.Fixed(func(th float64) float64 {
			c := math.Cos(th)
			g := complex(0, -c*v) / complex(w, -c*v)
			// Force along the motion, from the i k_x factor of the field
			// gradient: −Re(i cosθ · g) = −(w/v)·Re g per direction θ.
			return -real(complex(0, c) * g)
		}, 0, math.Pi/2, 64, quad.Legendre{}, 0) / (math.Pi / 2)
		lift, drag := ThinSheetForces(1, v, w)
		if !scalar.EqualWithinRel(lift, liftAvg, 1e-6) {
			t.Errorf("v = %g: lift %g, quadrature %g", v, lift, liftAvg)
		}
		// The force along the motion is negative: the drag opposes it.
		if !scalar.EqualWithinRel(drag, -dragAvg, 1e-6) {
			t.Errorf("v = %g: drag %g, quadrature −(force along motion) %g", v, drag, -dragAvg)
		}
	}
}

func TestImageForces(t *testing.T) {
	t.Parallel()
	// Pole of 10 A·m at 5 mm: μ0q²/(16πh²) = 4πe-7·100/(16π·25e-6) = 0.1 N.
	// Tolerance 1e-9: the CODATA μ0 differs from 4π×10⁻⁷ by about 5e-10.
	if got := PoleImageForceN(10, 5e-3); !scalar.EqualWithinRel(got, 0.1, 1e-9) {
		t.Errorf("PoleImageForceN = %g, want 0.1", got)
	}
	// Dipole of 1 A·m² at 10 mm: two coaxial dipoles 20 mm apart repel with
	// 3μ0m²/(2πr⁴) = 3·4πe-7/(2π·1.6e-7) = 3.75 N.
	if got := DipoleImageForceN(1, 10e-3); !scalar.EqualWithinRel(got, 3.75, 1e-9) {
		t.Errorf("DipoleImageForceN = %g, want 3.75", got)
	}
	// Dynamic skin depth √(2h/(μ0σv)) for h = 5 mm, 35 MS/m, 10 m/s.
	if got, want := DynamicSkinDepthM(35e6, 10, 5e-3), math.Sqrt(2*5e-3/(4e-7*math.Pi*35e6*10)); !scalar.EqualWithinRel(got, want, 1e-9) {
		t.Errorf("DynamicSkinDepthM = %g, want %g", got, want)
	}
}
