package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"whorl/acquire"
)

const (
	foreignCSV = "../../testdata/acquire/R03C017_pull_20260314.csv"
	foreignMap = "../../testdata/acquire/bench-logger.map.json"
)

// writeScanFixtures writes a small scan, a raw record and a malformed
// scan into a temporary folder.
func writeScanFixtures(t *testing.T) (dir, scan, raw, bad string) {
	t.Helper()
	dir = t.TempDir()
	s := &acquire.Scan{Meta: acquire.Meta{Component: "R01C002", ProbeID: "BX-1"}, SampleRateHz: 1000,
		Channels: []acquire.Channel{{Name: "400k-diff", FreqHz: 4e5, Mode: acquire.Differential}}}
	for i := range 50 {
		s.TimeS = append(s.TimeS, float64(i)*1e-3)
		s.Channels[0].Samples = append(s.Channels[0].Samples, complex(float64(i%7)*1e-3, float64(i%5)*1e-3))
	}
	scan = filepath.Join(dir, "scan.csv")
	if err := acquire.WriteScanFile(scan, s); err != nil {
		t.Fatal(err)
	}
	raw = filepath.Join(dir, "raw.csv")
	rec := &acquire.RawRecord{Meta: acquire.Meta{Component: "STD-1"}, Coil: "diff", Mode: acquire.Differential,
		SampleRateHz: 1e6, ExcitationHz: []float64{1e5, 4e5}, VoltageV: []float64{0.1, -0.2, 0.3, 0}}
	if err := acquire.WriteRawFile(raw, rec); err != nil {
		t.Fatal(err)
	}
	bad = filepath.Join(dir, "bad.csv")
	os.WriteFile(bad, []byte("# whorl-scan 1\n# channel: c; 1 kHz; abs\ntime [s],c X [V],c Y [V]\n0,1,2\n0.001,1;5,2\n"), 0o644)
	return dir, scan, raw, bad
}

func TestScanInfo(t *testing.T) {
	t.Parallel()
	_, scan, raw, bad := writeScanFixtures(t)
	cases := []struct {
		name   string
		args   []string
		code   int
		stdout []string
		stderr []string
	}{
		{"whorl scan", []string{"scan", "info", scan}, exitOK,
			[]string{"Whorl scan", "R01C002", "400k-diff  400 kHz  differential", "samples      50", "duration     49 ms", "sample rate  1 kHz", "probe-id: BX-1", "problems     none found"}, nil},
		{"raw record", []string{"scan", "info", raw}, exitOK,
			[]string{"raw coil-voltage record", "STD-1", "diff (differential)", "100 kHz, 400 kHz", "samples      4", "duration     3 µs", "sample rate  1 MHz"}, nil},
		{"mapped foreign file", []string{"scan", "info", "--map", foreignMap, foreignCSV}, exitOK,
			[]string{"foreign CSV read through the column map", "R03C017", "300k-diff  300 kHz  differential", "length       19.5 mm (position 12.5 mm to 32 mm)", "direction: pull"}, nil},
		{"one bad file among good ones", []string{"scan", "info", scan, bad, raw}, exitData,
			[]string{"R01C002", "bad.csv: cannot be read", "STD-1"},
			[]string{`1 of 3 files could not be read`, `bad.csv:5:2 (column "c X [V]"): "1;5" is not a number; expected a decimal number in V`}},
		{"foreign file without a map", []string{"scan", "info", foreignCSV}, exitData, nil,
			[]string{`R03C017_pull_20260314.csv:1: first line is "Export;bench logger, invented layout for tests"`}},
		{"missing map", []string{"scan", "info", "--map", "nowhere.json", scan}, exitUsage, nil, []string{"--map"}},
		{"no file", []string{"scan", "info"}, exitUsage, nil, []string{"no FILE given"}},
		{"help", []string{"scan", "info", "--help"}, exitOK, []string{"Examples:", "--map", "--json"}, nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			code, out, errs := runCmd(t, c.args...)
			if code != c.code {
				t.Fatalf("%q: exit %d, want %d\nstdout %s\nstderr %s", c.args, code, c.code, out, errs)
			}
			for _, w := range c.stdout {
				if !strings.Contains(out, w) {
					t.Errorf("%q: stdout lacks %q:\n%s", c.args, w, out)
				}
			}
			for _, w := range c.stderr {
				if !strings.Contains(errs, w) {
					t.Errorf("%q: stderr lacks %q:\n%s", c.args, w, errs)
				}
			}
		})
	}
}

func TestScanInfoJSON(t *testing.T) {
	t.Parallel()
	_, scan, _, bad := writeScanFixtures(t)
	code, out, _ := runCmd(t, "scan", "info", "--json", scan, bad)
	if code != exitData {
		t.Fatalf("exit %d, want %d", code, exitData)
	}
	var got []scanFileInfo
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatalf("stdout is not JSON: %v\n%s", err, out)
	}
	if len(got) != 2 || got[0].Kind != "scan" || got[0].Samples != 50 || got[0].SampleRateHz != 1000 ||
		len(got[0].Channels) != 1 || got[0].Channels[0].FreqHz != 4e5 || got[0].Error != "" ||
		got[1].Error == "" || !strings.Contains(got[1].Error, "bad.csv:5:2") {
		t.Fatalf("got %+v", got)
	}
}

func TestScanConvert(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	out := filepath.Join(dir, "R03C017.csv")
	code, stdout, stderr := runCmd(t, "scan", "convert", "--map", foreignMap, "-o", out, foreignCSV)
	if code != exitOK || !strings.Contains(stdout, "40 samples") {
		t.Fatalf("convert: exit %d\n%s%s", code, stdout, stderr)
	}
	s, err := acquire.ReadScanFile(out)
	if err != nil {
		t.Fatalf("converted file does not read: %v", err)
	}
	// The converted file holds the same samples as reading through the map.
	m, _ := acquire.LoadColumnMap(foreignMap)
	f, _ := os.Open(foreignCSV)
	defer f.Close()
	want, err := acquire.ReadMapped(f, filepath.Base(foreignCSV), m)
	if err != nil {
		t.Fatal(err)
	}
	for k := range want.Channels {
		for i, v := range want.Channels[k].Samples {
			if s.Channels[k].Samples[i] != v || s.PositionM[i] != want.PositionM[i] || s.TimeS[i] != want.TimeS[i] {
				t.Fatalf("channel %d sample %d: got %v, want %v", k, i, s.Channels[k].Samples[i], v)
			}
		}
	}
	before, _ := os.ReadFile(out)
	code, _, stderr = runCmd(t, "scan", "convert", "--map", foreignMap, "-o", out, foreignCSV)
	if code != exitUsage || !strings.Contains(stderr, "exists; give --force") {
		t.Fatalf("second convert without --force: exit %d, stderr %s", code, stderr)
	}
	os.WriteFile(out, []byte("old"), 0o644)
	code, stdout, stderr = runCmd(t, "scan", "convert", "--force", "--json", "--map", foreignMap, "-o", out, foreignCSV)
	after, _ := os.ReadFile(out)
	if code != exitOK || string(after) != string(before) || !strings.Contains(stdout, `"samples": 40`) {
		t.Fatalf("convert --force: exit %d, stdout %s, stderr %s", code, stdout, stderr)
	}
	for _, c := range []struct {
		args []string
		code int
		msg  string
	}{
		{[]string{"scan", "convert", "-o", out, foreignCSV}, exitUsage, "--map is required"},
		{[]string{"scan", "convert", "--map", foreignMap, foreignCSV}, exitUsage, "-o is required"},
		{[]string{"scan", "convert", "--map", foreignMap, "-o", filepath.Join(dir, "x.csv"), filepath.Join(dir, "R03C017.csv")}, exitData, "R03C017.csv:5: no column named \"Zeit\""},
	} {
		code, _, stderr := runCmd(t, c.args...)
		if code != c.code || !strings.Contains(stderr, c.msg) {
			t.Errorf("%q: exit %d, stderr %q; want %d and %q", c.args, code, stderr, c.code, c.msg)
		}
	}
}
