package reports_test

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"whorl/reports"
	"whorl/store"
	"whorl/store/storetest"
)

// writers pairs each writer of a whole Inspection with its streaming
// counterpart on a Report.
var writers = []struct {
	name string
	mem  func(io.Writer, *reports.Inspection) error
	rep  func(*reports.Report, context.Context, io.Writer) error
}{
	{"pdf", reports.WritePDF, (*reports.Report).WritePDF},
	{"indications-csv", reports.WriteIndicationsCSV, (*reports.Report).WriteIndicationsCSV},
	{"record-csv", reports.WriteRecordCSV, (*reports.Report).WriteRecordCSV},
	{"indications-json", reports.WriteIndicationsJSON, (*reports.Report).WriteIndicationsJSON},
	{"record-json", reports.WriteRecordJSON, (*reports.Report).WriteRecordJSON},
}

// TestReportMatchesFromStore checks that the streaming report writes the
// same bytes as the writers of the Inspection FromStore builds, on the
// store fixture (with and without signal windows and reporting criteria)
// and on a record with no indication.
func TestReportMatchesFromStore(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	full, _ := fixture(t)
	empty, err := store.Create(ctx, filepath.Join(t.TempDir(), "e.whorl"), storetest.Inspection, storetest.Lead,
		store.WithClock(storetest.Clock(storetest.Epoch)))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { empty.Close() })
	now := func() time.Time { return generated }
	sizedOnly := func(d store.Indication) string {
		if d.DepthPct == nil {
			return "not sized"
		}
		return ""
	}
	for _, tc := range []struct {
		name string
		s    *store.Store
		opt  reports.Options
	}{
		{"fixture", full, reports.Options{Now: now}},
		{"fixture with windows", full, reports.Options{Now: now, Window: syntheticWindow}},
		{"fixture with criteria", full, reports.Options{Now: now, Window: syntheticWindow, Exclude: sizedOnly}},
		{"empty record", empty, reports.Options{Now: now}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			in, err := reports.FromStore(ctx, tc.s, tc.opt)
			if err != nil {
				t.Fatalf("FromStore: %v", err)
			}
			r, err := reports.Open(ctx, tc.s, tc.opt)
			if err != nil {
				t.Fatalf("Open: %v", err)
			}
			n := 0
			for i := range in.Indications {
				if in.Indications[i].Reportable() {
					n++
				}
			}
			if r.Total != len(in.Indications) || r.Reportable() != n {
				t.Errorf("Open counts %d indications, %d reportable; FromStore has %d, %d", r.Total, r.Reportable(), len(in.Indications), n)
			}
			if r.ReportID != in.ReportID || r.Draft != in.Draft {
				t.Errorf("Open: report %s draft %v; FromStore: %s draft %v", r.ReportID, r.Draft, in.ReportID, in.Draft)
			}
			for _, w := range writers {
				var want, got bytes.Buffer
				if err := w.mem(&want, in); err != nil {
					t.Fatalf("%s from FromStore: %v", w.name, err)
				}
				if err := w.rep(r, ctx, &got); err != nil {
					t.Fatalf("%s from Open: %v", w.name, err)
				}
				if !bytes.Equal(got.Bytes(), want.Bytes()) {
					t.Errorf("%s: streaming output (%d bytes) differs from FromStore's (%d bytes)", w.name, got.Len(), want.Len())
				}
			}
		})
	}
}

// TestReportLoadsWindowsWhenDrawn checks that Open loads no signal
// window and that the PDF loads each reportable indication's once.
func TestReportLoadsWindowsWhenDrawn(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	s, _ := fixture(t)
	loaded := map[string]int{}
	r, err := reports.Open(ctx, s, reports.Options{Now: func() time.Time { return generated },
		Window: func(ctx context.Context, d store.Indication) (*reports.Window, error) {
			loaded[d.ID]++
			return syntheticWindow(ctx, d)
		}})
	if err != nil {
		t.Fatalf("Open: %v", err)
	}
	if len(loaded) != 0 {
		t.Errorf("Open loaded windows %v; want none before the PDF is drawn", loaded)
	}
	if err := r.WritePDF(ctx, io.Discard); err != nil {
		t.Fatalf("WritePDF: %v", err)
	}
	if len(loaded) != r.Reportable() || r.Reportable() == 0 {
		t.Errorf("WritePDF loaded windows %v; want one each for the %d reportable indications", loaded, r.Reportable())
	}
	for _, d := range r.Indications {
		if loaded[d.ID] != 1 || d.Window != nil {
			t.Errorf("indication %s: window loaded %d times, kept %v; want once, not kept", d.ID, loaded[d.ID], d.Window != nil)
		}
	}
}

func TestOpenRefusesTampered(t *testing.T) {
	t.Parallel()
	s, _ := fixture(t)
	if err := storetest.Tamper(s.Path(), "UPDATE indications SET vpp_v = 0.1 WHERE ind_id = 'S-R1C2/1'"); err != nil {
		t.Fatal(err)
	}
	_, err := reports.Open(context.Background(), s, reports.Options{})
	if !errors.Is(err, store.ErrTampered) {
		t.Errorf("Open on a tampered record: %v; want an error wrapping store.ErrTampered", err)
	}
}

// TestReportWindowError checks that a signal window that cannot be loaded
// fails the PDF, naming the indication, and leaves the exports alone.
func TestReportWindowError(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	s, _ := fixture(t)
	bad := errors.New("scan file unreadable")
	r, err := reports.Open(ctx, s, reports.Options{Now: func() time.Time { return generated },
		Window: func(context.Context, store.Indication) (*reports.Window, error) { return nil, bad }})
	if err != nil {
		t.Fatalf("Open: %v", err)
	}
	if r.Reportable() == 0 {
		t.Fatal("fixture has no reportable indication")
	}
	err = r.WritePDF(ctx, io.Discard)
	if !errors.Is(err, bad) || !strings.Contains(err.Error(), r.Indications[0].ID) {
		t.Errorf("WritePDF with a failing window: %v; want an error wrapping %q naming %s", err, bad, r.Indications[0].ID)
	}
	var we *reports.WindowError
	if !errors.As(err, &we) || we.Indication != r.Indications[0].ID {
		t.Errorf("WritePDF with a failing window: %v; want a *reports.WindowError for %s", err, r.Indications[0].ID)
	}
	if err := r.WriteIndicationsCSV(ctx, io.Discard); err != nil {
		t.Errorf("WriteIndicationsCSV: %v", err)
	}
}

// BenchmarkReportExports writes the four exports of a record of 10,000
// indications from the store (Report: streamed a batch at a time).
func BenchmarkReportExports(b *testing.B) {
	ctx := context.Background()
	s, err := storetest.Build(ctx, filepath.Join(b.TempDir(), "b.whorl"), storetest.Clock(storetest.Epoch))
	if err != nil {
		b.Fatal(err)
	}
	defer s.Close()
	inds := make([]store.Indication, 10000)
	for i := range inds {
		inds[i] = store.Indication{Channel: "F1-diff", StartSample: 10 * i, EndSample: 10*i + 8, AxialM: 0.001 * float64(i),
			Location: fmt.Sprintf("TSP-%d +%d mm", i%9, i%100), VppV: 0.1 + 1e-4*float64(i), PhaseRad: 1.5,
			DepthPct: storetest.Depth(float64(i % 100)), Class: "flaw-like", Method: "phase curve", Source: store.SourceAuto}
	}
	if _, err := s.As(storetest.ActorOf(storetest.Primary)).AddIndications(ctx, "S-R1C1", inds); err != nil {
		b.Fatal(err)
	}
	r, err := reports.Open(ctx, s, reports.Options{Now: func() time.Time { return generated },
		Exclude: func(store.Indication) string { return "below the reporting threshold" }})
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		for _, w := range writers[1:] {
			if err := w.rep(r, ctx, io.Discard); err != nil {
				b.Fatal(err)
			}
		}
	}
}
