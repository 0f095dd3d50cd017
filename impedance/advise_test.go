package impedance

import (
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// TestF90WorkedTable checks F90Hz against the worked f90 table for tube
// walls of 0.040, 0.043, 0.049 and 0.050 in (f90 [kHz] = 3ρ[µΩ·cm]/t²[mm²],
// Cecco et al., AECL-7523, from memory; the tabulated values are rounded to
// whole kHz, hence the 0.6 kHz tolerance).
func TestF90WorkedTable(t *testing.T) {
	t.Parallel()
	walls := []float64{0.040, 0.043, 0.049, 0.050} // inches
	tests := []struct {
		material      string
		rhoMicroOhmCm float64
		wantKHz       [4]float64
	}{
		{"alloy 600", 103, [4]float64{299, 259, 199, 192}},
		{"alloy 690", 115, [4]float64{334, 289, 223, 214}},
		{"alloy 800", 99, [4]float64{288, 249, 192, 184}},
		{"304 stainless", 72, [4]float64{209, 181, 139, 134}},
		{"90/10 Cu-Ni", 19.1, [4]float64{56, 48, 37, 36}},
		{"admiralty brass", 6.9, [4]float64{20, 17, 13, 13}},
		{"CP titanium grade 2", 56, [4]float64{163, 141, 108, 104}},
	}
	for _, tc := range tests {
		tc := tc
		t.Run(tc.material, func(t *testing.T) {
			t.Parallel()
			sigma := 1 / (tc.rhoMicroOhmCm * 1e-8)
			for i, w := range walls {
				got := F90Hz(sigma, 1, w*0.0254) / 1e3
				if !scalar.EqualWithinAbs(got, tc.wantKHz[i], 0.6) {
					t.Errorf("F90Hz(ρ = %g µΩ·cm, t = %g in) = %.2f kHz, want %g kHz ± 0.6", tc.rhoMicroOhmCm, w, got, tc.wantKHz[i])
				}
			}
		})
	}
}

func TestF90Relations(t *testing.T) {
	t.Parallel()
	sigma := 1 / 115e-8 // alloy 690, ρ = 115 µΩ·cm
	wall := 1.09e-3
	f90 := F90Hz(sigma, 1, wall)
	t.Run("wall is 1.09 skin depths at f90", func(t *testing.T) {
		t.Parallel()
		// t/δ = √(π μ0 · 3e5) = 1.0883 (closed form of the 3ρ/t² rule).
		got := wall / SkinDepthM(f90, sigma, 1)
		want := math.Sqrt(math.Pi * 4e-7 * math.Pi * 3e5)
		if !scalar.EqualWithinRel(got, want, 1e-9) {
			t.Errorf("t/δ at f90 = %.6f, want %.6f", got, want)
		}
		if !scalar.EqualWithinAbs(got, 1.09, 0.005) {
			t.Errorf("t/δ at f90 = %.4f, want 1.09 (stated relation t ≈ 1.09δ)", got)
		}
	})
	t.Run("0.8 delta rule", func(t *testing.T) {
		t.Parallel()
		// t = 1.09 mm, σ = 1 MS/m: f90 = 136.4 kHz with t = 0.8δ exactly
		// (computed value in the t = 0.8δ rule notes; 280/(t²σ[%IACS]) gives 136.7).
		got := F90RuleHz(1e6, 1, 1.09e-3, 0.8) / 1e3
		if !scalar.EqualWithinAbs(got, 136.4, 0.05) {
			t.Errorf("F90RuleHz(1 MS/m, 1.09 mm, 0.8) = %.3f kHz, want 136.4", got)
		}
		rule := 280 / (1.09 * 1.09 * 1e6 / 58e4)
		if !scalar.EqualWithinAbs(rule, 136.7, 0.05) {
			t.Errorf("280/(t²σ) = %.3f kHz, want 136.7", rule)
		}
	})
	t.Run("permeability divides f90", func(t *testing.T) {
		t.Parallel()
		if got, want := F90Hz(sigma, 4, wall), f90/4; !scalar.EqualWithinRel(got, want, 1e-12) {
			t.Errorf("F90Hz with μr = 4 = %g, want %g", got, want)
		}
	})
	t.Run("phase spread", func(t *testing.T) {
		t.Parallel()
		// 2t/δ at f90 = 2·1.0883 rad = 124.7° (plane-wave phase-lag rule).
		got := PhaseSpreadRad(f90, sigma, 1, wall) * 180 / math.Pi
		if !scalar.EqualWithinAbs(got, 124.71, 0.01) {
			t.Errorf("phase spread at f90 = %.3f°, want 124.71°", got)
		}
	})
	t.Run("three skin depths", func(t *testing.T) {
		t.Parallel()
		// 6061-T6 (43 %IACS) plate of 2 mm: 3δ = 2 mm at
		// f = 9/(π μ0 σ t²) = 9/(π·4πe-7·24.94e6·4e-6) = 22.85 kHz (closed form).
		f := MinFreqForThicknessHz(0.43*58e6, 1, 2e-3, 3)
		if !scalar.EqualWithinRel(f, 22850, 1e-3) {
			t.Errorf("MinFreqForThicknessHz = %.1f Hz, want 22850", f)
		}
		if d := SkinDepthM(f, 0.43*58e6, 1); !scalar.EqualWithinRel(3*d, 2e-3, 1e-9) {
			t.Errorf("3δ at that frequency = %g m, want 2e-3", 3*d)
		}
	})
}

func TestAdvise(t *testing.T) {
	t.Parallel()
	t.Run("alloy 690 3/4 in x 0.043 in", func(t *testing.T) {
		t.Parallel()
		a, err := Advise(AdviceInput{ConductivitySPerM: 1 / 115e-8, WallM: 0.043 * 0.0254, TubeOuterDiamM: 0.75 * 0.0254, IncludeID: true})
		if err != nil {
			t.Fatal(err)
		}
		// Typical set for 3/4 in × 0.043 in alloy 600/690: about 400, 200,
		// 100 and 20–35 kHz (bobbin practice; from memory/common practice).
		want := map[FrequencyRole]float64{RolePrime: 400e3, RoleMixPartner: 200e3, RoleLandmark: 25e3, RoleID: 800e3}
		if len(a.Set) != 4 {
			t.Fatalf("got %d recommendations, want 4", len(a.Set))
		}
		for _, r := range a.Set {
			if r.FreqHz != want[r.Role] {
				t.Errorf("%s = %g Hz, want %g", r.Role, r.FreqHz, want[r.Role])
			}
		}
		if p := a.Set[0].FreqHz; p < a.F90Hz || p > 1.5*a.F90Hz {
			t.Errorf("prime %g Hz outside [f90, 1.5 f90] = [%g, %g]", p, a.F90Hz, 1.5*a.F90Hz)
		}
		if len(a.Warnings) != 0 {
			t.Errorf("unexpected warnings %q", a.Warnings)
		}
	})
	t.Run("acquisition warnings", func(t *testing.T) {
		t.Parallel()
		// 0.5 m/s at 400 Hz is 20 samples per inch (< 30); coil of 2 mm
		// gives a flaw bandwidth of 250 Hz above the 100 Hz low-pass.
		a, err := Advise(AdviceInput{ConductivitySPerM: 1 / 115e-8, WallM: 1.09e-3, ProbeSpeedMPS: 0.5, SampleRateHz: 400, LowpassHz: 100, CoilLengthM: 2e-3})
		if err != nil {
			t.Fatal(err)
		}
		all := strings.Join(a.Warnings, "\n")
		for _, w := range []string{"samples per inch", "below the flaw bandwidth", "cannot carry"} {
			if !strings.Contains(all, w) {
				t.Errorf("warnings %q lack %q", a.Warnings, w)
			}
		}
		if !scalar.EqualWithinRel(a.FlawBandwidthHz, 250, 1e-12) {
			t.Errorf("flaw bandwidth %g Hz, want 250", a.FlawBandwidthHz)
		}
	})
	t.Run("thin plate for conductivity", func(t *testing.T) {
		t.Parallel()
		a, err := Advise(AdviceInput{ConductivitySPerM: 0.43 * 58e6, WallM: 1e-3, CandidateHz: 10e3})
		if err != nil {
			t.Fatal(err)
		}
		if !strings.Contains(strings.Join(a.Warnings, "\n"), "< 3δ") {
			t.Errorf("1 mm of 6061 at 10 kHz (δ = 1.008 mm) should warn about 3δ; warnings %q", a.Warnings)
		}
	})
	t.Run("speed effect in copper bar", func(t *testing.T) {
		t.Parallel()
		a, err := Advise(AdviceInput{ConductivitySPerM: 58e6, ProbeSpeedMPS: 5, FieldLengthM: 0.01})
		if err != nil {
			t.Fatal(err)
		}
		if !strings.Contains(strings.Join(a.Warnings, "\n"), "Reynolds") {
			t.Errorf("Rm = %g should warn; warnings %q", a.ReynoldsNumber, a.Warnings)
		}
	})
	t.Run("bad input", func(t *testing.T) {
		t.Parallel()
		for _, in := range []AdviceInput{
			{},
			{ConductivitySPerM: math.NaN()},
			{ConductivitySPerM: 1e6, RelPermeability: 0.5},
			{ConductivitySPerM: 1e6, WallM: -1},
			{ConductivitySPerM: 1e6, WallM: 0.01, TubeOuterDiamM: 0.015},
		} {
			if _, err := Advise(in); err == nil {
				t.Errorf("Advise(%+v) gave no error", in)
			}
		}
	})
}

func TestRound125(t *testing.T) {
	t.Parallel()
	tests := []struct{ x, down, up, near float64 }{
		{433e3, 400e3, 500e3, 400e3},
		{26.7e3, 25e3, 30e3, 25e3},
		{1000, 1000, 1000, 1000},
		{0.7, 0.6, 0.8, 0.8}, // log(0.8/0.7) < log(0.7/0.6)
	}
	for _, tc := range tests {
		if got := roundDown125(tc.x); !scalar.EqualWithinRel(got, tc.down, 1e-12) {
			t.Errorf("roundDown125(%g) = %g, want %g", tc.x, got, tc.down)
		}
		if got := roundUp125(tc.x); !scalar.EqualWithinRel(got, tc.up, 1e-12) {
			t.Errorf("roundUp125(%g) = %g, want %g", tc.x, got, tc.up)
		}
		if got := roundNearest125(tc.x); !scalar.EqualWithinRel(got, tc.near, 1e-12) {
			t.Errorf("roundNearest125(%g) = %g, want %g", tc.x, got, tc.near)
		}
	}
}

func TestMaterials(t *testing.T) {
	t.Parallel()
	m, ok := LookupMaterial("Alloy 690")
	if !ok {
		t.Fatal("alloy 690 missing")
	}
	// f90 for 0.043 in alloy 690 from the table value: 289 kHz (worked f90 table).
	if got := F90Hz(m.ConductivitySPerM, 1, 0.043*0.0254) / 1e3; !scalar.EqualWithinAbs(got, 289, 0.6) {
		t.Errorf("f90 = %.2f kHz, want 289", got)
	}
	// 90/10 Cu-Ni: 9.0 %IACS (ρ 19.1 µΩ·cm, copper-mill datasheet).
	if m, _ := LookupMaterial("cuni9010"); !scalar.EqualWithinAbs(m.ConductivitySPerM/58e4, 9.0, 0.05) {
		t.Errorf("90/10 Cu-Ni %.3f %%IACS, want 9.0", m.ConductivitySPerM/58e4)
	}
	if _, ok := LookupMaterial("unobtainium"); ok {
		t.Error("unknown material found")
	}
	for _, m := range Materials() {
		if m.Source == "" || !(m.ConductivitySPerM > 0) {
			t.Errorf("%s: missing source or conductivity", m.Name)
		}
	}
}

// TestSkinDepthAlloy690Worked checks the standard depth of penetration of
// alloy 690 (ρ = 115 µΩ·cm) against the worked values of the f90 notes:
// 3.8, 1.71, 1.21, 0.99, 0.85 and 0.73 mm at 20, 100, 200, 300, 400 and
// 550 kHz (δ[mm] = 50.3·√(ρ[µΩ·cm]/f[Hz]); rounded to 2–3 digits, hence
// the tolerance of half a unit in the last digit).
func TestSkinDepthAlloy690Worked(t *testing.T) {
	t.Parallel()
	sigma := 1 / 115e-8
	for _, c := range []struct{ fHz, wantMM, tolMM float64 }{
		{20e3, 3.8, 0.05}, {100e3, 1.71, 0.005}, {200e3, 1.21, 0.005},
		{300e3, 0.99, 0.005}, {400e3, 0.85, 0.005}, {550e3, 0.73, 0.005},
	} {
		got := SkinDepthM(c.fHz, sigma, 1) * 1e3
		if !scalar.EqualWithinAbs(got, c.wantMM, c.tolMM) {
			t.Errorf("δ(alloy 690, %g kHz) = %.4f mm, want %g ± %g", c.fHz/1e3, got, c.wantMM, c.tolMM)
		}
	}
}

func TestAdviseMagnet(t *testing.T) {
	t.Parallel()
	// 1 A·m² dipole 10 mm over 1 mm of aluminium (35 MS/m) at w: lift =
	// drag = F_image(1 − 1/√2) (ThinSheetForces at v = w).
	w := RecessionSpeedMPS(35e6, 1e-3)
	a, err := Advise(AdviceInput{ConductivitySPerM: 35e6, WallM: 1e-3, ProbeSpeedMPS: w, MagnetMomentAm2: 1, MagnetHeightM: 10e-3})
	if err != nil {
		t.Fatal(err)
	}
	want := DipoleImageForceN(1, 10e-3) * (1 - 1/math.Sqrt2)
	if a.Magnet == nil || !scalar.EqualWithinRel(a.Magnet.LiftN, want, 1e-12) || !scalar.EqualWithinRel(a.Magnet.DragN, want, 1e-12) {
		t.Errorf("magnet %+v, want lift = drag = %g N", a.Magnet, want)
	}
	if _, err := Advise(AdviceInput{ConductivitySPerM: 35e6, MagnetMomentAm2: 1}); err == nil {
		t.Error("magnet without height, sheet and speed accepted")
	}
}
