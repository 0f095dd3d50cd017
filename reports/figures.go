package reports

import (
	"errors"
	"fmt"
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

var (
	traceGrey = color.Gray{Y: 170}
	traceDark = color.RGBA{R: 20, G: 40, B: 110, A: 255}
	traceRed  = color.RGBA{R: 170, G: 30, B: 30, A: 255}
)

// drawFigure draws p as vector graphics into the rectangle of the current
// page with top-left corner (x, y) and size w × h millimetres.
func (pw *pdfw) drawFigure(p *plot.Plot, x, y, w, h float64) {
	c := newPDFCanvas(pw.f, "sans", x, y, w, h)
	p.Draw(draw.New(c))
	c.finish()
}

// newPlot returns a plot whose text is set in Liberation Sans, the
// report's font, so that the widths gonum/plot measures are those of the
// glyphs the PDF shows.
func newPlot() *plot.Plot {
	p := plot.New()
	for _, f := range []*font.Font{&p.Title.TextStyle.Font, &p.X.Label.TextStyle.Font, &p.Y.Label.TextStyle.Font,
		&p.X.Tick.Label.Font, &p.Y.Tick.Label.Font, &p.Legend.TextStyle.Font} {
		f.Typeface, f.Variant = "Liberation", "Sans"
	}
	return p
}

func finite(vs ...float64) bool {
	for _, v := range vs {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return false
		}
	}
	return true
}

// padRange returns [lo, hi] widened so that it is not empty.
func padRange(lo, hi float64) (float64, float64) {
	if hi-lo < 1e-12*math.Max(1, math.Abs(hi)) {
		d := math.Max(1e-3, 0.1*math.Abs(hi))
		return lo - d, hi + d
	}
	pad := 0.05 * (hi - lo)
	return lo - pad, hi + pad
}

// curveFigure plots depth (%TW) against phase (degrees) for a calibration.
func curveFigure(c *Calibration) (*plot.Plot, error) {
	if len(c.Points) == 0 {
		return nil, errors.New("no curve points")
	}
	pts := make(plotter.XYs, len(c.Points))
	for i, q := range c.Points {
		if !finite(q.PhaseRad, q.DepthPct) {
			return nil, fmt.Errorf("curve point %d is not finite", i)
		}
		pts[i] = plotter.XY{X: degrees(q.PhaseRad), Y: q.DepthPct}
	}
	p := newPlot()
	p.Title.Text = "Phase to depth"
	p.X.Label.Text = "Phase (deg)"
	p.Y.Label.Text = "Depth (%TW)"
	p.Add(plotter.NewGrid())
	l, err := plotter.NewLine(pts)
	if err != nil {
		return nil, err
	}
	l.Color = traceDark
	s, err := plotter.NewScatter(pts)
	if err != nil {
		return nil, err
	}
	s.Color = traceDark
	p.Add(l, s)
	return p, nil
}

func checkWindow(w *Window, start, end int) error {
	if len(w.X) != len(w.Y) {
		return fmt.Errorf("signal window has %d X and %d Y samples", len(w.X), len(w.Y))
	}
	if len(w.X) < 2 {
		return errors.New("signal window has fewer than 2 samples")
	}
	if !finite(w.X...) || !finite(w.Y...) {
		return errors.New("signal window holds non-finite samples")
	}
	if start < w.FirstSample || end > w.FirstSample+len(w.X) {
		return fmt.Errorf("measurement window [%d, %d) lies outside the signal window [%d, %d)",
			start, end, w.FirstSample, w.FirstSample+len(w.X))
	}
	return nil
}

// lissajousFigure plots Y against X (the impedance plane) over the signal
// window in grey and the measurement window in dark blue, with equal
// scales on both axes so that phase angles appear true.
func lissajousFigure(d *Indication) (*plot.Plot, error) {
	w := d.Window
	if err := checkWindow(w, d.StartSample, d.EndSample); err != nil {
		return nil, err
	}
	all := make(plotter.XYs, len(w.X))
	for i := range w.X {
		all[i] = plotter.XY{X: w.X[i], Y: w.Y[i]}
	}
	meas := all[d.StartSample-w.FirstSample : d.EndSample-w.FirstSample]
	p := newPlot()
	p.Title.Text = "Impedance plane"
	p.X.Label.Text = "X (V)"
	p.Y.Label.Text = "Y (V)"
	p.Add(plotter.NewGrid())
	la, err := plotter.NewLine(all)
	if err != nil {
		return nil, err
	}
	la.Color = traceGrey
	p.Add(la)
	if len(meas) >= 2 {
		lm, err := plotter.NewLine(meas)
		if err != nil {
			return nil, err
		}
		lm.Color, lm.Width = traceDark, vg.Points(1.5)
		p.Add(lm)
	}
	// Equal scales: the same span on both axes, centred on the data.
	xlo, xhi, ylo, yhi := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	for _, q := range all {
		xlo, xhi = math.Min(xlo, q.X), math.Max(xhi, q.X)
		ylo, yhi = math.Min(ylo, q.Y), math.Max(yhi, q.Y)
	}
	xlo, xhi = padRange(xlo, xhi)
	ylo, yhi = padRange(ylo, yhi)
	span := math.Max(xhi-xlo, yhi-ylo)
	xc, yc := (xlo+xhi)/2, (ylo+yhi)/2
	if !finite(span, xc, yc, xc-span/2, xc+span/2, yc-span/2, yc+span/2) {
		return nil, errors.New("signal window spans too large a range to plot")
	}
	p.X.Min, p.X.Max = xc-span/2, xc+span/2
	p.Y.Min, p.Y.Max = yc-span/2, yc+span/2
	return p, nil
}

// stripFigure plots X and Y against sample number, with the measurement
// window marked by two vertical lines.
func stripFigure(d *Indication) (*plot.Plot, error) {
	w := d.Window
	if err := checkWindow(w, d.StartSample, d.EndSample); err != nil {
		return nil, err
	}
	xs := make(plotter.XYs, len(w.X))
	ys := make(plotter.XYs, len(w.Y))
	lo, hi := math.Inf(1), math.Inf(-1)
	for i := range w.X {
		n := float64(w.FirstSample + i)
		xs[i] = plotter.XY{X: n, Y: w.X[i]}
		ys[i] = plotter.XY{X: n, Y: w.Y[i]}
		lo, hi = math.Min(lo, math.Min(w.X[i], w.Y[i])), math.Max(hi, math.Max(w.X[i], w.Y[i]))
	}
	lo, hi = padRange(lo, hi)
	hi += 0.25 * (hi - lo) // headroom for the legend
	if !finite(lo, hi, hi-lo) {
		return nil, errors.New("signal window spans too large a range to plot")
	}
	p := newPlot()
	p.Title.Text = "Strip chart"
	p.X.Label.Text = "Sample"
	p.Y.Label.Text = "Volts"
	p.Add(plotter.NewGrid())
	lx, err := plotter.NewLine(xs)
	if err != nil {
		return nil, err
	}
	lx.Color = traceDark
	ly, err := plotter.NewLine(ys)
	if err != nil {
		return nil, err
	}
	ly.Color = traceRed
	ly.Dashes = []vg.Length{vg.Points(3), vg.Points(2)}
	p.Add(lx, ly)
	p.Legend.Add("X", lx)
	p.Legend.Add("Y", ly)
	p.Legend.Top = true
	for _, n := range []int{d.StartSample, d.EndSample - 1} {
		m, err := plotter.NewLine(plotter.XYs{{X: float64(n), Y: lo}, {X: float64(n), Y: hi}})
		if err != nil {
			return nil, err
		}
		m.Color = traceGrey
		m.Dashes = []vg.Length{vg.Points(1), vg.Points(2)}
		p.Add(m)
	}
	p.Y.Min, p.Y.Max = lo, hi
	return p, nil
}
