package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

const demoProc = "../../internal/demodata/demo-procedure.json"

// demoSet writes a small demo inspection: 8 tubes in 2 groups, the second
// closing with a drifted calibration (synth.Demo's drift, 9° and 12 %).
func demoSet(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	code, _, errs := runCmd(t, "synth", "--tubes", "8", "--groups", "2", "--drifted-group", "1", "--raw", "0", dir)
	if code != exitOK {
		t.Fatalf("synth: exit %d: %s", code, errs)
	}
	return dir
}

func TestCalibrateAndAnalyzeCommands(t *testing.T) {
	t.Parallel()
	dir := demoSet(t)
	out := t.TempDir()
	p := func(parts ...string) string { return filepath.Join(append([]string{dir}, parts...)...) }
	cal1, cal2 := filepath.Join(out, "cal1.json"), filepath.Join(out, "cal2.json")
	png := filepath.Join(out, "curves.png")

	code, stdout, stderr := runCmd(t, "calibrate", "--standard", p("standard.json"), "--procedure", demoProc, "--builder", "analyst-2a",
		"--closing", p("calibration", "CG01-close.csv"), "--scans", p("scans"), "-o", cal1, "--plot", png, p("calibration", "CG01-open.csv"))
	if code != exitOK {
		t.Fatalf("calibrate CG01: exit %d\n%s%s", code, stdout, stderr)
	}
	for _, want := range []string{"Located flaws", "FBH-20x4", "TWH at 40°", "40.00", "phase-od (sizing)", "leave-one-out", "Closing check of group CG01: VALID", "Caution"} {
		if !strings.Contains(stdout, want) {
			t.Errorf("calibrate output lacks %q:\n%s", want, stdout)
		}
	}
	if st, err := os.Stat(png); err != nil || st.Size() < 1000 {
		t.Errorf("curve plot: %v", err)
	}

	// The drifted group: the check fails (exit 4), its tubes are listed.
	code, stdout, stderr = runCmd(t, "calibrate", "--standard", p("standard.json"), "--procedure", demoProc, "--builder", "analyst-2a",
		"--closing", p("calibration", "CG02-close.csv"), "--scans", p("scans"), "--group-out", filepath.Join(out, "cg02.json"), "-o", cal2, p("calibration", "CG02-open.csv"))
	if code != exitCheck {
		t.Fatalf("calibrate CG02 (drifted): exit %d, want %d\n%s%s", code, exitCheck, stdout, stderr)
	}
	if !strings.Contains(stdout, "INVALID") || !strings.Contains(stdout, "re-test list (4)") || !strings.Contains(stderr, "closing calibration check of group CG02 failed") {
		t.Errorf("drifted group output:\n%s\nstderr %s", stdout, stderr)
	}
	if _, err := os.Stat(cal2); err != nil {
		t.Errorf("calibration not written although the check failed: %v", err)
	}
	var grp struct {
		Status string   `json:"status"`
		Retest []string `json:"retest"`
	}
	if b, err := os.ReadFile(filepath.Join(out, "cg02.json")); err != nil || json.Unmarshal(b, &grp) != nil || grp.Status != "invalid" || len(grp.Retest) != 4 {
		t.Errorf("group record: %v %+v", err, grp)
	}

	// Analyse all scans with both calibrations (chosen by group); score.
	csvPath := filepath.Join(out, "ind.csv")
	code, stdout, stderr = runCmd(t, "analyze", "--calibration", cal1, "--calibration", cal2, "--procedure", demoProc,
		"--csv", csvPath, "--truth", p("truth.csv"), "--manifest", p("manifest.json"), p("scans"))
	if code != exitOK && code != exitCheck {
		t.Fatalf("analyze: exit %d\n%s%s", code, stdout, stderr)
	}
	for _, want := range []string{"8 scans", "Accuracy against ground truth (8 tubes)", "false calls", "not approved", "Caution"} {
		if !strings.Contains(stdout, want) {
			t.Errorf("analyze output lacks %q:\n%s", want, stdout)
		}
	}
	b, err := os.ReadFile(csvPath)
	if err != nil || !strings.HasPrefix(string(b), "component,channel,window_start") {
		t.Errorf("indication CSV: %v %.80q", err, b)
	}
	code, stdout, _ = runCmd(t, "analyze", "--calibration", cal1, "--procedure", demoProc, "--json", p("scans", "R01C002.csv"))
	var doc struct {
		Indications []map[string]any `json:"indications"`
		Reports     []map[string]any `json:"reports"`
	}
	if code != exitOK || json.Unmarshal([]byte(stdout), &doc) != nil || len(doc.Reports) != 1 {
		t.Errorf("analyze --json: exit %d, output %.200s", code, stdout)
	}

	// Approval: the builder may not approve, nor a Level II; a Level III may.
	v2 := filepath.Join(out, "cal1-v2.json")
	for _, c := range []struct {
		person, role string
		want         int
	}{{"analyst-2a", "level3", exitRefused}, {"reviewer-3c", "level2", exitRefused}, {"reviewer-3c", "level3", exitOK}} {
		code, stdout, stderr = runCmd(t, "calibrate", "approve", "--person", c.person, "--role", c.role, "-o", v2, cal1)
		if code != c.want {
			t.Errorf("approve by %s (%s): exit %d, want %d\n%s%s", c.person, c.role, code, c.want, stdout, stderr)
		}
	}
	if !strings.Contains(stdout, "version 2") {
		t.Errorf("approval output: %s", stdout)
	}
	// A tampered calibration is refused.
	b, _ = os.ReadFile(v2)
	bad := filepath.Join(out, "bad.json")
	os.WriteFile(bad, []byte(strings.Replace(string(b), `"status": "approved"`, `"status": "draft"`, 1)), 0o644)
	code, _, stderr = runCmd(t, "analyze", "--calibration", bad, "--procedure", demoProc, p("scans", "R01C002.csv"))
	if code != exitData || !strings.Contains(stderr, "hash") {
		t.Errorf("tampered calibration: exit %d, stderr %s", code, stderr)
	}
}

func TestCalibrateCommandErrors(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	badProc := filepath.Join(dir, "p.json")
	os.WriteFile(badProc, []byte(`{"id": "X", "revision": "1", "code_edition": "c", "channels": []}`), 0o644)
	std := "../../testdata/calibrate/example-standard.json"
	for _, c := range []struct {
		args []string
		code int
		want string
	}{
		{[]string{"calibrate", "x.csv"}, exitUsage, "--standard is required"},
		{[]string{"calibrate", "--standard", std, "--procedure", demoProc, "x.csv"}, exitUsage, "-o is required"},
		{[]string{"calibrate", "--standard", std, "--procedure", badProc, "-o", filepath.Join(dir, "c.json"), "x.csv"}, exitData, "channels: empty"},
		{[]string{"calibrate", "--standard", std, "--procedure", demoProc, "-o", filepath.Join(dir, "c.json"), filepath.Join(dir, "none.csv")}, exitData, "none.csv"},
		{[]string{"analyze", "--procedure", demoProc, "x.csv"}, exitUsage, "--calibration is required"},
	} {
		code, _, stderr := runCmd(t, c.args...)
		if code != c.code || !strings.Contains(stderr, c.want) {
			t.Errorf("%v: exit %d (want %d), stderr %q (want %q)", c.args, code, c.code, stderr, c.want)
		}
	}
}
