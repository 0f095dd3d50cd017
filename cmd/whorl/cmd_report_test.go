package main

import (
	"context"
	"math"
	"math/cmplx"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"whorl/acquire"
	"whorl/store"
	"whorl/store/storetest"
)

// TestReportSignals records a real scan file, draws the indication
// figures from it with --signals, and refuses a scan file changed since it
// was recorded.
func TestReportSignals(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	dir := t.TempDir()
	const n = 400
	sc := &acquire.Scan{Meta: acquire.Meta{Component: "R1C1", CalGroup: "G1"}, SampleRateHz: 1000, TimeS: make([]float64, n),
		Channels: []acquire.Channel{{Name: "F1-diff", FreqHz: 400e3, Mode: acquire.Differential, Samples: make([]complex128, n)}}}
	for i := range n {
		sc.TimeS[i] = float64(i) / 1000
		u := float64(i-200) / 20
		sc.Channels[0].Samples[i] = cmplx.Rect(math.Sin(u)*math.Exp(-u*u/4), 1.9)
	}
	if err := os.MkdirAll(filepath.Join(dir, "scans"), 0o755); err != nil {
		t.Fatal(err)
	}
	scanPath := filepath.Join(dir, "scans", "R1C1.csv")
	if err := acquire.WriteScanFile(scanPath, sc); err != nil {
		t.Fatal(err)
	}
	db := filepath.Join(dir, "insp.whorl")
	s, err := store.Create(ctx, db, storetest.Inspection, storetest.Lead)
	if err != nil {
		t.Fatal(err)
	}
	lead := s.As(storetest.ActorOf(storetest.Lead))
	if err := lead.AddPerson(ctx, storetest.Primary); err != nil {
		t.Fatal(err)
	}
	an := s.As(storetest.ActorOf(storetest.Primary))
	size, sum, err := store.FileDigest(scanPath)
	if err != nil {
		t.Fatal(err)
	}
	err = firstError(
		an.AddComponents(ctx, []store.Component{{ID: "R1C1", Row: 1, Column: 1}}),
		an.AddScan(ctx, store.Scan{ID: "S-R1C1", Component: "R1C1", Path: "scans/R1C1.csv", SizeBytes: size, SHA256: sum, CalGroup: "G1"}))
	if err != nil {
		t.Fatal(err)
	}
	if _, err := an.AddIndications(ctx, "S-R1C1", []store.Indication{{Channel: "F1-diff", StartSample: 180, EndSample: 220,
		AxialM: 0.2, Location: "TSP-1 +3 mm", VppV: 1.2, PhaseRad: 1.9, Class: "flaw-like", Method: "amplitude", Source: store.SourceAuto},
		{Channel: "MIX-1", StartSample: 180, EndSample: 220, VppV: 0.4, PhaseRad: 1, Class: "flaw-like", Method: "amplitude", Source: store.SourceAuto}}); err != nil {
		t.Fatal(err)
	}
	s.Close()

	pdf := filepath.Join(dir, "r.pdf")
	code, out, errs := runCmd(t, "report", "--db", db, "--signals", "--pdf", pdf)
	if code != exitOK || !strings.Contains(out, "(draft)") {
		t.Fatalf("report --signals: code %d, stdout %q, stderr %q", code, out, errs)
	}
	if exe, err := exec.LookPath("pdftotext"); err == nil {
		txt, err := exec.Command(exe, pdf, "-").Output()
		if err != nil {
			t.Fatal(err)
		}
		got := strings.Join(strings.Fields(string(txt)), " ")
		for _, want := range []string{"Signal: channel F1-diff as stored in scans/R1C1.csv (size and SHA-256 checked against the record)",
			"Figures not drawn: no calibration is recorded for the indication and scans/R1C1.csv has no channel MIX-1"} {
			if !strings.Contains(got, want) {
				t.Errorf("PDF text lacks %q", want)
			}
		}
	}
	// A changed scan file is refused.
	f, err := os.OpenFile(scanPath, os.O_APPEND|os.O_WRONLY, 0)
	if err != nil {
		t.Fatal(err)
	}
	f.WriteString("\n")
	f.Close()
	code, _, errs = runCmd(t, "report", "--db", db, "--signals", "--pdf", pdf)
	if code != exitData || !strings.Contains(errs, "does not match the record") {
		t.Errorf("report --signals with a changed scan: code %d, stderr %q; want %d", code, errs, exitData)
	}
}

func firstError(errs ...error) error {
	for _, e := range errs {
		if e != nil {
			return e
		}
	}
	return nil
}
