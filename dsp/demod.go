package dsp

import (
	"errors"
	"fmt"
	"maps"
	"math"
	"math/cmplx"
	"strconv"
	"sync"

	"gonum.org/v1/gonum/dsp/window"
	"gonum.org/v1/gonum/mat"

	"whorl/acquire"
)

// DemodOptions sets up the digital lock-in (see Demodulate). Zero values
// select the documented defaults.
type DemodOptions struct {
	// OutputRateHz is the output sample rate. The decimation factor is
	// round(fs/OutputRateHz) and the rate actually used, fs/decimation, is
	// reported. Default 2000 Hz (or the ADC rate if lower). Ignored for
	// time-multiplexed records, whose output rate is one sample per cycle.
	OutputRateHz float64
	// LowpassHz is the −3 dB cut-off of each pass of the zero-phase
	// Butterworth low-pass (the response is |H|², −6 dB at the cut-off).
	// Default: a fifth of the output rate. It must be below half the output
	// rate.
	LowpassHz float64
	// Order is the Butterworth order of the low-pass (default 4).
	Order int
	// SettleS is the time discarded at the start of each multiplex slot while
	// the coil and electronics settle (default: a quarter of the slot).
	SettleS float64
	// CoilLengthM is the effective coil length used for the flaw-band warning
	// (0: no check).
	CoilLengthM float64
	// Workers is the number of goroutines of the simultaneous-tone
	// lock-in (0 or 1: one): the first stage splits the record into that
	// many time ranges, the low-pass filters that many tones at once. The
	// output does not depend on it, bit for bit. Ignored for
	// time-multiplexed records.
	Workers int
}

// ToneReport describes the demodulation of one excitation frequency.
type ToneReport struct {
	FreqHz float64 `json:"freq_hz"`
	// Channel is the name of the output channel.
	Channel string `json:"channel"`
	// ReferenceRecorded says whether a reference channel was used.
	ReferenceRecorded bool `json:"reference_recorded"`
	// ReferenceAmplitudeV and ReferencePhaseRad are the recorded reference's
	// amplitude and phase at this frequency relative to cos(ω(t−t0)) (zero
	// without a reference).
	ReferenceAmplitudeV float64 `json:"reference_amplitude_v"`
	ReferencePhaseRad   float64 `json:"reference_phase_rad"`
	// EstimatedPhaseRad is, without a recorded reference, the phase of the
	// record-mean coil voltage at this frequency relative to cos(ω(t−t0)): the
	// phase an unrecorded reference locked to the coil's balance point would
	// have had. Rotating the channel by −EstimatedPhaseRad puts the mean on
	// the +X axis.
	EstimatedPhaseRad float64 `json:"estimated_phase_rad"`
	// MeanV is the record mean of the output channel.
	MeanV complex128 `json:"-"`
}

// DemodReport records how a raw record was demodulated.
type DemodReport struct {
	InputRateHz  float64 `json:"input_rate_hz"`
	OutputRateHz float64 `json:"output_rate_hz"`
	LowpassHz    float64 `json:"lowpass_hz"`
	Order        int     `json:"order"`
	// Decimation is the total decimation factor (simultaneous tones).
	Decimation int `json:"decimation,omitempty"`
	// Stage1 is the decimation of the first (B-spline) stage.
	Stage1 int `json:"stage1_decimation,omitempty"`
	// TrimmedSamples is the number of output samples dropped at each end of
	// the record while the low-pass settles (simultaneous tones).
	TrimmedSamples int `json:"trimmed_samples,omitempty"`
	// SlotS and SettleS describe a time-multiplexed record.
	SlotS   float64      `json:"slot_s,omitempty"`
	SettleS float64      `json:"settle_s,omitempty"`
	Tones   []ToneReport `json:"tones"`
	// Warnings lists conditions the user should know about (flaw band cut).
	Warnings []string `json:"warnings,omitempty"`
}

// ErrRecord is returned (wrapped) for a raw record that cannot be demodulated.
var ErrRecord = errors.New("raw record")

// splineOrder is the number of boxcars in the first decimation stage.
const splineOrder = 4

// ChannelLabel names the demodulated channel of a coil at a frequency, in
// the scan model's style: "400k-diff" for 400 kHz, "1.5k-abs", "750Hz-abs".
func ChannelLabel(coil string, freqHz float64) string {
	if coil == "" {
		coil = "coil"
	}
	if freqHz >= 1000 {
		return strconv.FormatFloat(freqHz/1000, 'g', -1, 64) + "k-" + coil
	}
	return strconv.FormatFloat(freqHz, 'g', -1, 64) + "Hz-" + coil
}

// FlawBandWarning returns a warning when a low-pass cut-off lies below the
// flaw signal bandwidth, probe speed ÷ effective coil length (FIELD.md §8:
// low-pass cut-offs must stay above it), and "" otherwise or when either
// quantity is unknown (zero).
func FlawBandWarning(cutoffHz, speedMPS, coilLengthM float64) string {
	if !(speedMPS > 0) || !(coilLengthM > 0) || !(cutoffHz > 0) {
		return ""
	}
	band := speedMPS / coilLengthM
	if cutoffHz < band {
		return fmt.Sprintf("low-pass cut-off %.4g Hz is below the flaw band %.4g Hz (probe speed %.4g m/s ÷ coil length %.4g mm): flaw signals will be attenuated and distorted",
			cutoffHz, band, speedMPS, coilLengthM*1e3)
	}
	return ""
}

// HighpassFlawBandWarning returns a warning when a high-pass (drift
// removal) cut-off lies above the flaw band, probe speed ÷ effective coil
// length, so that it would remove the flaw signals themselves, and ""
// otherwise or when either quantity is unknown (zero).
func HighpassFlawBandWarning(cutoffHz, speedMPS, coilLengthM float64) string {
	if !(speedMPS > 0) || !(coilLengthM > 0) || !(cutoffHz > 0) {
		return ""
	}
	band := speedMPS / coilLengthM
	if cutoffHz > band {
		return fmt.Sprintf("high-pass cut-off %.4g Hz is above the flaw band %.4g Hz (probe speed %.4g m/s ÷ coil length %.4g mm): flaw signals will be removed",
			cutoffHz, band, speedMPS, coilLengthM*1e3)
	}
	return ""
}

// validateRecord checks the record; with checkVoltage false the voltage
// samples are left to the caller (the simultaneous-tone lock-in checks them
// for non-finite values during its first pass, which saves a pass over the
// largest array).
func validateRecord(rec *acquire.RawRecord, checkVoltage bool) error {
	fs := rec.SampleRateHz
	if !(fs > 0) || math.IsInf(fs, 0) {
		return fmt.Errorf("%w: sample rate %v Hz: expected a positive finite rate", ErrRecord, fs)
	}
	if len(rec.ExcitationHz) == 0 {
		return fmt.Errorf("%w: no excitation frequency", ErrRecord)
	}
	seen := map[float64]bool{}
	for _, f := range rec.ExcitationHz {
		if !(f > 0 && f < fs/2) {
			return fmt.Errorf("%w: excitation %v Hz: expected 0 < f < %v Hz (half the sample rate)", ErrRecord, f, fs/2)
		}
		if seen[f] {
			return fmt.Errorf("%w: excitation %v Hz listed twice", ErrRecord, f)
		}
		seen[f] = true
	}
	if math.IsNaN(rec.SlotS) || rec.SlotS < 0 || math.IsInf(rec.SlotS, 0) {
		return fmt.Errorf("%w: slot length %v s: expected 0 (simultaneous) or a positive time", ErrRecord, rec.SlotS)
	}
	n := len(rec.VoltageV)
	if n == 0 {
		return fmt.Errorf("%w: no voltage samples", ErrRecord)
	}
	if rec.ReferenceV != nil && len(rec.ReferenceV) != n {
		return fmt.Errorf("%w: %d reference samples for %d voltage samples", ErrRecord, len(rec.ReferenceV), n)
	}
	if rec.PositionM != nil && len(rec.PositionM) != n {
		return fmt.Errorf("%w: %d positions for %d voltage samples", ErrRecord, len(rec.PositionM), n)
	}
	for _, c := range []struct {
		name string
		s    []float64
	}{{"voltage", rec.VoltageV}, {"reference", rec.ReferenceV}, {"position", rec.PositionM}} {
		if c.name == "voltage" && !checkVoltage {
			continue
		}
		if i := firstNonFinite(c.s); i >= 0 {
			return fmt.Errorf("%w: %s sample %d is %v: expected a finite value", ErrRecord, c.name, i, c.s[i])
		}
	}
	return nil
}

// firstNonFinite returns the index of the first NaN or infinite value of
// s, or −1. It sums x−x (zero for finite x, NaN otherwise) in blocks so the
// common all-finite case runs at memory speed.
func firstNonFinite(s []float64) int {
	const blk = 1024
	for b := 0; b < len(s); b += blk {
		e := min(b+blk, len(s))
		// Four independent sums keep the adds from waiting on each other.
		var a0, a1, a2, a3 float64
		blk := s[b:e]
		i := 0
		for ; i+4 <= len(blk); i += 4 {
			q := blk[i : i+4 : i+4]
			a0 += q[0] - q[0]
			a1 += q[1] - q[1]
			a2 += q[2] - q[2]
			a3 += q[3] - q[3]
		}
		for ; i < len(blk); i++ {
			a0 += blk[i] - blk[i]
		}
		if acc := a0 + a1 + a2 + a3; acc != 0 || acc != acc {
			for i := b; i < e; i++ {
				if math.IsNaN(s[i]) || math.IsInf(s[i], 0) {
					return i
				}
			}
		}
	}
	return -1
}

// Demodulate turns a raw coil-voltage record into a demodulated scan, one
// complex channel per excitation frequency, by digital lock-in detection
// (the record is not changed).
//
// Simultaneous tones (rec.SlotS == 0): for each frequency f the voltage is
// multiplied by e^{−j2πf(t−t0)}, then low-passed and decimated in two
// zero-phase stages: (1) a centred B-spline kernel (the convolution of
// four boxcars of D1 samples, Hogenauer's CIC response, with nulls of
// fourth order at every multiple of the intermediate rate fs/D1, so the
// products at 2f and at the other tones' offsets cannot alias into the
// pass band), evaluated only at the intermediate samples; (2) the
// Butterworth low-pass of opt.Order run forwards and backwards (FiltFilt) at
// the intermediate rate, followed by taking every D2-th sample. The overall
// response is sinc⁴(f·D1/fs)/sinc⁴(f/fs)·|H(f)|², unity at 0 Hz; the first
// stage's droop at the cut-off is below 0.5 % for the default settings.
// Output samples are centred on input samples, so there is no delay. At
// each end of the record the output is dropped for as long as products
// outside the pass band that the first stage leaves (at 2f and at the
// other tones' sums and differences) could still ring through the
// low-pass from the zero-phase filter's edge padding above 1e-6 of the
// signal (see edgeThreshold and DemodReport.TrimmedSamples); for tones far
// apart this is nothing or a few samples.
//
// Time-multiplexed excitation (rec.SlotS > 0): each slot holds one
// frequency; its first opt.SettleS seconds are discarded and the rest is
// reduced to one complex value by a Blackman–Harris-weighted lock-in
// average (Harris 1978, 4-term window, sidelobes −92 dB, which suppresses
// the 2f product), time-stamped at the centre of the kept part. Each
// frequency's values are then interpolated linearly onto a common axis,
// one sample at the centre of each complete cycle of all frequencies, and,
// if opt.LowpassHz is below half the cycle rate, low-passed with the
// zero-phase Butterworth.
//
// The output follows the package convention: A cos(ω(t−t0) + θ) gives
// A e^{jθ}; with a recorded reference R cos(ω(t−t0) + φ) the output is
// A e^{j(θ−φ)}, the reference being demodulated by the same chain and
// divided out sample by sample (so slow drift of the reference phase is
// followed).
func Demodulate(rec *acquire.RawRecord, opt DemodOptions) (*acquire.Scan, *DemodReport, error) {
	if rec == nil {
		panic("dsp: nil record")
	}
	if err := validateRecord(rec, rec.SlotS > 0); err != nil {
		return nil, nil, err
	}
	if opt.Order == 0 {
		opt.Order = 4
	}
	if err := checkOrder(opt.Order); err != nil {
		return nil, nil, err
	}
	if rec.SlotS > 0 {
		return demodMultiplexed(rec, opt)
	}
	return demodSimultaneous(rec, opt)
}

// splitDecimation splits a total decimation d into the first (B-spline)
// stage d1 and the second (after the Butterworth) d2, keeping the
// intermediate rate at 8 to 16 times the output rate so that the
// first stage's droop and aliasing stay small at any cut-off below half the
// output rate: below 16 there is no first stage (d1 = 1); otherwise d2 is
// the smallest divisor of d from 8 to 16, and when d has none, d is
// rounded to the nearest multiple of 8 (the rate actually used is
// reported).
func splitDecimation(d int) (d1, d2 int) {
	if d < 16 {
		return 1, d
	}
	for c := 8; c <= 16; c++ {
		if d%c == 0 {
			return d / c, c
		}
	}
	return int(math.Round(float64(d) / 8)), 8
}

func newScanFrom(rec *acquire.RawRecord) *acquire.Scan {
	meta := rec.Meta
	meta.Extra = maps.Clone(rec.Meta.Extra)
	if meta.Extra == nil {
		meta.Extra = map[string]string{}
	}
	return &acquire.Scan{Meta: meta}
}

func demodSimultaneous(rec *acquire.RawRecord, opt DemodOptions) (*acquire.Scan, *DemodReport, error) {
	fs := rec.SampleRateHz
	out := opt.OutputRateHz
	if out == 0 {
		out = math.Min(2000, fs)
	}
	if !(out > 0) || out > fs || math.IsInf(out, 0) {
		return nil, nil, fmt.Errorf("%w: output rate %v Hz: expected 0 < rate ≤ %v Hz (the ADC rate)", ErrFilterSpec, out, fs)
	}
	d1, d2 := splitDecimation(max(1, int(math.Round(fs/out))))
	d := d1 * d2
	out = fs / float64(d)
	lp := opt.LowpassHz
	if lp == 0 {
		lp = out / 5
	}
	if !(lp > 0 && lp < out/2) {
		return nil, nil, fmt.Errorf("%w: demodulation low-pass %v Hz: expected 0 < f < %v Hz (half the output rate)", ErrFilterSpec, lp, out/2)
	}
	fs1 := fs / float64(d1)
	sos, err := ButterworthLowpass(opt.Order, lp, fs1)
	if err != nil {
		return nil, nil, err
	}
	rep := &DemodReport{InputRateHz: fs, OutputRateHz: out, LowpassHz: lp, Order: opt.Order, Decimation: d, Stage1: d1}
	if w := FlawBandWarning(lp, rec.Meta.ProbeSpeedMPS, opt.CoilLengthM); w != "" {
		rep.Warnings = append(rep.Warnings, w)
	}
	for i, fa := range rec.ExcitationHz {
		for _, fb := range rec.ExcitationHz[i+1:] {
			df := math.Abs(fa - fb)
			if df >= fs1/2 {
				continue
			}
			if h := cmplx.Abs(sos.Response(df, fs1)); h*h > 1e-4 {
				rep.Warnings = append(rep.Warnings, fmt.Sprintf("tones %v Hz and %v Hz are %v Hz apart: the %v Hz low-pass lets %.0f dB of each into the other's channel",
					fa, fb, df, lp, 20*math.Log10(h*h)))
			}
		}
	}
	dm := newDemodulator(d1, d2, sos)
	n := len(rec.VoltageV)
	half := splineOrder * (d1 - 1) / 2
	m1 := dm.stage1Len(n)
	trim := (settleLen(sos, edgeThreshold(rec.ExcitationHz, fs, d1)) + d2 - 1) / d2
	nAll := (m1 + d2 - 1) / d2
	nOut := nAll - 2*trim
	if m1 <= sos.PadLen() || nOut < 2 {
		need := (max(sos.PadLen()+1, (2*trim+2)*d2))*d1 + 2*half
		return nil, nil, fmt.Errorf("%w: %d samples at %v Hz is too short to demodulate to %v Hz with a %v Hz low-pass (need at least %d)",
			ErrTooShort, n, fs, out, lp, need)
	}
	rep.TrimmedSamples = trim
	scan := newScanFrom(rec)
	scan.SampleRateHz = out
	centre := func(k int) int { return half + (k+trim)*d2*d1 }
	scan.TimeS = make([]float64, nOut)
	for k := range scan.TimeS {
		scan.TimeS[k] = float64(centre(k)) / fs
	}
	if rec.PositionM != nil {
		scan.PositionM = make([]float64, nOut)
		for k := range scan.PositionM {
			scan.PositionM[k] = rec.PositionM[centre(k)]
		}
	}
	dm.trim = trim
	type result struct {
		tr ToneReport
		z  []complex128
	}
	res := make([]result, len(rec.ExcitationHz))
	// All tones in one pass over the voltage (and one over the reference),
	// so the record is read from memory once; the workers split the record
	// in time (see demodulator.run).
	workers := max(opt.Workers, 1)
	freqs := rec.ExcitationHz
	zs, err := dm.run(rec.VoltageV, freqs, fs, workers)
	if err != nil {
		return nil, nil, err
	}
	var rs [][]complex128
	if rec.ReferenceV != nil {
		if rs, err = dm.run(rec.ReferenceV, freqs, fs, workers); err != nil {
			return nil, nil, err
		}
	}
	for k, f := range freqs {
		z := zs[k]
		tr := ToneReport{FreqHz: f, Channel: ChannelLabel(rec.Coil, f)}
		if rs != nil {
			if err := referTo(z, rs[k], f, &tr); err != nil {
				return nil, nil, err
			}
		} else {
			tr.EstimatedPhaseRad = cmplx.Phase(mean(z))
		}
		tr.MeanV = mean(z)
		res[k] = result{tr: tr, z: z}
	}
	for k, r := range res {
		rep.Tones = append(rep.Tones, r.tr)
		scan.Channels = append(scan.Channels, acquire.Channel{Name: r.tr.Channel, FreqHz: rec.ExcitationHz[k], Mode: rec.Mode, Samples: r.z})
	}
	annotate(scan, rep)
	return scan, rep, scan.Validate()
}

// splineGain returns the magnitude response of the first (B-spline)
// stage at freqHz: |sin(πf·d1/fs) / (d1·sin(πf/fs))|⁴.
func splineGain(freqHz, fsHz float64, d1 int) float64 {
	den := float64(d1) * math.Sin(math.Pi*freqHz/fsHz)
	if den == 0 {
		return 1
	}
	return math.Pow(math.Abs(math.Sin(math.Pi*freqHz*float64(d1)/fsHz)/den), splineOrder)
}

// edgeThreshold returns the level, relative to its peak, to which the
// low-pass impulse response must decay before output samples near the
// record ends are kept. Products the first stage leaves outside the pass
// band (at 2f, f+g and |f−g| for the other tones g, with gain r) cause
// a transient at each end of about r times their amplitude; keeping it
// below 1e-6 of the signal even for a neighbouring tone 100 times
// stronger needs a decay to 1e-8/r (capped at 1: no trimming).
func edgeThreshold(freqsHz []float64, fsHz float64, d1 int) float64 {
	var r float64
	for _, f := range freqsHz {
		r = math.Max(r, splineGain(2*f, fsHz, d1))
		for _, g := range freqsHz {
			if g != f {
				r = math.Max(r, splineGain(f+g, fsHz, d1))
				r = math.Max(r, splineGain(math.Abs(f-g), fsHz, d1))
			}
		}
	}
	if r == 0 {
		return 1
	}
	return math.Min(1, 1e-8/r)
}

// settleLen returns the number of samples after which the impulse
// response of s stays below rel times its peak magnitude.
func settleLen(s SOS, rel float64) int {
	if rel >= 1 {
		return 0
	}
	const limit = 1 << 20
	x := make([]complex128, 4096)
	x[0] = 1
	z := make([][2]complex128, len(s))
	var peak float64
	last := 0
	for base := 0; base < limit; base += len(x) {
		s.filterState(x, x, z)
		quiet := true
		for i, v := range x {
			a := cmplx.Abs(v)
			peak = math.Max(peak, a)
			if a > rel*peak {
				last = base + i
				quiet = false
			}
		}
		if quiet {
			break
		}
		clear(x)
	}
	return last + 1
}

// referTo divides the reference phasor out of z, sample by sample, and
// fills the reference figures of tr.
func referTo(z, r []complex128, f float64, tr *ToneReport) error {
	var sum complex128
	var amp float64
	for _, v := range r {
		sum += v
		amp += cmplx.Abs(v)
	}
	amp /= float64(len(r))
	if !(amp > 0) {
		return fmt.Errorf("%w: reference channel has no component at %v Hz", ErrRecord, f)
	}
	for i, v := range r {
		a := cmplx.Abs(v)
		if a < 1e-6*amp {
			return fmt.Errorf("%w: reference channel at %v Hz vanishes near output sample %d", ErrRecord, f, i)
		}
		z[i] *= cmplx.Conj(v) / complex(a, 0)
	}
	tr.ReferenceRecorded = true
	tr.ReferenceAmplitudeV = amp
	tr.ReferencePhaseRad = cmplx.Phase(sum)
	return nil
}

func mean(z []complex128) complex128 {
	var s complex128
	for _, v := range z {
		s += v
	}
	return s / complex(float64(len(z)), 0)
}

func annotate(scan *acquire.Scan, rep *DemodReport) {
	e := scan.Meta.Extra
	e["demod_input_rate_hz"] = strconv.FormatFloat(rep.InputRateHz, 'g', -1, 64)
	e["demod_output_rate_hz"] = strconv.FormatFloat(rep.OutputRateHz, 'g', -1, 64)
	e["demod_lowpass_hz"] = strconv.FormatFloat(rep.LowpassHz, 'g', -1, 64)
	e["demod_order"] = strconv.Itoa(rep.Order)
	if rep.SlotS > 0 {
		e["demod_slot_s"] = strconv.FormatFloat(rep.SlotS, 'g', -1, 64)
		e["demod_settle_s"] = strconv.FormatFloat(rep.SettleS, 'g', -1, 64)
	}
	for _, t := range rep.Tones {
		if t.ReferenceRecorded {
			e["demod_reference_phase_deg."+t.Channel] = strconv.FormatFloat(t.ReferencePhaseRad*180/math.Pi, 'f', 4, 64)
		} else {
			e["demod_estimated_phase_deg."+t.Channel] = strconv.FormatFloat(t.EstimatedPhaseRad*180/math.Pi, 'f', 4, 64)
		}
	}
}

// demodulator holds the kernels and work buffers of the two-stage lock-in
// for one decimation set-up; it may be reused for many tones and records.
type demodulator struct {
	d1, d2 int
	// taps is the B-spline kernel times 2 (the lock-in factor), zero-padded
	// to splineOrder·d1 so that each input phase p uses taps[p+k·d1].
	taps []float64
	sos  SOS
	ff   *FiltFilter
	// trim is the number of output samples dropped at each end.
	trim int
	// mom maps the running-sum moments of a block to its four segment sums
	// (see momentMatrix); used when useMoments.
	mom        [splineOrder][splineOrder]float64
	useMoments bool
}

func newDemodulator(d1, d2 int, sos SOS) *demodulator {
	// The kernel is the d1-boxcar convolved with itself splineOrder times,
	// normalised to unit sum (a B-spline, the impulse response of a CIC
	// decimator: Hogenauer, IEEE Trans. ASSP 29(2), 1981, eq. 1).
	h := []float64{1}
	for k := 0; k < splineOrder; k++ {
		next := make([]float64, len(h)+d1-1)
		for i, v := range h {
			for j := 0; j < d1; j++ {
				next[i+j] += v
			}
		}
		h = next
	}
	taps := make([]float64, splineOrder*d1)
	norm := math.Pow(float64(d1), splineOrder)
	for i, v := range h {
		taps[i] = 2 * v / norm
	}
	dm := &demodulator{d1: d1, d2: d2, taps: taps, sos: sos, ff: NewFiltFilter(sos)}
	dm.mom, dm.useMoments = momentMatrix(taps, d1)
	return dm
}

// momentMatrix expresses each block segment of the B-spline kernel,
// t_k[p] = taps[p + k·d1] for p = 0 … d1−1, in the weights that a cascade
// of four running sums gives a block's samples: after a block of d1 samples
// the j-th running sum holds Σ_p w_j[p]·v_p with
//
//	w_1 = 1, w_2 = d1−p, w_3 = C(d1−p+1, 2), w_4 = C(d1−p+2, 3).
//
// A discrete B-spline of order four is a cubic polynomial in p within each
// block (its knots are the multiples of d1: Hogenauer 1981, eq. 1 expanded
// by the binomial theorem), and the w_j span the cubics, so
// t_k = Σ_j A[k][j]·w_j exactly. It returns ok = false (use the taps) for
// blocks too short to determine the fit or when the fit is not exact to
// rounding.
func momentMatrix(taps []float64, d1 int) (a [splineOrder][splineOrder]float64, ok bool) {
	if d1 < 8 {
		return a, false
	}
	w := mat.NewDense(d1, splineOrder, nil)
	for p := 0; p < d1; p++ {
		r := float64(d1 - p)
		w.Set(p, 0, 1)
		w.Set(p, 1, r)
		w.Set(p, 2, r*(r+1)/2)
		w.Set(p, 3, r*(r+1)*(r+2)/6)
	}
	t := mat.NewDense(d1, splineOrder, nil)
	var peak float64
	for k := 0; k < splineOrder; k++ {
		for p := 0; p < d1; p++ {
			t.Set(p, k, taps[p+k*d1])
			peak = math.Max(peak, math.Abs(taps[p+k*d1]))
		}
	}
	var sol mat.Dense
	if err := sol.Solve(w, t); err != nil {
		return a, false
	}
	var fit mat.Dense
	fit.Mul(w, &sol)
	for p := 0; p < d1; p++ {
		for k := 0; k < splineOrder; k++ {
			if math.Abs(fit.At(p, k)-t.At(p, k)) > 1e-12*peak {
				return a, false
			}
		}
	}
	for k := 0; k < splineOrder; k++ {
		for j := 0; j < splineOrder; j++ {
			a[k][j] = sol.At(j, k)
		}
	}
	return a, true
}

// combineMoments turns a block's running-sum moments into its four segment
// sums with the matrix of momentMatrix (written out: it runs once per block
// and tone).
func combineMoments(a *[splineOrder][splineOrder]float64, mo [2 * splineOrder]float64) (s [2 * splineOrder]float64) {
	for k := range a {
		r := &a[k]
		s[2*k] = r[0]*mo[0] + r[1]*mo[2] + r[2]*mo[4] + r[3]*mo[6]
		s[2*k+1] = r[0]*mo[1] + r[1]*mo[3] + r[2]*mo[5] + r[3]*mo[7]
	}
	return s
}

// stage1Len is the number of intermediate samples from n input samples:
// output m covers inputs [m·d1, m·d1 + splineOrder·(d1−1)].
func (dm *demodulator) stage1Len(n int) int {
	span := splineOrder*(dm.d1-1) + 1
	if n < span {
		return 0
	}
	return (n-span)/dm.d1 + 1
}

// run demodulates v at each of freqsHz and returns the decimated baseband
// samples, one slice per frequency, on up to workers goroutines: the first
// stage splits the intermediate samples into that many consecutive time
// ranges (each reading its part of the record plus the splineOrder−1
// blocks of overlap the B-spline needs), then the zero-phase low-pass runs
// the tones concurrently. The result does not depend on workers.
func (dm *demodulator) run(v []float64, freqsHz []float64, fsHz float64, workers int) ([][]complex128, error) {
	m1 := dm.stage1Len(len(v))
	us := make([][]complex128, len(freqsHz))
	for i := range us {
		us[i] = make([]complex128, m1)
	}
	// Ranges of at least minRange intermediate samples, so that the
	// goroutines' start-up and overlap stay small beside their work.
	const minRange = 256
	parts := max(1, min(workers, m1/minRange))
	bad := make([]int, parts)
	var wg sync.WaitGroup
	for w := range parts {
		lo, hi := m1*w/parts, m1*(w+1)/parts
		if w == parts-1 {
			bad[w] = dm.stage1Range(us, v, freqsHz, fsHz, lo, hi)
			continue
		}
		wg.Go(func() { bad[w] = dm.stage1Range(us, v, freqsHz, fsHz, lo, hi) })
	}
	wg.Wait()
	for _, j := range bad {
		if j >= 0 {
			return nil, fmt.Errorf("%w: voltage sample %d is %v: expected a finite value", ErrRecord, j, v[j])
		}
	}
	nOut := (m1+dm.d2-1)/dm.d2 - 2*dm.trim
	out := make([][]complex128, len(freqsHz))
	errs := make([]error, len(freqsHz))
	// filter runs the low-pass on the tones w, w+g, w+2g, … with its own
	// FiltFilter (one is not safe for concurrent use).
	filter := func(w, g int, ff *FiltFilter) {
		for i := w; i < len(us); i += g {
			u := us[i]
			if errs[i] = ff.Run(u, u); errs[i] != nil {
				return
			}
			dst := make([]complex128, nOut)
			for k := range dst {
				dst[k] = u[(k+dm.trim)*dm.d2]
			}
			out[i] = dst
		}
	}
	g := max(1, min(workers, len(us)))
	for w := 1; w < g; w++ {
		wg.Go(func() { filter(w, g, NewFiltFilter(dm.sos)) })
	}
	filter(0, g, dm.ff)
	wg.Wait()
	if err := errors.Join(errs...); err != nil {
		return nil, err
	}
	return out, nil
}

// stage1 mixes v to baseband at each of freqsHz and applies the B-spline
// decimator, writing len(us[i]) intermediate samples for frequency i, in
// polyphase form: each input sample is read once (per block, from cache
// for every frequency after the first) and added to the splineOrder
// overlapping outputs it belongs to.
//
// The carrier is split as e^{−jω(b·d1+p)} = e^{−jωb·d1}·e^{−jωp}. Each
// block's four segment sums S_k = Σ_p t_k[p]·e^{−jωp}·v_p are formed either
// from four running sums of the mixed samples (momentMatrix; ten
// operations per sample; the kernels in moments.go read each sample once
// for two tones and, with AVX, two blocks at once) or, for blocks shorter than 8
// samples, from complex taps T_k[p] = t_k[p]·e^{−jωp} (blockSums). The
// block's sums are then turned by the block phase e^{−jωb·d1}, advanced by
// one complex multiplication per block and recomputed exactly with
// math.Sincos every 64 blocks, so no phase error accumulates however long
// the record.
//
// It returns the index of the first non-finite input sample, or −1: a NaN
// or infinity makes the block's first sum non-finite (the first running
// sum, or the first tap column, which is positive at every phase).
func (dm *demodulator) stage1(us [][]complex128, v []float64, freqsHz []float64, fsHz float64) int {
	if len(us) == 0 {
		return -1
	}
	return dm.stage1Range(us, v, freqsHz, fsHz, 0, len(us[0]))
}

// stage1Range is stage1 for the intermediate samples mLo ≤ m < mHi only,
// which need the blocks mLo … mHi+splineOrder−2. Every output is formed
// from the same operations in the same order whatever the range (the
// block phase is replayed from the last exact value), so ranges computed
// apart give exactly the samples of one pass over the whole record.
func (dm *demodulator) stage1Range(us [][]complex128, v []float64, freqsHz []float64, fsHz float64, mLo, mHi int) int {
	d1 := dm.d1
	nf := len(freqsHz)
	if nf == 0 {
		return -1
	}
	m1 := len(us[0])
	type toneState struct {
		w          float64
		ct         [][2 * splineOrder]float64 // complex taps (tap path)
		car        []complex128               // carrier table e^{−jωp} (moment path)
		o1, o2, o3 complex128                 // partial outputs b−1, b−2, b−3 carried between blocks
		rot, step  complex128                 // block phase and its change per block
	}
	st := make([]toneState, nf)
	for i, f := range freqsHz {
		w := -2 * math.Pi * f / fsHz
		t := toneState{w: w}
		sn, cs := math.Sincos(w * float64(d1))
		t.step = complex(cs, sn)
		if dm.useMoments {
			t.car = make([]complex128, d1)
			for p := range t.car {
				sn, cs := math.Sincos(w * float64(p))
				t.car[p] = complex(cs, sn)
			}
		} else {
			t.ct = make([][2 * splineOrder]float64, d1)
			for p := range t.ct {
				sn, cs := math.Sincos(w * float64(p))
				for k := 0; k < splineOrder; k++ {
					tap := dm.taps[p+k*d1]
					t.ct[p][2*k] = tap * cs
					t.ct[p][2*k+1] = tap * sn
				}
			}
		}
		st[i] = t
	}
	nBlocks := m1 + splineOrder - 1
	bHi := min(nBlocks, mHi+splineOrder-1)
	a := &dm.mom
	// The block phase at the first block, replayed from the last block
	// with an exact value so that it agrees with a pass from block 0.
	for i := range st {
		t := &st[i]
		for b := mLo &^ 63; b < mLo; b++ {
			if b%64 == 0 {
				sn, cs := math.Sincos(t.w * float64(b*d1))
				t.rot = complex(cs, sn)
			} else {
				t.rot *= t.step
			}
		}
	}
	// mo holds each tone's block segment sums (moment path), two tones
	// per read of the block; next those of the following block when the
	// two were read together.
	mo := make([][2 * splineOrder]float64, nf)
	next := make([][2 * splineOrder]float64, nf)
	ready := false
	cars := make([][]complex128, nf)
	for i := range st {
		cars[i] = st[i].car
	}
	var pair [4 * splineOrder]float64
	for b := mLo; b < bHi; b++ {
		base := b * d1
		var blk []float64
		if base < len(v) {
			blk = v[base:min(base+d1, len(v))]
		}
		if dm.useMoments && len(blk) > 0 {
			switch {
			case ready:
				mo, next = next, mo
				ready = false
			case b+1 < bHi && base+2*d1 <= len(v):
				blockPairSums(v[base:base+2*d1], d1, cars, a, mo, next)
				ready = true
			default:
				i := 0
				for ; i+1 < nf; i += 2 {
					mixMoments2(blk, st[i].car, st[i+1].car, &pair)
					mo[i] = [2 * splineOrder]float64(pair[:2*splineOrder])
					mo[i+1] = [2 * splineOrder]float64(pair[2*splineOrder:])
				}
				if i < nf {
					mixMoments1(blk, st[i].car, &mo[i])
				}
				for i := range mo {
					if short := d1 - len(blk); short > 0 {
						extendMoments(&mo[i], short)
					}
					mo[i] = combineMoments(a, mo[i])
				}
			}
		}
		for i := range st {
			t := &st[i]
			var sums [2 * splineOrder]float64
			if len(blk) > 0 {
				if dm.useMoments {
					sums = mo[i]
				} else {
					sums = blockSums(t.ct[:len(blk)], blk)
				}
				if i == 0 {
					if c := sums[0] + sums[1]; c-c != 0 {
						if j := firstNonFinite(blk); j >= 0 {
							return base + j
						}
					}
				}
			}
			// The block phase e^{−jω·b·d1}: exact (Sincos) every 64 blocks,
			// by one complex multiplication in between.
			if b%64 == 0 {
				sn, cs := math.Sincos(t.w * float64(base))
				t.rot = complex(cs, sn)
			} else {
				t.rot *= t.step
			}
			rot := t.rot
			// Block b contributes tap segment k to output b−k.
			if m := b - (splineOrder - 1); m >= mLo && m < mHi {
				us[i][m] = t.o3 + rot*complex(sums[6], sums[7])
			}
			t.o3 = t.o2 + rot*complex(sums[4], sums[5])
			t.o2 = t.o1 + rot*complex(sums[2], sums[3])
			t.o1 = rot * complex(sums[0], sums[1])
		}
	}
	return -1
}

// demodMultiplexed handles SlotS > 0.
func demodMultiplexed(rec *acquire.RawRecord, opt DemodOptions) (*acquire.Scan, *DemodReport, error) {
	fs := rec.SampleRateHz
	nf := len(rec.ExcitationHz)
	slot := rec.SlotS
	settle := opt.SettleS
	if settle == 0 {
		settle = slot / 4
	}
	if !(settle >= 0 && settle < slot) {
		return nil, nil, fmt.Errorf("%w: settling time %v s: expected 0 ≤ settle < slot length %v s", ErrRecord, settle, slot)
	}
	n := len(rec.VoltageV)
	cycle := slot * float64(nf)
	nCycles := int(math.Floor(float64(n) / (cycle * fs)))
	if nCycles < 3 {
		return nil, nil, fmt.Errorf("%w: %d samples hold %d complete multiplex cycles of %v s, need at least 3", ErrTooShort, n, nCycles, cycle)
	}
	rate := 1 / cycle
	rep := &DemodReport{InputRateHz: fs, OutputRateHz: rate, Order: opt.Order, SlotS: slot, SettleS: settle}
	// One lock-in value per slot.
	type series struct {
		t []float64
		z []complex128
		r []complex128
	}
	per := make([]series, nf)
	for c := 0; c < nCycles; c++ {
		for k, f := range rec.ExcitationHz {
			s0 := float64(c)*cycle + float64(k)*slot
			i0 := int(math.Ceil((s0 + settle) * fs))
			i1 := int(math.Ceil((s0 + slot) * fs))
			i1 = min(i1, n)
			if i1-i0 < 16 {
				return nil, nil, fmt.Errorf("%w: %d samples kept per slot after settling (slot %v s, settle %v s at %v Hz), need at least 16", ErrRecord, i1-i0, slot, settle, fs)
			}
			z := slotLockIn(rec.VoltageV[i0:i1], i0, f, fs)
			per[k].z = append(per[k].z, z)
			per[k].t = append(per[k].t, (float64(i0)+float64(i1-1))/2/fs)
			if rec.ReferenceV != nil {
				per[k].r = append(per[k].r, slotLockIn(rec.ReferenceV[i0:i1], i0, f, fs))
			}
		}
	}
	// Common axis: the centre of each cycle, interior cycles only, so every
	// frequency has values on both sides.
	var grid []float64
	for c := 0; c < nCycles; c++ {
		tc := (float64(c) + 0.5) * cycle
		ok := true
		for k := range per {
			if tc < per[k].t[0] || tc > per[k].t[len(per[k].t)-1] {
				ok = false
			}
		}
		if ok {
			grid = append(grid, tc)
		}
	}
	scan := newScanFrom(rec)
	scan.SampleRateHz = rate
	scan.TimeS = grid
	if rec.PositionM != nil {
		scan.PositionM = make([]float64, len(grid))
		for i, t := range grid {
			x := t * fs
			j := min(int(x), n-2)
			a := x - float64(j)
			scan.PositionM[i] = rec.PositionM[j]*(1-a) + rec.PositionM[j+1]*a
		}
	}
	var sos SOS
	if lp := opt.LowpassHz; lp > 0 {
		if !(lp < rate/2) {
			return nil, nil, fmt.Errorf("%w: low-pass %v Hz: expected below %v Hz (half the multiplex cycle rate)", ErrFilterSpec, lp, rate/2)
		}
		var err error
		if sos, err = ButterworthLowpass(opt.Order, lp, rate); err != nil {
			return nil, nil, err
		}
		rep.LowpassHz = lp
		if w := FlawBandWarning(lp, rec.Meta.ProbeSpeedMPS, opt.CoilLengthM); w != "" {
			rep.Warnings = append(rep.Warnings, w)
		}
	}
	if w := FlawBandWarning(rate/2, rec.Meta.ProbeSpeedMPS, opt.CoilLengthM); w != "" {
		rep.Warnings = append(rep.Warnings, "multiplex cycle rate: "+w)
	}
	for k, f := range rec.ExcitationHz {
		z := interpComplex(grid, per[k].t, per[k].z)
		tr := ToneReport{FreqHz: f, Channel: ChannelLabel(rec.Coil, f)}
		if rec.ReferenceV != nil {
			r := interpComplex(grid, per[k].t, per[k].r)
			if err := referTo(z, r, f, &tr); err != nil {
				return nil, nil, err
			}
		}
		if sos != nil {
			var err error
			if z, err = sos.FiltFilt(z, z); err != nil {
				return nil, nil, err
			}
		}
		if rec.ReferenceV == nil {
			tr.EstimatedPhaseRad = cmplx.Phase(mean(z))
		}
		tr.MeanV = mean(z)
		rep.Tones = append(rep.Tones, tr)
		scan.Channels = append(scan.Channels, acquire.Channel{Name: tr.Channel, FreqHz: f, Mode: rec.Mode, Samples: z})
	}
	annotate(scan, rep)
	return scan, rep, scan.Validate()
}

// slotLockIn returns 2·Σ w_i v_i e^{−jω i/fs} / Σ w_i over one slot whose first
// sample has index i0, with Blackman–Harris weights w.
func slotLockIn(v []float64, i0 int, f, fs float64) complex128 {
	w := make([]float64, len(v))
	for i := range w {
		w[i] = 1
	}
	window.BlackmanHarris(w)
	var sr, si, sw float64
	om := 2 * math.Pi * f / fs
	for i, x := range v {
		s, c := math.Sincos(-om * float64(i0+i))
		sr += w[i] * x * c
		si += w[i] * x * s
		sw += w[i]
	}
	return complex(2*sr/sw, 2*si/sw)
}

// interpComplex interpolates (t, z) linearly at the increasing times grid,
// all of which lie within [t[0], t[len−1]].
func interpComplex(grid, t []float64, z []complex128) []complex128 {
	out := make([]complex128, len(grid))
	j := 0
	for i, g := range grid {
		for j < len(t)-2 && t[j+1] < g {
			j++
		}
		a := (g - t[j]) / (t[j+1] - t[j])
		out[i] = z[j]*complex(1-a, 0) + z[j+1]*complex(a, 0)
	}
	return out
}
