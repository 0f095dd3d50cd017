package gui

import (
	"fmt"
	"image"
	"math"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"

	"whorl/gui/pixels"
	"whorl/gui/viewmodel"
)

// PlaneSource is what the impedance-plane widget draws.
type PlaneSource interface {
	Tube() *viewmodel.Tube
	Chart() *viewmodel.Chart
	Channel() string
	Plane() viewmodel.Plane
	Measurement() (viewmodel.Measurement, bool)
}

// ImpedancePlane draws the samples of the analysis window of one channel
// in the impedance plane, after the display-only rotation, span and null,
// with a grid in volts and the measured chord.
type ImpedancePlane struct {
	widget.BaseWidget
	src   PlaneSource
	th    *Theme
	scene pixels.PlaneScene
	img   *image.RGBA
	// OnScroll is called with +1 (gain up) or −1 when the wheel turns.
	OnScroll func(dir int)
}

// NewImpedancePlane returns the impedance-plane widget over src.
func NewImpedancePlane(src PlaneSource, th *Theme) *ImpedancePlane {
	p := &ImpedancePlane{src: src, th: th}
	p.ExtendBaseWidget(p)
	return p
}

// MinSize implements fyne.Widget.
func (p *ImpedancePlane) MinSize() fyne.Size { return fyne.NewSize(220, 240) }

// Scrolled changes the display gain.
func (p *ImpedancePlane) Scrolled(ev *fyne.ScrollEvent) {
	if p.OnScroll == nil {
		return
	}
	if ev.Scrolled.DY > 0 {
		p.OnScroll(1)
	} else if ev.Scrolled.DY < 0 {
		p.OnScroll(-1)
	}
}

// CreateRenderer implements fyne.Widget.
func (p *ImpedancePlane) CreateRenderer() fyne.WidgetRenderer {
	r := &planeRenderer{p: p}
	r.raster = canvas.NewRaster(r.draw)
	r.raster.ScaleMode = canvas.ImageScalePixels
	r.top = canvas.NewText("", p.th.fg())
	r.bottom = canvas.NewText("", p.th.fg())
	r.left = canvas.NewText("", p.th.dim())
	r.right = canvas.NewText("", p.th.dim())
	r.refreshText()
	return r
}

const planeTextH = 18

type planeRenderer struct {
	p                        *ImpedancePlane
	raster                   *canvas.Raster
	top, bottom, left, right *canvas.Text
	size                     fyne.Size
}

func (r *planeRenderer) Destroy() {}

// area returns the square plot area in units.
func (r *planeRenderer) area() (x, y, side float32) {
	side = min(r.size.Width-8, r.size.Height-2*planeTextH-8)
	side = max(side, 10)
	return (r.size.Width - side) / 2, planeTextH + 4, side
}

func (r *planeRenderer) Layout(size fyne.Size) {
	r.size = size
	r.raster.Resize(size)
	r.refreshText()
}

func (r *planeRenderer) refreshText() {
	p := r.p
	capSz := theme.CaptionTextSize()
	x, y, side := r.area()
	pl := p.src.Plane()
	r.top.Text = fmt.Sprintf("%s   span %s V   rotation %.0f°", p.src.Channel(), trimNum(pl.SpanV, 3), pl.RotationRad*180/math.Pi)
	if a, ok := p.src.(interface{ AutoSpan() bool }); ok && a.AutoSpan() {
		r.top.Text += " (auto)"
	}
	r.top.TextSize, r.top.Color = capSz+1, p.th.fg()
	r.top.TextStyle = fyne.TextStyle{Bold: true}
	r.bottom.TextSize, r.bottom.Color = capSz+1, p.th.PlotStyle().Chord
	if m, ok := p.src.Measurement(); ok {
		r.bottom.Text = fmt.Sprintf("chord %.3f V at %.1f°  (display angle %.1f°)", m.VppV, m.PhasePPDeg, displayAngle(m, pl))
	} else {
		r.bottom.Text = "no measurement"
	}
	half := pl.SpanV / 2
	r.left.Text = fmt.Sprintf("−%s V", trimNum(half, 3))
	r.right.Text = fmt.Sprintf("+%s V", trimNum(half, 3))
	for _, t := range []*canvas.Text{r.left, r.right} {
		t.TextSize, t.Color = capSz, p.th.dim()
	}
	for _, t := range []*canvas.Text{r.top, r.bottom, r.left, r.right} {
		t.Resize(t.MinSize())
	}
	r.top.Move(fyne.NewPos(x, 1))
	r.bottom.Move(fyne.NewPos(x, y+side+3))
	r.left.Move(fyne.NewPos(x+3, y+side/2+1))
	r.right.Move(fyne.NewPos(x+side-r.right.MinSize().Width-3, y+side/2+1))
	r.top.Refresh()
	r.bottom.Refresh()
}

// displayAngle is the chord's angle as drawn (measurement angle plus the
// display rotation), in degrees in [0, 360).
func displayAngle(m viewmodel.Measurement, pl viewmodel.Plane) float64 {
	a := math.Mod(m.PhasePPDeg+pl.RotationRad*180/math.Pi, 360)
	if a < 0 {
		a += 360
	}
	return a
}

func (r *planeRenderer) MinSize() fyne.Size { return r.p.MinSize() }

func (r *planeRenderer) Objects() []fyne.CanvasObject {
	return []fyne.CanvasObject{r.raster, r.top, r.bottom, r.left, r.right}
}

func (r *planeRenderer) Refresh() {
	r.refreshText()
	r.raster.Refresh()
}

func (r *planeRenderer) draw(w, h int) image.Image {
	p := r.p
	cv := pixels.New(p.img, w, h)
	p.img = cv.Img
	if r.size.Width <= 0 {
		return cv.Img
	}
	scale := float32(w) / r.size.Width
	x, y, side := r.area()
	a := pixels.Rect{X0: int(x * scale), Y0: int(y * scale), X1: int((x + side) * scale), Y1: int((y + side) * scale)}
	fillPlaneScene(&p.scene, p.src, a, p.th.PlotStyle())
	pixels.DrawPlane(cv, &p.scene)
	return cv.Img
}

// fillPlaneScene sets the scene from the workstation state.
func fillPlaneScene(sc *pixels.PlaneScene, src PlaneSource, a pixels.Rect, style pixels.Style) {
	sc.Area, sc.Style = a, style
	sc.Transform = src.Plane()
	sc.Samples, sc.HasChord = nil, false
	t, c := src.Tube(), src.Chart()
	if t != nil && c != nil {
		for i := range t.Scan.Channels {
			if ch := &t.Scan.Channels[i]; ch.Name == src.Channel() {
				w := c.Samples()
				sc.Samples = ch.Samples[w.Lo:w.Hi]
				sc.Colour = style.ChannelColour(i)
			}
		}
	}
	if m, ok := src.Measurement(); ok && m.Channel == src.Channel() {
		sc.ChordA, sc.ChordB, sc.HasChord = m.ChordA, m.ChordB, true
	}
	half := sc.Transform.SpanV / 2
	sc.GridV, _ = viewmodel.Ticks(-half, half, 8)
}
