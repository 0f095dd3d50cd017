package impedance

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/integrate/quad"

	"whorl/impedance/cbessel"
)

// TestCylinderCoilIntegrals checks the scaled κ_I and κ_K against direct
// quadrature of x·I1(x) and x·K1(x) (gonum integrate/quad, 200-point
// Gauss–Legendre on the scaled integrand, with I1, K1 from cbessel), on
// both sides of the series/asymptotic switch at x = 35.
func TestCylinderCoilIntegrals(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct{ alpha, r1, r2 float64 }{
		{1, 7e-3, 7.6e-3}, {100, 7e-3, 7.6e-3}, {3000, 7e-3, 7.6e-3}, {5000, 7e-3, 7.6e-3},
		{20000, 7e-3, 7.6e-3}, {60000, 7e-3, 7.6e-3}, {800, 1e-3, 12e-3}, {4000, 6e-3, 7e-3},
	} {
		x1, x2 := tc.alpha*tc.r1, tc.alpha*tc.r2
		wantI := quad.Fixed(func(x float64) float64 {
			return x * real(cbessel.I1Scaled(complex(x, 0))) * math.Exp(x-x2)
		}, x1, x2, 200, nil, 0)
		if got := kappaIScaled(tc.alpha, tc.r1, tc.r2); !scalar.EqualWithinRel(got, wantI, 1e-12) {
			t.Errorf("κ_I e^{−αr2}(α=%g, %g..%g) = %.15g, quadrature %.15g", tc.alpha, tc.r1, tc.r2, got, wantI)
		}
		wantK := quad.Fixed(func(x float64) float64 {
			return x * real(cbessel.K1Scaled(complex(x, 0))) * math.Exp(x1-x)
		}, x1, x2, 200, nil, 0)
		if got := kappaKScaled(tc.alpha, tc.r1, tc.r2); !scalar.EqualWithinRel(got, wantK, 1e-12) {
			t.Errorf("κ_K e^{αr1}(α=%g, %g..%g) = %.15g, quadrature %.15g", tc.alpha, tc.r1, tc.r2, got, wantK)
		}
	}
	// T(0⁺) = ∫0^∞ tK1 dt = Γ(½)Γ(3/2) = π/2 (DLMF 10.43.19:
	// ∫0^∞ t^{μ−1}K_ν = 2^{μ−2}Γ((μ−ν)/2)Γ((μ+ν)/2), μ = 2, ν = 1).
	if got := tKScaled(1e-9); !scalar.EqualWithinAbs(got, math.Pi/2, 1e-8) {
		t.Errorf("T(0⁺) = %.12g, want π/2 (DLMF 10.43.19)", got)
	}
}
