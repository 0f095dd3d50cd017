package dsp

import (
	"errors"
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"whorl/acquire"
)

func TestChannelOps(t *testing.T) {
	t.Parallel()
	raw := []complex128{1 + 1i, 2 + 1i, 3 - 1i, 0.5 + 2i}
	c := acquire.Channel{Name: "abs-100k", FreqHz: 1e5, Mode: acquire.Absolute, Samples: raw}
	keep := append([]complex128(nil), raw...)
	n, err := Null(c, [2]int{1, 3})
	if err != nil {
		t.Fatal(err)
	}
	// Mean of samples 1 and 2 is 2.5 + 0i.
	if n.Samples[0] != -1.5+1i {
		t.Errorf("Null: sample 0 = %v, want -1.5+1i", n.Samples[0])
	}
	r := Rotate(c, math.Pi/2)
	if cmplx.Abs(r.Samples[0]-(-1+1i)) > 1e-15 {
		t.Errorf("Rotate 90°: %v, want -1+1i (anticlockwise)", r.Samples[0])
	}
	g := XYGain(c, 2, -1)
	if g.Samples[2] != 6+1i {
		t.Errorf("XYGain: %v, want 6+1i", g.Samples[2])
	}
	s, f, err := Span(c, [2]int{0, 4}, 4)
	if err != nil || !scalar.EqualWithinRel(Vpp(s.Samples), 4, 1e-14) || !scalar.EqualWithinRel(f, 4/Vpp(raw), 1e-14) {
		t.Errorf("Span: Vpp %v, factor %v, %v; want 4 V", Vpp(s.Samples), f, err)
	}
	b := acquire.Channel{Name: "abs2", FreqHz: 1e5, Samples: []complex128{1, 1, 1, 1}}
	d, err := DifferentialFrom("diff-100k", c, b)
	if err != nil || d.Samples[1] != 1+1i || d.Mode != acquire.Differential {
		t.Errorf("DifferentialFrom: %v %v %v", d.Samples, d.Mode, err)
	}
	b.FreqHz = 2e5
	if _, err := DifferentialFrom("x", c, b); err == nil || !errors.Is(err, ErrChannel) {
		t.Errorf("DifferentialFrom of different frequencies: %v", err)
	}
	if _, err := Null(c, [2]int{3, 9}); err == nil || !strings.Contains(err.Error(), "3:9") {
		t.Errorf("Null out of range: %v", err)
	}
	for i := range raw {
		if raw[i] != keep[i] {
			t.Fatal("raw samples changed")
		}
	}
}

func TestMovingMedianSpike(t *testing.T) {
	t.Parallel()
	step := func(i int) complex128 {
		if i < 30 {
			return 1 - 0.5i
		}
		return 3 + 2i
	}
	x := make([]complex128, 50)
	for i := range x {
		x[i] = step(i)
	}
	x[10] = 100 - 100i // a one-sample spike
	x[20] = -50        // and another
	y := MovingMedian(nil, x, 5)
	// Median filtering keeps a step and removes pulses shorter than half
	// the window (root-signal property; Gallagher & Wise, IEEE Trans. ASSP
	// 29(6), 1981).
	for i := range y {
		want := step(i)
		if cmplx.Abs(y[i]-want) > 1e-12 {
			t.Errorf("sample %d: %v, want %v", i, y[i], want)
		}
	}
}

func TestRemoveBaseline(t *testing.T) {
	t.Parallel()
	// A constant offset plus a linear drift is removed exactly by a centred
	// running mean (the mean of a linear function over a symmetric window is
	// its centre value), including at the shrinking ends.
	x := make([]complex128, 200)
	for i := range x {
		x[i] = complex(0.3+0.01*float64(i), -2+0.002*float64(i))
	}
	y := RemoveBaseline(nil, x, 51)
	for i, v := range y {
		if cmplx.Abs(v) > 1e-12 {
			t.Fatalf("sample %d: %v, want 0", i, v)
		}
	}
}

func TestDerivative(t *testing.T) {
	t.Parallel()
	// Central differences are exact for quadratics (closed form): d/dz of
	// (z² + jz) at z is 2z + j.
	const h = 0.001
	x := make([]complex128, 20)
	for i := range x {
		z := float64(i) * h
		x[i] = complex(z*z, z)
	}
	y := Derivative(nil, x, 1, h)
	for i := 1; i < 19; i++ {
		want := complex(2*float64(i)*h, 1)
		if cmplx.Abs(y[i]-want) > 1e-9 {
			t.Errorf("sample %d: %v, want %v", i, y[i], want)
		}
	}
}
