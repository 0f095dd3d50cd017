package impedance_test

import (
	"fmt"
	"math"
	"math/cmplx"

	"whorl/impedance"
)

// A pancake coil 0.88 mm above a 12.22 mm aluminium-alloy plate (30.6 MS/m) at
// 900 Hz: the coil of TEAM Workshop Problem 15 (dimensions as recalled in
// MODEL.md §3.1).
func ExamplePlanar_Impedance() {
	p := impedance.Planar{
		Coil:     impedance.Coil{InnerRadiusM: 6.15e-3, OuterRadiusM: 12.4e-3, LengthM: 6.15e-3, Turns: 3790},
		LiftoffM: 0.88e-3,
		Layers:   []impedance.Layer{{ThicknessM: 12.22e-3, ConductivitySPerM: 30.6e6, RelPermeability: 1}},
	}
	r, err := p.Impedance(900)
	if err != nil {
		fmt.Println(err)
		return
	}
	zn := r.Normalized()
	fmt.Printf("L0 = %.4f mH\n", r.L0H*1e3)
	fmt.Printf("ΔZ = %.3f %+.3fj Ω\n", real(r.DZOhm), imag(r.DZOhm))
	fmt.Printf("Zn = %.4f %+.4fj\n", real(zn), imag(zn))
	fmt.Println("error estimate below 1e-8:", r.ErrorEstimate < 1e-8)
	// Output:
	// L0 = 225.9879 mH
	// ΔZ = 120.651 -267.658j Ω
	// Zn = 0.0944 +0.7906j
	// error estimate below 1e-8: true
}

// A conductivity curve at fixed lift-off from one cached model: the
// impedance of a small coil over a copper half-space versus frequency.
func ExamplePlanarModel_Impedance() {
	m, err := impedance.NewPlanarModel(impedance.Coil{InnerRadiusM: 1e-3, OuterRadiusM: 2e-3, LengthM: 1e-3, Turns: 100}, 1e-8)
	if err != nil {
		fmt.Println(err)
		return
	}
	copper := []impedance.Layer{{ThicknessM: math.Inf(1), ConductivitySPerM: 58e6, RelPermeability: 1}}
	fmt.Printf("L0 = %.3f µH\n", m.L0H()*1e6)
	for _, f := range []float64{10e3, 100e3, 1e6} {
		r, _ := m.Impedance(f, 0.1e-3, copper)
		zn := r.Normalized()
		fmt.Printf("%7.0f Hz: Zn = %.4f %+.4fj\n", f, real(zn), imag(zn))
	}
	// Output:
	// L0 = 25.491 µH
	//   10000 Hz: Zn = 0.1076 +0.8224j
	//  100000 Hz: Zn = 0.0659 +0.6776j
	// 1000000 Hz: Zn = 0.0253 +0.6197j
}

// A reflection (driver–pickup) probe over stainless steel: a small pickup
// coil inside a larger driver, both 0.3 mm above a 1.4 MS/m plate 2 mm
// thick, at 50 kHz.
func ExampleMutualPlanar() {
	drive := impedance.Coil{InnerRadiusM: 3e-3, OuterRadiusM: 4e-3, LengthM: 2e-3, Turns: 150}
	pickup := impedance.Coil{InnerRadiusM: 1e-3, OuterRadiusM: 2e-3, LengthM: 2e-3, Turns: 200}
	plate := []impedance.Layer{{ThicknessM: 2e-3, ConductivitySPerM: 1.4e6, RelPermeability: 1}}
	r, err := impedance.MutualPlanar(drive, pickup, 0.3e-3, 0.3e-3, 50e3, plate)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("mutual inductance in air: %.3f µH\n", r.L0H*1e6)
	fmt.Printf("change of transfer impedance: %.4f %+.4fj Ω\n", real(r.DZOhm), imag(r.DZOhm))
	// Output:
	// mutual inductance in air: 39.451 µH
	// change of transfer impedance: 1.8847 -1.9656j Ω
}

// Eddy-current density versus depth under a pancake coil over a copper
// half-space at 10 kHz (δ ≈ 0.66 mm), relative to the surface value.
func ExamplePlanar_CurrentDensity() {
	p := impedance.Planar{
		Coil:     impedance.Coil{InnerRadiusM: 4e-3, OuterRadiusM: 8e-3, LengthM: 3e-3, Turns: 100},
		LiftoffM: 0.5e-3,
		Layers:   []impedance.Layer{{ThicknessM: math.Inf(1), ConductivitySPerM: 58e6, RelPermeability: 1}},
	}
	delta := impedance.SkinDepthM(10e3, 58e6, 1)
	depths := []float64{0, delta, 2 * delta, 3 * delta}
	j, err := p.CurrentDensity(10e3, depths, 6e-3)
	if err != nil {
		fmt.Println(err)
		return
	}
	for i, d := range depths {
		fmt.Printf("%.0fδ: |J|/|J0| = %.3f, phase lag %.0f°\n", d/delta, cmplx.Abs(j[i]/j[0]), -cmplx.Phase(j[i]/j[0])*180/math.Pi)
	}
	// Output:
	// 0δ: |J|/|J0| = 1.000, phase lag 0°
	// 1δ: |J|/|J0| = 0.360, phase lag 56°
	// 2δ: |J|/|J0| = 0.129, phase lag 112°
	// 3δ: |J|/|J0| = 0.046, phase lag 168°
}
