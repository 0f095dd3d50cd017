package dsp

import (
	"errors"
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"whorl/acquire"
)

// analytic is a smooth complex signal of position: a Gaussian flaw response
// on a slowly rotating baseline.
func analytic(z float64) complex128 {
	g := math.Exp(-0.5 * math.Pow((z-0.3)/0.004, 2))
	return complex(g*2, -g) + cmplx.Rect(0.1, 5*z)
}

func TestResampleAxialAnalytic(t *testing.T) {
	t.Parallel()
	// Time-sampled at 2 kHz with a varying probe speed; the encoder gives
	// z(t) = 0.5t + 0.01·sin(3t) (strictly increasing).
	const fs = 2000.0
	n := 1400
	s := &acquire.Scan{SampleRateHz: fs}
	ch := acquire.Channel{Name: "diff-400k", FreqHz: 4e5, Mode: acquire.Differential}
	for i := range n {
		tm := float64(i) / fs
		z := 0.5*tm + 0.01*math.Sin(3*tm)
		s.TimeS = append(s.TimeS, tm)
		s.PositionM = append(s.PositionM, z)
		ch.Samples = append(ch.Samples, analytic(z))
	}
	s.Channels = []acquire.Channel{ch}
	out, err := ResampleAxial(s, 0.5e-3)
	if err != nil {
		t.Fatal(err)
	}
	if out.AxialStepM != 0.5e-3 || out.Validate() != nil {
		t.Fatalf("step %v, validate %v", out.AxialStepM, out.Validate())
	}
	for k, z := range out.PositionM {
		got := out.Channels[0].Samples[k]
		want := analytic(z)
		// Tolerance: cubic-spline error h⁴·max|f''''|·5/384 with h ≈ 0.26 mm
		// and the 4 mm Gaussian (|f''''| ≈ 3/σ⁴·2 V) gives ≈ 2e-5 V; the
		// natural end conditions add error only within a few samples of the
		// ends, where the signal is the smooth baseline.
		if cmplx.Abs(got-want) > 5e-5 {
			t.Fatalf("z = %.5f m: %v, want %v (5e-5 V)", z, got, want)
		}
	}
}

func TestResampleAxialFromSpeed(t *testing.T) {
	t.Parallel()
	s := &acquire.Scan{SampleRateHz: 100}
	ch := acquire.Channel{Name: "a", FreqHz: 1}
	for i := range 100 {
		tm := float64(i) / 100
		s.TimeS = append(s.TimeS, tm)
		// Linear in position, so the spline reproduces it exactly.
		ch.Samples = append(ch.Samples, complex(0.5*tm*3, 1))
	}
	s.Channels = []acquire.Channel{ch}
	out, err := ResampleAxial(s, 0.01, FromSpeed(0.5, 0))
	if err != nil {
		t.Fatal(err)
	}
	for k, z := range out.PositionM {
		if cmplx.Abs(out.Channels[0].Samples[k]-complex(3*z, 1)) > 1e-12 {
			t.Fatalf("z %v: %v, want %v", z, out.Channels[0].Samples[k], complex(3*z, 1))
		}
	}
}

func TestResampleAxialErrors(t *testing.T) {
	t.Parallel()
	mk := func(pos []float64) *acquire.Scan {
		c := acquire.Channel{Name: "a", FreqHz: 1, Samples: make([]complex128, len(pos))}
		return &acquire.Scan{PositionM: pos, Channels: []acquire.Channel{c}}
	}
	for _, c := range []struct {
		name string
		pos  []float64
		want string
	}{
		{"reversal", []float64{0, 0.1, 0.2, 0.15, 0.3}, "sample 3"},
		{"repeat", []float64{0, 0.1, 0.1, 0.3}, "sample 2"},
		{"nan", []float64{0, 0.1, math.NaN(), 0.3}, "sample 2"},
	} {
		_, err := ResampleAxial(mk(c.pos), 0.01)
		if err == nil || !errors.Is(err, ErrPositions) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one naming %q", c.name, err, c.want)
		}
	}
	// Decreasing positions (a push) are accepted and come out ascending.
	out, err := ResampleAxial(mk([]float64{0.3, 0.2, 0.1, 0}), 0.05)
	if err != nil || out.PositionM[0] != 0 || len(out.PositionM) != 7 {
		t.Errorf("decreasing positions: %v, %v", out, err)
	}
}
