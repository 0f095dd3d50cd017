package impedance

import (
	"fmt"
	"math"
	"math/cmplx"

	"whorl/impedance/cbessel"
)

// Placement says where a coil sits relative to a tube or rod.
type Placement int

const (
	// Bobbin is an internal coil inside the tube bore (heat-exchanger
	// tubing); TubeOuterRadiusM = +Inf models a borehole in an unbounded
	// conductor.
	Bobbin Placement = iota
	// Encircling is a coil around the tube or rod; TubeInnerRadiusM = 0
	// makes a solid rod.
	Encircling
)

// String returns "bobbin" or "encircling".
func (p Placement) String() string {
	switch p {
	case Bobbin:
		return "bobbin"
	case Encircling:
		return "encircling"
	}
	return fmt.Sprintf("Placement(%d)", int(p))
}

// TubeProbe is a coil coaxial with a conducting tube or rod (Dodd & Deeds
// 1968 cylindrical solutions; MODEL.md §2): a bobbin coil inside the bore
// or an encircling coil outside, absolute or as a differential pair of two
// identical coils.
type TubeProbe struct {
	Coil      Coil
	Placement Placement
	// TubeOuterRadiusM and TubeInnerRadiusM are the radii of the tube
	// wall in metres. Inner 0 is a solid rod (encircling only); outer
	// +Inf is a borehole in an unbounded conductor (bobbin only).
	TubeOuterRadiusM, TubeInnerRadiusM float64
	// ConductivitySPerM (S/m, ≥ 0) and RelPermeability (≥ 1; 0 means 1)
	// of the tube material.
	ConductivitySPerM, RelPermeability float64
	// Differential selects a pair of identical coaxial coils whose centres
	// are CoilGapM apart (≥ the coil length) on the axis.
	Differential bool
	CoilGapM     float64
}

// Validate reports an impossible probe: a coil touching or crossing the
// wall, non-finite or negative sizes, bad material values.
func (t TubeProbe) Validate() error {
	if err := t.Coil.Validate(); err != nil {
		return err
	}
	b1, b2 := t.TubeInnerRadiusM, t.TubeOuterRadiusM
	if !(b1 >= 0) || math.IsInf(b1, 0) {
		return fmt.Errorf("tube inner radius %v m: expected a finite value ≥ 0", b1)
	}
	if !(b2 > b1) {
		return fmt.Errorf("tube outer radius %v m: expected a value greater than the inner radius %v m", b2, b1)
	}
	switch t.Placement {
	case Bobbin:
		if !(b1 > t.Coil.OuterRadiusM) {
			return fmt.Errorf("bobbin coil outer radius %v m does not fit inside the tube inner radius %v m", t.Coil.OuterRadiusM, b1)
		}
	case Encircling:
		if math.IsInf(b2, 0) {
			return fmt.Errorf("tube outer radius: an encircling coil needs a finite value")
		}
		if !(t.Coil.InnerRadiusM > b2) {
			return fmt.Errorf("encircling coil inner radius %v m: expected a value greater than the tube outer radius %v m", t.Coil.InnerRadiusM, b2)
		}
	default:
		return fmt.Errorf("placement %d: expected bobbin or encircling", int(t.Placement))
	}
	if !(t.ConductivitySPerM >= 0) || math.IsInf(t.ConductivitySPerM, 0) {
		return fmt.Errorf("conductivity %v S/m: expected a finite value ≥ 0", t.ConductivitySPerM)
	}
	if mu := t.RelPermeability; mu != 0 && (!(mu >= 1) || math.IsInf(mu, 0)) {
		return fmt.Errorf("relative permeability %v: expected a finite value ≥ 1", mu)
	}
	if t.Differential && (!(t.CoilGapM >= t.Coil.LengthM) || math.IsInf(t.CoilGapM, 0)) {
		return fmt.Errorf("differential coil spacing %v m: expected a finite value ≥ the coil length %v m", t.CoilGapM, t.Coil.LengthM)
	}
	return nil
}

// Impedance returns the impedance of one coil: L0, Z0 = jωL0 and the change
// ΔZ caused by the tube. For a differential pair it is the impedance of
// each of the two (identical) coils; the coupling between them and the
// bridge output are given by DifferentialImpedance.
func (t TubeProbe) Impedance(freqHz float64) (Result, error) {
	if err := t.Validate(); err != nil {
		return Result{}, err
	}
	if err := validateFreq(freqHz); err != nil {
		return Result{}, err
	}
	m, err := NewPlanarModel(t.Coil, 1e-9)
	if err != nil {
		return Result{}, err
	}
	omega := 2 * math.Pi * freqHz
	dz, e := t.integrate(omega, 0)
	return Result{FreqHz: freqHz, L0H: m.L0H(), Z0Ohm: complex(0, omega*m.L0H()), DZOhm: dz, ErrorEstimate: e}, nil
}

// DifferentialResult describes a differential pair of identical coaxial
// coils: in a uniform tube (TubeProbe.DifferentialImpedance) or stacked
// above a layered plate (DifferentialPlanar).
type DifferentialResult struct {
	// Coil is the impedance of each coil alone (as TubeProbe.Impedance).
	Coil Result
	// MutualL0H is the mutual inductance of the two coils in air, and
	// MutualDZOhm the change of their mutual impedance caused by the tube.
	MutualL0H   float64
	MutualDZOhm complex128
	// OutputOhm is the bridge output Z1 − Z2. In a uniform tube both coils
	// see the same material, so it is exactly 0; it departs from 0 only at
	// a change of wall, material or a flaw, which these axisymmetric
	// uniform-tube models do not describe. For a stacked planar pair it is
	// ΔZ of the lower coil minus ΔZ of the upper one.
	OutputOhm complex128
	// ErrorEstimate is the relative error estimate of MutualDZOhm.
	ErrorEstimate float64
}

// DifferentialImpedance returns the single-coil and mutual terms of a
// differential pair (Differential must be set). The mutual term is the
// two-coil form of MODEL.md §2.2, which for identical coils with centres D
// apart reduces to ΔZ12 = P ∫ C κ² sin²(αl/2) cos(αD)/α⁶ dα.
func (t TubeProbe) DifferentialImpedance(freqHz float64) (DifferentialResult, error) {
	if !t.Differential {
		return DifferentialResult{}, fmt.Errorf("differential impedance of an absolute probe: set Differential and CoilGapM")
	}
	single, err := t.Impedance(freqHz)
	if err != nil {
		return DifferentialResult{}, err
	}
	air, err := MutualPlanar(t.Coil, t.Coil, 0, t.CoilGapM, freqHz, nil)
	if err != nil {
		return DifferentialResult{}, err
	}
	dz, e := t.integrate(2*math.Pi*freqHz, t.CoilGapM)
	return DifferentialResult{Coil: single, MutualL0H: air.L0H, MutualDZOhm: dz, ErrorEstimate: e}, nil
}

// integrate returns P ∫ C κ² sin²(αl/2) cos(αD)/α⁶ dα (D = 0 for one coil)
// and its relative error estimate. P = jω·8μ0N²/(l²(r2−r1)²) (MODEL.md §2).
//
// Everything is exponentially scaled (MODEL.md §2.3): for the bobbin
// C′κ_I² = [C′e^{2αb1}]·[κ_I e^{−αr2}]²·e^{−2α(b1−r2)}, for the encircling
// coil Cκ_K² = [C e^{−2αb2}]·[κ_K e^{αr1}]²·e^{−2α(r1−b2)}; the wall
// reflection terms enter only through e^{−(α1+Re α1)(b2−b1)}.
func (t TubeProbe) integrate(omega, d float64) (complex128, float64) {
	c := t.Coil
	r1, r2, l := c.InnerRadiusM, c.OuterRadiusM, c.LengthM
	mu := t.RelPermeability
	if mu == 0 {
		mu = 1
	}
	k2 := omega * mu0 * mu * t.ConductivitySPerM
	var gap float64
	if t.Placement == Bobbin {
		gap = t.TubeInnerRadiusM - r2
	} else {
		gap = r1 - t.TubeOuterRadiusM
	}
	// Panels: half a period of sin²(αl/2) (and of cos αD), at most 2/gap
	// (the e^{−2α·gap} decay); the structure on the scale 1/r near α = 0 is
	// resolved by the geometric grading of panelEdges.
	h := math.Pi / l
	if d > 0 {
		if v := math.Pi / d; v < h {
			h = v
		}
	}
	if v := 2 / gap; v < h {
		h = v
	}
	f := func(a float64) complex128 {
		var v complex128
		if t.Placement == Bobbin {
			v = t.bobbinKernel(a, k2, mu)
		} else {
			v = t.encirclingKernel(a, k2, mu)
		}
		s := math.Sin(a * l / 2)
		w := s * s / pow6(a)
		if d > 0 {
			w *= math.Cos(a * d)
		}
		return v * complex(w, 0)
	}
	env := func(a float64) float64 {
		var v complex128
		if t.Placement == Bobbin {
			v = t.bobbinKernel(a, k2, mu)
		} else {
			v = t.encirclingKernel(a, k2, mu)
		}
		return cmplx.Abs(v) / pow6(a) / (2 * gap)
	}
	s, e := panelIntegral(h, 80/gap, 1e-9, f, env, nil)
	p := complex(0, omega*8*mu0*c.Turns*c.Turns/(l*l*(r2-r1)*(r2-r1)))
	rel := 0.0
	if m := cmplx.Abs(s); m > 0 {
		rel = e / m
	}
	return p * s, rel
}

// tubeCoeffs are the exponentially scaled interface coefficients of the
// cylindrical models at one wavenumber (MODEL.md §2.1–2.3).
type tubeCoeffs struct {
	a1     complex128 // α1 = √(α² + jωμ0μrσ)
	z1, z2 complex128 // α1 b1, α1 b2
	coef   complex128 // S̃ (bobbin) or R̃ (encircling tube); 0 for a borehole or rod
	hasRef bool       // the far wall surface reflects (coef is used)
	e      complex128 // e^{(z1−z2) + Re(z1−z2)}, the decay across the wall
	near1  complex128 // bobbin: e^{z1}K1(z1); encircling: e^{−Re z2}I1(z2)
	far1   complex128 // bobbin: e^{−Re z1}I1(z1); encircling: e^{z2}K1(z2)
	cs     complex128 // bobbin: C′e^{2αb1}; encircling: C e^{−2αb2}
	n1, m1 complex128 // bobbin: e^{αb1}K1(αb1), e^{−αb1}I1(αb1); encircling: e^{−αb2}I1(αb2), e^{αb2}K1(αb2)
}

// coeffs computes the reflection coefficient of the wall seen from the coil
// (MODEL.md §2). Bobbin (§2.2):
//
//	C′ = [Y K1(αb1) + α K0(αb1)] / [α I0(αb1) − Y I1(αb1)],
//	Y  = (α1/μr)[−K0(α1b1) + S I0(α1b1)] / [K1(α1b1) + S I1(α1b1)],
//	S  = [(α1/μr)K0(α1b2) − ακ K1(α1b2)] / [ακ I1(α1b2) + (α1/μr)I0(α1b2)],
//	κ  = K0(αb2)/K1(αb2),
//
// and Y = −(α1/μr)K0(α1b1)/K1(α1b1) for a borehole (b2 = ∞). Encircling
// (§2.1):
//
//	C = [α I0(αb2) − Y I1(αb2)] / [α K0(αb2) + Y K1(αb2)],
//	Y = (α1/μr) I0(α1b2)/I1(α1b2) for a rod, and for a tube
//	Y = (α1/μr)[I0(α1b2) − R K0(α1b2)] / [I1(α1b2) + R K1(α1b2)],
//	R = [(α1/μr)I0(α1b1) − αι I1(α1b1)] / [(α1/μr)K0(α1b1) + αι K1(α1b1)],
//	ι = I0(αb1)/I1(αb1).
//
// With the scaled Bessel functions S and R enter only through
// S̃·e = S·e^{…} and R̃·e, which decay across the wall and never overflow.
func (t TubeProbe) coeffs(a, k2, mu float64) tubeCoeffs {
	b1, b2 := t.TubeInnerRadiusM, t.TubeOuterRadiusM
	a1 := layerAlpha(a*a, k2)
	q := a1 / complex(mu, 0)
	ca := complex(a, 0)
	c := tubeCoeffs{a1: a1, z1: a1 * complex(b1, 0)}
	if !math.IsInf(b2, 1) {
		c.z2 = a1 * complex(b2, 0)
	}
	if t.Placement == Bobbin {
		k0z1, k1z1 := cbessel.K01Scaled(c.z1)
		i0z1, i1z1 := cbessel.I01Scaled(c.z1)
		c.near1, c.far1 = k1z1, i1z1
		var y complex128
		if math.IsInf(b2, 1) {
			y = -q * k0z1 / k1z1
		} else {
			k0b, k1b := cbessel.K01Scaled(complex(a*b2, 0))
			kap := ca * k0b / k1b
			k0z2, k1z2 := cbessel.K01Scaled(c.z2)
			i0z2, i1z2 := cbessel.I01Scaled(c.z2)
			c.coef = (q*k0z2 - kap*k1z2) / (kap*i1z2 + q*i0z2)
			c.hasRef = true
			d := c.z1 - c.z2
			c.e = cmplx.Exp(d + complex(real(d), 0))
			y = q * (-k0z1 + c.coef*i0z1*c.e) / (k1z1 + c.coef*i1z1*c.e)
		}
		ab := complex(a*b1, 0)
		k0, k1 := cbessel.K01Scaled(ab)
		i0, i1 := cbessel.I01Scaled(ab)
		c.cs = (y*k1 + ca*k0) / (ca*i0 - y*i1)
		c.n1, c.m1 = k1, i1
		return c
	}
	i0z2, i1z2 := cbessel.I01Scaled(c.z2)
	c.near1 = i1z2
	var y complex128
	if b1 == 0 {
		y = q * i0z2 / i1z2
	} else {
		i0b, i1b := cbessel.I01Scaled(complex(a*b1, 0))
		iota := ca * i0b / i1b
		i0z1, i1z1 := cbessel.I01Scaled(c.z1)
		k0z1, k1z1 := cbessel.K01Scaled(c.z1)
		k0z2, k1z2 := cbessel.K01Scaled(c.z2)
		c.far1 = k1z2
		c.coef = (q*i0z1 - iota*i1z1) / (q*k0z1 + iota*k1z1)
		c.hasRef = true
		d := c.z1 - c.z2
		c.e = cmplx.Exp(d + complex(real(d), 0))
		y = q * (i0z2 - c.coef*k0z2*c.e) / (i1z2 + c.coef*k1z2*c.e)
	}
	ab := complex(a*b2, 0)
	k0, k1 := cbessel.K01Scaled(ab)
	i0, i1 := cbessel.I01Scaled(ab)
	c.cs = (ca*i0 - y*i1) / (ca*k0 + y*k1)
	c.n1, c.m1 = i1, k1
	return c
}

// bobbinKernel returns C′(α)κ_I²(α) for a coil inside the tube:
// [C′e^{2αb1}]·[κ_I e^{−αr2}]²·e^{−2α(b1−r2)} (MODEL.md §2.3).
func (t TubeProbe) bobbinKernel(a, k2, mu float64) complex128 {
	c := t.coeffs(a, k2, mu)
	ki := kappaIScaled(a, t.Coil.InnerRadiusM, t.Coil.OuterRadiusM)
	return c.cs * complex(ki*ki*math.Exp(-2*a*(t.TubeInnerRadiusM-t.Coil.OuterRadiusM)), 0)
}

// encirclingKernel returns C(α)κ_K²(α) for a coil around the tube or rod:
// [C e^{−2αb2}]·[κ_K e^{αr1}]²·e^{−2α(r1−b2)} (MODEL.md §2.3).
func (t TubeProbe) encirclingKernel(a, k2, mu float64) complex128 {
	c := t.coeffs(a, k2, mu)
	kk := kappaKScaled(a, t.Coil.InnerRadiusM, t.Coil.OuterRadiusM)
	return c.cs * complex(kk*kk*math.Exp(-2*a*(t.Coil.InnerRadiusM-t.TubeOuterRadiusM)), 0)
}
