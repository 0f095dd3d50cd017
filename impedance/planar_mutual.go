package impedance

import (
	"fmt"
	"math"
	"math/cmplx"
)

// MutualPlanar returns the mutual impedance between two coaxial coils above
// a layered conductor, as for a driver–pickup (transmit–receive) reflection
// probe: the open-circuit voltage at the pickup per ampere in the driver.
// Each coil has its own lift-off (bottom of its winding above the surface);
// the windings may overlap in height (concentric coils in one plane) or be
// stacked. In the Result, L0H and Z0Ohm = jωM0 are the mutual inductance
// and impedance in air, DZOhm is the change caused by the conductor.
// Normalized() then refers the change to ωM0.
//
// The conductor term is the bilinear form of Dodd & Deeds (1968) (MODEL.md
// §1.4, driver/pickup):
//
//	ΔZ12 = jωπμ0N1N2/(l l′(r2−r1)(r2′−r1′)) ∫ χ1χ2/α⁶ (e^{−αz1}−e^{−αz2})(e^{−αz1′}−e^{−αz2′}) φ dα,
//
// and the air term replaces the product of height factors by
// α²∫∫e^{−α|z−z′|}dz dz′ over the two windings (the Hankel form of the
// mutual inductance of coaxial loops, M = μ0πab∫J1(αa)J1(αb)e^{−α|d|}dα,
// MODEL.md §4.1, integrated over both cross-sections). It is reciprocal:
// swapping the coils gives the same result.
func MutualPlanar(drive, pickup Coil, driveLiftoffM, pickupLiftoffM, freqHz float64, layers []Layer) (Result, error) {
	if err := drive.Validate(); err != nil {
		return Result{}, fmt.Errorf("drive coil: %w", err)
	}
	if err := pickup.Validate(); err != nil {
		return Result{}, fmt.Errorf("pickup coil: %w", err)
	}
	if err := validateLiftoff(driveLiftoffM); err != nil {
		return Result{}, fmt.Errorf("drive coil: %w", err)
	}
	if err := validateLiftoff(pickupLiftoffM); err != nil {
		return Result{}, fmt.Errorf("pickup coil: %w", err)
	}
	if err := validateFreq(freqHz); err != nil {
		return Result{}, err
	}
	if err := validateLayers(layers); err != nil {
		return Result{}, err
	}
	const relTol = 1e-8
	omega := 2 * math.Pi * freqHz
	a1, b1 := drive.InnerRadiusM, drive.OuterRadiusM
	a2, b2 := pickup.InnerRadiusM, pickup.OuterRadiusM
	za, zb := driveLiftoffM, driveLiftoffM+drive.LengthM
	zc, zd := pickupLiftoffM, pickupLiftoffM+pickup.LengthM
	scale := math.Pi * mu0 * drive.Turns * pickup.Turns /
		(drive.LengthM * pickup.LengthM * (b1 - a1) * (b2 - a2))
	rmax := math.Max(b1, b2)
	h := math.Pi / rmax
	maxA := float64(maxPanelsAr2) / rmax

	// Smooth (non-oscillating) part of χ1χ2/α at large α: pairs of equal
	// radii, s_a s_b r/π (see oscillationSum).
	meanCof := 0.0
	for _, p := range [][2]float64{{b1, 1}, {a1, -1}} {
		for _, q := range [][2]float64{{b2, 1}, {a2, -1}} {
			if p[0] > 0 && math.Abs(p[0]-q[0]) <= 1e-12*p[0] {
				meanCof += p[1] * q[1] * p[0] / math.Pi
			}
		}
	}
	// Bound on the oscillating part: Σ amplitude/frequency over all pairs.
	oscSum := 0.0
	for _, p := range []float64{a1, b1} {
		for _, q := range []float64{a2, b2} {
			if p == 0 || q == 0 {
				continue
			}
			amp := math.Sqrt(p*q) / math.Pi
			if d := math.Abs(p - q); d > 1e-12*p {
				oscSum += amp / d
			}
			oscSum += amp / (p + q)
		}
	}
	hz := func(a, lo, hi float64) float64 { return math.Exp(-a*lo) * -math.Expm1(-a*(hi-lo)) }

	res := Result{FreqHz: freqHz}
	// Air mutual inductance.
	{
		f1, f2 := fAccumulator{r: a1}, fAccumulator{r: b1}
		g1, g2 := fAccumulator{r: a2}, fAccumulator{r: b2}
		f := func(a float64) complex128 {
			c1 := f2.next(a) - f1.next(a)
			c2 := g2.next(a) - g1.next(a)
			return complex(c1*c2/pow6(a)*heightOverlap(a, za, zb, zc, zd), 0)
		}
		rem := func(A float64) float64 {
			return A * heightOverlap(A, za, zb, zc, zd) / pow6(A) * oscSum
		}
		smooth := func(a float64) complex128 {
			return complex(meanCof*a*heightOverlap(a, za, zb, zc, zd)/pow6(a), 0)
		}
		s, e := panelIntegral(h, maxA, relTol, f, rem, smooth)
		res.L0H = scale * real(s)
		res.Z0Ohm = complex(0, omega*res.L0H)
		_ = e
	}
	if len(layers) == 0 {
		return res, nil
	}
	var st stackBuf
	stk := st.prepare(layers, omega)
	f1, f2 := fAccumulator{r: a1}, fAccumulator{r: b1}
	g1, g2 := fAccumulator{r: a2}, fAccumulator{r: b2}
	f := func(a float64) complex128 {
		c1 := f2.next(a) - f1.next(a)
		c2 := g2.next(a) - g1.next(a)
		return complex(c1*c2*hz(a, za, zb)*hz(a, zc, zd)/pow6(a), 0) * stk.reflection(a)
	}
	rem := func(A float64) float64 {
		return A * hz(A, za, zb) * hz(A, zc, zd) / pow6(A) * cmplx.Abs(stk.reflection(A)) * oscSum
	}
	smooth := func(a float64) complex128 {
		return complex(meanCof*a*hz(a, za, zb)*hz(a, zc, zd)/pow6(a), 0) * stk.reflection(a)
	}
	s, e := panelIntegral(h, maxA, relTol, f, rem, smooth)
	res.DZOhm = complex(0, omega*scale) * s
	if m := cmplx.Abs(s); m > 0 {
		res.ErrorEstimate = e / m
	}
	return res, nil
}

// heightOverlap returns α²∫_a^b∫_c^d e^{−α|z−z′|} dz′ dz for two windings
// [a, b] and [c, d]. Disjoint windings use the product of exponentials
// (no cancellation); overlapping ones use Φ(t) = α|t| + e^{−α|t|} − 1,
// whose second derivative in t is α²e^{−α|t|}:
// Φ(b−c) − Φ(a−c) − Φ(b−d) + Φ(a−d).
func heightOverlap(alpha, a, b, c, d float64) float64 {
	switch {
	case b <= c: // first below second
		return math.Exp(-alpha*(c-b)) * -math.Expm1(-alpha*(b-a)) * -math.Expm1(-alpha*(d-c))
	case d <= a:
		return math.Exp(-alpha*(a-d)) * -math.Expm1(-alpha*(b-a)) * -math.Expm1(-alpha*(d-c))
	}
	phi := func(t float64) float64 {
		x := alpha * math.Abs(t)
		return x + math.Expm1(-x)
	}
	return phi(b-c) - phi(a-c) - phi(b-d) + phi(a-d)
}

// DifferentialPlanar returns the terms of a coaxial (stacked) differential
// pair of identical coils above a layered conductor: the sensing coil at
// liftoffM and the reference coil gapM higher (centre spacing, ≥ the coil
// length). Coil is the result of the lower coil; MutualL0H and MutualDZOhm
// the coupling of the pair (MutualPlanar); OutputOhm the bridge output
// Z_lower − Z_upper, which for a stacked pair over a uniform conductor is
// the difference of the two coils' ΔZ (Z0 cancels). Side-by-side pairs are
// not axisymmetric and are outside this model.
func DifferentialPlanar(m *PlanarModel, liftoffM, gapM, freqHz float64, layers []Layer) (DifferentialResult, error) {
	c := m.Coil()
	if !(gapM >= c.LengthM) || math.IsInf(gapM, 0) {
		return DifferentialResult{}, fmt.Errorf("coil spacing %v m: expected a finite value ≥ the coil length %v m", gapM, c.LengthM)
	}
	lower, err := m.Impedance(freqHz, liftoffM, layers)
	if err != nil {
		return DifferentialResult{}, err
	}
	upper, err := m.Impedance(freqHz, liftoffM+gapM, layers)
	if err != nil {
		return DifferentialResult{}, err
	}
	mu, err := MutualPlanar(c, c, liftoffM, liftoffM+gapM, freqHz, layers)
	if err != nil {
		return DifferentialResult{}, err
	}
	return DifferentialResult{
		Coil:          lower,
		MutualL0H:     mu.L0H,
		MutualDZOhm:   mu.DZOhm,
		OutputOhm:     lower.DZOhm - upper.DZOhm,
		ErrorEstimate: mu.ErrorEstimate,
	}, nil
}
