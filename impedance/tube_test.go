package impedance

import (
	"math"
	"math/cmplx"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"whorl/impedance/cbessel"
)

// besselJ1Zeros returns the first n positive zeros of J1 by Newton's method
// from McMahon's expansion j ≈ β − 3/(8β), β = (i + ¼)π (A&S 9.5.12), with
// J1′(x) = J0(x) − J1(x)/x.
func besselJ1Zeros(n int) []float64 {
	z := make([]float64, n)
	for i := range z {
		b := (float64(i+1) + 0.25) * math.Pi
		x := b - 3/(8*b)
		for k := 0; k < 20; k++ {
			dx := math.J1(x) / (math.J0(x) - math.J1(x)/x)
			x -= dx
			if math.Abs(dx) < 1e-15*x {
				break
			}
		}
		z[i] = x
	}
	return z
}

// pecTubeSeries returns the inductance (self if d = 0, else mutual with an
// identical coil whose centre is d higher) of a coil inside a perfectly
// conducting cylinder of radius b: the Dirichlet eigen-series of MODEL.md
// §1.7/§4.6,
//
//	L = 2πμ0N²/(l²(r2−r1)²) Σ χ²(α_i) g(α_i) / (α_i⁷ b² J0²(α_i b)),  J1(α_i b) = 0,
//
// with g = α²∫∫e^{−α|z−z′|} over the two windings. The terms fall like
// i^{−4}; the sum of terms beyond n is estimated from the last one by the
// integral test (Σ_{i>n} ≈ t_n·n/3).
func pecTubeSeries(c Coil, b, d float64, n int) float64 {
	zs := besselJ1Zeros(n)
	s, last := 0.0, 0.0
	for _, j := range zs {
		a := j / b
		chi := coilF(a*c.OuterRadiusM) - coilF(a*c.InnerRadiusM)
		j0 := math.J0(j)
		last = chi * chi * heightOverlap(a, 0, c.LengthM, d, d+c.LengthM) / (pow6(a) * a * b * b * j0 * j0)
		s += last
	}
	s += last * float64(n) / 3
	r := c.OuterRadiusM - c.InnerRadiusM
	return 2 * math.Pi * mu0 * c.Turns * c.Turns / (c.LengthM * c.LengthM * r * r) * s
}

// TestBobbinPECTube checks the bobbin model against the exact impedance of
// a coil in a perfectly conducting tube (MODEL.md §4.6): ΔL = L_series(b1)
// − L0 = −79.34893 μH for r1 = 6 mm, r2 = 7 mm, l = 2 mm, N = 100,
// b1 = 8 mm, computed here with 20000 terms; the model uses σ = 1e26 S/m
// (δ ≈ 2e-12 m, a relative correction ~δ/gap ≈ 2e-9). The mutual term of a
// differential pair is checked the same way.
func TestBobbinPECTube(t *testing.T) {
	t.Parallel()
	c := Coil{InnerRadiusM: 6e-3, OuterRadiusM: 7e-3, LengthM: 2e-3, Turns: 100}
	m := mustModel(t, c)
	series := pecTubeSeries(c, 8e-3, 0, 20000)
	want := series - m.L0H()
	// MODEL.md §4.6: −79.3489272 μH (2000 terms), −79.34892709 μH (32000).
	if !scalar.EqualWithinRel(want, -79.34892709e-6, 2e-8) {
		t.Errorf("eigen-series ΔL = %.10g H, want −79.34892709 μH (MODEL.md §4.6)", want)
	}
	const f = 1e3
	p := TubeProbe{Coil: c, Placement: Bobbin, TubeInnerRadiusM: 8e-3, TubeOuterRadiusM: math.Inf(1),
		ConductivitySPerM: 1e26, RelPermeability: 1, Differential: true, CoilGapM: 3e-3}
	r, err := p.Impedance(f)
	if err != nil {
		t.Fatal(err)
	}
	if got := imag(r.DZOhm) / (2 * math.Pi * f); !scalar.EqualWithinRel(got, want, 1e-7) {
		t.Errorf("bobbin in PEC borehole: ΔL = %.10g H, want %.10g H (eigen-series) ± 1e-7", got, want)
	}
	dr, err := p.DifferentialImpedance(f)
	if err != nil {
		t.Fatal(err)
	}
	wantM := pecTubeSeries(c, 8e-3, 3e-3, 20000) - dr.MutualL0H
	if got := imag(dr.MutualDZOhm) / (2 * math.Pi * f); !scalar.EqualWithinRel(got, wantM, 1e-6) {
		t.Errorf("differential pair in PEC borehole: ΔM = %.10g H, want %.10g H (eigen-series) ± 1e-6", got, wantM)
	}
	if dr.OutputOhm != 0 {
		t.Errorf("uniform tube: differential output %v, want 0", dr.OutputOhm)
	}
}

// TestForsterLimit checks the long encircling coil against Förster's
// effective permeability of a rod, ΔZ → jωμ0(N²/l)πa²(μ_eff − 1),
// μ_eff = 2I1(ka)/(ka I0(ka)), k = √(jωμ0σ) (MODEL.md §4.7). The finite-
// length ratio behaves as 1 − c/l (MODEL.md §4.7: 1 − 0.0149 m/l), so the
// values at l = 0.4 m and 0.8 m are extrapolated to l → ∞.
func TestForsterLimit(t *testing.T) {
	t.Parallel()
	const a, sigma, f = 5e-3, 30.6e6, 1e3
	om := 2 * math.Pi * f
	k := cmplx.Sqrt(complex(0, om*mu0*sigma))
	ka := k * complex(a, 0)
	i0, i1 := cbessel.I01Scaled(ka)
	mueff := 2 * i1 / (ka * i0)
	ratio := func(l float64) complex128 {
		p := TubeProbe{Coil: Coil{InnerRadiusM: 10e-3, OuterRadiusM: 10.2e-3, LengthM: l, Turns: 1000},
			Placement: Encircling, TubeOuterRadiusM: a, ConductivitySPerM: sigma, RelPermeability: 1}
		r, err := p.Impedance(f)
		if err != nil {
			t.Fatal(err)
		}
		forster := complex(0, om*mu0*1000*1000/l*math.Pi*a*a) * (mueff - 1)
		return r.DZOhm / forster
	}
	r4, r8 := ratio(0.4), ratio(0.8)
	if e := cmplx.Abs(2*r8 - r4 - 1); e > 2e-3 {
		t.Errorf("Förster ratio: l=0.4 m %v, l=0.8 m %v, extrapolated %v, want 1 ± 2e-3", r4, r8, 2*r8-r4)
	}
	// MODEL.md §4.7 (its scipy implementation, coil radius 10 mm):
	// 0.9632 at l = 0.4 m, 0.9815 at 0.8 m, real ratio.
	if !scalar.EqualWithinAbs(real(r8), 0.9815, 2e-3) || !scalar.EqualWithinAbs(real(r4), 0.9632, 3e-3) {
		t.Errorf("Förster ratio %v (l=0.4), %v (l=0.8): want ≈ 0.9632, 0.9815 (MODEL.md §4.7)", r4, r8)
	}
}

// TestForsterTable checks μ_eff = 2I1(ka)/(ka I0(ka)), (ka)² = j·f/fg,
// against MODEL.md §4.7 (computed there with mpmath; they match the
// classical Förster table, e.g. f/fg = 10 → 0.468 − 0.349j, from memory).
func TestForsterTable(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		ffg  float64
		want complex128
	}{
		{0.5, 0.994830 - 0.062056i}, {1, 0.979767 - 0.121523i}, {2, 0.925506 - 0.224410i},
		{4, 0.773777 - 0.344896i}, {10, 0.467787 - 0.349437i}, {25, 0.284056 - 0.241598i},
		{100, 0.141625 - 0.131248i}, {1000, 0.044727 - 0.043716i},
	} {
		ka := cmplx.Sqrt(complex(0, tc.ffg))
		i0, i1 := cbessel.I01Scaled(ka)
		got := 2 * i1 / (ka * i0)
		if cmplx.Abs(got-tc.want) > 1.5e-6 {
			t.Errorf("μ_eff(f/fg = %g) = %.6f, want %.6f (MODEL.md §4.7)", tc.ffg, got, tc.want)
		}
	}
}

// TestTubeLimits checks structural identities: a tube with a 1 µm bore
// equals the rod; a 20 mm wall at 1 MHz equals the borehole (MODEL.md
// §3.3); passivity (Re ΔZ ≥ 0, ΔX ≤ 0 for μr = 1) over a frequency grid.
func TestTubeLimits(t *testing.T) {
	t.Parallel()
	enc := TubeProbe{Coil: Coil{InnerRadiusM: 10.5e-3, OuterRadiusM: 11.5e-3, LengthM: 2e-3, Turns: 100},
		Placement: Encircling, TubeOuterRadiusM: 9.525e-3, ConductivitySPerM: 1e6, RelPermeability: 1}
	rod, err := enc.Impedance(1e4)
	if err != nil {
		t.Fatal(err)
	}
	enc.TubeInnerRadiusM = 1e-6
	tube, err := enc.Impedance(1e4)
	if err != nil {
		t.Fatal(err)
	}
	if e := cRelErr(tube.DZOhm, rod.DZOhm); e > 1e-9 {
		t.Errorf("tube with 1 µm bore %v, rod %v, rel %.2g > 1e-9", tube.DZOhm, rod.DZOhm, e)
	}
	bob := TubeProbe{Coil: Coil{InnerRadiusM: 7e-3, OuterRadiusM: 7.6e-3, LengthM: 1.5e-3, Turns: 60},
		Placement: Bobbin, TubeInnerRadiusM: 8.435e-3, TubeOuterRadiusM: 28.435e-3, ConductivitySPerM: 1e6, RelPermeability: 1}
	thick, err := bob.Impedance(1e6)
	if err != nil {
		t.Fatal(err)
	}
	bob.TubeOuterRadiusM = math.Inf(1)
	bore, err := bob.Impedance(1e6)
	if err != nil {
		t.Fatal(err)
	}
	if e := cRelErr(thick.DZOhm, bore.DZOhm); e > 1e-10 {
		t.Errorf("20 mm wall %v, borehole %v, rel %.2g > 1e-10", thick.DZOhm, bore.DZOhm, e)
	}
	bob.TubeOuterRadiusM = 9.525e-3
	for _, f := range []float64{100, 3e3, 5e4, 4e5, 2e6} {
		for _, p := range []TubeProbe{bob, enc} {
			r, err := p.Impedance(f)
			if err != nil {
				t.Fatal(err)
			}
			if real(r.DZOhm) < 0 || imag(r.DZOhm) > 0 {
				t.Errorf("%v at %g Hz: ΔZ = %v, want Re ≥ 0, Im ≤ 0", p.Placement, f, r.DZOhm)
			}
		}
	}
}

// TestTubeValidate checks that impossible probes are refused.
func TestTubeValidate(t *testing.T) {
	t.Parallel()
	good := TubeProbe{Coil: Coil{InnerRadiusM: 7e-3, OuterRadiusM: 7.6e-3, LengthM: 1.5e-3, Turns: 60},
		Placement: Bobbin, TubeInnerRadiusM: 8.435e-3, TubeOuterRadiusM: 9.525e-3, ConductivitySPerM: 1e6}
	if err := good.Validate(); err != nil {
		t.Fatalf("valid probe: %v", err)
	}
	for name, mod := range map[string]func(*TubeProbe){
		"coil touches wall":   func(p *TubeProbe) { p.TubeInnerRadiusM = 7.6e-3 },
		"outer below inner":   func(p *TubeProbe) { p.TubeOuterRadiusM = 8e-3 },
		"negative σ":          func(p *TubeProbe) { p.ConductivitySPerM = -1 },
		"NaN σ":               func(p *TubeProbe) { p.ConductivitySPerM = math.NaN() },
		"μr below 1":          func(p *TubeProbe) { p.RelPermeability = 0.5 },
		"encircling inside":   func(p *TubeProbe) { p.Placement = Encircling },
		"bad placement":       func(p *TubeProbe) { p.Placement = 7 },
		"differential no gap": func(p *TubeProbe) { p.Differential = true },
	} {
		p := good
		mod(&p)
		if err := p.Validate(); err == nil {
			t.Errorf("%s: Validate() = nil, want an error", name)
		}
		if _, err := p.Impedance(1e4); err == nil {
			t.Errorf("%s: Impedance() error = nil, want an error", name)
		}
	}
}
