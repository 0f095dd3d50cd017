package impedance

import (
	"math"
	"math/cmplx"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// coilPairMaxwell integrates Maxwell's loop formula over the cross-sections
// of two coaxial coils, the second at heights sign·[z, z+l] (sign −1 for the
// mirror image), with n-point Gauss–Legendre in each variable.
func coilPairMaxwell(c1 Coil, z1 float64, c2 Coil, z2, sign float64, n int) float64 {
	x, w := gaussLegendre(n)
	h1r, h1z := (c1.OuterRadiusM-c1.InnerRadiusM)/2, c1.LengthM/2
	h2r, h2z := (c2.OuterRadiusM-c2.InnerRadiusM)/2, c2.LengthM/2
	s := 0.0
	for i := range x {
		ra := c1.InnerRadiusM + h1r*(1+x[i])
		for j := range x {
			za := z1 + h1z*(1+x[j])
			for k := range x {
				rb := c2.InnerRadiusM + h2r*(1+x[k])
				for m := range x {
					zb := sign * (z2 + h2z*(1+x[m]))
					s += w[i] * w[j] * w[k] * w[m] * maxwellMutual(ra, rb, za-zb)
				}
			}
		}
	}
	// (N1/A1)(N2/A2)·(h1r h1z h2r h2z)·Σ, with A = (r2−r1)l = 4 hr hz.
	return c1.Turns * c2.Turns / 16 * s
}

// TestMutualPlanar checks the driver–pickup mutual impedance: identical
// coils give the self-impedance change of PlanarModel; swapping the coils
// gives the same result (reciprocity); the air mutual inductance of two
// stacked coils and the PEC limit −jωM(coil 1, image of coil 2) agree with
// Maxwell's elliptic-integral loop formula integrated over both sections
// (MODEL.md §4.1).
func TestMutualPlanar(t *testing.T) {
	t.Parallel()
	m := mustModel(t, coilC9)
	hs := halfSpace(16.45e6, 1)
	self, err := m.Impedance(1e4, 1.32e-3, hs)
	if err != nil {
		t.Fatal(err)
	}
	mu, err := MutualPlanar(coilC9, coilC9, 1.32e-3, 1.32e-3, 1e4, hs)
	if err != nil {
		t.Fatal(err)
	}
	if e := cRelErr(mu.DZOhm, self.DZOhm); e > 1e-8 {
		t.Errorf("identical coils: ΔZ12 = %v, self ΔZ = %v, rel %.2g > 1e-8", mu.DZOhm, self.DZOhm, e)
	}
	if !scalar.EqualWithinRel(mu.L0H, self.L0H, 1e-7) {
		t.Errorf("identical coils: M0 = %.10g H, L0 = %.10g H", mu.L0H, self.L0H)
	}

	drive := Coil{InnerRadiusM: 4e-3, OuterRadiusM: 6e-3, LengthM: 1.5e-3, Turns: 120}
	pick := Coil{InnerRadiusM: 1.5e-3, OuterRadiusM: 2.5e-3, LengthM: 1e-3, Turns: 200}
	const zd, zp = 2.5e-3, 0.4e-3 // pickup nearer the surface, below the driver
	ab, err := MutualPlanar(drive, pick, zd, zp, 5e4, hs)
	if err != nil {
		t.Fatal(err)
	}
	ba, err := MutualPlanar(pick, drive, zp, zd, 5e4, hs)
	if err != nil {
		t.Fatal(err)
	}
	if e := cRelErr(ab.DZOhm, ba.DZOhm); e > 1e-10 {
		t.Errorf("reciprocity: %v vs %v, rel %.2g", ab.DZOhm, ba.DZOhm, e)
	}
	wantM0 := coilPairMaxwell(drive, zd, pick, zp, 1, 16)
	if !scalar.EqualWithinRel(ab.L0H, wantM0, 1e-8) {
		t.Errorf("air mutual = %.12g H, want %.12g H (Maxwell, 16⁴ Gauss–Legendre) ± 1e-8", ab.L0H, wantM0)
	}
	pec, err := MutualPlanar(drive, pick, zd, zp, 1e3, halfSpace(1e24, 1))
	if err != nil {
		t.Fatal(err)
	}
	wantImg := coilPairMaxwell(drive, zd, pick, zp, -1, 16)
	if got := -imag(pec.DZOhm) / (2 * math.Pi * 1e3); !scalar.EqualWithinRel(got, wantImg, 1e-8) {
		t.Errorf("PEC: −ΔM = %.12g H, want image mutual %.12g H ± 1e-8", got, wantImg)
	}
	// Concentric coils in one plane (overlapping heights): air mutual.
	outer := Coil{InnerRadiusM: 5e-3, OuterRadiusM: 7e-3, LengthM: 2e-3, Turns: 100}
	inner := Coil{InnerRadiusM: 2e-3, OuterRadiusM: 3.5e-3, LengthM: 2e-3, Turns: 80}
	cc, err := MutualPlanar(outer, inner, 0.5e-3, 0.5e-3, 1e4, hs)
	if err != nil {
		t.Fatal(err)
	}
	if want := coilPairMaxwell(outer, 0.5e-3, inner, 0.5e-3, 1, 24); !scalar.EqualWithinRel(cc.L0H, want, 1e-7) {
		t.Errorf("concentric air mutual = %.12g H, want %.12g H (Maxwell, 24⁴) ± 1e-7", cc.L0H, want)
	}
}

// TestDifferentialPlanar checks the stacked pair: the output is the
// difference of the two coils' ΔZ, far above the conductor it vanishes,
// and the mutual term agrees with MutualPlanar (checked against Maxwell's
// formula above).
func TestDifferentialPlanar(t *testing.T) {
	t.Parallel()
	m := mustModel(t, coilC9)
	hs := halfSpace(16.45e6, 1)
	d, err := DifferentialPlanar(m, 1.32e-3, 4e-3, 1e4, hs)
	if err != nil {
		t.Fatal(err)
	}
	up, _ := m.Impedance(1e4, 5.32e-3, hs)
	if e := cRelErr(d.OutputOhm, d.Coil.DZOhm-up.DZOhm); e > 1e-14 {
		t.Errorf("output %v, want ΔZ_lower − ΔZ_upper = %v", d.OutputOhm, d.Coil.DZOhm-up.DZOhm)
	}
	mu, _ := MutualPlanar(coilC9, coilC9, 1.32e-3, 5.32e-3, 1e4, hs)
	if d.MutualDZOhm != mu.DZOhm || d.MutualL0H != mu.L0H {
		t.Errorf("mutual %v/%g, want %v/%g", d.MutualDZOhm, d.MutualL0H, mu.DZOhm, mu.L0H)
	}
	far, err := DifferentialPlanar(m, 0.2, 4e-3, 1e4, hs)
	if err != nil {
		t.Fatal(err)
	}
	if a := cmplx.Abs(far.OutputOhm) / cmplx.Abs(d.OutputOhm); a > 1e-6 {
		t.Errorf("pair 0.2 m above the conductor: |output| ratio %g, want → 0", a)
	}
	if _, err := DifferentialPlanar(m, 1e-3, 1e-3, 1e4, hs); err == nil {
		t.Errorf("spacing below the coil length: want an error")
	}
}
