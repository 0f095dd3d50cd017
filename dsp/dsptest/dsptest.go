// Package dsptest holds signals of known answer for testing the dsp package
// and its users: multi-tone and time-multiplexed coil voltages with stated
// amplitudes and phases, and support-plate signals built from the demo
// signal model.
//
// Conventions are those of package dsp: a tone of amplitude A and phase θ is
// v(t) = A cos(2πf(t−t0) + θ), t0 being the first sample, and demodulates to
// A e^{jθ}.
package dsptest

import (
	"math"
	"math/rand/v2"
)

// Tone is one excitation component.
type Tone struct {
	FreqHz     float64
	AmplitudeV float64
	PhaseRad   float64
}

// Phasor returns A e^{jθ}, the value a correct lock-in gives for t.
func (t Tone) Phasor() complex128 {
	s, c := math.Sincos(t.PhaseRad)
	return complex(t.AmplitudeV*c, t.AmplitudeV*s)
}

// MultiTone returns n samples at sampleRateHz of Σ A_k cos(2πf_k i/fs + θ_k).
func MultiTone(n int, sampleRateHz float64, tones []Tone) []float64 {
	v := make([]float64, n)
	for _, t := range tones {
		w := 2 * math.Pi * t.FreqHz / sampleRateHz
		for i := range v {
			v[i] += t.AmplitudeV * math.Cos(w*float64(i)+t.PhaseRad)
		}
	}
	return v
}

// Multiplexed returns n samples at sampleRateHz of a time-multiplexed
// excitation: during slot k (from k·slotS to (k+1)·slotS seconds) only tone
// k mod len(tones) is present, with its phase continuous in absolute time,
// A cos(2πf t + θ).
func Multiplexed(n int, sampleRateHz, slotS float64, tones []Tone) []float64 {
	v := make([]float64, n)
	for i := range v {
		t := float64(i) / sampleRateHz
		k := int(math.Floor(t/slotS)) % len(tones)
		tn := tones[k]
		v[i] = tn.AmplitudeV * math.Cos(2*math.Pi*tn.FreqHz*t+tn.PhaseRad)
	}
	return v
}

// Gaussian returns exp(−(x/w)²/2).
func Gaussian(x, widthM float64) float64 { return math.Exp(-0.5 * (x / widthM) * (x / widthM)) }

// Differential returns the differential coil response to a localised
// feature at z0 seen by two coils spaced spacingM apart (FIELD.md §8 demo
// signal model): amp·[g(z−z0−d/2) − g(z−z0+d/2)] with g a Gaussian of width
// widthM.
func Differential(posM []float64, z0, spacingM, widthM float64, amp complex128) []complex128 {
	out := make([]complex128, len(posM))
	for i, z := range posM {
		g := Gaussian(z-z0-spacingM/2, widthM) - Gaussian(z-z0+spacingM/2, widthM)
		out[i] = amp * complex(g, 0)
	}
	return out
}

// AddNoise adds independent Gaussian noise of standard deviation sigmaV to
// X and Y of every sample of z, in place, drawing from rnd.
func AddNoise(z []complex128, sigmaV float64, rnd *rand.Rand) {
	for i := range z {
		z[i] += complex(sigmaV*rnd.NormFloat64(), sigmaV*rnd.NormFloat64())
	}
}

// Vpp returns the peak-to-peak amplitude of z: the largest distance between
// any two samples (O(n²); for test-sized signals).
func Vpp(z []complex128) float64 {
	var m float64
	for i := range z {
		for j := i + 1; j < len(z); j++ {
			d := z[i] - z[j]
			m = math.Max(m, math.Hypot(real(d), imag(d)))
		}
	}
	return m
}
