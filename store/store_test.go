package store_test

import (
	"context"
	"database/sql"
	"errors"
	"path/filepath"
	"strings"
	"testing"

	"whorl/store"
	"whorl/store/storetest"
)

func build(t testing.TB) (*store.Store, string) {
	t.Helper()
	path := filepath.Join(t.TempDir(), "insp.whorl")
	s, err := storetest.Build(context.Background(), path, storetest.Clock(storetest.Epoch))
	if err != nil {
		t.Fatalf("storetest.Build: %v", err)
	}
	t.Cleanup(func() { s.Close() })
	return s, path
}

func TestBuildAndQuery(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	s, _ := build(t)
	res, err := s.Verify(ctx)
	if err != nil || !res.OK {
		t.Fatalf("Verify = %+v, %v; want OK", res, err)
	}
	insp, err := s.Inspection(ctx)
	if err != nil {
		t.Fatal(err)
	}
	if insp.Software != "Whorl" || insp.SoftwareVersion == "" || insp.CreatedBy != storetest.Lead.Name ||
		!insp.Created.Equal(storetest.Epoch) {
		t.Errorf("Inspection = %+v; want software Whorl, a version, creator %s at %v", insp, storetest.Lead.Name, storetest.Epoch)
	}
	comps, err := s.Components(ctx)
	if err != nil {
		t.Fatal(err)
	}
	want := map[string]store.ComponentStatus{"R1C1": store.StatusExamined, "R2C2": store.StatusNotExamined,
		"R3C1": store.StatusInvalidGroup, "R3C3": store.StatusInvalidGroup}
	for _, c := range comps {
		if w, ok := want[c.ID]; ok && c.Status != w {
			t.Errorf("component %s status %q, want %q", c.ID, c.Status, w)
		}
	}
	ind, err := s.Indication(ctx, "S-R1C2/1")
	if err != nil {
		t.Fatal(err)
	}
	if ind.CallVersion != 4 || !ind.Resolved || ind.Class != "flaw-like" || ind.CalledBy != storetest.Resolver.Name ||
		ind.Component != "R1C2" || ind.DepthPct == nil || *ind.DepthPct != 52 {
		t.Errorf("indication S-R1C2/1 = %+v; want call v4 resolved flaw-like by %s, depth 52", ind, storetest.Resolver.Name)
	}
	calls, err := s.Calls(ctx, "S-R1C2/1")
	if err != nil {
		t.Fatal(err)
	}
	// The original call and every amendment are kept.
	kinds := []store.CallKind{store.KindInitial, store.KindCall, store.KindCall, store.KindResolution}
	if len(calls) != len(kinds) {
		t.Fatalf("got %d calls, want %d", len(calls), len(kinds))
	}
	for i, c := range calls {
		if c.Kind != kinds[i] || c.Version != i+1 {
			t.Errorf("call %d: kind %q version %d; want %q version %d", i, c.Kind, c.Version, kinds[i], i+1)
		}
	}
	if calls[0].Class != "flaw-like" || calls[2].Class != "deposit" {
		t.Errorf("call classes %q, %q; want original flaw-like and amended deposit kept", calls[0].Class, calls[2].Class)
	}
	all, err := s.Indications(ctx, "")
	if err != nil {
		t.Fatal(err)
	}
	r1c2, err := s.Indications(ctx, "R1C2")
	if err != nil {
		t.Fatal(err)
	}
	if len(all) != 3 || len(r1c2) != 2 || r1c2[1].Status != store.CallRejected {
		t.Errorf("Indications: %d in all, %d on R1C2 (second %q); want 3, 2, rejected", len(all), len(r1c2), r1c2[1].Status)
	}
	cals, err := s.Calibrations(ctx)
	if err != nil || len(cals) != 1 || cals[0].Status != store.CalApproved || cals[0].Approver != storetest.Lead.Name {
		t.Errorf("Calibrations = %+v, %v; want CAL-A v1 approved by %s", cals, err, storetest.Lead.Name)
	}
	checks, err := s.GroupChecks(ctx)
	if err != nil || len(checks) != 2 || checks[1].Valid || strings.Join(checks[1].Retest, ",") != "R3C1,R3C2,R3C3" {
		t.Errorf("GroupChecks = %+v, %v; want G2 invalid with re-test R3C1,R3C2,R3C3", checks, err)
	}
	hist, err := s.History(ctx, "indication", "S-R1C2/1")
	if err != nil || len(hist) != 4 {
		t.Fatalf("History = %d events, %v; want 4", len(hist), err)
	}
	if string(hist[0].Before) != "null" || !strings.Contains(string(hist[2].Before), `"class":"flaw-like"`) ||
		!strings.Contains(string(hist[2].After), `"class":"deposit"`) || hist[2].Reason == "" {
		t.Errorf("history event 3: before %s, after %s, reason %q; want flaw-like→deposit with a reason", hist[2].Before, hist[2].After, hist[2].Reason)
	}
	for _, c := range []struct {
		id   string
		want bool
	}{{"R1C1", true}, {"R2C2", false}, {"R3C1", true}, {"nope", false}} {
		got, err := s.IsRecorded(ctx, c.id)
		if err != nil || got != c.want {
			t.Errorf("IsRecorded(%s) = %v, %v; want %v", c.id, got, err, c.want)
		}
	}
	rel, err := s.Releases(ctx)
	if err != nil || len(rel) != 1 || !strings.HasPrefix(rel[0].ReportID, "INS-2026-014-R1-") {
		t.Errorf("Releases = %+v, %v; want one INS-2026-014-R1-…", rel, err)
	}
}

func TestReopen(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	s, path := build(t)
	n1, h1, err := s.Head(ctx)
	if err != nil {
		t.Fatal(err)
	}
	s.Close()
	s2, err := store.Open(ctx, path)
	if err != nil {
		t.Fatalf("Open: %v", err)
	}
	defer s2.Close()
	n2, h2, err := s2.Head(ctx)
	if err != nil || n1 != n2 || h1 != h2 {
		t.Errorf("head after reopen %d %s, %v; want %d %s", n2, h2, err, n1, h1)
	}
	if _, err := store.Create(ctx, path, storetest.Inspection, storetest.Lead); err == nil {
		t.Errorf("Create over an existing record succeeded; want an error")
	}
	if _, err := store.Open(ctx, filepath.Join(t.TempDir(), "missing.whorl")); err == nil {
		t.Errorf("Open of a missing file succeeded; want an error")
	}
	other := filepath.Join(t.TempDir(), "other.db")
	db, err := sql.Open("sqlite", other)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := db.Exec("CREATE TABLE x (a)"); err != nil {
		t.Fatal(err)
	}
	db.Close()
	if _, err := store.Open(ctx, other); !errors.Is(err, store.ErrNotRecord) {
		t.Errorf("Open of a foreign SQLite file: %v; want ErrNotRecord", err)
	}
}

func TestTriggersRefuseUpdate(t *testing.T) {
	t.Parallel()
	_, path := build(t)
	db, err := sql.Open("sqlite", path)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	if _, err := db.Exec("UPDATE indications SET vpp_v = 9 WHERE ind_id = 'S-R1C2/1'"); err == nil ||
		!strings.Contains(err.Error(), "append-only") {
		t.Errorf("UPDATE through SQL: %v; want the append-only refusal", err)
	}
}

func TestBadInput(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	s, _ := build(t)
	an := s.As(storetest.ActorOf(storetest.Primary))
	lead := s.As(storetest.ActorOf(storetest.Lead))
	good := store.Indication{Channel: "F1", StartSample: 1, EndSample: 2, VppV: 1, Source: store.SourceAuto}
	tests := []struct {
		name string
		do   func() error
		want string
	}{
		{"NaN Vpp", func() error {
			d := good
			d.VppV = nan()
			_, err := an.AddIndications(ctx, "S-R1C1", []store.Indication{d})
			return err
		}, "Vpp is NaN"},
		{"empty window", func() error {
			d := good
			d.EndSample = 1
			_, err := an.AddIndications(ctx, "S-R1C1", []store.Indication{d})
			return err
		}, "window [1, 1) is empty"},
		{"unknown scan", func() error { _, err := an.AddIndications(ctx, "S-none", []store.Indication{good}); return err }, "not found"},
		{"unknown curve", func() error {
			d := good
			d.CurveID, d.CurveVersion = "CAL-A", 7
			_, err := an.AddIndications(ctx, "S-R1C1", []store.Indication{d})
			return err
		}, `calibration CAL-A version 7: not found`},
		{"NUL in comment", func() error {
			d := good
			d.Comment = "a\x00b"
			_, err := an.AddIndications(ctx, "S-R1C1", []store.Indication{d})
			return err
		}, "control character U+0000"},
		{"invalid UTF-8 name", func() error {
			return lead.AddPerson(ctx, store.Person{Name: "bad\xffname", Role: store.RoleQA})
		}, "invalid UTF-8"},
		{"no expiry", func() error {
			return lead.AddPerson(ctx, store.Person{Name: "New Person", Role: store.RoleLevel2})
		}, "expiry date is required"},
		{"bad sha", func() error {
			return s.As(storetest.ActorOf(storetest.Acquirer)).AddScan(ctx, store.Scan{ID: "x", Component: "R1C1", Path: "p", SHA256: "abc", CalGroup: "G1"})
		}, "not a lower-case hex SHA-256"},
		{"scan of unknown tube", func() error {
			return s.As(storetest.ActorOf(storetest.Acquirer)).AddScan(ctx, store.Scan{ID: "x", Component: "R9C9", Path: "p",
				SHA256: storetest.FakeSHA("x"), CalGroup: "G1"})
		}, "component R9C9: not found"},
		{"duplicate scan", func() error {
			return s.As(storetest.ActorOf(storetest.Acquirer)).AddScan(ctx, store.Scan{ID: "S-R1C1", Component: "R1C1", Path: "p",
				SHA256: storetest.FakeSHA("x"), CalGroup: "G1"})
		}, "already recorded"},
		{"call without reason", func() error {
			return an.Call(ctx, "S-R1C2/2", store.Decision{Status: store.CallAccepted}, " ")
		}, "a reason is required"},
		{"bad JSON body", func() error {
			_, err := an.RecordCalibration(ctx, store.Calibration{ID: "CAL-B", Body: []byte(`{"a":`)})
			return err
		}, "not valid JSON"},
		{"approve twice", func() error {
			return s.As(storetest.ActorOf(storetest.Resolver)).ApproveCalibration(ctx, "CAL-A", 1, "")
		}, "already approved"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			before, _, _ := s.Head(ctx)
			err := tc.do()
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %v; want one containing %q", err, tc.want)
			}
			if after, _, _ := s.Head(ctx); after != before {
				t.Errorf("head moved %d → %d on a failed action; want nothing written", before, after)
			}
		})
	}
}

// RecordExamination writes the component, the scan and its indications in
// one transaction: a refused or failing part leaves none of them.
func TestRecordExamination(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	s, _ := build(t)
	defer s.Close()
	an := s.As(storetest.ActorOf(storetest.Primary))
	sum := strings.Repeat("ab", 32)
	comp := &store.Component{ID: "R9C9", Row: 9, Column: 9}
	sc := store.Scan{ID: "S-R9C9", Component: "R9C9", Path: "scans/R9C9.csv", SizeBytes: 10, SHA256: sum, CalGroup: "G1"}
	bad := []store.Indication{{Channel: "F1-diff", StartSample: 5, EndSample: 1, Class: "flaw-like", Method: "pp"}}
	if _, err := an.RecordExamination(ctx, comp, sc, bad); err == nil {
		t.Fatal("RecordExamination with an inverted window: no error")
	}
	if _, err := s.Component(ctx, "R9C9"); err == nil {
		t.Error("a refused examination registered its component")
	}
	// A curve that is not recorded fails inside the transaction: nothing stays.
	unknown := []store.Indication{{Channel: "F1-diff", StartSample: 1, EndSample: 5, Class: "flaw-like", Method: "pp", CurveID: "NOPE", CurveVersion: 1}}
	if _, err := an.RecordExamination(ctx, comp, sc, unknown); err == nil {
		t.Fatal("RecordExamination with an unknown curve: no error")
	}
	if _, err := s.Component(ctx, "R9C9"); err == nil {
		t.Error("a failed examination registered its component")
	}
	ids, err := an.RecordExamination(ctx, comp, sc, []store.Indication{{Channel: "F1-diff", StartSample: 1, EndSample: 5, Class: "flaw-like", Method: "pp"}})
	if err != nil || len(ids) != 1 || ids[0] != "S-R9C9/1" {
		t.Fatalf("RecordExamination = %v, %v; want [S-R9C9/1]", ids, err)
	}
	if ok, err := s.IsRecorded(ctx, "R9C9"); !ok || err != nil {
		t.Errorf("IsRecorded(R9C9) = %v, %v; want true", ok, err)
	}
	// Levels I may not record an examination.
	if _, err := s.As(storetest.ActorOf(storetest.Acquirer)).RecordExamination(ctx, nil, store.Scan{ID: "S-X", Component: "R9C9", Path: "x.csv", SHA256: sum, CalGroup: "G1"}, nil); !errors.Is(err, store.ErrNotPermitted) {
		t.Errorf("level1 RecordExamination: %v, want ErrNotPermitted", err)
	}
	if vr, err := s.Verify(ctx); err != nil || !vr.OK {
		t.Errorf("Verify = %+v, %v", vr, err)
	}
}
