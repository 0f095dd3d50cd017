package main

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"whorl/store/storetest"
)

// runCmdEnv runs the command line in-process with the given environment.
func runCmdEnv(t *testing.T, vars map[string]string, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	e := &env{
		stdin:  strings.NewReader(""),
		stdout: &out,
		stderr: &errb,
		now:    func() time.Time { return time.Date(2026, 12, 1, 9, 0, 0, 0, time.UTC) },
		getenv: func(k string) string { return vars[k] },
	}
	code := run(context.Background(), e, args)
	return code, out.String(), errb.String()
}

// record builds the fixture record in a fresh directory and returns its path.
func record(t *testing.T) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), "insp.whorl")
	s, err := storetest.Build(context.Background(), path, storetest.Clock(storetest.Epoch))
	if err != nil {
		t.Fatal(err)
	}
	s.Close()
	return path
}

func TestRecordsCommands(t *testing.T) {
	t.Parallel()
	db := record(t)
	tests := []struct {
		name     string
		args     []string
		code     int
		inStdout []string
		inStderr string
	}{
		{"list", []string{"records", "list", db}, exitOK, []string{"indication   S-R1C2/1", "items, 51 events"}, ""},
		{"list kind json", []string{"records", "list", "--kind", "calibration", "--json", db}, exitOK, []string{`"id": "CAL-A"`, `"events": 2`}, ""},
		{"show indication", []string{"records", "show", db, "indication:S-R1C2/1"}, exitOK, []string{`"kind": "resolution"`, `"resolved": true`}, ""},
		{"show bare id", []string{"records", "show", db, "R2C2"}, exitOK, []string{"component R2C2", `"status": "not-examined"`}, ""},
		{"show person json", []string{"records", "show", "--json", db, "person:reviewer-3b"}, exitOK, []string{`"role": "level3"`}, ""},
		{"show missing", []string{"records", "show", db, "indication:nope"}, exitData, nil, `no indication "nope"`},
		{"history", []string{"records", "history", db, "S-R1C2/1"}, exitOK,
			[]string{"4 events", "analyst-2k (level2)", `class: "flaw-like" → "deposit"`, "reason: signal shape matches the flat-bottom-hole reference"}, ""},
		{"verify", []string{"records", "verify", db}, exitOK, []string{"verifies: 51 events"}, ""},
		{"verify json", []string{"records", "verify", "--json", db}, exitOK, []string{`"ok": true`}, ""},
		{"verify missing file", []string{"records", "verify", filepath.Join(t.TempDir(), "none.whorl")}, exitData, nil, "no such file"},
		{"wrong args", []string{"records", "verify"}, exitUsage, nil, "want one record file"},
		{"help", []string{"records", "history", "--help"}, exitOK, []string{"Examples:"}, ""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			code, out, errs := runCmd(t, tc.args...)
			if code != tc.code || !strings.Contains(errs, tc.inStderr) {
				t.Fatalf("whorl %q: code %d, stderr %q; want %d and stderr containing %q\nstdout: %s", tc.args, code, errs, tc.code, tc.inStderr, out)
			}
			for _, want := range tc.inStdout {
				if !strings.Contains(out, want) {
					t.Errorf("whorl %q: stdout lacks %q:\n%s", tc.args, want, out)
				}
			}
		})
	}
}

func TestRecordsVerifyTampered(t *testing.T) {
	t.Parallel()
	db := record(t)
	if err := storetest.Tamper(db, "UPDATE calls SET class = 'noise' WHERE class = 'deposit'"); err != nil {
		t.Fatal(err)
	}
	code, out, errs := runCmd(t, "records", "verify", db)
	if code != exitCheck || !strings.Contains(errs, "event 43") || !strings.Contains(errs, "row calls/") {
		t.Errorf("verify of a tampered record: code %d, stdout %q, stderr %q; want %d naming event 43 and its calls row", code, out, errs, exitCheck)
	}
	good := record(t)
	code, out, _ = runCmd(t, "records", "verify", "--json", good)
	var res struct {
		HeadSeq  int64  `json:"head_seq"`
		HeadHash string `json:"head_hash"`
	}
	if err := json.Unmarshal([]byte(out), &res); err != nil || res.HeadSeq != 51 {
		t.Fatalf("verify --json: %q, %v", out, err)
	}
	anchor := fmt.Sprintf("%d:%s", res.HeadSeq, res.HeadHash)
	if code, _, errs := runCmd(t, "records", "verify", "--anchor", anchor, good); code != exitOK {
		t.Errorf("verify --anchor on the same record: code %d, stderr %q", code, errs)
	}
	// Cutting off the newest event with its row leaves a chain that verifies
	// on its own; the anchor shows the cut.
	if err := storetest.Tamper(good, "DELETE FROM releases", "DELETE FROM events WHERE seq = 51"); err != nil {
		t.Fatal(err)
	}
	if code, _, _ := runCmd(t, "records", "verify", good); code != exitOK {
		t.Errorf("verify of a cut record without anchor: code %d; want %d (the chain alone cannot show it)", code, exitOK)
	}
	if code, _, errs := runCmd(t, "records", "verify", "--anchor", anchor, good); code != exitCheck || !strings.Contains(errs, "event 51") {
		t.Errorf("verify --anchor of a cut record: code %d, stderr %q; want %d naming event 51", code, errs, exitCheck)
	}
	code, _, errs = runCmd(t, "report", "--db", db, "--csv", filepath.Join(t.TempDir(), "x.csv"))
	if code != exitCheck || !strings.Contains(errs, "does not verify") {
		t.Errorf("report of a tampered record: code %d, stderr %q; want %d", code, errs, exitCheck)
	}
}

func TestReportCommand(t *testing.T) {
	t.Parallel()
	db := record(t)
	dir := t.TempDir()
	pdf, csvOut, js := filepath.Join(dir, "r.pdf"), filepath.Join(dir, "i.csv"), filepath.Join(dir, "r.json")
	code, out, errs := runCmd(t, "report", "--db", db, "--pdf", pdf, "--csv", csvOut, "--json", js,
		"--record-csv", filepath.Join(dir, "e.csv"), "--indications-json", filepath.Join(dir, "i.json"))
	if code != exitOK || !strings.Contains(out, "(released)") {
		t.Fatalf("report: code %d, stdout %q, stderr %q", code, out, errs)
	}
	for _, p := range []string{pdf, csvOut, js} {
		if fi, err := os.Stat(p); err != nil || fi.Size() == 0 {
			t.Errorf("output %s: %v", p, err)
		}
	}
	if exe, err := exec.LookPath("pdftotext"); err == nil {
		txt, err := exec.Command(exe, pdf, "-").Output()
		if err != nil || !strings.Contains(string(txt), "End of report INS-2026-014-R1-") {
			t.Errorf("PDF text lacks the end mark (%v)", err)
		}
	}

	code, _, errs = runCmd(t, "report", "--db", db)
	if code != exitUsage || !strings.Contains(errs, "at least one output") {
		t.Errorf("report without outputs: code %d, stderr %q", code, errs)
	}
	code, _, errs = runCmdEnv(t, map[string]string{"WHORL_USER": "analyst-2c", "WHORL_ROLE": "level2"},
		"report", "--db", db, "--release", "mine", "--pdf", pdf)
	if code != exitRefused || !strings.Contains(errs, `analyst-2c (level2) may not release the report: only qa may do this`) {
		t.Errorf("release by level2: code %d, stderr %q; want %d and a refusal naming the person", code, errs, exitRefused)
	}
	code, _, errs = runCmd(t, "report", "--db", db, "--release", "x", "--pdf", pdf)
	if code != exitUsage || !strings.Contains(errs, "WHORL_USER") {
		t.Errorf("release without identity: code %d, stderr %q", code, errs)
	}
	code, out, errs = runCmdEnv(t, map[string]string{"WHORL_USER": "qa-records-2", "WHORL_ROLE": "qa"},
		"report", "--db", db, "--release", "second issue", "--csv", csvOut)
	if code != exitOK || !strings.Contains(errs, "released report INS-2026-014-R2-") || !strings.Contains(out, "(released)") {
		t.Errorf("release by qa: code %d, stdout %q, stderr %q", code, out, errs)
	}
}
