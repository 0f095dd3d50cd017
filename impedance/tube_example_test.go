package impedance_test

import (
	"fmt"

	"whorl/impedance"
)

// A bobbin coil in a 19.05 mm × 1.09 mm heat-exchanger tube of
// 1.0 MS/m alloy (about 1.7 %IACS) at 100 kHz, and the coupling of a
// differential pair of such coils 2.5 mm apart.
func ExampleTubeProbe_DifferentialImpedance() {
	p := impedance.TubeProbe{
		Coil:              impedance.Coil{InnerRadiusM: 7e-3, OuterRadiusM: 7.6e-3, LengthM: 1.5e-3, Turns: 60},
		Placement:         impedance.Bobbin,
		TubeOuterRadiusM:  19.05e-3 / 2,
		TubeInnerRadiusM:  19.05e-3/2 - 1.09e-3,
		ConductivitySPerM: 1e6,
		RelPermeability:   1,
		Differential:      true,
		CoilGapM:          2.5e-3,
	}
	d, err := p.DifferentialImpedance(100e3)
	if err != nil {
		fmt.Println(err)
		return
	}
	zn := d.Coil.Normalized()
	fmt.Printf("each coil: L0 = %.2f µH, ΔZ = %.3f %+.3fj Ω, Zn = %.4f %+.4fj\n",
		d.Coil.L0H*1e6, real(d.Coil.DZOhm), imag(d.Coil.DZOhm), real(zn), imag(zn))
	fmt.Printf("mutual: M0 = %.2f µH, ΔZ12 = %.3f %+.3fj Ω\n", d.MutualL0H*1e6, real(d.MutualDZOhm), imag(d.MutualDZOhm))
	fmt.Printf("bridge output in a uniform tube: %v Ω\n", d.OutputOhm)
	// Output:
	// each coil: L0 = 93.42 µH, ΔZ = 8.464 -16.515j Ω, Zn = 0.1442 +0.7186j
	// mutual: M0 = 40.99 µH, ΔZ12 = 6.520 -14.796j Ω
	// bridge output in a uniform tube: (0+0i) Ω
}
