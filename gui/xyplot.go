package gui

import (
	"image"
	"image/color"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"

	"whorl/gui/pixels"
	"whorl/gui/viewmodel"
)

// XY plot margins in units.
const (
	xyLeft   = 52
	xyRight  = 10
	xyTop    = 34
	xyBottom = 34
)

// Curve is one series of an XYPlot with its legend entry. Colour index −1
// uses the chord colour; otherwise the channel palette.
type Curve struct {
	pixels.Series
	Name string
	// ColourIndex picks the palette colour (−1: the chord colour).
	ColourIndex int
}

// XYPlot is a small line/marker plot with ticks, axis titles (with units)
// and a legend.
type XYPlot struct {
	widget.BaseWidget
	th             *Theme
	Title          string
	XLabel, YLabel string
	Curves         []Curve
	// Equal keeps one unit on x as long as one unit on y.
	Equal bool
	// YDown draws y growing downwards (depth plots).
	YDown bool
	// Message replaces the plot when there is nothing to show.
	Message string

	scene pixels.XYScene
	img   *image.RGBA
}

// NewXYPlot returns an empty plot.
func NewXYPlot(th *Theme, title, xlabel, ylabel string) *XYPlot {
	p := &XYPlot{th: th, Title: title, XLabel: xlabel, YLabel: ylabel}
	p.ExtendBaseWidget(p)
	return p
}

// MinSize implements fyne.Widget.
func (p *XYPlot) MinSize() fyne.Size { return fyne.NewSize(200, 150) }

// CreateRenderer implements fyne.Widget.
func (p *XYPlot) CreateRenderer() fyne.WidgetRenderer {
	r := &xyRenderer{p: p}
	r.raster = canvas.NewRaster(r.draw)
	r.raster.ScaleMode = canvas.ImageScalePixels
	return r
}

// ranges returns the axis ranges of the data.
func (p *XYPlot) ranges(w, h float32) (xlo, xhi, ylo, yhi float64) {
	var xs, ys [][]float64
	for _, c := range p.Curves {
		xs = append(xs, c.X)
		ys = append(ys, c.Y)
	}
	xlo, xhi = pixels.Range(0.05, xs...)
	ylo, yhi = pixels.Range(0.08, ys...)
	if p.Equal && w > 0 && h > 0 {
		// Grow one range so that both have the same scale.
		sx, sy := (xhi-xlo)/float64(w), (yhi-ylo)/float64(h)
		if sx > sy {
			m, d := (ylo+yhi)/2, sx*float64(h)/2
			ylo, yhi = m-d, m+d
		} else {
			m, d := (xlo+xhi)/2, sy*float64(w)/2
			xlo, xhi = m-d, m+d
		}
	}
	return xlo, xhi, ylo, yhi
}

type xyRenderer struct {
	p      *XYPlot
	raster *canvas.Raster
	labels
	size fyne.Size
}

func (r *xyRenderer) Destroy()           {}
func (r *xyRenderer) MinSize() fyne.Size { return r.p.MinSize() }
func (r *xyRenderer) Objects() []fyne.CanvasObject {
	return append([]fyne.CanvasObject{r.raster}, r.texts...)
}

func (r *xyRenderer) Layout(size fyne.Size) {
	r.size = size
	r.raster.Resize(size)
	r.place()
}

func (r *xyRenderer) Refresh() {
	r.place()
	r.raster.Refresh()
	canvas.Refresh(r.p)
}

func (r *xyRenderer) plotArea() (x0, y0, w, h float32) {
	return xyLeft, xyTop, r.size.Width - xyLeft - xyRight, r.size.Height - xyTop - xyBottom
}

func (r *xyRenderer) place() {
	p := r.p
	r.reset()
	capSz := theme.CaptionTextSize()
	fg, dim := p.th.fg(), p.th.dim()
	style := p.th.PlotStyle()
	r.text(p.Title, xyLeft, 1, -1, fg, capSz+1, true)
	x0, y0, w, h := r.plotArea()
	if w <= 10 || h <= 10 {
		return
	}
	if len(p.Curves) == 0 {
		r.text(orText(p.Message, "no data"), x0+w/2, y0+h/2-8, 0, dim, capSz+1, false)
		return
	}
	xlo, xhi, ylo, yhi := p.ranges(w, h)
	xt, _ := viewmodel.Ticks(xlo, xhi, max(2, int(w/70)))
	yt, _ := viewmodel.Ticks(ylo, yhi, max(2, int(h/36)))
	for _, v := range xt {
		x := x0 + float32((v-xlo)/(xhi-xlo))*w
		r.text(formatTick(v), x, y0+h+1, 0, dim, capSz, false)
	}
	for _, v := range yt {
		f := float32((v - ylo) / (yhi - ylo))
		y := y0 + h - f*h
		if p.YDown {
			y = y0 + f*h
		}
		r.text(formatTick(v), x0-4, y-capSz*0.7, 1, dim, capSz, false)
	}
	r.text(p.XLabel, x0+w, y0+h+16, 1, fg, capSz, false)
	r.text("↑ "+p.YLabel, 2, 18, -1, fg, capSz, false)
	// Legend: one entry per line in the plot's top-right corner.
	y := y0 + 3
	for _, c := range p.Curves {
		if c.Name == "" || y > y0+h-capSz-4 {
			continue
		}
		r.text("▬ "+c.Name, x0+w-6, y, 1, curveColour(style, c), capSz, false)
		y += capSz + 4
	}
}

func curveColour(st pixels.Style, c Curve) color.NRGBA {
	if c.ColourIndex < 0 {
		return st.Chord
	}
	return st.ChannelColour(c.ColourIndex)
}

func (r *xyRenderer) draw(w, h int) image.Image {
	p := r.p
	cv := pixels.New(p.img, w, h)
	p.img = cv.Img
	style := p.th.PlotStyle()
	if r.size.Width <= 0 {
		cv.Clear(style.Background)
		return cv.Img
	}
	s := float32(w) / r.size.Width
	x0, y0, pw, ph := r.plotArea()
	sc := &p.scene
	sc.Style, sc.Clear = style, true
	sc.Area = pixels.Rect{X0: int(x0 * s), Y0: int(y0 * s), X1: int((x0 + pw) * s), Y1: int((y0 + ph) * s)}
	if len(p.Curves) == 0 || pw <= 10 || ph <= 10 {
		cv.Clear(style.Background)
		return cv.Img
	}
	sc.XLo, sc.XHi, sc.YLo, sc.YHi = p.ranges(pw, ph)
	sc.GridX, _ = viewmodel.Ticks(sc.XLo, sc.XHi, max(2, int(pw/70)))
	sc.GridY, _ = viewmodel.Ticks(sc.YLo, sc.YHi, max(2, int(ph/36)))
	sc.Series = sc.Series[:0]
	for _, c := range p.Curves {
		ser := c.Series
		ser.Colour = curveColour(style, c)
		if p.YDown {
			ys := make([]float64, len(ser.Y))
			for i, v := range ser.Y {
				ys[i] = sc.YHi - (v - sc.YLo)
			}
			ser.Y = ys
		}
		sc.Series = append(sc.Series, ser)
	}
	if p.YDown {
		for i, v := range sc.GridY {
			sc.GridY[i] = sc.YHi - (v - sc.YLo)
		}
	}
	pixels.DrawXY(cv, sc)
	return cv.Img
}
