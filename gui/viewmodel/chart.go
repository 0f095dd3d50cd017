package viewmodel

import (
	"math"
	"math/cmplx"
)

// Chart is the strip-chart state of one open scan: the axial range shown
// and the analysis window, both in axis units (metres along the component,
// or seconds or sample numbers for scans without a position axis).
type Chart struct {
	axis []float64
	n    int
	// AxisName and AxisUnit describe the axis in SI ("position", "m").
	AxisName, AxisUnit string
	// FullFrom and FullTo bound the whole scan.
	FullFrom, FullTo float64
	// ViewFrom and ViewTo bound the range shown.
	ViewFrom, ViewTo float64
	// WinFrom and WinTo bound the analysis window.
	WinFrom, WinTo float64
	// step is the mean sample spacing in axis units.
	step float64
}

// minWindowSamples is the narrowest analysis window, in samples.
const minWindowSamples = 4

// NewChart returns the chart of a scan with the given axis (positions in
// metres, times in seconds, or nil for sample numbers) and n samples,
// showing the whole scan with a window of about winSamples samples at its
// centre.
func NewChart(axis []float64, n int, name, unit string, winSamples int) *Chart {
	c := &Chart{axis: axis, n: n, AxisName: name, AxisUnit: unit}
	if axis == nil {
		c.AxisName, c.AxisUnit = "sample", ""
	}
	c.FullFrom, c.FullTo = c.at(0), c.at(max(n-1, 0))
	if c.FullFrom > c.FullTo {
		c.FullFrom, c.FullTo = c.FullTo, c.FullFrom
	}
	if !(c.FullTo > c.FullFrom) {
		c.FullTo = c.FullFrom + 1
	}
	c.step = (c.FullTo - c.FullFrom) / float64(max(n-1, 1))
	c.ViewFrom, c.ViewTo = c.FullFrom, c.FullTo
	w := float64(max(winSamples, minWindowSamples)) * c.step
	mid := (c.FullFrom + c.FullTo) / 2
	c.SetWindow(mid-w/2, mid+w/2)
	return c
}

func (c *Chart) at(i int) float64 {
	if c.axis == nil {
		return float64(i)
	}
	if i >= len(c.axis) {
		return 0
	}
	return c.axis[i]
}

// Step returns the mean sample spacing in axis units.
func (c *Chart) Step() float64 { return c.step }

// Samples returns the analysis window as a range of sample indices.
func (c *Chart) Samples() Window {
	lo, hi := IndexRange(c.axis, c.n, c.WinFrom, c.WinTo)
	return Window{lo, hi}
}

// ViewSamples returns the sample range shown.
func (c *Chart) ViewSamples() Window {
	lo, hi := IndexRange(c.axis, c.n, c.ViewFrom, c.ViewTo)
	return Window{lo, hi}
}

// SetWindow places the analysis window on [from, to], keeping it at least
// a few samples wide and inside the scan, and pans the view to show it.
func (c *Chart) SetWindow(from, to float64) {
	c.WinFrom, c.WinTo = c.fit(from, to, minWindowSamples*c.step)
	c.showWindow()
}

// fit orders [from, to], widens it about its centre to at least minW,
// and shifts it (shrinking it to the scan only when it is longer) so that
// it lies inside the scan.
func (c *Chart) fit(from, to, minW float64) (float64, float64) {
	if from > to {
		from, to = to, from
	}
	if to-from < minW {
		mid := (from + to) / 2
		from, to = mid-minW/2, mid+minW/2
	}
	if to-from >= c.FullTo-c.FullFrom {
		return c.FullFrom, c.FullTo
	}
	if from < c.FullFrom {
		from, to = c.FullFrom, to+c.FullFrom-from
	}
	if to > c.FullTo {
		from, to = from-(to-c.FullTo), c.FullTo
	}
	return from, to
}

// SetWindowSamples places the window on the samples of w.
func (c *Chart) SetWindowSamples(w Window) {
	if w.Hi <= w.Lo {
		return
	}
	c.SetWindow(c.at(w.Lo), c.at(max(w.Hi-1, w.Lo)))
}

func (c *Chart) showWindow() {
	vw := c.ViewTo - c.ViewFrom
	if c.WinTo-c.WinFrom > vw {
		mid := (c.WinFrom + c.WinTo) / 2
		vw = (c.WinTo - c.WinFrom) * 1.5
		c.setView(mid-vw/2, mid+vw/2)
		return
	}
	switch {
	case c.WinFrom < c.ViewFrom:
		c.setView(c.WinFrom-vw*0.1, c.WinFrom+vw*0.9)
	case c.WinTo > c.ViewTo:
		c.setView(c.WinTo-vw*0.9, c.WinTo+vw*0.1)
	}
}

// setView sets the range shown, clamped to the scan and at least a few
// samples wide.
func (c *Chart) setView(from, to float64) {
	c.ViewFrom, c.ViewTo = c.fit(from, to, 4*minWindowSamples*c.step)
}

// MoveWindow shifts the window by d axis units.
func (c *Chart) MoveWindow(d float64) { c.SetWindow(c.WinFrom+d, c.WinTo+d) }

// StepWindow shifts the window by a fraction of its own width (negative:
// towards the start).
func (c *Chart) StepWindow(frac float64) { c.MoveWindow(frac * (c.WinTo - c.WinFrom)) }

// CentreWindow moves the window, keeping its width, so it is centred on x.
func (c *Chart) CentreWindow(x float64) {
	h := (c.WinTo - c.WinFrom) / 2
	c.SetWindow(x-h, x+h)
}

// ScaleWindow multiplies the window width by f about its centre.
func (c *Chart) ScaleWindow(f float64) {
	mid := (c.WinFrom + c.WinTo) / 2
	h := (c.WinTo - c.WinFrom) / 2 * f
	c.SetWindow(mid-h, mid+h)
}

// Zoom multiplies the magnification by f (f > 1 zooms in) about x; a NaN x
// zooms about the analysis window's centre.
func (c *Chart) Zoom(f, x float64) {
	if !(f > 0) {
		return
	}
	if math.IsNaN(x) {
		x = (c.WinFrom + c.WinTo) / 2
	}
	from := x - (x-c.ViewFrom)/f
	to := x + (c.ViewTo-x)/f
	c.setView(from, to)
}

// Pan shifts the view by a fraction of its width (negative: towards the start).
func (c *Chart) Pan(frac float64) {
	d := frac * (c.ViewTo - c.ViewFrom)
	c.setView(c.ViewFrom+d, c.ViewTo+d)
}

// Fit shows the whole scan.
func (c *Chart) Fit() { c.ViewFrom, c.ViewTo = c.FullFrom, c.FullTo }

// Frac returns the position of x across the view, 0 at ViewFrom and 1 at ViewTo.
func (c *Chart) Frac(x float64) float64 { return (x - c.ViewFrom) / (c.ViewTo - c.ViewFrom) }

// AxisAt returns the axis value at fraction f across the view.
func (c *Chart) AxisAt(f float64) float64 { return c.ViewFrom + f*(c.ViewTo-c.ViewFrom) }

// Axis returns the scan's axis (nil for sample numbers).
func (c *Chart) Axis() []float64 { return c.axis }

// DisplayUnit returns the unit the axis labels use for the current view
// and the factor from SI: millimetres for views under 0.5 m, else metres.
func (c *Chart) DisplayUnit() (unit string, factor float64) {
	if c.AxisUnit == "m" && c.ViewTo-c.ViewFrom < 0.5 {
		return "mm", 1000
	}
	if c.AxisUnit == "s" && c.ViewTo-c.ViewFrom < 0.5 {
		return "ms", 1000
	}
	return c.AxisUnit, 1
}

// Plane is the impedance-plane display transform. It only changes how
// samples are drawn: a displayed point is (z − Null)·e^{j·RotationRad}.
type Plane struct {
	RotationRad float64
	// SpanV is the full width (and height) of the plot in volts.
	SpanV float64
	// Null is the sample value placed at the centre, in volts.
	Null complex128
}

// DefaultSpanV is the span shown before any measurement, in volts.
const DefaultSpanV = 10

// Apply returns the displayed position of sample z.
func (p Plane) Apply(z complex128) complex128 {
	return (z - p.Null) * cmplx.Rect(1, p.RotationRad)
}

// Rotate adds d radians, wrapped to (−π, π].
func (p *Plane) Rotate(dRad float64) {
	r := math.Remainder(p.RotationRad+dRad, 2*math.Pi)
	if r <= -math.Pi {
		r += 2 * math.Pi
	}
	p.RotationRad = r
}

// Gain multiplies the displayed size by f (the span shrinks by f).
func (p *Plane) Gain(f float64) {
	if f > 0 && p.SpanV/f > 1e-6 && p.SpanV/f < 1e4 {
		p.SpanV /= f
	}
}
