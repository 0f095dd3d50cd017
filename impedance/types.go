package impedance

import (
	"fmt"
	"math"
)

// Coil is an air-cored cylindrical coil of rectangular cross-section with
// uniformly distributed turns.
type Coil struct {
	InnerRadiusM float64 // r1, metres
	OuterRadiusM float64 // r2, metres
	LengthM      float64 // l, metres
	Turns        float64 // N
}

// Validate reports an impossible coil: non-finite or non-positive sizes,
// r2 ≤ r1, or fewer than one turn.
func (c Coil) Validate() error {
	switch {
	case !(c.InnerRadiusM >= 0) || math.IsInf(c.InnerRadiusM, 0):
		return fmt.Errorf("coil inner radius %v m: expected a finite value ≥ 0", c.InnerRadiusM)
	case !(c.OuterRadiusM > c.InnerRadiusM) || math.IsInf(c.OuterRadiusM, 0):
		return fmt.Errorf("coil outer radius %v m: expected a finite value greater than the inner radius %v m", c.OuterRadiusM, c.InnerRadiusM)
	case !(c.LengthM > 0) || math.IsInf(c.LengthM, 0):
		return fmt.Errorf("coil length %v m: expected a finite positive value", c.LengthM)
	case !(c.Turns >= 1) || math.IsInf(c.Turns, 0):
		return fmt.Errorf("coil turns %v: expected at least 1", c.Turns)
	}
	return nil
}

// Layer is one conducting (or non-conducting) layer below a planar coil.
type Layer struct {
	// ThicknessM is the layer thickness in metres; math.Inf(1) makes the
	// layer a half-space (it must then be the last layer).
	ThicknessM float64
	// ConductivitySPerM is the electrical conductivity in S/m (≥ 0).
	ConductivitySPerM float64
	// RelPermeability is μr (≥ 1 for the materials Whorl models; 0 means 1).
	RelPermeability float64
}

// Result is the impedance of a coil at one frequency, with time dependence
// e^{+jωt} (an inductive coil has positive reactance).
type Result struct {
	FreqHz float64
	// L0H is the inductance of the coil in air, in henries.
	L0H float64
	// Z0Ohm is the isolated-coil impedance jωL0 in ohms (wire resistance excluded).
	Z0Ohm complex128
	// DZOhm is the change of impedance caused by the conductor, in ohms.
	DZOhm complex128
	// ErrorEstimate is the estimated relative error of DZOhm from quadrature
	// and truncation.
	ErrorEstimate float64
}

// Normalized returns the normalised impedance ΔR/X0 + j(X0+ΔX)/X0, where
// X0 = ωL0. Air is 0 + 1j.
func (r Result) Normalized() complex128 {
	x0 := imag(r.Z0Ohm)
	return complex(real(r.DZOhm)/x0, (x0+imag(r.DZOhm))/x0)
}
