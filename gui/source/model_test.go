package source

import (
	"context"
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"whorl/gui/viewmodel"
	"whorl/impedance"
)

func params() viewmodel.ModelParams {
	return viewmodel.ModelParams{Coil: impedance.Coil{InnerRadiusM: 1e-3, OuterRadiusM: 2e-3, LengthM: 1e-3, Turns: 200},
		LiftoffM: 0.2e-3, ThicknessM: math.Inf(1), SigmaSPerM: 17e6, MuR: 1, FreqHz: 100e3}
}

func TestCoilModelDepthProfileFollowsSkinDepth(t *testing.T) {
	t.Parallel()
	m := NewCoilModel()
	p := params()
	p.FreqHz = 2e6 // δ ≈ 86 µm ≪ coil radius: nearly a plane wave
	prof, err := m.DepthProfile(context.Background(), p)
	if err != nil {
		t.Fatal(err)
	}
	delta := impedance.SkinDepthM(p.FreqHz, p.SigmaSPerM, 1)
	// Plane-wave limit (standard depth of penetration, e.g. Libby,
	// "Introduction to Electromagnetic Nondestructive Test Methods", 1971):
	// |J(z)|/|J(0)| = e^{−z/δ} and the phase lags by z/δ radians. The coil's
	// field is not a plane wave: allow 10 % on the attenuation and 0.1 rad.
	for i, z := range prof.DepthM {
		if z > 2*delta {
			break
		}
		if want := math.Exp(-z / delta); !scalar.EqualWithinAbsOrRel(prof.MagRel[i], want, 0.02, 0.1) {
			t.Errorf("|J|/|J0| at z=%.3g m = %v, want e^{-z/δ} = %v (10 %%)", z, prof.MagRel[i], want)
		}
		if want := -z / delta; math.Abs(prof.PhaseRad[i]-want) > 0.1 {
			t.Errorf("phase at z=%.3g m = %v rad, want −z/δ = %v (±0.1)", z, prof.PhaseRad[i], want)
		}
	}
}

func TestCoilModelFamiliesAndCancel(t *testing.T) {
	t.Parallel()
	m := NewCoilModel()
	fam, err := m.Families(context.Background(), params())
	if err != nil {
		t.Fatal(err)
	}
	if len(fam.Curves) != 5 {
		t.Fatalf("%d curves, want 5", len(fam.Curves))
	}
	// Passivity (closed form: a conductor only dissipates): ΔR ≥ 0, and
	// eddy currents oppose the coil's field, so X/X0 < 1.
	for _, c := range fam.Curves {
		for i, z := range c.Points {
			if real(z) < -1e-9 || imag(z) > 1+1e-9 {
				t.Errorf("%s point %d (%s) = %v: want ΔR ≥ 0 and X/X0 ≤ 1", c.Name, i, c.Labels[i], z)
			}
		}
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := m.Families(ctx, params()); err == nil {
		t.Error("cancelled evaluation returned no error")
	}
	adv, err := m.Advice(params())
	if err != nil || !scalar.EqualWithinAbsOrRel(adv.SkinDepthM, impedance.SkinDepthM(100e3, 17e6, 1), 0, 1e-12) {
		t.Errorf("advice %+v, %v", adv, err)
	}
}

func TestSplitLocation(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		in      string
		name    string
		offsetM float64
	}{
		{"+0.120 m from support-3", "support-3", 0.120},
		{"-12.5 mm from tubesheet-1", "tubesheet-1", -0.0125},
		{"near the U-bend", "near the U-bend", 0},
	} {
		name, off := splitLocation(tc.in)
		if name != tc.name || math.Abs(off-tc.offsetM) > 1e-12 {
			t.Errorf("splitLocation(%q) = %q, %v; want %q, %v", tc.in, name, off, tc.name, tc.offsetM)
		}
	}
}

// FuzzSplitLocation checks that any location text parses without panic
// and that a parsed offset is finite and round-trips through the
// analysis's "%+.3f m from NAME" form.
func FuzzSplitLocation(f *testing.F) {
	for _, s := range []string{"+0.120 m from support-3", "-12.5 mm from tubesheet-1", "near the U-bend", " from ", "1e309 m from x", "NaN m from y"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		name, off := splitLocation(s)
		if math.IsNaN(off) || math.IsInf(off, 0) {
			t.Fatalf("splitLocation(%q) = %q, %v: non-finite offset", s, name, off)
		}
		if off != 0 {
			back := fmt.Sprintf("%+.6f m from %s", off, name)
			n2, o2 := splitLocation(back)
			if n2 != name || math.Abs(o2-off) > 1e-6*math.Max(1, math.Abs(off)) {
				t.Fatalf("round trip of %q: %q → %q, %v", s, back, n2, o2)
			}
		}
	})
}
