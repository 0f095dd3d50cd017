package workflow

import (
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"whorl/store"
	"whorl/store/storetest"
)

// The whole pipeline on a small generated inspection: generation,
// calibration, analysis, record, report, verification, and the indications
// scored against the generator's ground truth with the acceptance targets
// (every flaw of 40 %TW or deeper found, OD sizing mean absolute error at
// most 5 %TW, at most one false call per 10 tubes, no support called a
// flaw). A tampered copy of the record fails verification.
func TestDemoEndToEnd(t *testing.T) {
	if testing.Short() {
		t.Skip("runs the whole demo pipeline on 48 tubes")
	}
	t.Parallel()
	out := filepath.Join(t.TempDir(), "demo")
	sum, err := Demo(context.Background(), DemoOptions{Out: out, Set: "demo", Tubes: 48, Jobs: 2, Now: testClock})
	if err != nil {
		t.Fatalf("Demo: %v", err)
	}
	a := sum.Accuracy
	if !a.Pass {
		t.Errorf("accuracy against the ground truth: found %d of %d (≥ %.0f %%TW), MAE %.2f %%TW over %d, %.2f false calls per 10 tubes, %d support calls; want every target met",
			a.Detected, a.ToDetect, a.DetectMinPct, a.MAEPct, a.Sized, a.FalseCallsPer10, a.SupportCalls)
	}
	if a.ToDetect == 0 || a.Sized == 0 {
		t.Errorf("the small inspection holds %d flaws to detect and %d to size; the test needs some of each", a.ToDetect, a.Sized)
	}
	if sum.Inspection.Examined != 48 || len(sum.Inspection.NotExamined) != 0 {
		t.Errorf("examined %d, not examined %v; want 48 and none", sum.Inspection.Examined, sum.Inspection.NotExamined)
	}
	if len(sum.Inspection.InvalidGroups) != 1 {
		t.Errorf("invalid groups %v; want the one drifted by design", sum.Inspection.InvalidGroups)
	}
	if !sum.Verify.OK || sum.Reports.Draft {
		t.Errorf("verify %+v, draft %v; want a verified record and a released report", sum.Verify, sum.Reports.Draft)
	}
	for _, p := range []string{sum.Reports.PDF, sum.Reports.IndicationsCSV, sum.Reports.IndicationsJSON, sum.Reports.RecordCSV, sum.Reports.RecordJSON,
		filepath.Join(out, "accuracy.json"), filepath.Join(out, "data", "procedure.json")} {
		if fi, err := os.Stat(p); err != nil || fi.Size() == 0 {
			t.Errorf("%s: %v; want a non-empty file", p, err)
		}
	}
	// The report carries the caution, its id on every page and a marked end.
	if exe, err := exec.LookPath("pdftotext"); err == nil {
		b, err := exec.Command(exe, sum.Reports.PDF, "-").Output()
		if err != nil {
			t.Fatal(err)
		}
		txt := strings.Join(strings.Fields(string(b)), " ")
		for _, want := range []string{"qualified, certified personnel", "End of report " + sum.Reports.ReportID, "page 1 of"} {
			if !strings.Contains(txt, want) {
				t.Errorf("report text lacks %q", want)
			}
		}
		if pages := strings.Count(string(b), "\f"); strings.Count(txt, "Report "+sum.Reports.ReportID) < pages {
			t.Errorf("the report id is on fewer than all %d pages", pages)
		}
	} else {
		t.Log("pdftotext not found (Debian poppler-utils): report text not checked")
	}

	// A changed value in a copy of the record is found.
	db := filepath.Join(out, "inspection.db")
	b, err := os.ReadFile(db)
	if err != nil {
		t.Fatal(err)
	}
	bad := filepath.Join(t.TempDir(), "tampered.db")
	if err := os.WriteFile(bad, b, 0o644); err != nil {
		t.Fatal(err)
	}
	if err := storetest.Tamper(bad, "UPDATE indications SET vpp_v = vpp_v * 1.01 WHERE seq = (SELECT min(seq) FROM indications)"); err != nil {
		t.Fatal(err)
	}
	st, err := store.Open(context.Background(), bad)
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	if vr, err := st.Verify(context.Background()); err != nil || vr.OK || vr.Problem == nil {
		t.Errorf("Verify of a tampered record = %+v, %v; want the first bad event named", vr, err)
	}
}
