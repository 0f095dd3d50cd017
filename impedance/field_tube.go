package impedance

import (
	"fmt"
	"math"
	"math/cmplx"

	"whorl/impedance/cbessel"
)

// CurrentDensity returns the eddy-current density J_φ in the tube wall (or
// rod) in A/m² per ampere of coil current (time dependence e^{+jωt}) at
// each radius of radiiM, in the plane axialM from the coil centre along the
// axis. Radii must lie in the conductor: [TubeInnerRadiusM,
// TubeOuterRadiusM] (0 allowed for a rod). For a differential probe it is
// the density due to one coil.
//
// The field follows from the same interface matching as the impedance
// (MODEL.md §2; the loop potential A = (μ0Ir0/π)∫I1(αr<)K1(αr>)cos αz dα):
// for a bobbin coil the wall potential is T[K1(α1r) + S I1(α1r)] with
// T = [K1(αb1) + C′I1(αb1)]/[K1(α1b1) + S I1(α1b1)] (continuity of A at
// the bore), for an encircling coil T[I1(α1r) + R K1(α1r)] with
// T = [I1(αb2) + C K1(αb2)]/[I1(α1b2) + R K1(α1b2)]; integrated over the
// winding, the source factor is κ(α)/α² · 2 sin(αl/2) cos(αz)/α and the
// prefactor μ0N/(πl(r2−r1)). J = −jωσA. All Bessel functions are scaled
// so that only decaying exponentials remain.
func (t TubeProbe) CurrentDensity(freqHz float64, radiiM []float64, axialM float64) ([]complex128, error) {
	if err := t.Validate(); err != nil {
		return nil, err
	}
	if err := validateFreq(freqHz); err != nil {
		return nil, err
	}
	if math.IsNaN(axialM) || math.IsInf(axialM, 0) {
		return nil, fmt.Errorf("axial position %v m: expected a finite value", axialM)
	}
	b1, b2 := t.TubeInnerRadiusM, t.TubeOuterRadiusM
	for _, r := range radiiM {
		if !(r >= b1 && r <= b2) || math.IsInf(r, 0) {
			return nil, fmt.Errorf("radius %v m: expected a value in the wall, %v to %v m", r, b1, b2)
		}
	}
	c := t.Coil
	r1, r2, l := c.InnerRadiusM, c.OuterRadiusM, c.LengthM
	mu := t.RelPermeability
	if mu == 0 {
		mu = 1
	}
	omega := 2 * math.Pi * freqHz
	k2 := omega * mu0 * mu * t.ConductivitySPerM
	var gap float64
	if t.Placement == Bobbin {
		gap = b1 - r2
	} else {
		gap = r1 - b2
	}
	h := math.Pi / l // as in TubeProbe.integrate
	if v := 2 / gap; v < h {
		h = v
	}
	if z := math.Abs(axialM); z > 0 && math.Pi/z < h {
		h = math.Pi / z
	}
	pref := complex(0, -omega*t.ConductivitySPerM) * complex(mu0*c.Turns/(math.Pi*l*(r2-r1)), 0)
	sums, _ := panelIntegralVec(h, 80/gap, 1e-11, len(radiiM), func(a float64, dst []complex128) {
		w := t.wallCommon(a, k2, mu)
		s := complex(2*math.Sin(a*l/2)*math.Cos(a*axialM)/(a*a*a), 0)
		for i, r := range radiiM {
			dst[i] = s * w.at(r)
		}
	})
	for i := range sums {
		sums[i] *= pref
	}
	return sums, nil
}

// wallField holds the radius-independent part of the wall potential at one
// wavenumber (see CurrentDensity); at(r) completes it.
type wallField struct {
	bobbin bool
	c      tubeCoeffs
	front  complex128 // κ·T with the exponents that do not depend on r
	scaleA float64    // real exponent independent of r (encircling)
}

// wallCommon computes the radius-independent factors: the coil integral
// times the transmission T = [field outside the wall]/[wall function] at
// the surface facing the coil, all scaled.
func (t TubeProbe) wallCommon(a, k2, mu float64) wallField {
	c := t.coeffs(a, k2, mu)
	num := c.n1 + c.cs*c.m1            // bobbin: [K1(αb1) + C′I1(αb1)]e^{αb1}; encircling: [I1(αb2) + C K1(αb2)]e^{−αb2}
	den := c.near1 + c.coef*c.far1*c.e // bobbin: [K1(z1) + S I1(z1)]e^{z1}; encircling: [I1(z2) + R K1(z2)]e^{−Re z2}
	if t.Placement == Bobbin {
		ki := kappaIScaled(a, t.Coil.InnerRadiusM, t.Coil.OuterRadiusM)
		// κ_I e^{αr2} · num e^{−αb1} / (den e^{−z1}) · wall(r)
		return wallField{bobbin: true, c: c, front: complex(ki*math.Exp(a*(t.Coil.OuterRadiusM-t.TubeInnerRadiusM)), 0) * num / den}
	}
	kk := kappaKScaled(a, t.Coil.InnerRadiusM, t.Coil.OuterRadiusM)
	// κ_K e^{−αr1} · num e^{αb2} / (den e^{Re z2}) · wall(r)
	return wallField{c: c, front: complex(kk, 0) * num / den, scaleA: -a*(t.Coil.InnerRadiusM-t.TubeOuterRadiusM) - real(c.z2)}
}

// at returns the wall potential factor at radius r (in the conductor).
func (w wallField) at(r float64) complex128 {
	zr := w.c.a1 * complex(r, 0)
	if w.bobbin {
		// [K1(α1r) + S I1(α1r)] e^{α1r} times e^{z1 − α1r}.
		_, kr1 := cbessel.K01Scaled(zr)
		wall := kr1
		if w.c.hasRef {
			_, ir1 := cbessel.I01Scaled(zr)
			dr := zr - w.c.z2
			wall += w.c.coef * ir1 * cmplx.Exp(dr+complex(real(dr), 0))
		}
		return w.front * wall * cmplx.Exp(w.c.z1-zr)
	}
	// [I1(α1r) + R K1(α1r)] e^{−Re(α1r)} times e^{scaleA + Re(α1r)}.
	_, ir1 := cbessel.I01Scaled(zr)
	wall := ir1
	if w.c.hasRef && r > 0 {
		_, kr1 := cbessel.K01Scaled(zr)
		dr := w.c.z1 - zr
		wall += w.c.coef * kr1 * cmplx.Exp(dr+complex(real(dr), 0))
	}
	return w.front * wall * complex(math.Exp(w.scaleA+real(zr)), 0)
}
