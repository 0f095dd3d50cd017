package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// The window itself is tested headless in package gui; these tests cover
// the command line, which is checked before any window opens.
func TestGUICommandLine(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	db := filepath.Join(dir, "a.db")
	if err := os.WriteFile(db, nil, 0o644); err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name   string
		args   []string
		code   int
		stdout string
		stderr string
	}{
		{"help", []string{"gui", "--help"}, exitOK, "WHORL_ROLE", ""},
		{"bad desk", []string{"gui", "--desk", "cockpit"}, exitUsage, "", `--desk "cockpit": expected review, calibration, model or report`},
		{"bad theme", []string{"gui", "--theme", "neon"}, exitUsage, "", "expected dark or light"},
		{"bad size", []string{"gui", "--size", "800by600"}, exitUsage, "", "expected WIDTHxHEIGHT"},
		{"small size", []string{"gui", "--size", "300x200"}, exitUsage, "", "at least 640x480"},
		{"missing file", []string{"gui", filepath.Join(dir, "nope.db")}, exitData, "", "nope.db"},
		{"folder", []string{"gui", dir}, exitData, "", "is a folder"},
		{"database and scans", []string{"gui", db, db}, exitUsage, "", "give one inspection database"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			code, out, errs := runCmd(t, tc.args...)
			if code != tc.code || !strings.Contains(out, tc.stdout) || !strings.Contains(errs, tc.stderr) {
				t.Errorf("whorl %q = %d, stdout %q, stderr %q; want %d, stdout containing %q, stderr containing %q",
					tc.args, code, out, errs, tc.code, tc.stdout, tc.stderr)
			}
		})
	}
}
