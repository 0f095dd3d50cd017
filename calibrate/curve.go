package calibrate

import (
	"errors"
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"
)

// CurvePoint is one reference flaw on a depth curve: its calibrated phase
// (degrees) and peak-to-peak amplitude (calibrated volts), and its
// as-built depth (%TW).
type CurvePoint struct {
	FlawID   string  `json:"flaw_id"`
	PhaseDeg float64 `json:"phase_deg"`
	Vpp      float64 `json:"vpp"`
	DepthPct float64 `json:"depth_pct"`
}

// Curve is a fitted depth curve: depth (%TW) as a function of calibrated
// phase, of amplitude, or of both.
//
// Piecewise-linear and monotone-cubic curves interpolate their points;
// polynomial curves are least-squares fits in the scaled variable
// u = (x − Centre)/Scale, depth = Σ Coefficients[k]·u^k, with one more
// coefficient multiplying ln(Vpp) for a phase+amplitude curve.
// Residuals are depth − curve at each point; LOOResiduals are the
// leave-one-out prediction errors (each point predicted by the curve
// fitted without it; end points of interpolating curves are skipped since
// predicting them would be extrapolation). UncertaintyPct is the RMS of the
// leave-one-out residuals: the curve's sizing uncertainty.
type Curve struct {
	Name     string       `json:"name"`
	Variable string       `json:"variable"`
	Type     string       `json:"type"`
	Order    int          `json:"order,omitempty"`
	Points   []CurvePoint `json:"points"`
	// XMin and XMax bound the independent variable (phase in degrees or
	// Vpp in volts); VppMin and VppMax bound the amplitude of a
	// phase+amplitude curve.
	XMin   float64 `json:"x_min"`
	XMax   float64 `json:"x_max"`
	VppMin float64 `json:"vpp_min,omitempty"`
	VppMax float64 `json:"vpp_max,omitempty"`
	// Xs, Ys and Slopes define an interpolating curve (sorted by X).
	Xs     []float64 `json:"xs,omitempty"`
	Ys     []float64 `json:"ys,omitempty"`
	Slopes []float64 `json:"slopes,omitempty"`
	// Centre, Scale and Coefficients define a polynomial curve.
	Centre         float64   `json:"centre,omitempty"`
	Scale          float64   `json:"scale,omitempty"`
	Coefficients   []float64 `json:"coefficients,omitempty"`
	Residuals      []float64 `json:"residuals"`
	LOOResiduals   []float64 `json:"loo_residuals"`
	UncertaintyPct float64   `json:"uncertainty_pct"`
	// Monotone reports whether depth is monotone in X over [XMin, XMax].
	Monotone bool     `json:"monotone"`
	Warnings []string `json:"warnings,omitempty"`
}

// ErrOutOfRange is returned by Curve.Depth for an input outside the
// curve's calibrated range; the depth returned with it is the curve's
// value at the nearest end of the range (a bound, not a size).
var ErrOutOfRange = errors.New("outside the curve's calibrated range")

// FitCurve fits the curve spec through pts (one point per flaw of
// spec.Flaws, in any order). It returns an error when the points cannot
// define the curve (too few, repeated abscissae, a non-positive amplitude
// for an amplitude variable, a rank-deficient least-squares system).
func FitCurve(spec CurveSpec, pts []CurvePoint) (*Curve, error) {
	if err := spec.check(); err != nil {
		return nil, err
	}
	c := &Curve{Name: spec.Name, Variable: spec.Variable, Type: spec.Type, Order: spec.Order, Points: slices.Clone(pts)}
	for _, p := range pts {
		if !finite(p.PhaseDeg) || !finite(p.Vpp) || !finite(p.DepthPct) {
			return nil, fmt.Errorf("curve %s: flaw %s has a non-finite measurement", spec.Name, p.FlawID)
		}
		if spec.Variable != VarPhase && p.Vpp <= 0 {
			return nil, fmt.Errorf("curve %s: flaw %s has Vpp %v, an amplitude curve needs a positive amplitude", spec.Name, p.FlawID, p.Vpp)
		}
	}
	if err := c.fit(pts); err != nil {
		return nil, err
	}
	c.Residuals = make([]float64, len(pts))
	for i, p := range pts {
		c.Residuals[i] = p.DepthPct - c.eval(p.PhaseDeg, p.Vpp)
	}
	c.looResiduals(spec, pts)
	c.checkMonotone()
	return c, nil
}

func (c *Curve) x(p CurvePoint) float64 {
	if c.Variable == VarAmplitude {
		return p.Vpp
	}
	return p.PhaseDeg
}

func (c *Curve) fit(pts []CurvePoint) error {
	n := len(pts)
	c.XMin, c.XMax = math.Inf(1), math.Inf(-1)
	c.VppMin, c.VppMax = 0, 0
	for _, p := range pts {
		x := c.x(p)
		c.XMin, c.XMax = math.Min(c.XMin, x), math.Max(c.XMax, x)
	}
	if c.Variable == VarPhaseAmplitude {
		c.VppMin, c.VppMax = math.Inf(1), math.Inf(-1)
		for _, p := range pts {
			c.VppMin, c.VppMax = math.Min(c.VppMin, p.Vpp), math.Max(c.VppMax, p.Vpp)
		}
	}
	switch c.Type {
	case CurvePiecewiseLinear, CurveMonotoneCubic:
		idx := make([]int, n)
		for i := range idx {
			idx[i] = i
		}
		slices.SortFunc(idx, func(a, b int) int { return cmpFloat(c.x(pts[a]), c.x(pts[b])) })
		c.Xs, c.Ys = make([]float64, n), make([]float64, n)
		for k, i := range idx {
			c.Xs[k], c.Ys[k] = c.x(pts[i]), pts[i].DepthPct
			if k > 0 && !(c.Xs[k] > c.Xs[k-1]) {
				return fmt.Errorf("curve %s: flaws %s and %s have the same %s (%g); an interpolating curve needs distinct values", c.Name, pts[idx[k-1]].FlawID, pts[i].FlawID, c.Variable, c.Xs[k])
			}
		}
		if c.Type == CurveMonotoneCubic {
			c.Slopes = fritschCarlson(c.Xs, c.Ys)
		}
		return nil
	}
	// Polynomial least squares in u = (x − centre)/scale.
	c.Centre = (c.XMin + c.XMax) / 2
	c.Scale = (c.XMax - c.XMin) / 2
	if !(c.Scale > 0) {
		return fmt.Errorf("curve %s: all points have the same %s; a polynomial needs a spread", c.Name, c.Variable)
	}
	cols := c.Order + 1
	if c.Variable == VarPhaseAmplitude {
		cols++
	}
	a := mat.NewDense(n, cols, nil)
	b := mat.NewVecDense(n, nil)
	for i, p := range pts {
		c.row(a.RawRowView(i), p.PhaseDeg, p.Vpp)
		b.SetVec(i, p.DepthPct)
	}
	if cond := mat.Cond(a, 2); !(cond < 1e10) {
		return fmt.Errorf("curve %s: the least-squares system is rank-deficient (condition number %.3g); use fewer terms or more distinct flaws", c.Name, cond)
	}
	var qr mat.QR
	qr.Factorize(a)
	var x mat.VecDense
	if err := qr.SolveVecTo(&x, false, b); err != nil {
		return fmt.Errorf("curve %s: least squares: %w", c.Name, err)
	}
	c.Coefficients = make([]float64, cols)
	for k := range c.Coefficients {
		c.Coefficients[k] = x.AtVec(k)
	}
	return nil
}

// row fills one design-matrix row for a polynomial curve.
func (c *Curve) row(dst []float64, phaseDeg, vpp float64) {
	x := phaseDeg
	if c.Variable == VarAmplitude {
		x = vpp
	}
	u := (x - c.Centre) / c.Scale
	pw := 1.0
	for k := 0; k <= c.Order; k++ {
		dst[k] = pw
		pw *= u
	}
	if c.Variable == VarPhaseAmplitude {
		dst[c.Order+1] = math.Log(vpp)
	}
}

func cmpFloat(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

// fritschCarlson returns Hermite tangents that keep the interpolant
// monotone on every interval where the data are monotone: F. N. Fritsch &
// R. E. Carlson, "Monotone piecewise cubic interpolation", SIAM J. Numer.
// Anal. 17(2), 1980, 238–246, steps 1–5 (three-point initial slopes,
// zero slopes at extrema and flat intervals, and the α² + β² ≤ 9 circle
// restriction, §4).
func fritschCarlson(xs, ys []float64) []float64 {
	n := len(xs)
	m := make([]float64, n)
	d := make([]float64, n-1)
	for k := 0; k < n-1; k++ {
		d[k] = (ys[k+1] - ys[k]) / (xs[k+1] - xs[k])
	}
	m[0], m[n-1] = d[0], d[n-2]
	for k := 1; k < n-1; k++ {
		if d[k-1]*d[k] <= 0 {
			m[k] = 0
		} else {
			m[k] = (d[k-1] + d[k]) / 2
		}
	}
	for k := 0; k < n-1; k++ {
		if d[k] == 0 {
			m[k], m[k+1] = 0, 0
			continue
		}
		a, b := m[k]/d[k], m[k+1]/d[k]
		if a < 0 {
			m[k], a = 0, 0
		}
		if b < 0 {
			m[k+1], b = 0, 0
		}
		if s := a*a + b*b; s > 9 {
			t := 3 / math.Sqrt(s)
			m[k] = t * a * d[k]
			m[k+1] = t * b * d[k]
		}
	}
	return m
}

// eval returns the curve's depth at (phase, vpp) without range checks;
// interpolating curves are held constant beyond their end points.
func (c *Curve) eval(phaseDeg, vpp float64) float64 {
	if c.Coefficients != nil {
		var row [8]float64
		r := row[:len(c.Coefficients)]
		c.row(r, phaseDeg, vpp)
		var s float64
		for k, v := range r {
			s += v * c.Coefficients[k]
		}
		return s
	}
	x := phaseDeg
	if c.Variable == VarAmplitude {
		x = vpp
	}
	n := len(c.Xs)
	switch {
	case x <= c.Xs[0]:
		return c.Ys[0]
	case x >= c.Xs[n-1]:
		return c.Ys[n-1]
	}
	k, _ := slices.BinarySearch(c.Xs, x)
	k-- // Xs[k] < x <= Xs[k+1]
	h := c.Xs[k+1] - c.Xs[k]
	t := (x - c.Xs[k]) / h
	if c.Slopes == nil {
		return c.Ys[k] + t*(c.Ys[k+1]-c.Ys[k])
	}
	// Cubic Hermite basis (Fritsch & Carlson 1980, eq. 2).
	t2, t3 := t*t, t*t*t
	return (2*t3-3*t2+1)*c.Ys[k] + (t3-2*t2+t)*h*c.Slopes[k] + (-2*t3+3*t2)*c.Ys[k+1] + (t3-t2)*h*c.Slopes[k+1]
}

// Depth returns the depth in %TW for a calibrated phase (degrees) and Vpp
// (calibrated volts); a phase-only curve ignores vpp and an amplitude
// curve ignores phase. Outside the calibrated range it returns the value
// at the nearest end of the range with ErrOutOfRange: never an
// extrapolation.
func (c *Curve) Depth(phaseDeg, vpp float64) (float64, error) {
	x := phaseDeg
	if c.Variable == VarAmplitude {
		x = vpp
	}
	out := x < c.XMin || x > c.XMax
	if c.Variable == VarPhaseAmplitude && (vpp < c.VppMin || vpp > c.VppMax || !(vpp > 0)) {
		out = true
		vpp = math.Min(math.Max(vpp, c.VppMin), c.VppMax)
	}
	if out {
		x = math.Min(math.Max(x, c.XMin), c.XMax)
		if c.Variable == VarAmplitude {
			return c.eval(phaseDeg, x), ErrOutOfRange
		}
		return c.eval(x, vpp), ErrOutOfRange
	}
	return c.eval(phaseDeg, vpp), nil
}

func (c *Curve) looResiduals(spec CurveSpec, pts []CurvePoint) {
	c.LOOResiduals = make([]float64, 0, len(pts))
	var ss float64
	for i := range pts {
		if c.Xs != nil && (c.x(pts[i]) == c.XMin || c.x(pts[i]) == c.XMax) {
			continue
		}
		rest := slices.Delete(slices.Clone(pts), i, i+1)
		sub := spec
		sub.Flaws = nil
		for _, p := range rest {
			sub.Flaws = append(sub.Flaws, p.FlawID)
		}
		if sub.check() != nil {
			continue
		}
		d := &Curve{Name: c.Name, Variable: c.Variable, Type: c.Type, Order: c.Order}
		if d.fit(rest) != nil {
			continue
		}
		r := pts[i].DepthPct - d.eval(pts[i].PhaseDeg, pts[i].Vpp)
		c.LOOResiduals = append(c.LOOResiduals, r)
		ss += r * r
	}
	if len(c.LOOResiduals) > 0 {
		c.UncertaintyPct = math.Sqrt(ss / float64(len(c.LOOResiduals)))
	} else {
		c.Warnings = append(c.Warnings, "no leave-one-out residuals (too few points): the sizing uncertainty is unknown")
	}
}

// checkMonotone samples the curve over its range and records whether the
// depth is monotone in the independent variable (for a phase+amplitude
// curve, in phase at the geometric-mean amplitude).
func (c *Curve) checkMonotone() {
	const steps = 400
	vpp := 1.0
	if c.Variable == VarPhaseAmplitude {
		vpp = math.Sqrt(c.VppMin * c.VppMax)
	}
	up, down := false, false
	prev := math.NaN()
	for i := 0; i <= steps; i++ {
		x := c.XMin + (c.XMax-c.XMin)*float64(i)/steps
		var y float64
		if c.Variable == VarAmplitude {
			y = c.eval(0, x)
		} else {
			y = c.eval(x, vpp)
		}
		if i > 0 {
			const eps = 1e-9
			if y > prev+eps {
				up = true
			}
			if y < prev-eps {
				down = true
			}
		}
		prev = y
	}
	c.Monotone = !(up && down)
	if !c.Monotone {
		c.Warnings = append(c.Warnings, fmt.Sprintf("curve %s is not monotone over %s %.4g to %.4g: one reading can mean two depths", c.Name, c.Variable, c.XMin, c.XMax))
	}
}
