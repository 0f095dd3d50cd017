package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"whorl/synth"
)

func TestSynthCommand(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	code, out, errs := runCmd(t, "synth", "--tubes", "4", "--groups", "2", "--raw", "1", "--length", "1.5m", dir)
	if code != exitOK {
		t.Fatalf("exit %d, stderr %s", code, errs)
	}
	for _, want := range []string{"4 tubes of Alloy 690TT", "drifted closing: CG02", "400k-diff"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
	m, err := synth.ReadManifest(filepath.Join(dir, "manifest.json"))
	if err != nil {
		t.Fatal(err)
	}
	if len(m.Tubes) != 4 || len(m.Raw) != 1 || m.Config.LengthM != 1.5 || len(m.Config.SupportsM) != 1 {
		t.Errorf("manifest: %d tubes, %d raw, length %v, supports %v", len(m.Tubes), len(m.Raw), m.Config.LengthM, m.Config.SupportsM)
	}
	if _, err := os.Stat(filepath.Join(dir, m.Tubes[3].File)); err != nil {
		t.Error(err)
	}

	dir2 := t.TempDir()
	code, out, errs = runCmd(t, "synth", "--set", "alternate", "--tubes", "2", "--raw", "0", "--json", dir2)
	if code != exitOK {
		t.Fatalf("exit %d, stderr %s", code, errs)
	}
	var jm synth.Manifest
	if err := json.Unmarshal([]byte(out), &jm); err != nil {
		t.Fatalf("--json output: %v", err)
	}
	if jm.Config.Component != "1-LOC-03" || len(jm.Tubes) != 2 || jm.Channels[0] != "50k-diff" {
		t.Errorf("alternate manifest %+v", jm)
	}
}

func TestSynthCommandErrors(t *testing.T) {
	t.Parallel()
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"synth"}, "expected one output folder"},
		{[]string{"synth", "--set", "big", "x"}, `--set "big": expected demo or alternate`},
		{[]string{"synth", "--tubes", "0", "x"}, "config Tubes: 0: expected 1 to 1000000 tubes"},
		{[]string{"synth", "--length", "3kg", "x"}, "--length"},
		{[]string{"synth", "--length", "0.2m", "x"}, "--length 0.2 m: expected more than"},
		{[]string{"synth", "--drifted-group", "9", "x"}, "config DriftedGroup"},
	} {
		t.Run(strings.Join(c.args, " "), func(t *testing.T) {
			t.Parallel()
			code, _, errs := runCmd(t, c.args...)
			if code != exitUsage || !strings.Contains(errs, c.want) {
				t.Errorf("exit %d, stderr %q, want exit %d with %q", code, errs, exitUsage, c.want)
			}
		})
	}
}
