package main

import (
	"encoding/csv"
	"encoding/json"
	"math"
	"strings"
	"testing"
)

var t15Flags = []string{"--inner-radius", "6.15mm", "--outer-radius", "12.4mm", "--coil-length", "6.15mm", "--turns", "3790", "--liftoff", "0.88mm"}

// TestModelPlateJSON checks the JSON fields against the T15 half-space value
// of MODEL.md §3.3 (ΔZ = 120.6144247 − 267.6632223j Ω at 900 Hz, mpmath and
// SciPy) and that several --freq give an array.
func TestModelPlateJSON(t *testing.T) {
	t.Parallel()
	args := append([]string{"model", "plate"}, t15Flags...)
	args = append(args, "--freq", "900Hz", "--layer", "inf:30.6MS/m", "--json")
	code, out, errs := runCmd(t, args...)
	if code != 0 {
		t.Fatalf("exit %d, stderr %s", code, errs)
	}
	var o struct {
		FreqHz float64 `json:"freq_hz"`
		L0H    float64 `json:"l0_h"`
		Z0     struct{ Re, Im float64 }
		DZ     struct{ Re, Im float64 } `json:"dz_ohm"`
		Norm   struct{ R, X float64 }   `json:"normalized"`
		Err    *float64                 `json:"error_estimate"`
	}
	if err := json.Unmarshal([]byte(out), &o); err != nil {
		t.Fatalf("%v in %s", err, out)
	}
	if o.FreqHz != 900 || math.Abs(o.L0H-0.2259878883)/0.2259878883 > 1e-8 {
		t.Errorf("freq %g, L0 %g; want 900, 0.2259878883 H", o.FreqHz, o.L0H)
	}
	if math.Abs(o.DZ.Re-120.6144247) > 1e-5 || math.Abs(o.DZ.Im+267.6632223) > 1e-5 {
		t.Errorf("ΔZ = %g%+gj, want 120.6144247−267.6632223j (MODEL.md §3.3)", o.DZ.Re, o.DZ.Im)
	}
	if math.Abs(o.Norm.R-0.0943826) > 1e-6 || math.Abs(o.Norm.X-0.7905496) > 1e-6 {
		t.Errorf("Zn = %g, %g; want 0.0943826, 0.7905496 (MODEL.md §3.3)", o.Norm.R, o.Norm.X)
	}
	if o.Err == nil || *o.Err > 1e-8 {
		t.Errorf("error_estimate missing or large: %v", o.Err)
	}
	args = append([]string{"model", "plate"}, t15Flags...)
	args = append(args, "--freq", "1kHz", "--freq", "10kHz", "--layer", "0.2mm:5MS/m", "--layer", "inf:30.6MS/m", "--json")
	code, out, errs = runCmd(t, args...)
	if code != 0 {
		t.Fatalf("exit %d, stderr %s", code, errs)
	}
	var arr []map[string]any
	if err := json.Unmarshal([]byte(out), &arr); err != nil || len(arr) != 2 {
		t.Fatalf("want a JSON array of 2, got %v (%s)", err, out)
	}
	// MODEL.md §3.3: two-layer 10 kHz ΔZ = 620.35535 − 4337.735859j Ω.
	dz := arr[1]["dz_ohm"].(map[string]any)
	if math.Abs(dz["re"].(float64)-620.35535) > 1e-4 || math.Abs(dz["im"].(float64)+4337.735859) > 1e-4 {
		t.Errorf("two-layer 10 kHz ΔZ = %v, want 620.35535−4337.735859j", dz)
	}
}

// TestModelErrors checks that bad values are usage errors naming the flag.
func TestModelErrors(t *testing.T) {
	t.Parallel()
	base := append([]string{"model", "plate"}, t15Flags...)
	tests := []struct {
		name string
		args []string
		want string
	}{
		{"unknown unit", append(append([]string{}, base...), "--freq", "1kHz", "--layer", "inf:30%IAC"), "--layer"},
		{"half-space not last", append(append([]string{}, base...), "--freq", "1kHz", "--layer", "inf:1MS/m", "--layer", "1mm:2MS/m"), "last"},
		{"bad mur", append(append([]string{}, base...), "--freq", "1kHz", "--layer", "inf:1MS/m:0.5"), "permeability"},
		{"no freq", append(append([]string{}, base...), "--layer", "inf:1MS/m"), "--freq"},
		{"negative freq", append(append([]string{}, base...), "--freq", "-1kHz", "--layer", "inf:1MS/m"), "--freq"},
		{"bad length", []string{"model", "plate", "--inner-radius", "abc", "--outer-radius", "2mm", "--coil-length", "1mm", "--turns", "10", "--liftoff", "0", "--freq", "1kHz", "--layer", "inf:1MS/m"}, "--inner-radius"},
		{"outer below inner", []string{"model", "plate", "--inner-radius", "3mm", "--outer-radius", "2mm", "--coil-length", "1mm", "--turns", "10", "--liftoff", "0", "--freq", "1kHz", "--layer", "inf:1MS/m"}, "outer radius"},
		{"tube no placement", []string{"model", "tube", "--inner-radius", "7mm", "--outer-radius", "7.6mm", "--coil-length", "1.5mm", "--turns", "60", "--tube-od", "19.05mm", "--wall", "1.09mm", "--conductivity", "1MS/m", "--freq", "1kHz"}, "--placement"},
		{"bobbin does not fit", []string{"model", "tube", "--placement", "bobbin", "--inner-radius", "7mm", "--outer-radius", "9mm", "--coil-length", "1.5mm", "--turns", "60", "--tube-od", "19.05mm", "--wall", "1.09mm", "--conductivity", "1MS/m", "--freq", "1kHz"}, "bobbin"},
		{"depth format", []string{"model", "depth-profile", "--inner-radius", "2mm", "--outer-radius", "3mm", "--coil-length", "2mm", "--turns", "200", "--liftoff", "0.2mm", "--freq", "50kHz", "--layer", "inf:1.4MS/m", "--format", "xml"}, "--format"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			code, _, errs := runCmd(t, tc.args...)
			if code != exitUsage || !strings.Contains(errs, tc.want) {
				t.Errorf("exit %d, stderr %q; want exit %d mentioning %q", code, errs, exitUsage, tc.want)
			}
		})
	}
}

// TestModelTube checks the bobbin JSON against the mpmath-confirmed value
// at 100 kHz (testdata/impedance/tube_ref.txt) and the differential fields.
func TestModelTube(t *testing.T) {
	t.Parallel()
	code, out, errs := runCmd(t, "model", "tube", "--placement", "bobbin", "--mode", "differential", "--coil-gap", "2.5mm",
		"--tube-od", "19.05mm", "--wall", "1.09mm", "--conductivity", "1MS/m", "--inner-radius", "7mm", "--outer-radius", "7.6mm",
		"--coil-length", "1.5mm", "--turns", "60", "--freq", "100kHz", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var o map[string]any
	if err := json.Unmarshal([]byte(out), &o); err != nil {
		t.Fatal(err)
	}
	dz := o["dz_ohm"].(map[string]any)
	// MODEL.md §3.3 bobbin in tube, 100 kHz: 8.4637999 − 16.515063j Ω (to 1e-5).
	if math.Abs(dz["re"].(float64)-8.4638)/8.4638 > 1e-5 || math.Abs(dz["im"].(float64)+16.51506)/16.51506 > 1e-5 {
		t.Errorf("ΔZ = %v, want ≈ 8.4638 − 16.5151j (MODEL.md §3.3)", dz)
	}
	for _, k := range []string{"mutual_l0_h", "mutual_dz_ohm", "differential_output_ohm", "normalized", "error_estimate"} {
		if _, ok := o[k]; !ok {
			t.Errorf("missing %q in %s", k, out)
		}
	}
	code, out, errs = runCmd(t, "model", "tube", "--placement", "encircling", "--tube-od", "19.05mm", "--wall", "solid",
		"--conductivity", "1MS/m", "--inner-radius", "10.5mm", "--outer-radius", "11.5mm", "--coil-length", "2mm", "--turns", "100", "--freq", "10kHz")
	if code != 0 || !strings.Contains(out, "Caution") {
		t.Fatalf("encircling rod: exit %d, %s %s", code, out, errs)
	}
}

// TestModelDepthProfile checks the CSV form: header, row count, surface
// row (1, 0°) and monotone decay.
func TestModelDepthProfile(t *testing.T) {
	t.Parallel()
	code, out, errs := runCmd(t, "model", "depth-profile", "--inner-radius", "2mm", "--outer-radius", "3mm", "--coil-length", "2mm",
		"--turns", "200", "--liftoff", "0.2mm", "--freq", "50kHz", "--layer", "inf:1.4MS/m", "--points", "11", "--format", "csv")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	recs, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil || len(recs) != 12 {
		t.Fatalf("want header + 11 rows, got %d (%v)", len(recs), err)
	}
	if recs[0][2] != "magnitude_rel" || recs[1][2] != "1" || recs[1][3] != "0" {
		t.Errorf("header/first row = %v / %v", recs[0], recs[1])
	}
	code, out, _ = runCmd(t, "model", "depth-profile", "--help")
	if code != 0 || !strings.Contains(out, "Examples:") {
		t.Errorf("--help: exit %d, %s", code, out)
	}
}

// FuzzParseLayerSpec checks that the --layer parser never panics and that
// every accepted layer is physically valid.
func FuzzParseLayerSpec(f *testing.F) {
	for _, s := range []string{"inf:17.4MS/m", "0.1mm:100%IACS", "inf:5MS/m:80", "1mm:0", "inf:30%IAC", "::", "inf", "-1mm:1MS/m", "1mm:1MS/m:0.5", "nan:1", "1e400mm:1"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		l, err := parseLayerSpec(s)
		if err != nil {
			return
		}
		if !(l.ThicknessM > 0) || !(l.ConductivitySPerM >= 0) || math.IsInf(l.ConductivitySPerM, 0) || !(l.RelPermeability >= 1) || math.IsInf(l.RelPermeability, 0) {
			t.Errorf("parseLayerSpec(%q) = %+v accepted an invalid layer", s, l)
		}
	})
}

// TestModelDepthProfileTube checks the tube-wall profile: one row per
// depth across the wall, relative magnitude decreasing and the phase lag
// increasing from the bore outwards for a bobbin coil (a damped wave
// entering the wall), and a depth beyond the wall refused.
func TestModelDepthProfileTube(t *testing.T) {
	t.Parallel()
	args := []string{"model", "depth-profile", "--placement", "bobbin", "--tube-od", "19.05mm", "--wall", "1.09mm",
		"--conductivity", "1MS/m", "--inner-radius", "7mm", "--outer-radius", "7.6mm", "--coil-length", "1.5mm",
		"--turns", "60", "--freq", "100kHz", "--points", "6", "--json"}
	code, out, errs := runCmd(t, args...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var rows []struct {
		DepthM float64 `json:"depth_m"`
		Mag    float64 `json:"magnitude_rel"`
		Lag    float64 `json:"phase_lag_deg"`
	}
	if err := json.Unmarshal([]byte(out), &rows); err != nil || len(rows) != 6 {
		t.Fatalf("want 6 rows, got %d (%v)", len(rows), err)
	}
	if math.Abs(rows[5].DepthM-1.09e-3) > 1e-12 {
		t.Errorf("last depth %g, want the wall 1.09e-3 m", rows[5].DepthM)
	}
	for i := 1; i < len(rows); i++ {
		if !(rows[i].Mag < rows[i-1].Mag) || !(rows[i].Lag > rows[i-1].Lag) {
			t.Errorf("row %d: |J|/|J0| %g, lag %g°; want decreasing magnitude and increasing lag", i, rows[i].Mag, rows[i].Lag)
		}
	}
	code, _, errs = runCmd(t, append(args, "--max-depth", "2mm")...)
	if code != exitUsage || !strings.Contains(errs, "wall") {
		t.Errorf("depth beyond the wall: exit %d, %q", code, errs)
	}
}
