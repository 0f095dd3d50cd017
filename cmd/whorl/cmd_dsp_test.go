package main

import (
	"encoding/json"
	"math/cmplx"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"whorl/acquire"
	"whorl/dsp"
	"whorl/dsp/dsptest"
)

func writeRaw(t *testing.T, dir string) string {
	t.Helper()
	const fs = 200e3
	tones := []dsptest.Tone{{FreqHz: 40e3, AmplitudeV: 1.5, PhaseRad: 0.5}, {FreqHz: 10e3, AmplitudeV: 0.8, PhaseRad: -1}}
	rec := &acquire.RawRecord{
		Meta:         acquire.Meta{Component: "R01C002", ProbeID: "P-7", ProbeType: "bobbin", ProbeSpeedMPS: 0.5},
		Coil:         "diff",
		Mode:         acquire.Differential,
		SampleRateHz: fs,
		ExcitationHz: []float64{40e3, 10e3},
		VoltageV:     dsptest.MultiTone(40000, fs, tones),
	}
	p := filepath.Join(dir, "raw.csv")
	if err := acquire.WriteRawFile(p, rec); err != nil {
		t.Fatal(err)
	}
	return p
}

// writeSupportScan writes a scan with a support signal on two channels,
// the 400 kHz one an affine image of the 100 kHz one, and a flaw on the
// 400 kHz channel only.
func writeSupportScan(t *testing.T, dir string) string {
	t.Helper()
	n := 800
	s := &acquire.Scan{Meta: acquire.Meta{Component: "CAL-1"}, AxialStepM: 1e-3, SampleRateHz: 1000}
	for i := range n {
		s.PositionM = append(s.PositionM, float64(i)*1e-3)
		s.TimeS = append(s.TimeS, float64(i)/1000)
	}
	lf := dsptest.Differential(s.PositionM, 0.3, 4e-3, 8e-3, cmplx.Rect(3, 1.2))
	lf2 := dsptest.Differential(s.PositionM, 0.31, 4e-3, 5e-3, cmplx.Rect(1, -0.5))
	flaw := dsptest.Differential(s.PositionM, 0.6, 4e-3, 3e-3, cmplx.Rect(1, 2.4))
	hf := make([]complex128, n)
	for i := range hf {
		lf[i] += lf2[i]
		hf[i] = complex(0.8*real(lf[i])-0.3*imag(lf[i]), 0.5*real(lf[i])+1.7*imag(lf[i])) + flaw[i]
	}
	s.Channels = []acquire.Channel{
		{Name: "diff-400k", FreqHz: 4e5, Mode: acquire.Differential, Samples: hf},
		{Name: "diff-100k", FreqHz: 1e5, Mode: acquire.Differential, Samples: lf},
	}
	p := filepath.Join(dir, "cal.csv")
	if err := acquire.WriteScanFile(p, s); err != nil {
		t.Fatal(err)
	}
	return p
}

func TestDemodCommand(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	raw := writeRaw(t, dir)
	out := filepath.Join(dir, "scan.csv")
	code, stdout, stderr := runCmd(t, "demod", "--rate", "1kHz", "-o", out, raw)
	if code != exitOK {
		t.Fatalf("exit %d, stderr %s", code, stderr)
	}
	if !strings.Contains(stdout, "estimated reference phase 28.648°") {
		t.Errorf("stdout %q: want the estimated phase of the 40 kHz tone, 0.5 rad = 28.648°", stdout)
	}
	s, err := acquire.ReadScanFile(out)
	if err != nil {
		t.Fatal(err)
	}
	c := s.Channel("40k-diff")
	if c == nil || s.SampleRateHz != 1000 {
		t.Fatalf("channels %v, rate %v", s.Channels, s.SampleRateHz)
	}
	// Lock-in convention (dsp/doc.go): 1.5 cos(ωt + 0.5) → 1.5 e^{0.5j}.
	want := cmplx.Rect(1.5, 0.5)
	if got := c.Samples[len(c.Samples)/2]; cmplx.Abs(got-want) > 1e-4 {
		t.Errorf("demodulated %v, want %v", got, want)
	}
	code, stdout, _ = runCmd(t, "demod", "--json", "--workers", "2", "-o", out, raw)
	var rep dsp.DemodReport
	if code != exitOK || json.Unmarshal([]byte(stdout), &rep) != nil || len(rep.Tones) != 2 {
		t.Errorf("--json: exit %d, %q", code, stdout)
	}
}

func TestDemodCommandErrors(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	raw := writeRaw(t, dir)
	bad := filepath.Join(dir, "bad.csv")
	os.WriteFile(bad, []byte("# whorl-raw 1\nnonsense\n"), 0o644)
	for _, c := range []struct {
		args []string
		code int
		msg  string
	}{
		{[]string{"demod", raw}, exitUsage, "-o is required"},
		{[]string{"demod", "-o", "x.csv", "--rate", "fast", raw}, exitUsage, "--rate"},
		{[]string{"demod", "-o", filepath.Join(dir, "o.csv"), "--lowpass", "900Hz", "--rate", "1kHz", raw}, exitData, "low-pass 900 Hz"},
		{[]string{"demod", "-o", filepath.Join(dir, "o.csv"), bad}, exitData, "bad.csv"},
	} {
		code, _, stderr := runCmd(t, c.args...)
		if code != c.code || !strings.Contains(stderr, c.msg) {
			t.Errorf("%q: exit %d, stderr %q; want %d and %q", c.args, code, stderr, c.code, c.msg)
		}
	}
}

func TestMixCommands(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	cal := writeSupportScan(t, dir)
	mixPath := filepath.Join(dir, "mix.json")
	code, stdout, stderr := runCmd(t, "mix", "train", "--primary", "diff-400k", "--with", "diff-100k", "--window", "0.28m:0.34m", "--flaw", "0.58m:0.62m", "-o", mixPath, cal)
	if code != exitOK {
		t.Fatalf("train: exit %d, %s", code, stderr)
	}
	if !strings.Contains(stdout, "condition number") || !strings.Contains(stdout, "window 280:341") || !strings.Contains(stdout, "reference flaw 580:621") {
		t.Errorf("train output %q lacks the quality figures, the window or the reference flaw", stdout)
	}
	out := filepath.Join(dir, "mixed.csv")
	code, stdout, stderr = runCmd(t, "mix", "apply", "--mix", mixPath, "-o", out, cal)
	if code != exitOK || !strings.Contains(stdout, "residual ratio") {
		t.Fatalf("apply: exit %d, %s %s", code, stdout, stderr)
	}
	s, err := acquire.ReadScanFile(out)
	if err != nil {
		t.Fatal(err)
	}
	m := s.Channel("mix-diff-400k")
	if m == nil {
		t.Fatal("no mix channel")
	}
	// Exact affine image: the support is removed to rounding (plus the CSV
	// round trip of the samples).
	if v := dsp.Vpp(m.Samples[280:341]); v > 1e-6 {
		t.Errorf("support Vpp after mix %v V, want < 1e-6 V", v)
	}
	code, _, stderr = runCmd(t, "mix", "train", "--primary", "diff-400k", "--with", "diff-100k", "--window", "5:3", "-o", mixPath, cal)
	if code != exitUsage || !strings.Contains(stderr, "5:3") {
		t.Errorf("bad window: exit %d, %q", code, stderr)
	}
	code, _, stderr = runCmd(t, "mix", "train", "--primary", "diff-1M", "--with", "diff-100k", "--window", "0:100", "-o", mixPath, cal)
	if code != exitData || !strings.Contains(stderr, `no channel "diff-1M"`) {
		t.Errorf("bad channel: exit %d, %q", code, stderr)
	}
}

func TestProcessCommand(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	cal := writeSupportScan(t, dir)
	chain := filepath.Join(dir, "chain.json")
	os.WriteFile(chain, []byte(`{"version":1,"name":"test","coil_length_m":0.002,"steps":[{"op":"lowpass","order":4,"cutoff_per_m":200},{"op":"rotate","angle_deg":10}]}`), 0o644)
	out := filepath.Join(dir, "p.csv")
	code, stdout, stderr := runCmd(t, "process", "--chain", chain, "-o", out, cal)
	if code != exitOK || !strings.Contains(stdout, "sha256") {
		t.Fatalf("exit %d: %s %s", code, stdout, stderr)
	}
	s, err := acquire.ReadScanFile(out)
	if err != nil {
		t.Fatal(err)
	}
	if len(s.Meta.Extra["chain_sha256"]) != 64 || !strings.Contains(s.Meta.Extra["chain"], `"rotate"`) {
		t.Errorf("chain not recorded: %v", s.Meta.Extra)
	}
	// 200 cycles/m is below 1/(2 mm) = 500 cycles/m: a flaw-band warning.
	if !strings.Contains(stderr, "warning") {
		t.Errorf("stderr %q, want the flaw-band warning", stderr)
	}
}

func TestSpectrumCommand(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	cal := writeSupportScan(t, dir)
	out := filepath.Join(dir, "psd.csv")
	png := filepath.Join(dir, "psd.png")
	code, stdout, stderr := runCmd(t, "spectrum", "--channel", "diff-400k", "--window", "0:256", "--segment", "64", "--png", png, "-o", out, cal)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	b, err := os.ReadFile(out)
	if err != nil || !strings.Contains(string(b), "freq_per_m,psd_v2_m") || strings.Count(string(b), "\n") != 2+33 {
		t.Errorf("CSV %q (err %v)", b, err)
	}
	if st, err := os.Stat(png); err != nil || st.Size() < 1000 {
		t.Errorf("PNG not written: %v", err)
	}
	if !strings.Contains(stdout, "RMS") || !strings.Contains(stdout, "cycles/m") {
		t.Errorf("stdout %q", stdout)
	}
	code, stdout, _ = runCmd(t, "spectrum", "--channel", "diff-400k", "--axis", "time", "--segment", "64", "-o", out, cal)
	if code != exitOK || !strings.Contains(stdout, "bin width 15.62 Hz") {
		t.Errorf("--axis time: exit %d, %q; want bins of 1000/64 Hz", code, stdout)
	}
	if code, _, _ = runCmd(t, "spectrum", "--channel", "diff-400k", "--axis", "depth", "-o", out, cal); code != exitUsage {
		t.Errorf("--axis depth: exit %d, want %d", code, exitUsage)
	}
}
