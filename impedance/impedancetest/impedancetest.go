// Package impedancetest holds coils and cases of known answer for testing
// code built on package impedance (fits, inversions, diagrams). Every value
// names its source; none is computed by the package under test.
package impedancetest

import (
	"math"

	"whorl/impedance"
)

// Coils with published or independently computed reference values.
var (
	// T15 is the TEAM-15-like pancake coil (Burke, J. Nondestr. Eval. 7,
	// 35–41, 1988; dimensions from memory, MODEL.md §3.1). Its lift-off in
	// the benchmark is 0.88 mm.
	T15 = impedance.Coil{InnerRadiusM: 6.15e-3, OuterRadiusM: 12.4e-3, LengthM: 6.15e-3, Turns: 3790}
	// C9 is the coil of an open C++ example (MODEL.md §3.3), lift-off 1.32 mm.
	C9 = impedance.Coil{InnerRadiusM: 3.015e-3, OuterRadiusM: 5.46e-3, LengthM: 2.94e-3, Turns: 900}
	// M1 is the measured coil "m1" of the open data set carabedo/iamend_ci
	// (MODEL.md §3.2): L0 measured 376.8 μH (X/ω at 1 kHz in air).
	M1 = impedance.Coil{InnerRadiusM: 1.15e-3, OuterRadiusM: 2.95e-3, LengthM: 2.48e-3, Turns: 387}
	// Bobbin is a heat-exchanger bobbin coil for a 19.05 mm × 1.09 mm tube
	// (MODEL.md §3.3, hypothetical).
	Bobbin = impedance.Coil{InnerRadiusM: 7.0e-3, OuterRadiusM: 7.6e-3, LengthM: 1.5e-3, Turns: 60}
	// Encircling is an encircling coil for the same tube (MODEL.md §3.3).
	Encircling = impedance.Coil{InnerRadiusM: 10.5e-3, OuterRadiusM: 11.5e-3, LengthM: 2e-3, Turns: 100}
)

// PlanarCase is a planar evaluation with its expected result.
type PlanarCase struct {
	Name     string
	Coil     impedance.Coil
	LiftoffM float64
	FreqHz   float64
	Layers   []impedance.Layer
	// L0H and DZOhm are the expected values; RelTol the tolerance their
	// digits support.
	L0H    float64
	DZOhm  complex128
	RelTol float64
	Source string
}

func half(sigma, mur float64) []impedance.Layer {
	return []impedance.Layer{{ThicknessM: math.Inf(1), ConductivitySPerM: sigma, RelPermeability: mur}}
}

// PlanarCases are known answers of the planar model. The mpmath values
// come from testdata/impedance/gen_planar.py (mpmath 1.2.1, 25 digits),
// the others from MODEL.md §3.3 (mpmath and SciPy, two quadratures).
var PlanarCases = []PlanarCase{
	{"T15 half-space 900 Hz", T15, 0.88e-3, 900, half(30.6e6, 1), 0.2259878883041163, 120.6144247 - 267.6632223i, 1e-8, "MODEL.md §3.3; L0 from gen_planar.py"},
	{"T15 plate 12.22 mm 900 Hz", T15, 0.88e-3, 900, []impedance.Layer{{ThicknessM: 12.22e-3, ConductivitySPerM: 30.6e6, RelPermeability: 1}}, 0.2259878883041163, 120.6505074 - 267.6579922i, 1e-8, "MODEL.md §3.3"},
	{"T15 half-space 10 kHz", T15, 0.88e-3, 1e4, half(30.6e6, 1), 0.2259878883041163, 650.8398359 - 4560.799365i, 1e-8, "MODEL.md §3.3"},
	{"T15 zero lift-off 900 Hz", T15, 0, 900, half(30.6e6, 1), 0.2259878883041163, 164.7047673 - 343.3214295i, 1e-8, "MODEL.md §3.3"},
	{"C9 half-space 10 kHz", C9, 1.32e-3, 1e4, half(16.45e6, 1), 0, 16.758419 - 46.843460i, 1e-7, "MODEL.md §3.3"},
	{"C9 half-space 100 kHz", C9, 1.32e-3, 1e5, half(16.45e6, 1), 0, 76.250748 - 644.01864i, 1e-7, "MODEL.md §3.3"},
}

// T15ImageMutualH is the mutual inductance between coil T15 at 0.88 mm
// lift-off and its mirror image, −ΔL for a perfect conductor: Maxwell's
// loop formula integrated by 12⁴ and 16⁴-point Gauss–Legendre (MODEL.md
// §4.1, agreeing to 1e-10).
const T15ImageMutualH = 84.98751490e-3

// TubeCase is a cylindrical-model evaluation with its expected ΔZ.
type TubeCase struct {
	Name   string
	Probe  impedance.TubeProbe
	FreqHz float64
	DZOhm  complex128
	RelTol float64
	Source string
}

func tube(p impedance.Placement, c impedance.Coil, b1, b2, sigma float64) impedance.TubeProbe {
	return impedance.TubeProbe{Coil: c, Placement: p, TubeInnerRadiusM: b1, TubeOuterRadiusM: b2, ConductivitySPerM: sigma, RelPermeability: 1}
}

// TubeCases are known answers of the cylindrical models for a 19.05 mm ×
// 1.09 mm tube of 1.0 MS/m, from testdata/impedance/gen_tube.py (mpmath
// 1.2.1, 20 digits; μ0 = 4π×1e-7, hence the 1e-8 tolerance).
var TubeCases = []TubeCase{
	{"bobbin in tube 10 kHz", tube(impedance.Bobbin, Bobbin, 8.435e-3, 9.525e-3, 1e6), 1e4, 0.4585226489387535 - 0.1203145945660866i, 1e-8, "gen_tube.py"},
	{"bobbin in tube 100 kHz", tube(impedance.Bobbin, Bobbin, 8.435e-3, 9.525e-3, 1e6), 1e5, 8.463798740554646 - 16.51498028847788i, 1e-8, "gen_tube.py"},
	{"bobbin in tube 1 MHz", tube(impedance.Bobbin, Bobbin, 8.435e-3, 9.525e-3, 1e6), 1e6, 29.11021553925065 - 231.9547066941773i, 1e-8, "gen_tube.py"},
	{"encircling tube 10 kHz", tube(impedance.Encircling, Encircling, 8.435e-3, 9.525e-3, 1e6), 1e4, 2.365349256007256 - 0.6593706996755241i, 1e-8, "gen_tube.py"},
	{"encircling rod 100 kHz", tube(impedance.Encircling, Encircling, 0, 9.525e-3, 1e6), 1e5, 25.59065841276947 - 82.31445638165597i, 1e-8, "gen_tube.py"},
}
