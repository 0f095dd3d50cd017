package reports_test

import (
	"bytes"
	"context"
	"math"
	_ "modernc.org/sqlite"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"whorl/reports"
	"whorl/store"
	"whorl/store/storetest"
)

// generated is the fixed report time of the tests.
var generated = time.Date(2026, 12, 1, 9, 30, 0, 0, time.UTC)

// syntheticWindow draws a differential-probe-like loop around the
// indication: a two-lobe figure along the indication's phase, with a
// small lift-off drift, over 3× the measurement window.
func syntheticWindow(_ context.Context, d store.Indication) (*reports.Window, error) {
	n := d.EndSample - d.StartSample
	first := d.StartSample - n
	w := &reports.Window{Channel: d.Channel, FirstSample: first, X: make([]float64, 3*n), Y: make([]float64, 3*n)}
	for i := range w.X {
		s := float64(first + i)
		u := (s - float64(d.StartSample)) / float64(n) // 0..1 over the measurement window
		a := 0.0
		if u >= 0 && u < 1 {
			a = 0.5 * d.VppV * math.Sin(2*math.Pi*u)
		}
		w.X[i] = a*math.Cos(d.PhaseRad) + 0.002*float64(i)
		w.Y[i] = a*math.Sin(d.PhaseRad) + 0.05*a*math.Cos(math.Pi*u)
	}
	return w, nil
}

func fixture(t testing.TB) (*store.Store, *reports.Inspection) {
	t.Helper()
	ctx := context.Background()
	s, err := storetest.Build(ctx, filepath.Join(t.TempDir(), "r.whorl"), storetest.Clock(storetest.Epoch))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { s.Close() })
	in, err := reports.FromStore(ctx, s, reports.Options{Now: func() time.Time { return generated }, Window: syntheticWindow})
	if err != nil {
		t.Fatalf("FromStore: %v", err)
	}
	return s, in
}

// pdfToText extracts the text of a PDF with pdftotext (poppler-utils),
// one string per page; it skips the test when pdftotext is absent.
func pdfToText(t *testing.T, pdf []byte) []string {
	t.Helper()
	exe, err := exec.LookPath("pdftotext")
	if err != nil {
		t.Skip("pdftotext (poppler-utils) not installed: PDF text checks skipped")
	}
	dir := t.TempDir()
	in := filepath.Join(dir, "r.pdf")
	if err := os.WriteFile(in, pdf, 0o644); err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command(exe, "-layout", "-enc", "UTF-8", in, "-").Output()
	if err != nil {
		t.Fatalf("pdftotext: %v", err)
	}
	pages := strings.Split(string(out), "\f")
	if n := len(pages); n > 0 && strings.TrimSpace(pages[n-1]) == "" {
		pages = pages[:n-1]
	}
	return pages
}

func writePDF(t testing.TB, in *reports.Inspection) []byte {
	t.Helper()
	var b bytes.Buffer
	if err := reports.WritePDF(&b, in); err != nil {
		t.Fatalf("WritePDF: %v", err)
	}
	return b.Bytes()
}

func nan() float64 { return math.NaN() }
