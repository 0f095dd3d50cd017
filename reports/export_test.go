package reports_test

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"flag"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"whorl/reports"
	"whorl/store"
	"whorl/store/storetest"
)

var update = flag.Bool("update", false, "rewrite the golden files under testdata/reports")

// goldenDir is the repository's testdata/reports; failures go to testdata/failed.
const goldenDir = "../testdata/reports"

// handBuilt is a report input written out in full, so that the golden
// files do not depend on the store's hashes or the build's version.
func handBuilt() *reports.Inspection {
	at := time.Date(2026, 11, 30, 10, 15, 0, 0, time.UTC)
	depth, unc := 41.5, 7.0
	return &reports.Inspection{
		ReportID:  "INS-9-R1-0a1b2c3d",
		Generated: time.Date(2026, 12, 1, 9, 30, 0, 0, time.UTC),
		Record: store.Inspection{ID: "INS-9", Site: "Test site", Component: "HX-9", Procedure: "WP-1", ProcedureRev: "A",
			Software: "Whorl", SoftwareVersion: "test", Created: at, CreatedBy: "lead-3a"},
		People: []store.Person{{Name: "lead-3a", Role: store.RoleLevel3, CertLevel: "ET Level III", CertExpiry: "2028-06-30", Version: 1, At: at, By: "lead-3a"}},
		Indications: []reports.Indication{
			{Indication: store.Indication{ID: "S-1/1", ScanID: "S-1", Component: "R1C1", Channel: "F1-diff", StartSample: 100, EndSample: 140,
				AxialM: 0.8125, Location: "TSP-2 +12.5 mm", VppV: 1.84, PhaseRad: 1.9198621771937625, DepthPct: &depth, Uncertainty: &unc,
				Class: "flaw-like", Method: "phase curve", Source: store.SourceAuto, CurveID: "CAL-A", CurveVersion: 1,
				Status: store.CallAccepted, Comment: `says "check", later`, CallVersion: 2, CalledBy: "analyst-2c",
				CalledRole: store.RoleLevel2, CalledAt: at}},
			{Indication: store.Indication{ID: "S-2/1", ScanID: "S-2", Component: "R1C2, hot leg", Channel: "MIX-1", StartSample: 5, EndSample: 9,
				AxialM: -0.25, Location: "TSH\n+310 mm", VppV: 0.3, PhaseRad: 0, Class: "analyst-review", Method: "none", Source: store.SourceAnalyst,
				Status: store.CallRejected, Comment: "multi\r\nline,\ttab and \u202eRTL\u202c", CallVersion: 1,
				CalledBy: "analyst-2k", CalledRole: store.RoleLevel2, CalledAt: at}},
		},
		Events: []store.Event{{Seq: 1, At: at, Actor: "lead-3a", Role: store.RoleLevel3, ItemKind: "inspection", ItemID: "INS-9",
			Action: "create", Before: json.RawMessage("null"), After: json.RawMessage(`{"id":"INS-9"}`), Table: "inspection", Row: 1,
			RowHash: strings.Repeat("a", 64), PrevHash: "", Hash: strings.Repeat("b", 64)}},
		Chain: store.VerifyResult{OK: true, Events: 1, Rows: 1, HeadSeq: 1, HeadHash: strings.Repeat("b", 64)},
	}
}

func golden(t *testing.T, name string, got []byte) {
	t.Helper()
	path := filepath.Join(goldenDir, name)
	if *update {
		if err := os.MkdirAll(goldenDir, 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, got, 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test -update to create it)", err)
	}
	if !bytes.Equal(got, want) {
		failed := filepath.Join("../testdata/failed", name)
		os.MkdirAll(filepath.Dir(failed), 0o755)
		os.WriteFile(failed, got, 0o644)
		t.Errorf("%s differs from the golden file; actual output written to %s", name, failed)
	}
}

func TestGolden(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name  string
		write func(*bytes.Buffer, *reports.Inspection) error
	}{
		{"indications.csv", func(b *bytes.Buffer, in *reports.Inspection) error { return reports.WriteIndicationsCSV(b, in) }},
		{"indications.json", func(b *bytes.Buffer, in *reports.Inspection) error { return reports.WriteIndicationsJSON(b, in) }},
		{"record.csv", func(b *bytes.Buffer, in *reports.Inspection) error { return reports.WriteRecordCSV(b, in) }},
		{"record.json", func(b *bytes.Buffer, in *reports.Inspection) error { return reports.WriteRecordJSON(b, in) }},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			var b bytes.Buffer
			if err := tc.write(&b, handBuilt()); err != nil {
				t.Fatal(err)
			}
			golden(t, tc.name, b.Bytes())
		})
	}
}

func TestCSVColumns(t *testing.T) {
	t.Parallel()
	var b bytes.Buffer
	in := handBuilt()
	if err := reports.WriteIndicationsCSV(&b, in); err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(&b).ReadAll()
	if err != nil {
		t.Fatalf("re-reading the CSV: %v", err)
	}
	if len(recs) != 3 || strings.Join(recs[0], ",") != strings.Join(reports.IndicationColumns, ",") {
		t.Fatalf("CSV has %d records, header %q; want 3 and %q", len(recs), recs[0], reports.IndicationColumns)
	}
	col := map[string]int{}
	for i, c := range recs[0] {
		col[c] = i
	}
	// phase_deg = phase_rad·180/π; 1.9198621771937625 rad is 110° (closed form).
	if got := recs[1][col["phase_deg"]]; got != "110" {
		t.Errorf("phase_deg = %q; want 110", got)
	}
	if got := recs[2][col["component"]]; got != "R1C2, hot leg" {
		t.Errorf("component with a comma re-read as %q", got)
	}
	if got := recs[2][col["comment"]]; got != "multi\nline,\ttab and \u202eRTL\u202c" {
		t.Errorf("comment re-read as %q; want CR LF written as LF and the rest unchanged", got)
	}
	if got := recs[2][col["depth_pct"]]; got != "" {
		t.Errorf("depth_pct of an unsized indication = %q; want empty", got)
	}
}

// TestDeterminism builds the same record twice with the same clock and
// checks that every export is byte-identical and the PDF text is the same.
func TestDeterminism(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	var outs [2]map[string][]byte
	for i := range outs {
		s, err := storetest.Build(ctx, filepath.Join(t.TempDir(), "d.whorl"), storetest.Clock(storetest.Epoch))
		if err != nil {
			t.Fatal(err)
		}
		in, err := reports.FromStore(ctx, s, reports.Options{Now: func() time.Time { return generated }, Window: syntheticWindow})
		s.Close()
		if err != nil {
			t.Fatal(err)
		}
		outs[i] = map[string][]byte{}
		for name, w := range map[string]func(*bytes.Buffer, *reports.Inspection) error{
			"indications.csv":  func(b *bytes.Buffer, in *reports.Inspection) error { return reports.WriteIndicationsCSV(b, in) },
			"indications.json": func(b *bytes.Buffer, in *reports.Inspection) error { return reports.WriteIndicationsJSON(b, in) },
			"record.csv":       func(b *bytes.Buffer, in *reports.Inspection) error { return reports.WriteRecordCSV(b, in) },
			"record.json":      func(b *bytes.Buffer, in *reports.Inspection) error { return reports.WriteRecordJSON(b, in) },
		} {
			var b bytes.Buffer
			if err := w(&b, in); err != nil {
				t.Fatal(err)
			}
			outs[i][name] = b.Bytes()
		}
		outs[i]["pdf text"] = []byte(strings.Join(pdfToText(t, writePDF(t, in)), "\f"))
	}
	for name, a := range outs[0] {
		if !bytes.Equal(a, outs[1][name]) {
			t.Errorf("%s differs between two builds of the same record with the same clock", name)
		}
	}
}
