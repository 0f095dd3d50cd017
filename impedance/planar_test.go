package impedance

import (
	"math"
	"math/cmplx"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/mathext"
)

// Coils of MODEL.md §3.3. T15 is the TEAM-15-like coil (Burke, J. Nondestr.
// Eval. 7, 35–41, 1988; dimensions from memory, MODEL.md §3.1).
var (
	coilT15 = Coil{InnerRadiusM: 6.15e-3, OuterRadiusM: 12.4e-3, LengthM: 6.15e-3, Turns: 3790}
	// C9: geometry of an open C++ example (MODEL.md §3.3), z1 = 1.32 mm.
	coilC9 = Coil{InnerRadiusM: 3.015e-3, OuterRadiusM: 5.46e-3, LengthM: 2.94e-3, Turns: 900}
	// m1: coil of the open measured data set carabedo/iamend_ci (MODEL.md §3.2).
	coilM1 = Coil{InnerRadiusM: 1.15e-3, OuterRadiusM: 2.95e-3, LengthM: 2.48e-3, Turns: 387}
)

func halfSpace(sigma, mur float64) []Layer {
	return []Layer{{ThicknessM: math.Inf(1), ConductivitySPerM: sigma, RelPermeability: mur}}
}

func mustModel(t testing.TB, c Coil) *PlanarModel {
	t.Helper()
	m, err := NewPlanarModel(c, 1e-9)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

func cRelErr(got, want complex128) float64 { return cmplx.Abs(got-want) / cmplx.Abs(want) }

// maxwellMutual returns the mutual inductance of two coaxial circular
// filaments of radii a, b at axial distance d: Maxwell's formula
// M = μ0√(ab)[(2/k − k)K(k) − (2/k)E(k)], k² = 4ab/((a+b)² + d²)
// (Maxwell, Treatise §701; MODEL.md §4.1). gonum's CompleteK/CompleteE take
// the parameter m = k².
func maxwellMutual(a, b, d float64) float64 {
	m := 4 * a * b / ((a+b)*(a+b) + d*d)
	k := math.Sqrt(m)
	return mu0 * math.Sqrt(a*b) * ((2/k-k)*mathext.CompleteK(m) - 2/k*mathext.CompleteE(m))
}

// imageMutual integrates Maxwell's formula over the coil cross-section and
// that of its mirror image (heights −z2..−z1) with an n-point
// Gauss–Legendre rule in each of the four variables (MODEL.md §4.1).
func imageMutual(c Coil, z1 float64, n int) float64 {
	x, w := gaussLegendre(n)
	r1, r2, l := c.InnerRadiusM, c.OuterRadiusM, c.LengthM
	hr, hz := (r2-r1)/2, l/2
	s := 0.0
	for i := range x {
		ra := r1 + hr*(1+x[i])
		for j := range x {
			za := z1 + hz*(1+x[j])
			for k := range x {
				rb := r1 + hr*(1+x[k])
				for m := range x {
					zb := z1 + hz*(1+x[m])
					s += w[i] * w[j] * w[k] * w[m] * maxwellMutual(ra, rb, za+zb)
				}
			}
		}
	}
	// (N/A)² × (hr·hz)² from the change of variables, A = (r2−r1)l.
	a := (r2 - r1) * l
	return c.Turns * c.Turns / (a * a) * (hr * hz) * (hr * hz) * s
}

// TestPerfectConductorImage checks ΔZ → −jωM_image for σ → ∞ (image method,
// MODEL.md §4.1), with M_image from Maxwell's loop formula integrated
// independently by Gauss–Legendre (16⁴ points; MODEL.md §4.1 quotes
// 84.98751490 mH for T15 from 12⁴ and 16⁴ points). Two routes: φ = −1
// exactly in the wavenumber integral, and σ = 1e24 S/m through the full
// layered coefficient (its surface-impedance correction δ/r ≈ 1e-11).
func TestPerfectConductorImage(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name string
		coil Coil
		z1   float64
	}{
		{"T15 0.88 mm", coilT15, 0.88e-3},
		{"C9 1.32 mm", coilC9, 1.32e-3},
		{"m1 0.7 mm", coilM1, 0.7e-3},
		{"T15 10 mm", coilT15, 10e-3},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			want := imageMutual(tc.coil, tc.z1, 16)
			m := mustModel(t, tc.coil)
			s, _ := m.integrate(tc.z1, func(float64) complex128 { return -1 })
			got := -real(s) * m.scale
			// 1e-8: MODEL.md §6 check 1 tolerance; both sides are converged
			// to ~1e-10.
			if !scalar.EqualWithinRel(got, want, 1e-8) {
				t.Errorf("φ=−1: −ΔL = %.12g H, want M_image = %.12g H (Maxwell, 16⁴ Gauss–Legendre) ± 1e-8 rel", got, want)
			}
			const f = 900.0
			r, err := m.Impedance(f, tc.z1, halfSpace(1e24, 1))
			if err != nil {
				t.Fatal(err)
			}
			dL := imag(r.DZOhm) / (2 * math.Pi * f)
			if !scalar.EqualWithinRel(-dL, want, 1e-8) {
				t.Errorf("σ=1e24: −ΔL = %.12g H, want %.12g H ± 1e-8 rel", -dL, want)
			}
			if rr := real(r.DZOhm) / (2 * math.Pi * f * want); !(rr >= 0 && rr < 1e-8) {
				t.Errorf("σ=1e24: ΔR/(ωM) = %g, want in [0, 1e-8)", rr)
			}
		})
	}
	// The T15 value itself (MODEL.md §3.3/§6: 84.98751490 mH, 1e-8).
	if got := imageMutual(coilT15, 0.88e-3, 16); !scalar.EqualWithinRel(got, 84.98751490e-3, 1e-8) {
		t.Errorf("M_image(T15) = %.12g H, want 84.98751490e-3 H (MODEL.md §4.1) ± 1e-8", got)
	}
}

// TestIsolatedCoil checks L0 against MODEL.md §3.3 (T15 225.98789 mH,
// Dodd–Deeds integral with two independent quadratures and a filament
// sum), the measured inductance of coil m1 (376.8 μH from X/ω at 1 kHz of
// the carabedo/iamend_ci air sweep, MODEL.md §3.2; 1 %), and Wheeler's
// multilayer formula L[μH] = 0.8a²N²/(6a+9b+10c) in inches (Wheeler, Proc.
// IRE 16, 1398, 1928, from memory; stated accuracy about 1 %).
func TestIsolatedCoil(t *testing.T) {
	t.Parallel()
	wheeler := func(c Coil) float64 {
		in := 0.0254
		a := (c.InnerRadiusM + c.OuterRadiusM) / 2 / in
		b := c.LengthM / in
		cc := (c.OuterRadiusM - c.InnerRadiusM) / in
		return 0.8 * a * a * c.Turns * c.Turns / (6*a + 9*b + 10*cc) * 1e-6
	}
	m := mustModel(t, coilT15)
	if got, want := m.L0H(), 225.98789e-3; !scalar.EqualWithinRel(got, want, 2e-7) {
		t.Errorf("L0(T15) = %.10g H, want %.8g H (MODEL.md §3.3) ± 2e-7 (its 8 digits)", got, want)
	}
	if e := m.L0ErrorEstimate(); !(e < 1e-8) {
		t.Errorf("L0 error estimate %g, want < 1e-8", e)
	}
	for _, c := range []struct {
		name string
		coil Coil
	}{{"T15", coilT15}, {"m1", coilM1}, {"C9", coilC9}} {
		mm := mustModel(t, c.coil)
		if got, want := mm.L0H(), wheeler(c.coil); !scalar.EqualWithinRel(got, want, 0.015) {
			t.Errorf("L0(%s) = %.6g H, Wheeler %.6g H: differ by more than 1.5 %% (Wheeler's ~1 %% plus rounding of its constants)", c.name, got, want)
		}
	}
	if got := mustModel(t, coilM1).L0H(); !scalar.EqualWithinRel(got, 376.8e-6, 0.01) {
		t.Errorf("L0(m1) = %.6g H, want 376.8 μH measured (MODEL.md §3.2) ± 1 %%", got)
	}
	// Coil "pp1" of the same data set: catalogue L0 345.85 μH (MODEL.md
	// §3.2, apparently measured), r1 = 3.00, r2 = 4.56, l = 5.02 mm, N = 253.
	pp1 := Coil{InnerRadiusM: 3.00e-3, OuterRadiusM: 4.56e-3, LengthM: 5.02e-3, Turns: 253}
	if got := mustModel(t, pp1).L0H(); !scalar.EqualWithinRel(got, 345.85e-6, 0.01) {
		t.Errorf("L0(pp1) = %.6g H, want 345.85 μH (catalogue, MODEL.md §3.2) ± 1 %%", got)
	}
}

// nagaoka returns Nagaoka's coefficient of a current sheet of radius a and
// length l from its elliptic-integral expression (Nagaoka, J. Coll. Sci.
// Tokyo 27, art. 6, 1909, from memory):
//
//	K_N = (4/(3πk′))[(k′²/k²)(K(k) − E(k)) + E(k) − k],  k² = 4a²/(4a² + l²).
//
// The test below also checks its value 0.6884 at l = 2a (Nagaoka's table,
// from memory) and the long-solenoid limit 1.
func nagaoka(a, l float64) float64 {
	m := 4 * a * a / (4*a*a + l*l)
	k, kp := math.Sqrt(m), math.Sqrt(1-m)
	K, E := mathext.CompleteK(m), mathext.CompleteE(m)
	return 4 / (3 * math.Pi * kp) * (kp*kp/(k*k)*(K-E) + E - k)
}

// TestThinCoilNagaoka checks the thin-coil limit of L0 against the
// Nagaoka-corrected current-sheet formula L = K_N μ0 π a² N²/l.
func TestThinCoilNagaoka(t *testing.T) {
	t.Parallel()
	if got := nagaoka(1, 2); !scalar.EqualWithinAbs(got, 0.6884, 5e-5) {
		t.Fatalf("K_N(l = 2a) = %.5f, want 0.6884 (Nagaoka's table, from memory)", got)
	}
	if got := nagaoka(1, 2000); !scalar.EqualWithinRel(got, 1, 1e-3) {
		t.Fatalf("K_N(l = 1000·2a) = %.6f, want → 1", got)
	}
	for _, tc := range []struct {
		name    string
		a, l, w float64 // mean radius, length, radial build
		tol     float64
	}{
		// A winding of radial build w differs from the current sheet at its
		// mean radius by a term linear in w (−w/(3a) for a long solenoid:
		// the flux inside the winding links only part of the turns), so L0
		// is computed for builds w, 2w and 4w and extrapolated to w → 0
		// (Richardson, eliminating the w and w² terms); the remaining
		// O(w³) term is about 1e-5 for w = a/200.
		{"short l=a/2", 10e-3, 5e-3, 0.05e-3, 5e-5},
		{"square l=2a", 10e-3, 20e-3, 0.05e-3, 5e-5},
		{"long l=10a", 5e-3, 50e-3, 0.025e-3, 5e-5},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			l0 := func(w float64) float64 {
				c := Coil{InnerRadiusM: tc.a - w/2, OuterRadiusM: tc.a + w/2, LengthM: tc.l, Turns: 100}
				m, err := NewPlanarModel(c, 1e-7)
				if err != nil {
					t.Fatal(err)
				}
				return m.L0H()
			}
			got := (8*l0(tc.w) - 6*l0(2*tc.w) + l0(4*tc.w)) / 3
			want := nagaoka(tc.a, tc.l) * mu0 * math.Pi * tc.a * tc.a * 100 * 100 / tc.l
			if !scalar.EqualWithinRel(got, want, tc.tol) {
				t.Errorf("L0 = %.8g H, want Nagaoka %.8g H ± %g rel", got, want, tc.tol)
			}
		})
	}
}
