package pixels

import (
	"image/color"
	"math"
	"math/cmplx"

	"whorl/acquire"
	"whorl/gui/viewmodel"
)

// Style holds the colours of a plot; the views fill it from the theme.
type Style struct {
	Background color.NRGBA // behind the plot areas
	Plot       color.NRGBA // inside a plot area
	Grid       color.NRGBA
	Axis       color.NRGBA // zero lines and frames
	Window     color.NRGBA // analysis-window band (translucent)
	WindowEdge color.NRGBA
	Landmark   color.NRGBA
	Chord      color.NRGBA
	// Channels are the trace colours, one per channel in scan order.
	Channels []color.NRGBA
}

// ChannelColour returns the colour of channel i, cycling.
func (s Style) ChannelColour(i int) color.NRGBA {
	if len(s.Channels) == 0 {
		return s.Axis
	}
	return s.Channels[i%len(s.Channels)]
}

// Rect is a pixel rectangle [X0, X1) × [Y0, Y1).
type Rect struct{ X0, Y0, X1, Y1 int }

// W returns the width.
func (r Rect) W() int { return r.X1 - r.X0 }

// H returns the height.
func (r Rect) H() int { return r.Y1 - r.Y0 }

// Trace is one decimated strip-chart trace.
type Trace struct {
	Spans  []viewmodel.Span
	Colour color.NRGBA
}

// StripPanel is one channel's strip chart.
type StripPanel struct {
	Area Rect
	// Traces hold one min/max span per column of Area.
	Traces []Trace
	// YLo and YHi are the values at the bottom and top of Area, in volts.
	YLo, YHi float64
	// GridY are the vertical-axis tick values in volts.
	GridY []float64

	spanX, spanY []viewmodel.Span // decimation buffers
}

// StripScene is everything drawn for the strip charts: panels sharing one
// horizontal axis, with the analysis window and landmarks.
type StripScene struct {
	Panels []StripPanel
	// GridX, WinFrom, WinTo and Landmarks are fractions across the view (0…1).
	GridX          []float64
	WinFrom, WinTo float64
	Landmarks      []float64
	Style          Style
}

// DecimateScene fills the traces of panel p for channel ch over the view of
// chart (using the channel's block envelope env when not nil), and chooses its vertical range from the visible data (padded by
// 8 %, symmetric about the midpoint). The spans of previous calls are
// reused.
func DecimateScene(p *StripPanel, chart *viewmodel.Chart, ch *acquire.Channel, env *viewmodel.Envelope, parts []viewmodel.Part, colours []color.NRGBA) {
	cols := p.Area.W()
	vs := chart.ViewSamples()
	// Include one sample either side so that the trace reaches the edges.
	lo, hi := max(vs.Lo-1, 0), min(vs.Hi+1, len(ch.Samples))
	if len(p.Traces) != len(parts) {
		p.Traces = make([]Trace, len(parts))
	}
	// Both parts in one pass over the samples.
	p.spanX, p.spanY = viewmodel.DecimateEnvelopeXY(p.spanX, p.spanY, env, ch.Samples, chart.Axis(), lo, hi, chart.ViewFrom, chart.ViewTo, cols)
	ymin, ymax := math.Inf(1), math.Inf(-1)
	for k, part := range parts {
		t := &p.Traces[k]
		t.Spans = p.spanX
		if part == viewmodel.PartY {
			t.Spans = p.spanY
		}
		t.Colour = colours[k%len(colours)]
		for _, s := range t.Spans {
			if !s.Empty {
				ymin = math.Min(ymin, float64(s.Min))
				ymax = math.Max(ymax, float64(s.Max))
			}
		}
	}
	if math.IsInf(ymin, 0) {
		ymin, ymax = -1, 1
	}
	if ymax-ymin < 1e-6 {
		ymin, ymax = ymin-0.5, ymax+0.5
	}
	pad := 0.08 * (ymax - ymin)
	p.YLo, p.YHi = ymin-pad, ymax+pad
	p.GridY, _ = viewmodel.Ticks(p.YLo, p.YHi, max(2, p.Area.H()/28))
}

// DrawStrips draws the scene. The canvas is cleared first.
func DrawStrips(c Canvas, sc *StripScene) {
	st := sc.Style
	c.Clear(st.Background)
	for i := range sc.Panels {
		p := &sc.Panels[i]
		a := p.Area
		if a.W() <= 0 || a.H() <= 0 {
			continue
		}
		c.FillRect(a.X0, a.Y0, a.X1, a.Y1, st.Plot)
		for _, f := range sc.GridX {
			x := a.X0 + int(f*float64(a.W()))
			c.VLine(x, a.Y0, a.Y1-1, st.Grid)
		}
		yOf := func(v float64) int {
			return a.Y1 - 1 - int((v-p.YLo)/(p.YHi-p.YLo)*float64(a.H()-1)+0.5)
		}
		for _, v := range p.GridY {
			col := st.Grid
			if v == 0 {
				col = st.Axis
			}
			c.HLine(yOf(v), a.X0, a.X1-1, col)
		}
		// Analysis window band.
		wx0 := a.X0 + int(math.Floor(sc.WinFrom*float64(a.W())))
		wx1 := a.X0 + int(math.Ceil(sc.WinTo*float64(a.W())))
		if wx1 > a.X0 && wx0 < a.X1 {
			c.FillRect(max(wx0, a.X0), a.Y0, min(wx1, a.X1), a.Y1, st.Window)
			if wx0 >= a.X0 {
				c.VLine(wx0, a.Y0, a.Y1-1, st.WindowEdge)
			}
			if wx1-1 < a.X1 {
				c.VLine(wx1-1, a.Y0, a.Y1-1, st.WindowEdge)
			}
		}
		for _, f := range sc.Landmarks {
			if f >= 0 && f <= 1 {
				c.Dashed(a.X0+int(f*float64(a.W())), a.Y0, a.Y1-1, 4, st.Landmark)
			}
		}
		for _, t := range p.Traces {
			drawTrace(c, a, t, yOf)
		}
		c.Rect(a.X0, a.Y0, a.X1, a.Y1, st.Grid)
	}
}

// drawTrace draws one min/max trace: a vertical span per column, joined
// to the previous column so that the trace stays continuous, and joined
// across empty columns by a straight line when zoomed in past one sample
// per column.
func drawTrace(c Canvas, a Rect, t Trace, yOf func(float64) int) {
	prevX, prevLo, prevHi := -1, 0, 0
	for i, s := range t.Spans {
		if s.Empty {
			continue
		}
		x := a.X0 + i
		ylo, yhi := yOf(float64(s.Min)), yOf(float64(s.Max)) // ylo ≥ yhi on screen
		ylo, yhi = min(max(ylo, a.Y0), a.Y1-1), min(max(yhi, a.Y0), a.Y1-1)
		if prevX >= 0 {
			if x-prevX > 1 {
				c.Line(prevX, (prevLo+prevHi)/2, x, (ylo+yhi)/2, t.Colour)
			} else {
				// Extend the span to touch the previous column's range.
				if yhi > prevLo {
					yhi = prevLo
				}
				if ylo < prevHi {
					ylo = prevHi
				}
			}
		}
		c.VLine(x, yhi, ylo, t.Colour)
		prevX, prevLo, prevHi = x, yOf(float64(s.Min)), yOf(float64(s.Max))
		prevLo, prevHi = min(max(prevLo, a.Y0), a.Y1-1), min(max(prevHi, a.Y0), a.Y1-1)
	}
}

// PlaneScene is the impedance-plane drawing: the samples of the analysis
// window after the display transform, the grid in volts and the chord.
type PlaneScene struct {
	Area Rect
	// Samples are drawn after Transform; they are not modified.
	Samples   []complex128
	Transform viewmodel.Plane
	// GridV are grid-line values in volts (both axes).
	GridV []float64
	// Chord ends in volts (untransformed) when HasChord.
	ChordA, ChordB complex128
	HasChord       bool
	Colour         color.NRGBA
	Style          Style
}

// PlanePixel returns the pixel of displayed value z (after the transform)
// for a square area a and span spanV.
func PlanePixel(a Rect, spanV float64, z complex128) (x, y int) {
	s := float64(min(a.W(), a.H())) / spanV
	cx, cy := float64(a.X0)+float64(a.W())/2, float64(a.Y0)+float64(a.H())/2
	return int(math.Round(cx + real(z)*s)), int(math.Round(cy - imag(z)*s))
}

// DrawPlane draws the impedance plane. The canvas is cleared first.
// Successive samples are joined by straight lines.
func DrawPlane(c Canvas, sc *PlaneScene) {
	st := sc.Style
	c.Clear(st.Background)
	a := sc.Area
	c.FillRect(a.X0, a.Y0, a.X1, a.Y1, st.Plot)
	span := sc.Transform.SpanV
	for _, v := range sc.GridV {
		col := st.Grid
		if v == 0 {
			col = st.Axis
		}
		x, _ := PlanePixel(a, span, complex(v, 0))
		_, y := PlanePixel(a, span, complex(0, v))
		if x >= a.X0 && x < a.X1 {
			c.VLine(x, a.Y0, a.Y1-1, col)
		}
		if y >= a.Y0 && y < a.Y1 {
			c.HLine(y, a.X0, a.X1-1, col)
		}
	}
	c.Rect(a.X0, a.Y0, a.X1, a.Y1, st.Grid)
	sub := Canvas{Img: c.Img.SubImage(imageRect(a)).(*imageRGBA)}
	ra := Rect{0, 0, a.W(), a.H()} // sub's own coordinates
	px, py := 0, 0
	for i, z := range sc.Samples {
		x, y := PlanePixel(ra, span, sc.Transform.Apply(z))
		if i > 0 {
			sub.Line(px, py, x, y, sc.Colour)
		}
		px, py = x, y
	}
	if sc.HasChord {
		x0, y0 := PlanePixel(ra, span, sc.Transform.Apply(sc.ChordA))
		x1, y1 := PlanePixel(ra, span, sc.Transform.Apply(sc.ChordB))
		sub.ThickLine(x0, y0, x1, y1, st.Chord)
		sub.Marker(x0, y0, 6, 0, st.Chord)
		sub.Marker(x1, y1, 7, 1, st.Chord)
		// The chord's angle: a horizontal reference from the start point
		// and an arc from it to the chord, anticlockwise as displayed.
		ang := cmplx.Phase(sc.Transform.Apply(sc.ChordB) - sc.Transform.Apply(sc.ChordA))
		if ang < 0 {
			ang += 2 * math.Pi
		}
		r := float64(min(ra.W(), ra.H())) / 10
		dim := st.Chord
		dim.A = 0x90
		sub.Line(x0, y0, x0+int(1.6*r), y0, dim)
		steps := max(int(ang*r/3), 2)
		px, py := x0+int(r), y0
		for k := 1; k <= steps; k++ {
			a := ang * float64(k) / float64(steps)
			qx, qy := x0+int(math.Round(r*math.Cos(a))), y0-int(math.Round(r*math.Sin(a)))
			sub.Line(px, py, qx, qy, dim)
			px, py = qx, qy
		}
	}
}
