package workflow

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"whorl/internal/demodata"
	"whorl/store"
	"whorl/synth"
)

var testClock = func() time.Time { return time.Date(2026, 10, 20, 9, 0, 0, 0, time.UTC) }

// smallInspection writes a small generated inspection (two groups, the
// second drifting on its closing calibration) and returns its folder.
func smallInspection(t *testing.T, tubes int) (string, synth.Config) {
	t.Helper()
	cfg := synth.Demo()
	cfg.Tubes, cfg.Groups, cfg.DriftedGroup, cfg.Raw = tubes, 2, 1, 0
	dir := t.TempDir()
	if _, err := synth.Write(context.Background(), dir, cfg, nil); err != nil {
		t.Fatal(err)
	}
	return dir, cfg
}

func inspectOptions(t *testing.T, dir string, cfg synth.Config) InspectOptions {
	t.Helper()
	proc, err := demodata.Procedure("demo")
	if err != nil {
		t.Fatal(err)
	}
	g, err := synth.New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	std := g.Standard()
	return InspectOptions{
		Dir: dir, Procedure: proc, Standard: &std,
		DBPath:     filepath.Join(dir, "inspection.db"),
		Inspection: store.Inspection{ID: "INSP-TEST", Site: "test site", Component: cfg.Component, Procedure: proc.ID, ProcedureRev: proc.Revision, CodeEdition: proc.CodeEdition},
		Analyst:    DemoAnalyst, Reviewer: &DemoReviewer,
		Jobs: 2, Now: testClock,
	}
}

// A batch with corrupt files completes; the corrupt files are recorded as
// not examined with their errors; a second run records nothing twice.
func TestInspectBadFilesAndResume(t *testing.T) {
	t.Parallel()
	dir, cfg := smallInspection(t, 8)
	scans := filepath.Join(dir, ScansDir)
	good, err := listCSV(scans)
	if err != nil {
		t.Fatal(err)
	}
	// Three bad files: cut off mid-file, not a scan at all, and a number
	// that is not a number.
	b, err := os.ReadFile(good[0])
	if err != nil {
		t.Fatal(err)
	}
	bad := map[string]string{
		"R90C001.csv": string(b[:len(b)/2]),
		"R90C002.csv": "this is not a scan file\n",
		"R90C003.csv": strings.Replace(string(b), "\n0.", "\n0x.", 1),
		// A second copy of a good scan: the same component and start time.
		"R90C004.csv": string(b),
	}
	for name, body := range bad {
		if err := os.WriteFile(filepath.Join(scans, name), []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	opt := inspectOptions(t, dir, cfg)
	sum, err := Inspect(context.Background(), opt)
	if err != nil {
		t.Fatalf("Inspect: %v", err)
	}
	if sum.Examined != len(good) || len(sum.NotExamined) != len(bad) {
		t.Fatalf("examined %d, not examined %d (%+v); want %d and %d", sum.Examined, len(sum.NotExamined), sum.NotExamined, len(good), len(bad))
	}
	for _, n := range sum.NotExamined {
		if _, ok := bad[filepath.Base(n.File)]; !ok || n.Reason == "" {
			t.Errorf("not examined %+v: want one of the bad files, with a reason", n)
		}
		if filepath.Base(n.File) == "R90C004.csv" && !strings.Contains(n.Reason, "the same scan") {
			t.Errorf("duplicate file: reason %q, want it to name the same scan", n.Reason)
		}
	}
	// The failed closing check of the second group invalidates its tubes.
	if len(sum.InvalidGroups) != 1 || len(sum.Retest) == 0 {
		t.Errorf("invalid groups %v, re-test %v; want the drifted group and its tubes", sum.InvalidGroups, sum.Retest)
	}

	st, err := store.Open(context.Background(), opt.DBPath)
	if err != nil {
		t.Fatal(err)
	}
	events1, _ := st.Events(context.Background())
	st.Close()

	// Second run: everything good is skipped, nothing is recorded twice.
	sum2, err := Inspect(context.Background(), opt)
	if err != nil {
		t.Fatalf("second Inspect: %v", err)
	}
	if sum2.Examined != 0 || sum2.Skipped != len(good) {
		t.Errorf("second run examined %d, skipped %d; want 0 and %d", sum2.Examined, sum2.Skipped, len(good))
	}
	if sum2.Indications != sum.Indications {
		t.Errorf("indications after the second run %d, want %d (none recorded twice)", sum2.Indications, sum.Indications)
	}
	st, err = store.Open(context.Background(), opt.DBPath)
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	vr, err := st.Verify(context.Background())
	if err != nil || !vr.OK {
		t.Errorf("Verify after two runs = %+v, %v; want OK", vr, err)
	}
	events2, _ := st.Events(context.Background())
	// The re-run only retries the bad files (recorded as not examined again).
	if got, max := len(events2)-len(events1), 2*len(bad); got > max {
		t.Errorf("second run added %d events, want at most %d", got, max)
	}
}
