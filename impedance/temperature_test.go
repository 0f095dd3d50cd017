package impedance

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

func TestConductivityAt20C(t *testing.T) {
	t.Parallel()
	cu, ok := LookupTempCoefficient("Copper")
	if !ok {
		t.Fatal("copper missing from the coefficient table")
	}
	// Annealed (IACS) copper: α = 0.00393/°C at 20 °C (power-engineering
	// handbook table of temperature coefficients of resistance).
	if cu.AlphaPerC != 0.00393 {
		t.Fatalf("copper α = %g/°C, want 0.00393", cu.AlphaPerC)
	}
	tests := []struct {
		name         string
		sigma, tempC float64
		alpha        float64
		want         float64
		tol          float64
	}{
		// Copper read at 30 °C: σ20 = σT(1 + 0.00393·10) = 1.0393 σT.
		{"copper at 30 C", 55.8e6, 30, cu.AlphaPerC, 55.8e6 * 1.0393, 1e-12},
		// Below 20 °C the reading is high: 60 MS/m at 10 °C → 60(1 − 0.0393).
		{"copper at 10 C", 60e6, 10, cu.AlphaPerC, 60e6 * 0.9607, 1e-12},
		// At 20 °C nothing changes.
		{"at reference", 25e6, 20, 0.003, 25e6, 0},
	}
	for _, tc := range tests {
		tc := tc
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			got, err := ConductivityAt20C(tc.sigma, tc.tempC, tc.alpha)
			if err != nil {
				t.Fatal(err)
			}
			if !scalar.EqualWithinRel(got, tc.want, tc.tol) {
				t.Errorf("ConductivityAt20C(%g, %g °C, %g) = %.9g, want %.9g", tc.sigma, tc.tempC, tc.alpha, got, tc.want)
			}
		})
	}
	t.Run("copper resistivity law round trip", func(t *testing.T) {
		t.Parallel()
		// The linear resistivity law ρT = ρ20(1 + αΔT) gives
		// σT = σ20/(1 + αΔT), so the correction is exact for it: IACS copper
		// (58 MS/m at 20 °C) read at 25 °C comes back to 58 MS/m.
		sT := 58e6 / (1 + 0.00393*5)
		got, _ := ConductivityAt20C(sT, 25, 0.00393)
		if !scalar.EqualWithinRel(got, 58e6, 1e-14) {
			t.Errorf("got %g, want 58e6", got)
		}
	})
	t.Run("bad input", func(t *testing.T) {
		t.Parallel()
		for _, in := range [][3]float64{{math.NaN(), 20, 0.004}, {1e6, math.Inf(1), 0.004}, {1e6, -300, 0.004}} {
			if _, err := ConductivityAt20C(in[0], in[1], in[2]); err == nil {
				t.Errorf("ConductivityAt20C%v gave no error", in)
			}
		}
	})
	if n := len(TempCoefficients()); n < 3 {
		t.Errorf("coefficient table has %d entries", n)
	}
}
