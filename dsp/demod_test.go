package dsp

import (
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"whorl/acquire"
	"whorl/dsp/dsptest"
)

func deg(r float64) float64 { return r * 180 / math.Pi }

// phaseDiffDeg returns the wrapped difference arg(a) − arg(b) in degrees.
func phaseDiffDeg(a, b complex128) float64 { return deg(cmplx.Phase(a / b)) }

func TestDemodulateMultiTone(t *testing.T) {
	t.Parallel()
	const fs = 1e6
	// Known amplitudes and phases: the closed-form input of dsptest.MultiTone.
	tones := []dsptest.Tone{
		{FreqHz: 400e3, AmplitudeV: 1.3, PhaseRad: 40 * math.Pi / 180},
		{FreqHz: 100e3, AmplitudeV: 0.7, PhaseRad: -120 * math.Pi / 180},
		{FreqHz: 103.7e3, AmplitudeV: 0.05, PhaseRad: 3},
		{FreqHz: 20e3, AmplitudeV: 2.1, PhaseRad: 170 * math.Pi / 180},
	}
	refPhase := []float64{0.3, -1.1, 2.0, 0.9}
	n := 200000
	v := dsptest.MultiTone(n, fs, tones)
	var refTones []dsptest.Tone
	for k, tn := range tones {
		refTones = append(refTones, dsptest.Tone{FreqHz: tn.FreqHz, AmplitudeV: 2, PhaseRad: refPhase[k]})
	}
	r := dsptest.MultiTone(n, fs, refTones)
	freqs := []float64{400e3, 100e3, 103.7e3, 20e3}
	for _, c := range []struct {
		name   string
		ref    []float64
		rate   float64
		lp     float64
		refDeg func(k int) float64
	}{
		{"no reference", nil, 2000, 0, func(int) float64 { return 0 }},
		{"recorded reference", r, 2000, 0, func(k int) float64 { return deg(refPhase[k]) }},
		// A 500 Hz low-pass keeps the 3.7 kHz neighbours apart (2×70 dB).
		{"rate 10 kHz", nil, 10000, 500, func(int) float64 { return 0 }},
	} {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			rec := &acquire.RawRecord{Coil: "diff", Mode: acquire.Differential, SampleRateHz: fs, ExcitationHz: freqs, VoltageV: v, ReferenceV: c.ref}
			scan, rep, err := Demodulate(rec, DemodOptions{OutputRateHz: c.rate, LowpassHz: c.lp})
			if err != nil {
				t.Fatal(err)
			}
			if rep.OutputRateHz != c.rate || len(rep.Warnings) != 0 {
				t.Errorf("output rate %v, warnings %q; want %v, none", rep.OutputRateHz, rep.Warnings, c.rate)
			}
			for k, tn := range tones {
				ch := scan.Channels[k]
				want := tn.Phasor() * cmplx.Rect(1, -c.refDeg(k)*math.Pi/180)
				for i, z := range ch.Samples {
					// Tolerances from the requirement: 1e-4 relative amplitude, 0.01°.
					relAmp := cmplx.Abs(z)/tn.AmplitudeV - 1
					dph := phaseDiffDeg(z, want)
					if math.Abs(relAmp) > 1e-4 || math.Abs(dph) > 0.01 {
						t.Fatalf("%s sample %d: z = %v, want %v: amplitude error %.2e (1e-4), phase error %.4f° (0.01°)", ch.Name, i, z, want, relAmp, dph)
					}
				}
				if c.ref != nil && math.Abs(deg(rep.Tones[k].ReferencePhaseRad)-c.refDeg(k)) > 0.01 {
					t.Errorf("%s: reported reference phase %.4f°, want %.4f°", ch.Name, deg(rep.Tones[k].ReferencePhaseRad), c.refDeg(k))
				}
				if c.ref == nil && math.Abs(phaseDiffDeg(cmplx.Rect(1, rep.Tones[k].EstimatedPhaseRad), tn.Phasor())) > 0.01 {
					t.Errorf("%s: estimated phase %.4f°, want %.4f°", ch.Name, deg(rep.Tones[k].EstimatedPhaseRad), deg(tn.PhaseRad))
				}
			}
		})
	}
}

// TestDemodulateLeakage: a single tone demodulated at the other
// frequencies gives less than −80 dB of its amplitude (requirement).
func TestDemodulateLeakage(t *testing.T) {
	t.Parallel()
	const fs = 1e6
	freqs := []float64{400e3, 100e3, 103.7e3, 20e3}
	for j, f := range freqs {
		v := dsptest.MultiTone(100000, fs, []dsptest.Tone{{FreqHz: f, AmplitudeV: 1, PhaseRad: 0.2}})
		rec := &acquire.RawRecord{Coil: "abs", Mode: acquire.Absolute, SampleRateHz: fs, ExcitationHz: freqs, VoltageV: v}
		scan, _, err := Demodulate(rec, DemodOptions{})
		if err != nil {
			t.Fatal(err)
		}
		for k, ch := range scan.Channels {
			if k == j {
				continue
			}
			var peak float64
			for _, z := range ch.Samples {
				peak = math.Max(peak, cmplx.Abs(z))
			}
			if db := 20 * math.Log10(peak); db > -80 {
				t.Errorf("tone %v Hz leaks %.1f dB into %s, want below -80 dB", f, db, ch.Name)
			}
		}
	}
}

// TestDemodulateZeroDelay: an amplitude ramp A(t) = 1 + 2t is returned at
// the output time stamps without delay (a symmetric kernel and a
// forward–backward filter pass a linear function unchanged).
func TestDemodulateZeroDelay(t *testing.T) {
	t.Parallel()
	const fs = 200e3
	const f = 30e3
	n := 100000
	v := make([]float64, n)
	for i := range v {
		ti := float64(i) / fs
		v[i] = (1 + 2*ti) * math.Cos(2*math.Pi*f*ti+0.5)
	}
	pos := make([]float64, n)
	for i := range pos {
		pos[i] = 0.2 + 0.5*float64(i)/fs // encoder: 0.5 m/s from 0.2 m
	}
	rec := &acquire.RawRecord{Coil: "abs", SampleRateHz: fs, ExcitationHz: []float64{f}, VoltageV: v, Mode: acquire.Absolute, PositionM: pos}
	scan, _, err := Demodulate(rec, DemodOptions{OutputRateHz: 1000, LowpassHz: 100})
	if err != nil {
		t.Fatal(err)
	}
	for i, z := range scan.PositionM {
		if want := 0.2 + 0.5*scan.TimeS[i]; math.Abs(z-want) > 1e-12 {
			t.Fatalf("sample %d at %v s: position %v m, want %v m", i, scan.TimeS[i], z, want)
		}
	}
	for i, z := range scan.Channels[0].Samples {
		want := (1 + 2*scan.TimeS[i])
		if math.Abs(cmplx.Abs(z)-want) > 1e-4*want {
			t.Fatalf("sample %d at %v s: |z| = %v, want %v (1e-4)", i, scan.TimeS[i], cmplx.Abs(z), want)
		}
	}
}

func TestDemodulateMultiplexed(t *testing.T) {
	t.Parallel()
	const fs = 1e6
	const slot = 1e-3
	tones := []dsptest.Tone{
		{FreqHz: 400e3, AmplitudeV: 1.3, PhaseRad: 40 * math.Pi / 180},
		{FreqHz: 100e3, AmplitudeV: 0.7, PhaseRad: -120 * math.Pi / 180},
		{FreqHz: 20e3, AmplitudeV: 2.1, PhaseRad: 170 * math.Pi / 180},
	}
	n := 100000
	v := dsptest.Multiplexed(n, fs, slot, tones)
	refPh := []float64{0.1, 0.2, -0.3}
	var rt []dsptest.Tone
	for k, tn := range tones {
		rt = append(rt, dsptest.Tone{FreqHz: tn.FreqHz, AmplitudeV: 1, PhaseRad: refPh[k]})
	}
	r := dsptest.Multiplexed(n, fs, slot, rt)
	for _, withRef := range []bool{false, true} {
		rec := &acquire.RawRecord{Coil: "diff", Mode: acquire.Differential, SampleRateHz: fs, SlotS: slot,
			ExcitationHz: []float64{400e3, 100e3, 20e3}, VoltageV: v}
		if withRef {
			rec.ReferenceV = r
		}
		scan, rep, err := Demodulate(rec, DemodOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if rep.OutputRateHz != 1/(3*slot) || scan.Len() < 25 {
			t.Errorf("rate %v Hz, %d samples; want %v Hz, ≥ 25 samples", rep.OutputRateHz, scan.Len(), 1/(3*slot))
		}
		for k, tn := range tones {
			want := tn.Phasor()
			if withRef {
				want *= cmplx.Rect(1, -refPh[k])
			}
			for i, z := range scan.Channels[k].Samples {
				relAmp := cmplx.Abs(z)/tn.AmplitudeV - 1
				dph := phaseDiffDeg(z, want)
				// Requirement: 1e-4 relative amplitude and 0.01°.
				if math.Abs(relAmp) > 1e-4 || math.Abs(dph) > 0.01 {
					t.Fatalf("reference %v, %s sample %d: z = %v, want %v (amplitude %.2e, phase %.4f°)", withRef, scan.Channels[k].Name, i, z, want, relAmp, dph)
				}
			}
		}
	}
}

func TestDemodulateErrors(t *testing.T) {
	t.Parallel()
	good := func() *acquire.RawRecord {
		return &acquire.RawRecord{Coil: "abs", SampleRateHz: 1e5, ExcitationHz: []float64{1e4}, VoltageV: make([]float64, 50000)}
	}
	for _, c := range []struct {
		name string
		mod  func(r *acquire.RawRecord)
		opt  DemodOptions
		want string
	}{
		{"nan sample", func(r *acquire.RawRecord) { r.VoltageV[17] = math.NaN() }, DemodOptions{}, "voltage sample 17"},
		{"nan sample, running sums", func(r *acquire.RawRecord) { r.VoltageV[40017] = math.NaN() }, DemodOptions{OutputRateHz: 500}, "voltage sample 40017"},
		{"infinite sample, running sums", func(r *acquire.RawRecord) { r.VoltageV[3] = math.Inf(-1) }, DemodOptions{OutputRateHz: 500}, "voltage sample 3"},
		{"excitation above nyquist", func(r *acquire.RawRecord) { r.ExcitationHz[0] = 6e4 }, DemodOptions{}, "excitation 60000 Hz"},
		{"no samples", func(r *acquire.RawRecord) { r.VoltageV = nil }, DemodOptions{}, "no voltage samples"},
		{"reference length", func(r *acquire.RawRecord) { r.ReferenceV = make([]float64, 3) }, DemodOptions{}, "3 reference samples"},
		{"lowpass too high", func(*acquire.RawRecord) {}, DemodOptions{OutputRateHz: 1000, LowpassHz: 600}, "low-pass 600 Hz"},
		{"too short", func(r *acquire.RawRecord) { r.VoltageV = r.VoltageV[:60] }, DemodOptions{}, "too short"},
		{"silent reference", func(r *acquire.RawRecord) { r.ReferenceV = make([]float64, 50000) }, DemodOptions{}, "no component"},
		{"settle beyond slot", func(r *acquire.RawRecord) { r.SlotS = 1e-3 }, DemodOptions{SettleS: 2e-3}, "settling time"},
	} {
		r := good()
		c.mod(r)
		_, _, err := Demodulate(r, c.opt)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
	}
}

func TestDemodulateCloseTonesWarning(t *testing.T) {
	t.Parallel()
	v := dsptest.MultiTone(200000, 1e6, []dsptest.Tone{{FreqHz: 100e3, AmplitudeV: 1}})
	rec := &acquire.RawRecord{Coil: "abs", SampleRateHz: 1e6, ExcitationHz: []float64{100e3, 103.7e3}, VoltageV: v}
	_, rep, err := Demodulate(rec, DemodOptions{OutputRateHz: 10000})
	if err != nil {
		t.Fatal(err)
	}
	if len(rep.Warnings) != 1 || !strings.Contains(rep.Warnings[0], "3700 Hz apart") {
		t.Errorf("warnings %q, want one about tones 3700 Hz apart", rep.Warnings)
	}
}

func TestFlawBandWarning(t *testing.T) {
	t.Parallel()
	// 0.5 m/s over a 2 mm coil: band 250 Hz (speed ÷ coil length).
	if w := FlawBandWarning(100, 0.5, 2e-3); !strings.Contains(w, "250 Hz") {
		t.Errorf("cut-off 100 Hz: warning %q, want one naming the 250 Hz band", w)
	}
	if w := FlawBandWarning(300, 0.5, 2e-3); w != "" {
		t.Errorf("cut-off 300 Hz: warning %q, want none", w)
	}
	if w := HighpassFlawBandWarning(300, 0.5, 2e-3); !strings.Contains(w, "250 Hz") {
		t.Errorf("high-pass 300 Hz: warning %q, want one naming the 250 Hz band", w)
	}
	if w := HighpassFlawBandWarning(2, 0.5, 2e-3); w != "" {
		t.Errorf("high-pass 2 Hz: warning %q, want none", w)
	}
	if w := spatialFlawBandWarning(false, 200, 4e-3); !strings.Contains(w, "250 cycles/m") {
		t.Errorf("low-pass 200 cycles/m: warning %q, want one naming 250 cycles/m", w)
	}
}

func TestSplitDecimation(t *testing.T) {
	t.Parallel()
	for _, c := range []struct{ d, d1, d2 int }{
		{1, 1, 1}, {15, 1, 15}, {500, 50, 10}, {100, 10, 10}, {16, 2, 8}, {97, 12, 8}, {1000, 125, 8}, {330, 33, 10}, {143, 13, 11},
	} {
		d1, d2 := splitDecimation(c.d)
		if d1 != c.d1 || d2 != c.d2 {
			t.Errorf("splitDecimation(%d) = %d, %d; want %d, %d", c.d, d1, d2, c.d1, c.d2)
		}
	}
}

// TestDemodulateWorkers: demodulating tones concurrently gives the same
// samples as one at a time (each worker has its own buffers).
func TestDemodulateWorkers(t *testing.T) {
	t.Parallel()
	tones := []dsptest.Tone{{FreqHz: 300e3, AmplitudeV: 1}, {FreqHz: 120e3, AmplitudeV: 0.5, PhaseRad: 1}, {FreqHz: 40e3, AmplitudeV: 2, PhaseRad: -2}}
	v := dsptest.MultiTone(60000, 1e6, tones)
	rec := &acquire.RawRecord{Coil: "abs", SampleRateHz: 1e6, ExcitationHz: []float64{300e3, 120e3, 40e3}, VoltageV: v, ReferenceV: v}
	one, _, err := Demodulate(rec, DemodOptions{})
	if err != nil {
		t.Fatal(err)
	}
	two, _, err := Demodulate(rec, DemodOptions{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	for k := range one.Channels {
		for i, z := range one.Channels[k].Samples {
			if two.Channels[k].Samples[i] != z {
				t.Fatalf("channel %s sample %d: %v with 2 workers, %v with 1", one.Channels[k].Name, i, two.Channels[k].Samples[i], z)
			}
		}
	}
}

// TestStage1MomentsMatchTaps: the running-sum (moment) form of the first
// stage equals the direct complex-tap form to rounding, including a
// partial last block.
func TestStage1MomentsMatchTaps(t *testing.T) {
	t.Parallel()
	v := dsptest.MultiTone(20037, 1e6, []dsptest.Tone{{FreqHz: 400e3, AmplitudeV: 1, PhaseRad: 0.3}, {FreqHz: 21e3, AmplitudeV: 3, PhaseRad: -1}})
	for _, d1 := range []int{8, 13, 50, 125} {
		sos, _ := ButterworthLowpass(4, 1e6/float64(d1)/50, 1e6/float64(d1))
		dm := newDemodulator(d1, 8, sos)
		if !dm.useMoments {
			t.Fatalf("d1 = %d: moment form not used", d1)
		}
		m1 := dm.stage1Len(len(v)) + 1 // one output past the data: partial blocks
		got := [][]complex128{make([]complex128, m1), make([]complex128, m1)}
		dm.stage1(got, v, []float64{400e3, 21e3}, 1e6)
		dm.useMoments = false
		want := [][]complex128{make([]complex128, m1), make([]complex128, m1)}
		dm.stage1(want, v, []float64{400e3, 21e3}, 1e6)
		for i := range got {
			for m := range got[i] {
				// Tolerance: the 4×4 change of basis loses a few digits
				// (running sums reach ~d1³/6 times the samples).
				if cmplx.Abs(got[i][m]-want[i][m]) > 1e-11 {
					t.Fatalf("d1 = %d tone %d output %d: moments %v, taps %v", d1, i, m, got[i][m], want[i][m])
				}
			}
		}
	}
}

// TestDemodulateShortBlocks covers first stages of fewer than 8 samples
// per block (the direct complex-tap form) and no first stage at all.
func TestDemodulateShortBlocks(t *testing.T) {
	t.Parallel()
	tones := []dsptest.Tone{{FreqHz: 400e3, AmplitudeV: 1.3, PhaseRad: 0.7}, {FreqHz: 100e3, AmplitudeV: 0.2, PhaseRad: -2.5}}
	v := dsptest.MultiTone(50000, 1e6, tones)
	for _, rate := range []float64{20e3, 100e3} { // d1 = 5 and d1 = 1
		rec := &acquire.RawRecord{Coil: "abs", SampleRateHz: 1e6, ExcitationHz: []float64{400e3, 100e3}, VoltageV: v}
		scan, rep, err := Demodulate(rec, DemodOptions{OutputRateHz: rate, LowpassHz: rate / 10})
		if err != nil {
			t.Fatal(err)
		}
		for k, tn := range tones {
			for i, z := range scan.Channels[k].Samples {
				// Requirement: 1e-4 relative amplitude and 0.01°.
				if math.Abs(cmplx.Abs(z)/tn.AmplitudeV-1) > 1e-4 || math.Abs(phaseDiffDeg(z, tn.Phasor())) > 0.01 {
					t.Fatalf("rate %v (stage 1: %d) %s sample %d: %v, want %v", rate, rep.Stage1, scan.Channels[k].Name, i, z, tn.Phasor())
				}
			}
		}
	}
}

// TestDemodulateMultiplexedPositions: positions of a multiplexed record
// are interpolated at the cycle centres (exact for a constant speed).
func TestDemodulateMultiplexedPositions(t *testing.T) {
	t.Parallel()
	const fs = 1e6
	n := 60000
	tones := []dsptest.Tone{{FreqHz: 200e3, AmplitudeV: 1}, {FreqHz: 50e3, AmplitudeV: 1}}
	pos := make([]float64, n)
	for i := range pos {
		pos[i] = 1 + 0.3*float64(i)/fs
	}
	rec := &acquire.RawRecord{Coil: "diff", SampleRateHz: fs, SlotS: 5e-4, ExcitationHz: []float64{200e3, 50e3},
		VoltageV: dsptest.Multiplexed(n, fs, 5e-4, tones), PositionM: pos}
	scan, _, err := Demodulate(rec, DemodOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for i, z := range scan.PositionM {
		if want := 1 + 0.3*scan.TimeS[i]; math.Abs(z-want) > 1e-12 {
			t.Fatalf("sample %d: position %v m, want %v m", i, z, want)
		}
	}
}
