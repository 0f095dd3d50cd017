package impedance_test

import (
	"context"
	"fmt"
	"math/cmplx"

	"whorl/impedance"
)

// Calibrate an invented surface probe on three certified aluminium blocks,
// bare and under a 50.8 µm shim, then read an unknown spot under 40 µm of
// paint.
func ExampleCalibration_Invert() {
	coil := impedance.Coil{InnerRadiusM: 1e-3, OuterRadiusM: 2.5e-3, LengthM: 1.5e-3, Turns: 200}
	m, err := impedance.NewPlanarModel(coil, 1e-8)
	if err != nil {
		panic(err)
	}
	const freq, liftoff = 60e3, 0.3e-3
	gain, offset := cmplx.Rect(2.5, 0.6), complex(0.1, -0.2) // the instrument, unknown to the fit
	reading := func(iacs, extra float64) complex128 {
		z, err := impedance.NormalizedImpedance(m, freq, liftoff+extra, 1, impedance.Specimen{ConductivitySPerM: iacs * 58e4})
		if err != nil {
			panic(err)
		}
		return gain*z + offset
	}
	var pts []impedance.CalPoint
	for _, iacs := range []float64{28.1, 42.6, 59.5} {
		for _, shim := range []float64{0, 50.8e-6} {
			pts = append(pts, impedance.CalPoint{FreqHz: freq, ReadingV: reading(iacs, shim),
				Specimen: impedance.Specimen{ConductivitySPerM: iacs * 58e4}, ExtraLiftoffM: shim})
		}
	}
	cal, err := impedance.Calibrate(m, pts, impedance.CalibrationOptions{Coil: coil, LiftoffM: liftoff})
	if err != nil {
		panic(err)
	}
	inv, err := cal.Invert(m, []impedance.Reading{{FreqHz: freq, V: reading(43, 40e-6)}}, impedance.InvertOptions{})
	if err != nil {
		panic(err)
	}
	fmt.Printf("%.2f %%IACS, lift-off %.1f µm\n", inv.ConductivitySPerM/58e4, inv.ExtraLiftoffM*1e6)
	// Output:
	// 43.00 %IACS, lift-off 40.0 µm
}

// f90 and the recommended frequency set of a 0.043 in alloy 690 tube.
func ExampleAdvise() {
	a, err := impedance.Advise(impedance.AdviceInput{ConductivitySPerM: 1 / 115e-8, WallM: 0.043 * 0.0254})
	if err != nil {
		panic(err)
	}
	fmt.Printf("f90 %.0f kHz\n", a.F90Hz/1e3)
	for _, r := range a.Set {
		fmt.Printf("%s %.0f kHz, δ %.2f mm\n", r.Role, r.FreqHz/1e3, r.SkinDepthM*1e3)
	}
	// Output:
	// f90 289 kHz
	// prime 400 kHz, δ 0.85 mm
	// mix-partner 200 kHz, δ 1.21 mm
	// landmark 25 kHz, δ 3.41 mm
}

// Drag and lift on a magnet moving over a 1 mm aluminium sheet.
func ExampleThinSheetForces() {
	w := impedance.RecessionSpeedMPS(35e6, 1e-3)
	fImage := impedance.DipoleImageForceN(1, 10e-3)
	for _, v := range []float64{1, w, 1000} {
		lift, drag := impedance.ThinSheetForces(fImage, v, w)
		fmt.Printf("v = %6.1f m/s: lift %.3f N, drag %.3f N\n", v, lift, drag)
	}
	fmt.Printf("Rm of a bobbin probe in stainless at 1 m/s: %.3f\n", impedance.MagneticReynolds(1.4e6, 1, 1, 0.01))
	// Output:
	// v =    1.0 m/s: lift 0.001 N, drag 0.041 N
	// v =   45.5 m/s: lift 1.098 N, drag 1.098 N
	// v = 1000.0 m/s: lift 3.580 N, drag 0.163 N
	// Rm of a bobbin probe in stainless at 1 m/s: 0.018
}

// Correct a copper reading taken at 28 °C to 20 °C.
func ExampleConductivityAt20C() {
	cu, _ := impedance.LookupTempCoefficient("copper")
	s20, _ := impedance.ConductivityAt20C(56.3e6, 28, cu.AlphaPerC)
	fmt.Printf("%.2f MS/m = %.1f %%IACS\n", s20/1e6, s20/58e4)
	// Output:
	// 58.07 MS/m = 100.1 %IACS
}

// Conductivity curves of a surface coil at two lift-offs: each runs from
// the air point 0 + 1j towards the perfect-conductor point.
func ExampleComputeDiagram() {
	coil := impedance.Coil{InnerRadiusM: 1e-3, OuterRadiusM: 2.5e-3, LengthM: 1.5e-3, Turns: 200}
	m, err := impedance.NewPlanarModel(coil, 1e-8)
	if err != nil {
		panic(err)
	}
	lo, hi := impedance.ConductivitySpan(coil, 60e3, 1, 1e-4, 1e5)
	d, err := impedance.ComputeDiagram(context.Background(), m, impedance.DiagramSpec{
		Family: impedance.FamilyConductivity, FreqHz: 60e3,
		Values: impedance.LogSpace(lo, hi, 10), Curves: []float64{0.2e-3, 0.5e-3},
	})
	if err != nil {
		panic(err)
	}
	for _, c := range d.Curves {
		first, last := c.Points[0], c.Points[len(c.Points)-1]
		fmt.Printf("%s: %.3f%+.3fj … %.3f%+.3fj\n", c.Label, real(first), imag(first), real(last), imag(last))
	}
	// d.Save("conductivity.png") would draw it (PNG, SVG or PDF by extension).

	// Output:
	// lift-off 0.2 mm: 0.000+1.000j … 0.002+0.673j
	// lift-off 0.5 mm: 0.000+1.000j … 0.001+0.791j
}
