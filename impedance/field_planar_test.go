package impedance

import (
	"math"
	"math/cmplx"
	"testing"
)

// TestCurrentDensityPlaneWave checks that under a coil much wider than the
// skin depth the eddy current decays like a plane wave, J(s)/J(0) =
// e^{−(1+j)s/δ}: magnitude e^{−s/δ}, phase lag s/δ (standard plane-wave
// result, MODEL.md §5.1). The lateral wavenumbers (α ≲ 1/z1) add a relative
// correction ~(αδ)² ≈ 1e-3 for this geometry.
func TestCurrentDensityPlaneWave(t *testing.T) {
	t.Parallel()
	p := Planar{
		Coil:     Coil{InnerRadiusM: 40e-3, OuterRadiusM: 60e-3, LengthM: 10e-3, Turns: 10},
		LiftoffM: 5e-3,
		Layers:   halfSpace(58e6, 1),
	}
	const f = 1e5
	d := SkinDepthM(f, 58e6, 1)
	depths := []float64{0, 0.5 * d, d, 2 * d, 3 * d}
	j, err := p.CurrentDensity(f, depths, 50e-3)
	if err != nil {
		t.Fatal(err)
	}
	for i, s := range depths {
		ratio := j[i] / j[0]
		if got, want := cmplx.Abs(ratio), math.Exp(-s/d); math.Abs(got-want) > 5e-3*want+1e-6 {
			t.Errorf("depth %.2fδ: |J/J0| = %.5f, want e^{−s/δ} = %.5f ± 0.5 %%", s/d, got, want)
		}
		lag := -cmplx.Phase(ratio)
		if want := s / d; math.Abs(lag-want) > 5e-3*(1+want) {
			t.Errorf("depth %.2fδ: phase lag %.5f rad, want s/δ = %.5f", s/d, lag, want)
		}
	}
}

// TestCurrentDensityPowerBalance checks energy conservation: for one ampere
// (peak) the resistance change equals the Joule loss,
// ΔR = ∫|J|²/σ dV = 2π∫∫|J(r, s)|²/σ r dr ds (Poynting's theorem), with J
// from CurrentDensity and ΔR from the impedance integral — two different
// routes through the model. Both a half-space and a plate are checked.
func TestCurrentDensityPowerBalance(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		name   string
		layers []Layer
		f      float64
		maxS   float64
	}{
		{"half-space", halfSpace(16.45e6, 1), 2e4, 8 * SkinDepthM(2e4, 16.45e6, 1)},
		{"plate", []Layer{{0.8e-3, 16.45e6, 1}}, 1e4, 0.8e-3},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			p := Planar{Coil: coilC9, LiftoffM: 1.32e-3, Layers: tc.layers}
			r, err := p.Impedance(tc.f)
			if err != nil {
				t.Fatal(err)
			}
			sx, sw := gaussLegendre(24)
			rx, rw := gaussLegendre(24)
			depths := make([]float64, len(sx))
			for i, x := range sx {
				depths[i] = tc.maxS / 2 * (1 + x)
			}
			// r from 0 to 60 mm in three pieces (the current is concentrated
			// under the winding).
			sum := 0.0
			for _, seg := range [][2]float64{{0, 8e-3}, {8e-3, 20e-3}, {20e-3, 60e-3}} {
				for k, x := range rx {
					rr := seg[0] + (seg[1]-seg[0])/2*(1+x)
					j, err := p.CurrentDensity(tc.f, depths, rr)
					if err != nil {
						t.Fatal(err)
					}
					for i := range j {
						a := cmplx.Abs(j[i])
						sum += rw[k] * (seg[1] - seg[0]) / 2 * sw[i] * tc.maxS / 2 * a * a * rr
					}
				}
			}
			got := 2 * math.Pi * sum / tc.layers[0].ConductivitySPerM
			if want := real(r.DZOhm); math.Abs(got-want) > 2e-3*want {
				t.Errorf("∫|J|²/σ dV = %.6g Ω, want ΔR = %.6g Ω ± 0.2 %%", got, want)
			}
		})
	}
}
