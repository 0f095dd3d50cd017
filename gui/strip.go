package gui

import (
	"fmt"
	"image"
	"image/color"
	"math"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"

	"whorl/acquire"
	"whorl/gui/pixels"
	"whorl/gui/viewmodel"
)

// Strip-chart margins in Fyne units.
const (
	stripLeft   = 62
	stripRight  = 8
	stripTitle  = 17
	stripBottom = 40
	edgeGrab    = 6 // how close to a window edge a drag resizes it
)

// StripSource is what the strip-chart widget draws: the chart state, the
// scan, the channels and parts shown and the landmarks.
type StripSource interface {
	Chart() *viewmodel.Chart
	Tube() *viewmodel.Tube
	Shown() []string
	Parts() []viewmodel.Part
}

// StripChart draws the X/Y traces of the shown channels against the axis,
// stacked, with the analysis window and landmarks; it pans, zooms and
// moves or resizes the window with the mouse.
type StripChart struct {
	widget.BaseWidget
	src   StripSource
	th    *Theme
	scene pixels.StripScene
	img   *image.RGBA
	// OnWindow is called after the user moved or resized the window.
	OnWindow func(from, to float64)
	// OnView is called after the user zoomed or panned.
	OnView func()

	drag       int // 0 none, 1 move window, 2 left edge, 3 right edge, 4 pan
	dragOrigin float64
}

// NewStripChart returns the strip-chart widget over src.
func NewStripChart(src StripSource, th *Theme) *StripChart {
	s := &StripChart{src: src, th: th}
	s.ExtendBaseWidget(s)
	return s
}

// CreateRenderer implements fyne.Widget.
func (s *StripChart) CreateRenderer() fyne.WidgetRenderer {
	r := &stripRenderer{s: s}
	r.raster = canvas.NewRaster(r.draw)
	r.raster.ScaleMode = canvas.ImageScalePixels
	return r
}

// MinSize keeps the chart usable.
func (s *StripChart) MinSize() fyne.Size { return fyne.NewSize(320, 180) }

// plotWidth returns the width of the plot area in units.
func (s *StripChart) plotWidth() float32 { return s.Size().Width - stripLeft - stripRight }

// axisAt returns the axis value under x (units from the widget's left).
func (s *StripChart) axisAt(x float32) float64 {
	c := s.src.Chart()
	return c.AxisAt(float64((x - stripLeft) / s.plotWidth()))
}

// xOf returns the widget x of an axis value.
func (s *StripChart) xOf(v float64) float32 {
	return stripLeft + float32(s.src.Chart().Frac(v))*s.plotWidth()
}

// Tapped centres the analysis window on the tapped position.
func (s *StripChart) Tapped(ev *fyne.PointEvent) {
	c := s.src.Chart()
	if c == nil || ev.Position.X < stripLeft {
		return
	}
	x := s.axisAt(ev.Position.X)
	h := (c.WinTo - c.WinFrom) / 2
	if s.OnWindow != nil {
		s.OnWindow(x-h, x+h)
	}
}

// Scrolled zooms about the pointer: up zooms in.
func (s *StripChart) Scrolled(ev *fyne.ScrollEvent) {
	c := s.src.Chart()
	if c == nil {
		return
	}
	f := math.Pow(1.2, float64(ev.Scrolled.DY)/10)
	c.Zoom(f, s.axisAt(ev.Position.X))
	if s.OnView != nil {
		s.OnView()
	}
}

// Dragged moves the window when the drag starts inside it, resizes it
// when it starts on an edge and pans the view otherwise.
func (s *StripChart) Dragged(ev *fyne.DragEvent) {
	c := s.src.Chart()
	if c == nil || s.plotWidth() <= 0 {
		return
	}
	if s.drag == 0 {
		start := ev.Position.X - ev.Dragged.DX
		l, r := s.xOf(c.WinFrom), s.xOf(c.WinTo)
		switch {
		case abs32(start-l) <= edgeGrab:
			s.drag = 2
		case abs32(start-r) <= edgeGrab:
			s.drag = 3
		case start > l && start < r:
			s.drag = 1
		default:
			s.drag = 4
		}
	}
	d := float64(ev.Dragged.DX/s.plotWidth()) * (c.ViewTo - c.ViewFrom)
	from, to := c.WinFrom, c.WinTo
	switch s.drag {
	case 1:
		from, to = from+d, to+d
	case 2:
		from = min(from+d, to-c.Step()*4)
	case 3:
		to = max(to+d, from+c.Step()*4)
	case 4:
		c.Pan(-float64(ev.Dragged.DX / s.plotWidth()))
		if s.OnView != nil {
			s.OnView()
		}
		return
	}
	if s.OnWindow != nil {
		s.OnWindow(from, to)
	}
}

// DragEnd ends a drag.
func (s *StripChart) DragEnd() { s.drag = 0 }

func abs32(v float32) float32 {
	if v < 0 {
		return -v
	}
	return v
}

type stripRenderer struct {
	s      *StripChart
	raster *canvas.Raster
	labels
	size fyne.Size
	// scaleKey identifies the vertical scales the labels were placed for.
	scaleKey string
}

// scaleKey summarises the vertical scales of a scene.
func scaleKey(sc *pixels.StripScene) string {
	var b strings.Builder
	for _, p := range sc.Panels {
		fmt.Fprintf(&b, "%g/%g/%d/%d;", p.YLo, p.YHi, len(p.GridY), p.Area.H())
	}
	return b.String()
}

func (r *stripRenderer) Destroy() {}

func (r *stripRenderer) Layout(size fyne.Size) {
	r.size = size
	r.raster.Resize(size)
	r.raster.Move(fyne.NewPos(0, 0))
	r.place()
}

func (r *stripRenderer) MinSize() fyne.Size { return r.s.MinSize() }

func (r *stripRenderer) Objects() []fyne.CanvasObject {
	return append([]fyne.CanvasObject{r.raster}, r.texts...)
}

func (r *stripRenderer) Refresh() {
	r.place()
	r.raster.Refresh()
}

// panels returns the plot rectangles in units.
func (r *stripRenderer) panels(n int) []fyne.Position {
	out := make([]fyne.Position, n) // (top, height) of each plot area
	if n == 0 {
		return out
	}
	h := (r.size.Height - stripBottom) / float32(n)
	for i := range out {
		out[i] = fyne.NewPos(float32(i)*h+stripTitle, h-stripTitle-2)
	}
	return out
}

// stripChannels returns the shown channels that exist in the scan, with
// their index in the scan (for the colour).
func stripChannels(src StripSource) ([]*acquire.Channel, []int) {
	t := src.Tube()
	if t == nil {
		return nil, nil
	}
	var chs []*acquire.Channel
	var idx []int
	for _, name := range src.Shown() {
		for i := range t.Scan.Channels {
			if t.Scan.Channels[i].Name == name {
				chs = append(chs, &t.Scan.Channels[i])
				idx = append(idx, i)
			}
		}
	}
	return chs, idx
}

func (r *stripRenderer) place() {
	r.reset()
	s := r.s
	c := s.src.Chart()
	chs, idx := stripChannels(s.src)
	if c == nil || len(chs) == 0 || r.size.Width <= 0 {
		msg := "open a component to see its strip charts"
		if c != nil {
			msg = "no channel chosen: pick channels above"
		}
		r.text(msg, r.size.Width/2, r.size.Height/2-8, 0, s.th.dim(), theme.TextSize(), false)
		return
	}
	capSz := theme.CaptionTextSize()
	dim, fg := s.th.dim(), s.th.fg()
	style := s.th.PlotStyle()
	pw := s.plotWidth()
	for k, p := range r.panels(len(chs)) {
		ch := chs[k]
		col := style.ChannelColour(idx[k])
		title := fmt.Sprintf("%s  ·  %s  ·  %s", ch.Name, formatFreq(ch.FreqHz), ch.Mode)
		r.text(title, stripLeft, p.X-stripTitle+1, -1, col, capSz+1, true)
		// Part legend at the right of the title row.
		legend := ""
		for _, part := range s.src.Parts() {
			if part == viewmodel.PartY {
				legend += "  ▬ Y (bright)"
			} else {
				legend += "  ▬ X (muted)"
			}
		}
		r.text(legend+"   V", r.size.Width-stripRight, p.X-stripTitle+1, 1, dim, capSz, false)
		// Vertical ticks from the last drawn scene (same layout).
		if k < len(s.scene.Panels) {
			sp := s.scene.Panels[k]
			for _, v := range sp.GridY {
				y := p.X + p.Y - float32((v-sp.YLo)/(sp.YHi-sp.YLo))*p.Y
				if y < p.X+4 || y > p.X+p.Y-4 {
					continue
				}
				r.text(formatVolts(v), stripLeft-4, y-capSz*0.7, 1, dim, capSz, false)
			}
		}
	}
	// Horizontal ticks.
	unit, factor := c.DisplayUnit()
	ticks, _ := viewmodel.Ticks(c.ViewFrom*factor, c.ViewTo*factor, max(2, int(pw/90)))
	yb := r.size.Height - stripBottom + 2
	for _, v := range ticks {
		x := s.xOf(v / factor)
		if x < stripLeft+12 || x > r.size.Width-stripRight-12 {
			continue
		}
		r.text(formatTick(v), x, yb, 0, dim, capSz, false)
	}
	axisTitle := fmt.Sprintf("%s / %s", c.AxisName, unit)
	r.text(axisTitle, r.size.Width-stripRight, yb+17, 1, fg, capSz, false)
	// Landmark names under the axis, skipping any that would collide.
	probe := canvas.NewText(axisTitle, fg)
	probe.TextSize = capSz
	limit := r.size.Width - stripRight - probe.MinSize().Width - 8
	end := float32(-1e9) // right end of the last landmark label
	for _, lm := range s.src.Tube().Landmarks {
		f := c.Frac(lm.PositionM)
		if f < 0 || f > 1 {
			continue
		}
		x := s.xOf(lm.PositionM) - 5
		probe.Text = "▼ " + lm.Name
		w := probe.MinSize().Width
		if x < end+8 || x+w > limit {
			continue
		}
		r.text(probe.Text, x, yb+17, -1, style.Landmark, capSz, false)
		end = x + w
	}
}

// draw renders the strip charts at the raster's pixel size.
func (r *stripRenderer) draw(w, h int) image.Image {
	s := r.s
	cv := pixels.New(s.img, w, h)
	s.img = cv.Img
	c := s.src.Chart()
	chs, idx := stripChannels(s.src)
	style := s.th.PlotStyle()
	if c == nil || len(chs) == 0 || r.size.Width <= 0 {
		cv.Clear(style.Background)
		return cv.Img
	}
	scale := float32(w) / r.size.Width
	areas := r.panels(len(chs))
	rects := make([]pixels.Rect, len(areas))
	for i, a := range areas {
		rects[i] = pixels.Rect{X0: int(stripLeft * scale), Y0: int(a.X * scale),
			X1: int((r.size.Width - stripRight) * scale), Y1: int((a.X + a.Y) * scale)}
	}
	fillStripScene(&s.scene, c, s.src.Tube(), chs, idx, s.src.Parts(), rects, style)
	pixels.DrawStrips(cv, &s.scene)
	// The vertical scales are known only now: place their labels when
	// they changed.
	if key := scaleKey(&s.scene); key != r.scaleKey {
		r.scaleKey = key
		fyne.Do(func() { r.place(); canvas.Refresh(s) })
	}
	return cv.Img
}

// fillStripScene decimates the channels into the scene for the given panel
// rectangles (pixels).
func fillStripScene(sc *pixels.StripScene, c *viewmodel.Chart, t *viewmodel.Tube, chs []*acquire.Channel, idx []int, parts []viewmodel.Part, rects []pixels.Rect, style pixels.Style) {
	if len(sc.Panels) != len(chs) {
		sc.Panels = make([]pixels.StripPanel, len(chs))
	}
	for k, ch := range chs {
		p := &sc.Panels[k]
		p.Area = rects[k]
		col := style.ChannelColour(idx[k])
		muted := col
		muted.A = 0x80
		cols := make([]color.NRGBA, len(parts))
		for j, part := range parts {
			if part == viewmodel.PartY {
				cols[j] = col
			} else {
				cols[j] = muted
			}
		}
		pixels.DecimateScene(p, c, ch, t.Envelope(ch.Name), parts, cols)
	}
	unit, factor := c.DisplayUnit()
	_ = unit
	ticks, _ := viewmodel.Ticks(c.ViewFrom*factor, c.ViewTo*factor, max(2, rects[0].W()/110))
	sc.GridX = sc.GridX[:0]
	for _, v := range ticks {
		sc.GridX = append(sc.GridX, c.Frac(v/factor))
	}
	sc.WinFrom, sc.WinTo = c.Frac(c.WinFrom), c.Frac(c.WinTo)
	sc.Landmarks = sc.Landmarks[:0]
	for _, lm := range t.Landmarks {
		sc.Landmarks = append(sc.Landmarks, c.Frac(lm.PositionM))
	}
	sc.Style = style
}
