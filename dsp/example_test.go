package dsp_test

import (
	"fmt"
	"math"
	"math/cmplx"

	"whorl/acquire"
	"whorl/dsp"
	"whorl/dsp/dsptest"
)

// A 4th-order Butterworth low-pass at 100 Hz for a 1.2 kHz strip-chart
// rate: two sections, −3.01 dB at the cut-off.
func ExampleButterworthLowpass() {
	sos, err := dsp.ButterworthLowpass(4, 100, 1200)
	if err != nil {
		fmt.Println(err)
		return
	}
	h := cmplx.Abs(sos.Response(100, 1200))
	fmt.Printf("%d sections, |H(100 Hz)| = %.4f (%.2f dB)\n", len(sos), h, 20*math.Log10(h))
	// Output:
	// 2 sections, |H(100 Hz)| = 0.7071 (-3.01 dB)
}

// Demodulating a raw coil voltage of two simultaneous tones, recorded at
// 1 MHz without a reference: each tone comes back as A·e^{jθ}.
func ExampleDemodulate() {
	tones := []dsptest.Tone{
		{FreqHz: 400e3, AmplitudeV: 1.5, PhaseRad: 30 * math.Pi / 180},
		{FreqHz: 100e3, AmplitudeV: 0.4, PhaseRad: -75 * math.Pi / 180},
	}
	rec := &acquire.RawRecord{
		Coil: "diff", Mode: acquire.Differential, SampleRateHz: 1e6,
		ExcitationHz: []float64{400e3, 100e3},
		VoltageV:     dsptest.MultiTone(100000, 1e6, tones),
	}
	scan, rep, err := dsp.Demodulate(rec, dsp.DemodOptions{OutputRateHz: 2000})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d samples at %g Hz\n", scan.Len(), rep.OutputRateHz)
	for _, c := range scan.Channels {
		z := c.Samples[scan.Len()/2]
		fmt.Printf("%s: %.4f V at %.2f°\n", c.Name, cmplx.Abs(z), cmplx.Phase(z)*180/math.Pi)
	}
	// Output:
	// 200 samples at 2000 Hz
	// 400k-diff: 1.5000 V at 30.00°
	// 100k-diff: 0.4000 V at -75.00°
}

// A support signal seen at 100 kHz and, rotated and scaled, at 400 kHz is
// removed from the 400 kHz channel by a mix trained over it.
func ExampleTrainMix() {
	pos := make([]float64, 400)
	for i := range pos {
		pos[i] = float64(i) * 1e-3
	}
	lf := dsptest.Differential(pos, 0.2, 4e-3, 8e-3, cmplx.Rect(3, 0.4))
	edge := dsptest.Differential(pos, 0.21, 4e-3, 5e-3, cmplx.Rect(1, 2))
	hf := make([]complex128, len(pos))
	for i := range lf {
		lf[i] += edge[i]
		hf[i] = cmplx.Rect(0.6, 1.1) * lf[i]
	}
	m, err := dsp.TrainMix(dsp.MixRotateScale, hf, [][]complex128{lf}, [][2]int{{170, 240}})
	if err != nil {
		fmt.Println(err)
		return
	}
	a := m.Matrices[0]
	fmt.Printf("gain %.3f, rotation %.1f°, residual below 1e-12: %v\n",
		math.Hypot(a[0][0], a[1][0]), math.Atan2(a[1][0], a[0][0])*180/math.Pi, m.ResidualRatio < 1e-12)
	// Output:
	// gain 0.600, rotation 63.0°, residual below 1e-12: true
}

// The Welch PSD of a 50 Hz sine of 1 V amplitude sampled at 1 kHz: the
// power (0.5 V²) appears at 50 Hz.
func ExampleWelchPSD() {
	x := make([]float64, 4096)
	for i := range x {
		x[i] = math.Sin(2 * math.Pi * 50 * float64(i) / 1000)
	}
	f, p, err := dsp.WelchPSD(x, 1000, dsp.WelchOptions{SegmentLen: 500})
	if err != nil {
		fmt.Println(err)
		return
	}
	peak, total := 0, 0.0
	for k := range p {
		if p[k] > p[peak] {
			peak = k
		}
		total += p[k] * (f[1] - f[0])
	}
	fmt.Printf("peak at %.2f Hz, total power %.3f V²\n", f[peak], total)
	// Output:
	// peak at 50.00 Hz, total power 0.500 V²
}
