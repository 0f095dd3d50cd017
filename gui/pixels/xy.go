package pixels

import (
	"image/color"
	"math"
)

// Series is one set of points of an XY plot.
type Series struct {
	X, Y   []float64
	Colour color.NRGBA
	// Line joins successive points; NaN values break the line.
	Line bool
	// Marker is the symbol kind of Canvas.Marker, or −1 for none.
	Marker int
	// Stems draw a vertical line from y = 0 to each point (residuals).
	Stems bool
}

// XYScene is a plot of series in one rectangle with linear axes.
type XYScene struct {
	Area               Rect
	XLo, XHi, YLo, YHi float64
	GridX, GridY       []float64
	Series             []Series
	Style              Style
	// Clear fills the whole canvas with the background first.
	Clear bool
}

// XYPixel returns the pixel of (x, y) in the scene's area.
func (sc *XYScene) XYPixel(x, y float64) (int, int) {
	a := sc.Area
	px := float64(a.X0) + (x-sc.XLo)/(sc.XHi-sc.XLo)*float64(a.W()-1)
	py := float64(a.Y1-1) - (y-sc.YLo)/(sc.YHi-sc.YLo)*float64(a.H()-1)
	return int(math.Round(px)), int(math.Round(py))
}

// DrawXY draws the scene.
func DrawXY(c Canvas, sc *XYScene) {
	st := sc.Style
	if sc.Clear {
		c.Clear(st.Background)
	}
	a := sc.Area
	if a.W() < 2 || a.H() < 2 || !(sc.XHi > sc.XLo) || !(sc.YHi > sc.YLo) {
		return
	}
	c.FillRect(a.X0, a.Y0, a.X1, a.Y1, st.Plot)
	for _, v := range sc.GridX {
		x, _ := sc.XYPixel(v, sc.YLo)
		col := st.Grid
		if v == 0 {
			col = st.Axis
		}
		c.VLine(x, a.Y0, a.Y1-1, col)
	}
	for _, v := range sc.GridY {
		_, y := sc.XYPixel(sc.XLo, v)
		col := st.Grid
		if v == 0 {
			col = st.Axis
		}
		c.HLine(y, a.X0, a.X1-1, col)
	}
	c.Rect(a.X0, a.Y0, a.X1, a.Y1, st.Grid)
	sub := Canvas{Img: c.Img.SubImage(imageRect(a)).(*imageRGBA)}
	for _, s := range sc.Series {
		px, py, have := 0, 0, false
		for i := range min(len(s.X), len(s.Y)) {
			if math.IsNaN(s.X[i]) || math.IsNaN(s.Y[i]) || math.IsInf(s.X[i], 0) || math.IsInf(s.Y[i], 0) {
				have = false
				continue
			}
			x, y := sc.XYPixel(s.X[i], s.Y[i])
			x, y = x-a.X0, y-a.Y0
			if s.Stems {
				_, y0 := sc.XYPixel(s.X[i], 0)
				sub.VLine(x, y0-a.Y0, y, s.Colour)
				sub.VLine(x+1, y0-a.Y0, y, s.Colour)
			}
			if s.Line && have {
				sub.ThickLine(px, py, x, y, s.Colour)
			}
			if s.Marker >= 0 {
				sub.Marker(x, y, 7, s.Marker, s.Colour)
			}
			px, py, have = x, y, true
		}
	}
}

// Range returns the smallest and largest finite values of the slices,
// padded by frac of the range on each side; (−1, 1) when there are none.
func Range(frac float64, vals ...[]float64) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, v := range vals {
		for _, x := range v {
			if !math.IsNaN(x) && !math.IsInf(x, 0) {
				lo, hi = math.Min(lo, x), math.Max(hi, x)
			}
		}
	}
	if math.IsInf(lo, 0) {
		return -1, 1
	}
	if hi-lo < 1e-12*math.Max(1, math.Abs(hi)) {
		d := math.Max(math.Abs(hi)*0.1, 1e-9)
		return lo - d, hi + d
	}
	p := frac * (hi - lo)
	return lo - p, hi + p
}
