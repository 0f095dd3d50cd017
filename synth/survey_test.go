package synth

import (
	"encoding/csv"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"testing"

	"whorl/impedance"
)

// TestConductivitySurveyRoundTrip writes the demo survey, calibrates on its
// blocks and shims, and inverts every spot: the conductivities corrected
// to 20 °C and the paint and coating thicknesses agree with the ground
// truth within four reported standard uncertainties (a bound on the tail
// over some 40 spots whose errors share two calibrations; the coverage of
// the uncertainty itself is tested in package impedance); and, wherever
// 3u is inside the accuracy targets (so that a miss would be a 3σ event),
// within ±1.0 %IACS (instrument accuracy for aluminium alloys,
// MIL-STD-1537C) and ±max(10 %, 2.5 µm) (coating gauges under ideal
// conditions, ASTM E376 Note 2). The commands flag results whose
// expanded uncertainty 2u exceeds the target.
func TestConductivitySurveyRoundTrip(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	paths, err := WriteConductivitySurvey(dir, 42)
	if err != nil {
		t.Fatal(err)
	}
	if len(paths) != 8 {
		t.Fatalf("wrote %d files, want 8", len(paths))
	}
	open := func(name string) *os.File {
		f, err := os.Open(filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		t.Cleanup(func() { f.Close() })
		return f
	}
	probe, err := impedance.ReadProbe(open(SurveyProbeFile), SurveyProbeFile)
	if err != nil {
		t.Fatal(err)
	}
	blocks, err := impedance.ReadBlocks(open(SurveyBlocksFile), SurveyBlocksFile)
	if err != nil {
		t.Fatal(err)
	}
	shims, err := impedance.ReadShims(open(SurveyShimsFile), SurveyShimsFile)
	if err != nil {
		t.Fatal(err)
	}
	m, err := impedance.NewPlanarModel(probe.Coil(), 1e-8)
	if err != nil {
		t.Fatal(err)
	}
	truth := map[string][]float64{}
	tr, err := csv.NewReader(open(SurveyTruthFile)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range tr[1:] {
		var v []float64
		for _, s := range r[2:] {
			x, _ := strconv.ParseFloat(s, 64)
			v = append(v, x)
		}
		truth[r[1]] = v
	}
	calibrate := func(file string, fitLiftoff bool) *impedance.Calibration {
		rs, err := impedance.ReadCalReadings(open(file), file)
		if err != nil {
			t.Fatal(err)
		}
		pts, err := impedance.CalPointsFrom(blocks, shims, rs, file)
		if err != nil {
			t.Fatal(err)
		}
		cal, err := impedance.Calibrate(m, pts, impedance.CalibrationOptions{Coil: probe.Coil(), LiftoffM: probe.LiftoffM, FitLiftoff: fitLiftoff})
		if err != nil {
			t.Fatal(err)
		}
		// The fitted effective lift-off recovers the worn probe face within
		// three of its standard uncertainties (the last fitted parameter).
		n := len(cal.Params)
		if !fitLiftoff {
			return cal
		}
		if u := math.Sqrt(cal.Covariance[n*n-1]); math.Abs(cal.LiftoffM-surveyTrueLiftoffM) > 3*u {
			t.Errorf("%s: fitted lift-off %g ± %g m, true %g m", file, cal.LiftoffM, u, surveyTrueLiftoffM)
		}
		return cal
	}

	t.Run("conductivity", func(t *testing.T) {
		cal := calibrate(SurveyCalFile, true)
		rs, err := impedance.ReadSpotReadings(open(SurveyReadingsFile), SurveyReadingsFile)
		if err != nil {
			t.Fatal(err)
		}
		for _, spot := range impedance.GroupSpots(rs) {
			var rd []impedance.Reading
			for _, r := range spot.Readings {
				rd = append(rd, impedance.Reading{FreqHz: r.FreqHz, V: r.V})
			}
			r0 := spot.Readings[0]
			inv, err := cal.Invert(m, rd, impedance.InvertOptions{Specimen: impedance.Specimen{ThicknessM: r0.ThicknessM}})
			if err != nil {
				t.Fatalf("%s: %v", spot.ID, err)
			}
			s20, err := impedance.ConductivityAt20C(inv.ConductivitySPerM, r0.TempC, surveyAlphaPerC)
			if err != nil {
				t.Fatal(err)
			}
			want := truth[spot.ID]
			got, u := s20/58e4, inv.UConductivitySPerM/58e4*(1+surveyAlphaPerC*(r0.TempC-20))
			if d := math.Abs(got - want[0]); d > 4*u || (3*u <= 1.0 && d > 1.0) {
				t.Errorf("%s: %.3f ± %.3f %%IACS at 20 °C, truth %.3f", spot.ID, got, u, want[0])
			}
			if d := math.Abs(inv.ExtraLiftoffM*1e6 - want[2]); d > 4*inv.UExtraLiftoffM*1e6+0.5 {
				t.Errorf("%s: lift-off %.2f ± %.2f µm, truth %.2f", spot.ID, inv.ExtraLiftoffM*1e6, inv.UExtraLiftoffM*1e6, want[2])
			}
		}
	})
	t.Run("coating", func(t *testing.T) {
		// One base block fixes the effective lift-off poorly (its standard
		// uncertainty is tens of µm); the coating set-up keeps the probe
		// sheet's value, and the shims calibrate the lift-off scale.
		cal := calibrate(SurveyCoatingCalFile, false)
		rs, err := impedance.ReadSpotReadings(open(SurveyCoatingFile), SurveyCoatingFile)
		if err != nil {
			t.Fatal(err)
		}
		for _, spot := range impedance.GroupSpots(rs) {
			r := spot.Readings[0]
			inv, err := cal.Invert(m, []impedance.Reading{{FreqHz: r.FreqHz, V: r.V}}, impedance.InvertOptions{Specimen: impedance.Specimen{ThicknessM: 6e-3}})
			if err != nil {
				t.Fatalf("%s: %v", spot.ID, err)
			}
			want := truth[spot.ID][2]
			got, u := inv.ExtraLiftoffM*1e6, inv.UExtraLiftoffM*1e6
			tol := math.Max(0.1*want, 2.5)
			if d := math.Abs(got - want); d > 4*u || (3*u <= tol && d > tol) {
				t.Errorf("%s: coating %.2f ± %.2f µm, truth %.2f (E376 tolerance %.2f)", spot.ID, got, u, want, tol)
			}
		}
	})
}

func TestConductivitySurveyDeterministic(t *testing.T) {
	t.Parallel()
	a, b := t.TempDir(), t.TempDir()
	if _, err := WriteConductivitySurvey(a, 7); err != nil {
		t.Fatal(err)
	}
	if _, err := WriteConductivitySurvey(b, 7); err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{SurveyCalFile, SurveyReadingsFile, SurveyTruthFile} {
		x, _ := os.ReadFile(filepath.Join(a, name))
		y, _ := os.ReadFile(filepath.Join(b, name))
		if string(x) != string(y) {
			t.Errorf("%s differs between two runs with the same seed", name)
		}
	}
}
