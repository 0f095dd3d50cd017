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
	a1     complex128 // α1
	z1     complex128 // α1 b1 (0 for a rod)
	coef   complex128 // S̃ (bobbin) or R̃ (encircling tube), scaled
	zRef   complex128 // α1 b2 (bobbin: the S̃ reference) or α1 b1 (encircling: the R̃ reference)
	front  complex128 // κ·T with the exponents that do not depend on r
	hasRef bool
	scaleA float64 // real exponent independent of r (encircling)
}

// wallCommon computes the radius-independent factors.
func (t TubeProbe) wallCommon(a, k2, mu float64) wallField {
	b1, b2 := t.TubeInnerRadiusM, t.TubeOuterRadiusM
	a1 := layerAlpha(a*a, k2)
	q := a1 / complex(mu, 0)
	ca := complex(a, 0)
	if t.Placement == Bobbin {
		z1 := a1 * complex(b1, 0)
		k0z1, k1z1 := cbessel.K01Scaled(z1)
		i0z1, i1z1 := cbessel.I01Scaled(z1)
		w := wallField{bobbin: true, a1: a1, z1: z1}
		var e1 complex128
		if !math.IsInf(b2, 1) {
			z2 := a1 * complex(b2, 0)
			k0b, k1b := cbessel.K01Scaled(complex(a*b2, 0))
			kap := ca * k0b / k1b
			k0z2, k1z2 := cbessel.K01Scaled(z2)
			i0z2, i1z2 := cbessel.I01Scaled(z2)
			w.coef = (q*k0z2 - kap*k1z2) / (kap*i1z2 + q*i0z2)
			w.zRef, w.hasRef = z2, true
			d1 := z1 - z2
			e1 = cmplx.Exp(d1 + complex(real(d1), 0))
		}
		y := q * (-k0z1 + w.coef*i0z1*e1) / (k1z1 + w.coef*i1z1*e1)
		ab := complex(a*b1, 0)
		k0, k1 := cbessel.K01Scaled(ab)
		i0, i1 := cbessel.I01Scaled(ab)
		cs := (y*k1 + ca*k0) / (ca*i0 - y*i1) // C′e^{2αb1}
		num := k1 + cs*i1                     // [K1(αb1) + C′I1(αb1)] e^{αb1}
		den := k1z1 + w.coef*i1z1*e1          // [K1(z1) + S I1(z1)] e^{z1}
		ki := kappaIScaled(a, t.Coil.InnerRadiusM, t.Coil.OuterRadiusM)
		w.front = complex(ki*math.Exp(a*(t.Coil.OuterRadiusM-b1)), 0) * num / den
		return w
	}
	z2 := a1 * complex(b2, 0)
	i0z2, i1z2 := cbessel.I01Scaled(z2)
	w := wallField{a1: a1}
	var e2, k1z2, y complex128
	if b1 == 0 {
		y = q * i0z2 / i1z2
	} else {
		z1 := a1 * complex(b1, 0)
		i0b, i1b := cbessel.I01Scaled(complex(a*b1, 0))
		iota := ca * i0b / i1b
		i0z1, i1z1 := cbessel.I01Scaled(z1)
		k0z1, k1z1 := cbessel.K01Scaled(z1)
		var k0z2 complex128
		k0z2, k1z2 = cbessel.K01Scaled(z2)
		w.coef = (q*i0z1 - iota*i1z1) / (q*k0z1 + iota*k1z1)
		w.zRef, w.hasRef, w.z1 = z1, true, z1
		d2 := z1 - z2
		e2 = cmplx.Exp(d2 + complex(real(d2), 0))
		y = q * (i0z2 - w.coef*k0z2*e2) / (i1z2 + w.coef*k1z2*e2)
	}
	ab := complex(a*b2, 0)
	k0, k1 := cbessel.K01Scaled(ab)
	i0, i1 := cbessel.I01Scaled(ab)
	cs := (ca*i0 - y*i1) / (ca*k0 + y*k1) // C e^{−2αb2}
	num := i1 + cs*k1                     // [I1(αb2) + C K1(αb2)] e^{−αb2}
	den := i1z2 + w.coef*k1z2*e2          // [I1(z2) + R K1(z2)] e^{−Re z2}
	kk := kappaKScaled(a, t.Coil.InnerRadiusM, t.Coil.OuterRadiusM)
	w.front = complex(kk, 0) * num / den
	w.scaleA = -a*(t.Coil.InnerRadiusM-b2) - real(z2)
	return w
}

// at returns the wall potential factor at radius r (in the conductor).
func (w wallField) at(r float64) complex128 {
	zr := w.a1 * complex(r, 0)
	if w.bobbin {
		// [K1(α1r) + S I1(α1r)] e^{α1r} times e^{z1 − α1r}.
		_, kr1 := cbessel.K01Scaled(zr)
		wall := kr1
		if w.hasRef {
			_, ir1 := cbessel.I01Scaled(zr)
			dr := zr - w.zRef
			wall += w.coef * ir1 * cmplx.Exp(dr+complex(real(dr), 0))
		}
		return w.front * wall * cmplx.Exp(w.z1-zr)
	}
	// [I1(α1r) + R K1(α1r)] e^{−Re(α1r)} times e^{scaleA + Re(α1r)}.
	_, ir1 := cbessel.I01Scaled(zr)
	wall := ir1
	if w.hasRef && r > 0 {
		_, kr1 := cbessel.K01Scaled(zr)
		dr := w.zRef - zr
		wall += w.coef * kr1 * cmplx.Exp(dr+complex(real(dr), 0))
	}
	return w.front * wall * complex(math.Exp(w.scaleA+real(zr)), 0)
}
