package impedance

import (
	"bufio"
	"fmt"
	"math"
	"math/cmplx"
	"os"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// TestLayerConsistency checks structural identities of the layered
// reflection coefficient (MODEL.md §4.4, §6 check 4): a half-space split
// into two layers of the same material equals the half-space; a plate much
// thicker than δ equals the half-space; an air gap below the coil equals a
// larger lift-off.
func TestLayerConsistency(t *testing.T) {
	t.Parallel()
	m := mustModel(t, coilT15)
	const z1 = 0.88e-3
	inf := math.Inf(1)
	tests := []struct {
		name   string
		f      float64
		z1a    float64
		a      []Layer
		z1b    float64
		b      []Layer
		relTol float64
	}{
		// Exact identity: Γ recursion with r = 0 at the internal interface.
		{"split half-space", 900, z1, []Layer{{1e-3, 30.6e6, 1}, {inf, 30.6e6, 1}}, z1, halfSpace(30.6e6, 1), 1e-12},
		{"split magnetic", 1e3, z1, []Layer{{0.3e-3, 6e6, 80}, {inf, 6e6, 80}}, z1, halfSpace(6e6, 80), 1e-12},
		// 20 mm at 10 kHz is 20δ: e^{−40} below rounding (MODEL.md §3.3:
		// identical to 10 digits).
		{"thick plate", 1e4, z1, []Layer{{20e-3, 30.6e6, 1}}, z1, halfSpace(30.6e6, 1), 1e-10},
		// A 1 mm air layer on top is the same as 1 mm more lift-off.
		{"air gap = lift-off", 3e3, z1, []Layer{{1e-3, 0, 1}, {inf, 30.6e6, 1}}, z1 + 1e-3, halfSpace(30.6e6, 1), 1e-9},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			ra, err := m.Impedance(tc.f, tc.z1a, tc.a)
			if err != nil {
				t.Fatal(err)
			}
			rb, err := m.Impedance(tc.f, tc.z1b, tc.b)
			if err != nil {
				t.Fatal(err)
			}
			if e := cRelErr(ra.DZOhm, rb.DZOhm); !(e <= tc.relTol) {
				t.Errorf("ΔZ = %v, want %v (identity), rel diff %.2g > %g", ra.DZOhm, rb.DZOhm, e, tc.relTol)
			}
		})
	}
}

// TestThinSheetLimit checks that a plate with c → 0 at fixed σc tends to
// the thin-sheet coefficient φ = −jωμ0σc/(2α + jωμ0σc) (MODEL.md §1.4(d),
// §4.4), with the difference shrinking in proportion to c.
func TestThinSheetLimit(t *testing.T) {
	t.Parallel()
	m := mustModel(t, coilT15)
	const f, z1, sc = 1e4, 0.88e-3, 30.6e3 // σc = 30.6 kS as in MODEL.md §4.4
	om := 2 * math.Pi * f
	g := om * mu0 * sc
	s, _ := m.integrate(z1, func(a float64) complex128 {
		return complex(0, -g) / complex(2*a, g)
	})
	want := complex(0, om*m.scale) * s
	// MODEL.md §4.4: thin-sheet 693.24 − 5225.89j Ω.
	if e := cRelErr(want, 693.24-5225.89i); e > 2e-6 {
		t.Errorf("thin-sheet ΔZ = %v, want 693.24−5225.89j (MODEL.md §4.4), rel %.2g", want, e)
	}
	prev := math.Inf(1)
	for _, c := range []float64{1e-4, 1e-5, 1e-6} {
		r, err := m.Impedance(f, z1, []Layer{{c, sc / c, 1}})
		if err != nil {
			t.Fatal(err)
		}
		e := cRelErr(r.DZOhm, want)
		// The plate differs from the sheet by O(c/r̄ + (c/δ)²); c = 0.01 mm
		// gives 1.1e-3 (MODEL.md §4.4 values), so allow 15·c/1 mm.
		if !(e <= 15*c/1e-3) {
			t.Errorf("c = %g m: ΔZ = %v, thin sheet %v, rel diff %.2g > %.2g", c, r.DZOhm, want, e, 15*c/1e-3)
		}
		if !(e < prev) {
			t.Errorf("c = %g m: difference %.2g did not shrink (previous %.2g)", c, e, prev)
		}
		prev = e
	}
}

// TestLowFrequencyLimit checks ΔR/(A_c ω²) → 1 on a finite plate
// (MODEL.md §4.2; first-order Born reflection φ ≈ −jωμ0σ(1−e^{−2αc})/(4α²)):
// 0.999984 at 1 Hz for T15 over 1 mm (MODEL.md §4.2), and ΔX = O(ω³).
func TestLowFrequencyLimit(t *testing.T) {
	t.Parallel()
	m := mustModel(t, coilT15)
	const z1, c, sigma = 0.88e-3, 1e-3, 30.6e6
	s, _ := m.integrate(z1, func(a float64) complex128 {
		return complex(-math.Expm1(-2*a*c)/(4*a*a), 0)
	})
	// ΔZ_Born = jω·scale·∫g·(−jωμ0σ)(…) = ω² μ0 σ scale ∫g (…) ≡ A_c ω².
	ac := mu0 * sigma * m.scale * real(s)
	for _, tc := range []struct {
		f, want, tol float64
	}{
		{1, 0.999984, 2e-6}, // MODEL.md §4.2
		{10, 0.99902, 1e-5}, // MODEL.md §4.2
		{0.1, 1, 5e-7},      // approaching 1
	} {
		om := 2 * math.Pi * tc.f
		r, err := m.Impedance(tc.f, z1, []Layer{{c, sigma, 1}})
		if err != nil {
			t.Fatal(err)
		}
		got := real(r.DZOhm) / (ac * om * om)
		if !scalar.EqualWithinAbs(got, tc.want, tc.tol) {
			t.Errorf("f = %g Hz: ΔR/(A_c ω²) = %.7f, want %.7f ± %g", tc.f, got, tc.want, tc.tol)
		}
		if x := imag(r.DZOhm); !(x < 0) {
			t.Errorf("f = %g Hz: ΔX = %g, want < 0", tc.f, x)
		}
	}
}

// TestPassivityAndScaling checks, over a grid of σ, f, thickness and
// lift-off, that Re ΔZ ≥ 0 and X ≤ X0 for μr = 1 (a passive non-magnetic
// conductor absorbs power and reduces the inductance), and that the
// normalised impedance is unchanged when every length is scaled by s and σ
// by 1/s² (MODEL.md §5.3).
func TestPassivityAndScaling(t *testing.T) {
	t.Parallel()
	base := coilC9
	m := mustModel(t, base)
	const s = 3.7
	scaled := Coil{base.InnerRadiusM * s, base.OuterRadiusM * s, base.LengthM * s, base.Turns}
	ms := mustModel(t, scaled)
	for _, sigma := range []float64{1e5, 1.4e6, 58e6} {
		for _, f := range []float64{50, 2e3, 1e5, 3e6} {
			for _, c := range []float64{0.05e-3, 1e-3, math.Inf(1)} {
				for _, z1 := range []float64{0, 0.3e-3, 3e-3} {
					r, err := m.Impedance(f, z1, []Layer{{c, sigma, 1}})
					if err != nil {
						t.Fatal(err)
					}
					if real(r.DZOhm) < 0 || imag(r.DZOhm) > 0 {
						t.Errorf("σ=%g f=%g c=%g z1=%g: ΔZ = %v, want Re ≥ 0 and Im ≤ 0", sigma, f, c, z1, r.DZOhm)
					}
					rs, err := ms.Impedance(f, z1*s, []Layer{{c * s, sigma / (s * s), 1}})
					if err != nil {
						t.Fatal(err)
					}
					if e := cmplx.Abs(rs.Normalized() - r.Normalized()); e > 1e-8 {
						t.Errorf("σ=%g f=%g c=%g z1=%g: Zn = %v, scaled %v, |diff| %.2g > 1e-8", sigma, f, c, z1, r.Normalized(), rs.Normalized(), e)
					}
					if r.ErrorEstimate > 1e-7 {
						t.Errorf("σ=%g f=%g c=%g z1=%g: error estimate %g > 1e-7", sigma, f, c, z1, r.ErrorEstimate)
					}
				}
			}
		}
	}
}

// TestModelValuesT15 checks the T15 values of MODEL.md §3.3 (computed there
// with mpmath and SciPy by two quadratures, agreeing to the digits shown;
// coil dimensions of TEAM Workshop Problem 15, Burke 1988, from memory).
func TestModelValuesT15(t *testing.T) {
	t.Parallel()
	m := mustModel(t, coilT15)
	inf := math.Inf(1)
	tests := []struct {
		name   string
		f, z1  float64
		layers []Layer
		want   complex128
		tol    float64 // relative; the table's digits
	}{
		{"half-space 900 Hz", 900, 0.88e-3, halfSpace(30.6e6, 1), 120.6144247 - 267.6632223i, 1e-8},
		{"plate 12.22 mm 900 Hz", 900, 0.88e-3, []Layer{{12.22e-3, 30.6e6, 1}}, 120.6505074 - 267.6579922i, 1e-8},
		{"half-space 10 kHz", 1e4, 0.88e-3, halfSpace(30.6e6, 1), 650.8398359 - 4560.799365i, 1e-8},
		{"two-layer 10 kHz", 1e4, 0.88e-3, []Layer{{0.2e-3, 5e6, 1}, {inf, 30.6e6, 1}}, 620.35535 - 4337.735859i, 1e-8},
		{"half-space 100 Hz", 100, 0.88e-3, halfSpace(30.6e6, 1), 10.381316 - 8.556582i, 1e-7},
		{"half-space 100 kHz", 1e5, 0.88e-3, halfSpace(30.6e6, 1), 2347.42039 - 50912.1738i, 1e-8},
		{"zero lift-off 900 Hz", 900, 0, halfSpace(30.6e6, 1), 164.7047673 - 343.3214295i, 1e-8},
		{"lift-off 5 mm", 900, 5e-3, halfSpace(30.6e6, 1), 33.880752 - 97.590491i, 1e-7},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			r, err := m.Impedance(tc.f, tc.z1, tc.layers)
			if err != nil {
				t.Fatal(err)
			}
			if e := cRelErr(r.DZOhm, tc.want); !(e <= tc.tol) {
				t.Errorf("ΔZ = %.10g, want %.10g (MODEL.md §3.3), rel %.2g > %g", r.DZOhm, tc.want, e, tc.tol)
			}
		})
	}
	// Magnetostatic limit: ΔL = +((μr−1)/(μr+1)) M_image (MODEL.md §4.1):
	// μr = 100 gives +83.30459 mH.
	r, err := m.Impedance(1e-3, 0.88e-3, halfSpace(1e6, 100))
	if err != nil {
		t.Fatal(err)
	}
	if dl := imag(r.DZOhm) / (2 * math.Pi * 1e-3); !scalar.EqualWithinRel(dl, 83.30459e-3, 2e-7) {
		t.Errorf("magnetostatic ΔL = %.8g H, want +83.30459 mH (MODEL.md §4.1, (99/101)·M_image)", dl)
	}
}

// planarRef is one row of testdata/impedance/planar_ref.txt.
type planarRef struct {
	name   string
	coil   Coil
	z1, f  float64
	layers []Layer
	l0     float64
	dz     complex128
}

// readPlanarRef reads the mpmath reference table written by
// testdata/impedance/gen_planar.py (mpmath 1.2.1; the header names the
// version and method).
func readPlanarRef(path string) ([]planarRef, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	var out []planarRef
	sc := bufio.NewScanner(f)
	line := 0
	num := func(s string, col int) (float64, error) {
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			return 0, fmt.Errorf("%s:%d: column %d: %w", path, line, col, err)
		}
		return v, nil
	}
	for sc.Scan() {
		line++
		s := sc.Text()
		if strings.HasPrefix(s, "#") || strings.TrimSpace(s) == "" {
			continue
		}
		fs := strings.Split(s, "|")
		if len(fs) != 11 {
			return nil, fmt.Errorf("%s:%d: %d fields, want 11", path, line, len(fs))
		}
		var v [11]float64
		for _, i := range []int{1, 2, 3, 4, 5, 6, 8, 9, 10} {
			if v[i], err = num(fs[i], i+1); err != nil {
				return nil, err
			}
		}
		var layers []Layer
		for _, ls := range strings.Split(fs[7], ";") {
			p := strings.Split(ls, ":")
			if len(p) != 3 {
				return nil, fmt.Errorf("%s:%d: column 8: layer %q: want T:SIGMA:MUR", path, line, ls)
			}
			var l Layer
			if p[0] == "inf" {
				l.ThicknessM = math.Inf(1)
			} else if l.ThicknessM, err = num(p[0], 8); err != nil {
				return nil, err
			}
			if l.ConductivitySPerM, err = num(p[1], 8); err != nil {
				return nil, err
			}
			if l.RelPermeability, err = num(p[2], 8); err != nil {
				return nil, err
			}
			layers = append(layers, l)
		}
		out = append(out, planarRef{
			name: fs[0], coil: Coil{v[1], v[2], v[3], v[4]}, z1: v[5], f: v[6],
			layers: layers, l0: v[8], dz: complex(v[9], v[10]),
		})
	}
	return out, sc.Err()
}

// TestPlanarReferenceTable matches L0 and ΔZ to the mpmath table to 1e-6
// relative (the brief's target; the agreement is ~1e-9, limited by μ0:
// the script uses 4π×1e-7, the package CODATA μ0, which differ by 5.5e-10).
func TestPlanarReferenceTable(t *testing.T) {
	t.Parallel()
	refs, err := readPlanarRef("../testdata/impedance/planar_ref.txt")
	if err != nil {
		t.Fatal(err)
	}
	if len(refs) < 15 {
		t.Fatalf("only %d reference rows", len(refs))
	}
	models := map[Coil]*PlanarModel{}
	for _, rf := range refs {
		m := models[rf.coil]
		if m == nil {
			m = mustModel(t, rf.coil)
			models[rf.coil] = m
		}
		r, err := m.Impedance(rf.f, rf.z1, rf.layers)
		if err != nil {
			t.Fatalf("%s: %v", rf.name, err)
		}
		if !scalar.EqualWithinRel(r.L0H, rf.l0, 1e-6) {
			t.Errorf("%s: L0 = %.12g H, want %.12g H (mpmath) ± 1e-6", rf.name, r.L0H, rf.l0)
		}
		if e := cRelErr(r.DZOhm, rf.dz); !(e <= 1e-6) {
			t.Errorf("%s: ΔZ = %.12g Ω, want %.12g Ω (mpmath), rel %.2g > 1e-6", rf.name, r.DZOhm, rf.dz, e)
		}
		if r.ErrorEstimate > 1e-7 {
			t.Errorf("%s: error estimate %g > 1e-7", rf.name, r.ErrorEstimate)
		}
	}
}

// TestHighFrequencyLimit checks the surface-impedance limit (MODEL.md
// §4.3): with φ ≈ −1 + 2α/α1, ΔZ − ΔZ_PEC ≈ (1+j)ωδ·scale·∫χ²(…)²/α⁵ dα,
// so the imaginary part of the ratio → 1 as δ → 0 and the real part
// differs by a frequency-independent second-order term (≈ −144 Ω for T15,
// MODEL.md §4.3 table: 7729.01 − 7873.07 at 1 MHz, 24752.2 − 24896.8 at
// 10 MHz).
func TestHighFrequencyLimit(t *testing.T) {
	t.Parallel()
	m := mustModel(t, coilT15)
	const z1, sigma = 0.88e-3, 30.6e6
	pec, _ := m.integrate(z1, func(float64) complex128 { return -1 })
	first, _ := m.integrate(z1, func(a float64) complex128 { return complex(a, 0) })
	var offsets []float64
	for _, tc := range []struct{ f, tol float64 }{{1e6, 2e-4}, {1e7, 3e-5}} {
		om := 2 * math.Pi * tc.f
		r, err := m.Impedance(tc.f, z1, halfSpace(sigma, 1))
		if err != nil {
			t.Fatal(err)
		}
		diff := r.DZOhm - complex(0, om*m.scale)*pec
		est := complex(1, 1) * complex(om*m.scale*SkinDepthM(tc.f, sigma, 1)*real(first), 0)
		if got := imag(diff) / imag(est); math.Abs(got-1) > tc.tol {
			t.Errorf("%g Hz: Im(ΔZ − ΔZ_PEC)/estimate = %.6f, want 1 ± %g", tc.f, got, tc.tol)
		}
		offsets = append(offsets, real(diff)-real(est))
	}
	if math.Abs(offsets[0]-offsets[1]) > 1 || math.Abs(offsets[1]+144.5) > 1.5 {
		t.Errorf("second-order real offsets %v Ω, want equal and ≈ −144 Ω (MODEL.md §4.3)", offsets)
	}
}
