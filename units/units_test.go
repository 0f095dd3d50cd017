package units

import (
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

func TestParse(t *testing.T) {
	t.Parallel()
	tests := []struct {
		kind Kind
		in   string
		want float64
	}{
		// 1 in = 25.4 mm exactly (international yard and pound agreement, 1959).
		{Length, "1in", 0.0254},
		{Length, "0.043 in", 0.043 * 0.0254},
		{Length, "25.4mm", 0.0254},
		{Length, "100um", 1e-4},
		{Length, "100µm", 1e-4},
		{Length, "3 mil", 3 * 25.4e-6},
		{Length, "0.002", 0.002},
		{Frequency, "400kHz", 4e5},
		{Frequency, "1.5MHz", 1.5e6},
		{Frequency, "50", 50},
		// 100 %IACS = 58.0 MS/m at 20 °C (ASTM E1004; IEC 1913 definition).
		{Conductivity, "100%IACS", 58e6},
		{Conductivity, "17.4MS/m", 17.4e6},
		{Conductivity, "5 mS/m", 5e-3},
		{Conductivity, "1.2e6", 1.2e6},
		{Voltage, "250mV", 0.25},
		{Time, "2ms", 2e-3},
		{Speed, "12in/s", 12 * 0.0254},
		{Angle, "180deg", 3.141592653589793},
	}
	for _, tc := range tests {
		tc := tc
		t.Run(tc.in, func(t *testing.T) {
			t.Parallel()
			got, err := Parse(tc.kind, tc.in)
			if err != nil {
				t.Fatalf("Parse(%v, %q): %v", tc.kind, tc.in, err)
			}
			// Conversions are single multiplications: a few ulps.
			if !scalar.EqualWithinRel(got, tc.want, 1e-15) {
				t.Errorf("Parse(%v, %q) = %.17g, want %.17g", tc.kind, tc.in, got, tc.want)
			}
		})
	}
}

func TestParseErrors(t *testing.T) {
	t.Parallel()
	tests := []struct {
		kind Kind
		in   string
		want string
	}{
		{Length, "", `"": expected a length`},
		{Length, "mm", `"mm": expected a length`},
		{Length, "3 furlongs", `unknown length unit "furlongs"`},
		{Frequency, "10 kHzz", `unknown frequency unit "kHzz"`},
		{Conductivity, "NaN", `expected a conductivity`},
		{Length, "1e400mm", `expected a finite length`},
	}
	for _, tc := range tests {
		_, err := Parse(tc.kind, tc.in)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("Parse(%v, %q) error = %v, want it to contain %q", tc.kind, tc.in, err, tc.want)
		}
	}
}

func TestIACS(t *testing.T) {
	t.Parallel()
	// ρ = 1.7241 µΩ·cm ↔ 100 %IACS (FIELD.md §3.1, IACS definition).
	sigma := 1 / 1.7241e-8
	// 1.7241 is 1/0.58 rounded to 5 digits (3e-5 relative), so allow 5e-3 %IACS.
	if got := IACSFromSiemens(sigma); !scalar.EqualWithinAbs(got, 100, 5e-3) {
		t.Errorf("IACSFromSiemens(1/1.7241e-8 Ω·m) = %v, want 100 ± 5e-3", got)
	}
}

func FuzzParse(f *testing.F) {
	for _, s := range []string{"1in", "0.1mm", "17.4MS/m", "45%IACS", "", "-", "1e", ".", "1.e5kHz", "+.5 um"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		for k := Length; k <= Angle; k++ {
			v, err := Parse(k, s)
			if err == nil && (v != v || v > 1e308 || v < -1e308) {
				t.Fatalf("Parse(%v, %q) = %v without error", k, s, v)
			}
		}
	})
}
