package main

import (
	"flag"
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

func TestGUIIdentityFromEnvironment(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		name, user, role string
		signIn           bool
		wantErr          string
	}{
		{"both given", "analyst-2b", "level2", false, ""},
		{"role in capitals", "reviewer-3t", "LEVEL3", false, ""},
		{"no user: sign in", "", "level2", true, ""},
		{"no role: sign in", "analyst-2b", "", true, ""},
		{"unknown role", "analyst-2b", "boss", false, `WHORL_ROLE: role "boss": expected level1, level2, level3 or qa`},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			e := &env{getenv: func(k string) string {
				switch k {
				case "WHORL_USER":
					return tc.user
				case "WHORL_ROLE":
					return tc.role
				}
				return ""
			}}
			c := registry["gui"]
			fs := flag.NewFlagSet("gui", flag.ContinueOnError)
			c.setFlags(fs)
			cfg, err := parseGUI(e, fs, nil)
			if tc.wantErr != "" {
				if err == nil || !strings.Contains(err.Error(), tc.wantErr) || exitCode(err) != exitUsage {
					t.Fatalf("err %v (exit %d), want usage error containing %q", err, exitCode(err), tc.wantErr)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if cfg.signIn != tc.signIn || (!tc.signIn && cfg.actor.Name != tc.user) {
				t.Errorf("config %+v, want sign-in %v and name %q", cfg, tc.signIn, tc.user)
			}
			if !filepath.IsAbs(cfg.reportDir) || cfg.demoDir == "" {
				t.Errorf("report dir %q, demo dir %q", cfg.reportDir, cfg.demoDir)
			}
		})
	}
}
