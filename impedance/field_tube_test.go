package impedance

import (
	"math"
	"math/cmplx"
	"testing"
)

// TestTubeCurrentDensityPowerBalance checks energy conservation for the
// cylindrical fields: ΔR = ∫|J|²/σ dV = 2π∫∫|J(r, z)|²/σ r dr dz (Poynting's
// theorem, one ampere peak), with J from TubeProbe.CurrentDensity and ΔR
// from TubeProbe.Impedance (two routes through the model), for a bobbin
// coil in a tube and an encircling coil on a rod and on a tube.
func TestTubeCurrentDensityPowerBalance(t *testing.T) {
	t.Parallel()
	bob := TubeProbe{Coil: Coil{InnerRadiusM: 7e-3, OuterRadiusM: 7.6e-3, LengthM: 1.5e-3, Turns: 60}, Placement: Bobbin,
		TubeInnerRadiusM: 8.435e-3, TubeOuterRadiusM: 9.525e-3, ConductivitySPerM: 1e6, RelPermeability: 1}
	rod := TubeProbe{Coil: Coil{InnerRadiusM: 10.5e-3, OuterRadiusM: 11.5e-3, LengthM: 2e-3, Turns: 100}, Placement: Encircling,
		TubeOuterRadiusM: 9.525e-3, ConductivitySPerM: 1e6, RelPermeability: 1}
	tube := rod
	tube.TubeInnerRadiusM = 8.435e-3
	for _, tc := range []struct {
		name string
		p    TubeProbe
		f    float64
	}{{"bobbin tube", bob, 1e5}, {"encircling rod", rod, 2e4}, {"encircling tube", tube, 1e5}} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			r, err := tc.p.Impedance(tc.f)
			if err != nil {
				t.Fatal(err)
			}
			rx, rw := gaussLegendre(10)
			zx, zw := gaussLegendre(10)
			b1, b2 := tc.p.TubeInnerRadiusM, tc.p.TubeOuterRadiusM
			radii := make([]float64, len(rx))
			for i, x := range rx {
				radii[i] = b1 + (b2-b1)/2*(1+x)
			}
			sum := 0.0
			// J is even in z; integrate z ≥ 0 in three pieces and double.
			for _, seg := range [][2]float64{{0, 3e-3}, {3e-3, 10e-3}, {10e-3, 40e-3}} {
				for k, x := range zx {
					z := seg[0] + (seg[1]-seg[0])/2*(1+x)
					j, err := tc.p.CurrentDensity(tc.f, radii, z)
					if err != nil {
						t.Fatal(err)
					}
					for i := range j {
						a := cmplx.Abs(j[i])
						sum += 2 * zw[k] * (seg[1] - seg[0]) / 2 * rw[i] * (b2 - b1) / 2 * a * a * radii[i]
					}
				}
			}
			got := 2 * math.Pi * sum / tc.p.ConductivitySPerM
			if want := real(r.DZOhm); math.Abs(got-want) > 2e-3*want {
				t.Errorf("∫|J|²/σ dV = %.6g Ω, want ΔR = %.6g Ω ± 0.2 %%", got, want)
			}
		})
	}
}
