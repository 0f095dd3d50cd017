package dsp

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"slices"

	"whorl/acquire"
)

// ErrChannel is returned (wrapped) when channel operations get
// incompatible or invalid channels or parameters.
var ErrChannel = errors.New("channel operation")

func withSamples(c acquire.Channel, s []complex128) acquire.Channel {
	c.Samples = s
	return c
}

// Null returns a copy of c balanced over the window [start, end): the mean
// of the samples in the window is subtracted from every sample (a window of
// one sample nulls at a point).
func Null(c acquire.Channel, window [2]int) (acquire.Channel, error) {
	if err := checkWindow(window, len(c.Samples)); err != nil {
		return c, fmt.Errorf("%w: null %q: %w", ErrChannel, c.Name, err)
	}
	m := mean(c.Samples[window[0]:window[1]])
	out := make([]complex128, len(c.Samples))
	for i, v := range c.Samples {
		out[i] = v - m
	}
	return withSamples(c, out), nil
}

// Rotate returns a copy of c with every sample multiplied by e^{j·rad}
// (positive angles turn the trace anticlockwise).
func Rotate(c acquire.Channel, rad float64) acquire.Channel {
	r := cmplx.Rect(1, rad)
	out := make([]complex128, len(c.Samples))
	for i, v := range c.Samples {
		out[i] = v * r
	}
	return withSamples(c, out)
}

// Gain returns a copy of c with X and Y multiplied by g.
func Gain(c acquire.Channel, g float64) acquire.Channel { return XYGain(c, g, g) }

// XYGain returns a copy of c with X multiplied by gx and Y by gy (the
// separate horizontal and vertical gains of an impedance-plane display).
func XYGain(c acquire.Channel, gx, gy float64) acquire.Channel {
	out := make([]complex128, len(c.Samples))
	for i, v := range c.Samples {
		out[i] = complex(gx*real(v), gy*imag(v))
	}
	return withSamples(c, out)
}

// Span returns a copy of c scaled so that its peak-to-peak amplitude over
// the window [start, end) is targetVpp volts (for example 4 V on the
// through-wall hole of the reference standard), and the factor applied.
func Span(c acquire.Channel, window [2]int, targetVpp float64) (acquire.Channel, float64, error) {
	if err := checkWindow(window, len(c.Samples)); err != nil {
		return c, 0, fmt.Errorf("%w: span %q: %w", ErrChannel, c.Name, err)
	}
	if !(targetVpp > 0) || math.IsInf(targetVpp, 0) {
		return c, 0, fmt.Errorf("%w: span target %v V: expected a positive amplitude", ErrChannel, targetVpp)
	}
	v := Vpp(c.Samples[window[0]:window[1]])
	if v == 0 {
		return c, 0, fmt.Errorf("%w: span %q: no signal in window %d:%d", ErrChannel, c.Name, window[0], window[1])
	}
	g := targetVpp / v
	return Gain(c, g), g, nil
}

// DifferentialFrom returns the differential channel a − b formed from two
// absolute channels of the same frequency and length, named name and with
// mode Differential.
func DifferentialFrom(name string, a, b acquire.Channel) (acquire.Channel, error) {
	if len(a.Samples) != len(b.Samples) {
		return acquire.Channel{}, fmt.Errorf("%w: differential of %q (%d samples) and %q (%d samples): lengths differ", ErrChannel, a.Name, len(a.Samples), b.Name, len(b.Samples))
	}
	if a.FreqHz != b.FreqHz {
		return acquire.Channel{}, fmt.Errorf("%w: differential of %q (%v Hz) and %q (%v Hz): frequencies differ", ErrChannel, a.Name, a.FreqHz, b.Name, b.FreqHz)
	}
	out := make([]complex128, len(a.Samples))
	for i := range out {
		out[i] = a.Samples[i] - b.Samples[i]
	}
	return acquire.Channel{Name: name, FreqHz: a.FreqHz, Mode: acquire.Differential, Samples: out}, nil
}

// MovingMedian returns in dst (nil: allocated; not x) the running median of
// x over an odd window of width samples, taken separately on X and Y; the
// window shrinks symmetrically at the ends. It removes isolated spikes
// narrower than width/2 samples and leaves steps and slow signals. It panics
// if width is not a positive odd number or dst has the wrong length.
func MovingMedian(dst, x []complex128, width int) []complex128 {
	if width < 1 || width%2 == 0 {
		panic("dsp: median width must be odd and positive")
	}
	dst = useDst(dst, len(x))
	h := width / 2
	re := make([]float64, 0, width)
	im := make([]float64, 0, width)
	n := len(x)
	for i := range x {
		k := min(h, i, n-1-i)
		re, im = re[:0], im[:0]
		for _, v := range x[i-k : i+k+1] {
			re = append(re, real(v))
			im = append(im, imag(v))
		}
		slices.Sort(re)
		slices.Sort(im)
		dst[i] = complex(re[k], im[k])
	}
	return dst
}

// RemoveBaseline returns in dst (nil: allocated; may be x) x minus its
// running mean over a centred window of width samples (odd; shrinking
// symmetrically at the ends), which removes drift slower than about
// fs/width while keeping features much narrower than the window. It panics
// if width is not a positive odd number or dst has the wrong length.
func RemoveBaseline(dst, x []complex128, width int) []complex128 {
	if width < 1 || width%2 == 0 {
		panic("dsp: baseline width must be odd and positive")
	}
	n := len(x)
	prefix := make([]complex128, n+1)
	for i, v := range x {
		prefix[i+1] = prefix[i] + v
	}
	dst = useDst(dst, n)
	h := width / 2
	for i := range n {
		k := min(h, i, n-1-i)
		m := (prefix[i+k+1] - prefix[i-k]) / complex(float64(2*k+1), 0)
		dst[i] = x[i] - m
	}
	return dst
}

// Derivative returns in dst (nil: allocated; not x) the central difference
// (x[i+lag] − x[i−lag]) / (2·lag·step), one-sided at the ends, in volts per
// unit of step (V/m for an axial step in metres, V/s for a time step). It
// panics if lag < 1, step ≤ 0, len(x) ≤ lag or dst has the wrong length.
func Derivative(dst, x []complex128, lag int, step float64) []complex128 {
	if lag < 1 || !(step > 0) || len(x) <= lag {
		panic("dsp: derivative needs lag ≥ 1, step > 0 and more than lag samples")
	}
	dst = useDst(dst, len(x))
	n := len(x)
	for i := range x {
		lo, hi := max(0, i-lag), min(n-1, i+lag)
		dst[i] = (x[hi] - x[lo]) / complex(float64(hi-lo)*step, 0)
	}
	return dst
}
