package impedance

import (
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

func TestSkinDepth(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name   string
		freqHz float64
		sigma  float64 // S/m
		mur    float64
		wantM  float64
		tol    float64 // relative; the published values are rounded
	}{
		// Copper, 58 MS/m, 60 Hz: δ = 503.29/√(60·58e6) = 8.53 mm
		// (closed form δ = 503.29/√(fσμr), MODEL.md §5.1; hand computation).
		{"copper 60 Hz", 60, 58e6, 1, 8.532e-3, 1e-3},
		// Alloy 690, ρ = 115 µΩ·cm: δ = 0.85 mm at 400 kHz, 1.71 mm at 100 kHz,
		// 3.8 mm at 20 kHz (FIELD.md §2.3 worked values, rounded to 2–3 digits).
		{"alloy 690 400 kHz", 400e3, 1 / 115e-8, 1, 0.85e-3, 6e-3},
		{"alloy 690 100 kHz", 100e3, 1 / 115e-8, 1, 1.71e-3, 3e-3},
		{"alloy 690 20 kHz", 20e3, 1 / 115e-8, 1, 3.8e-3, 1e-2},
		// Aluminium 6061-T6, 43 %IACS = 24.94 MS/m at 10 kHz:
		// δ = 503.29/√(1e4·24.94e6) = 1.0078 mm (closed form, hand computation).
		{"6061-T6 10 kHz", 10e3, 0.43 * 58e6, 1, 1.0078e-3, 1e-4},
		// Carbon steel, σ = 6 MS/m, μr = 100, 1 kHz: 503.29/√(1e3·6e6·100) = 0.6497 mm.
		{"steel mur 100", 1e3, 6e6, 100, 0.6497e-3, 1e-4},
	}
	for _, tc := range tests {
		tc := tc
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			got := SkinDepthM(tc.freqHz, tc.sigma, tc.mur)
			if !scalar.EqualWithinRel(got, tc.wantM, tc.tol) {
				t.Errorf("SkinDepthM(%g Hz, %g S/m, %g) = %.6g m, want %.6g m ± %g rel", tc.freqHz, tc.sigma, tc.mur, got, tc.wantM, tc.tol)
			}
		})
	}
}
