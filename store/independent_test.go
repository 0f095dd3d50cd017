package store_test

import (
	"context"
	"os/exec"
	"strings"
	"testing"

	"whorl/store"
	"whorl/store/storetest"
)

// TestIndependentVerifier checks a record with testdata/store/verify_record.py,
// a verifier written from docs/records.md in Python (sqlite3 and hashlib of
// the Debian python3; no code shared with this package): both must agree on
// the chain head of a good record and on the first bad event of a tampered one.
func TestIndependentVerifier(t *testing.T) {
	t.Parallel()
	const py = "/usr/bin/python3"
	if _, err := exec.LookPath(py); err != nil {
		t.Skip("/usr/bin/python3 not installed: independent verifier skipped")
	}
	ctx := context.Background()
	s, path := build(t)
	// Unusual but valid values: negative zero, large and tiny floats,
	// non-ASCII text, an unsized indication.
	if _, err := s.As(storetest.ActorOf(storetest.Primary)).AddIndications(ctx, "S-R1C1", []store.Indication{
		{Channel: "F1-abs", StartSample: 0, EndSample: 3, AxialM: negZero(), Location: "ΔTSP-1 µ ° Ω «x»", VppV: 1e300,
			PhaseRad: -3.141592653589793, Class: "analyst-review", Method: "none", Source: store.SourceAnalyst, Comment: "line 1\nline 2\ttab"},
		{Channel: "F1-abs", StartSample: 5, EndSample: 6, AxialM: 5e-324, VppV: 0, PhaseRad: 0, DepthPct: storetest.Depth(-0.0),
			Uncertainty: storetest.Depth(1.0 / 3), Source: store.SourceAuto},
	}); err != nil {
		t.Fatal(err)
	}
	res, err := s.Verify(ctx)
	if err != nil || !res.OK {
		t.Fatalf("Verify: %+v, %v", res, err)
	}
	out, err := exec.Command(py, "../testdata/store/verify_record.py", path).CombinedOutput()
	want := "ok " + itoa(res.Events) + " " + itoa(res.Rows) + " " + res.HeadHash
	if err != nil || strings.TrimSpace(string(out)) != want {
		t.Fatalf("verify_record.py: %q, %v; want %q", out, err, want)
	}
	if err := storetest.Tamper(path, "UPDATE indications SET axial_m = 0.5 WHERE ind_id = 'S-R1C1/1'"); err != nil {
		t.Fatal(err)
	}
	res, err = s.Verify(ctx)
	if err != nil || res.OK {
		t.Fatalf("Verify after tampering: %+v, %v", res, err)
	}
	out, _ = exec.Command(py, "../testdata/store/verify_record.py", path).CombinedOutput()
	if want := "bad " + itoa(res.Problem.Seq) + " indications"; !strings.HasPrefix(string(out), want) {
		t.Errorf("verify_record.py after tampering: %q; want prefix %q", out, want)
	}
}
