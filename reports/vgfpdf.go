package reports

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"image"
	"image/color"
	"image/png"
	"math"
	"slices"

	"codeberg.org/go-pdf/fpdf"
	stdfnt "golang.org/x/image/font"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/vg"
)

// pdfCanvas is a vg.CanvasSizer that draws vector graphics straight into
// a rectangle of the current page of an *fpdf.Fpdf, so that gonum/plot
// figures become PDF paths and text rather than embedded raster images.
//
// Coordinates. vg's canvas space has its origin at the bottom-left corner
// of the rectangle, y upwards, lengths in points (1/72 inch). The canvas
// keeps the current transform (Translate, Rotate, Scale compose in the
// order called, each applying to what is drawn afterwards, as PDF's cm
// operator does) as an affine matrix from user space to canvas space, and
// maps every point itself to fpdf's page coordinates (document units, y
// downwards from the top of the page). Paths therefore need no PDF
// transform; rotated text uses one q … cm … Q group around the string.
//
// Line widths and dash lengths are scaled by the square root of the
// transform's area factor |det|, which is exact for rotations and uniform
// scales (the only ones gonum/plot uses).
//
// Text is set in the fonts already registered with the document: family
// is the fpdf family name, and a bold face uses style "B" (the report
// registers "sans" regular and bold). The text's glyph widths are gonum/plot's
// own measurement of the face it passes; they agree with the PDF only when
// the figure's fonts are the same typeface as the family, so the report's
// figures use Liberation Sans (see newPlot).
//
// Paths with a non-finite coordinate are not drawn (they would make the
// content stream invalid). The canvas changes fpdf's draw, fill and text
// colours, line width, cap and join style, dash pattern, alpha and font;
// finish restores the values fpdf held when the canvas was made (the dash
// pattern to solid, which is what the report uses).
type pdfCanvas struct {
	f      *fpdf.Fpdf
	family string

	// The rectangle on the page, in document units: left, top, width,
	// height; unitPerPt converts points to document units.
	x0, y0, wU, hU float64
	unitPerPt      float64

	cur   canvasState
	stack []canvasState

	// What the content stream currently holds, so that unchanged state is
	// not written again before every path.
	emitted struct {
		valid        bool
		stroke, fill color.NRGBA
		widthU       float64
		dashU        []float64
		dashPhaseU   float64
		fontStyle    string
		fontPt       float64
	}
	saved savedPDFState
}

// canvasState is what Push saves and Pop restores.
type canvasState struct {
	m          affine
	lineWidth  vg.Length
	dashes     []vg.Length
	dashOffset vg.Length
	color      color.NRGBA
}

// savedPDFState is fpdf's drawing state before the canvas changed it.
type savedPDFState struct {
	draw, fill, text [3]int
	lineWidth        float64
	capStyle         string
	joinStyle        string
	alpha            float64
	blend            string
	family, style    string
	fontPt           float64
}

// affine maps (x, y) to (a·x + c·y + e, b·x + d·y + f), the layout of a
// PDF transformation matrix [a b c d e f] (PDF 32000-1:2008, 8.3.3).
type affine struct{ a, b, c, d, e, f float64 }

var identity = affine{a: 1, d: 1}

// then returns the transform that applies n first and m after it.
func (m affine) then(n affine) affine {
	return affine{
		a: m.a*n.a + m.c*n.b,
		b: m.b*n.a + m.d*n.b,
		c: m.a*n.c + m.c*n.d,
		d: m.b*n.c + m.d*n.d,
		e: m.a*n.e + m.c*n.f + m.e,
		f: m.b*n.e + m.d*n.f + m.f,
	}
}

func (m affine) apply(x, y float64) (float64, float64) {
	return m.a*x + m.c*y + m.e, m.b*x + m.d*y + m.f
}

// lengthScale is the factor by which the transform scales lengths: the
// square root of its area factor.
func (m affine) lengthScale() float64 { return math.Sqrt(math.Abs(m.a*m.d - m.b*m.c)) }

// newPDFCanvas returns a canvas over the rectangle of the current page
// whose top-left corner is (x, y) and whose size is w × h, all in the
// document's units. family is a UTF-8 font family registered with f (its
// regular style, and "B" for bold faces). Call finish when the figure is
// drawn.
//
// It panics if w or h is not positive and finite (a programmer error).
func newPDFCanvas(f *fpdf.Fpdf, family string, x, y, w, h float64) *pdfCanvas {
	if !(w > 0 && h > 0) || math.IsInf(w, 0) || math.IsInf(h, 0) {
		panic("reports: canvas size must be positive and finite")
	}
	c := &pdfCanvas{f: f, family: family, x0: x, y0: y, wU: w, hU: h, unitPerPt: 1 / f.GetConversionRatio()}
	c.cur = canvasState{m: identity, lineWidth: vg.Points(1), color: color.NRGBA{A: 255}}
	s := &c.saved
	s.draw[0], s.draw[1], s.draw[2] = f.GetDrawColor()
	s.fill[0], s.fill[1], s.fill[2] = f.GetFillColor()
	s.text[0], s.text[1], s.text[2] = f.GetTextColor()
	s.lineWidth = f.GetLineWidth()
	s.capStyle, s.joinStyle = f.GetLineCapStyle(), f.GetLineJoinStyle()
	s.alpha, s.blend = f.GetAlpha()
	s.family, s.style = f.GetFontFamily(), f.GetFontStyle()
	s.fontPt, _ = f.GetFontSize()
	// Butt caps keep dashes and tick marks their drawn length; round joins
	// keep sharp turns of a signal trace from growing miter spikes.
	f.SetLineCapStyle("butt")
	f.SetLineJoinStyle("round")
	return c
}

// finish restores fpdf's drawing state as it was when the canvas was made.
// It panics if a Push has no matching Pop (a programmer error).
func (c *pdfCanvas) finish() {
	if len(c.stack) != 0 {
		panic("reports: canvas finished with an unmatched Push")
	}
	s := &c.saved
	f := c.f
	f.SetDrawColor(s.draw[0], s.draw[1], s.draw[2])
	f.SetFillColor(s.fill[0], s.fill[1], s.fill[2])
	f.SetTextColor(s.text[0], s.text[1], s.text[2])
	f.SetLineWidth(s.lineWidth)
	f.SetLineCapStyle(s.capStyle)
	f.SetLineJoinStyle(s.joinStyle)
	if c.emitted.dashU != nil {
		f.SetDashPattern(nil, 0)
	}
	if a, bl := f.GetAlpha(); a != s.alpha || bl != s.blend {
		f.SetAlpha(s.alpha, s.blend)
	}
	if s.family != "" && c.emitted.fontPt != 0 {
		f.SetFont(s.family, s.style, s.fontPt)
	}
	c.emitted.valid = false
}

// Size returns the canvas's width and height.
func (c *pdfCanvas) Size() (w, h vg.Length) {
	return vg.Length(c.wU / c.unitPerPt), vg.Length(c.hU / c.unitPerPt)
}

// SetLineWidth sets the width of stroked paths; paths are not stroked
// while it is not positive.
func (c *pdfCanvas) SetLineWidth(w vg.Length) { c.cur.lineWidth = w }

// SetLineDash sets the dash pattern (alternating dash and gap lengths)
// and the offset into it at which lines start. An empty pattern is a
// solid line.
func (c *pdfCanvas) SetLineDash(pattern []vg.Length, offset vg.Length) {
	c.cur.dashes = slices.Clone(pattern)
	c.cur.dashOffset = offset
}

// SetColor sets the colour of strokes, fills and text; nil is black.
func (c *pdfCanvas) SetColor(clr color.Color) {
	if clr == nil {
		clr = color.Black
	}
	c.cur.color = color.NRGBAModel.Convert(clr).(color.NRGBA)
}

// Rotate rotates what is drawn afterwards by rad radians anticlockwise.
func (c *pdfCanvas) Rotate(rad float64) {
	s, co := math.Sincos(rad)
	c.cur.m = c.cur.m.then(affine{a: co, b: s, c: -s, d: co})
}

// Translate moves the origin of what is drawn afterwards to pt.
func (c *pdfCanvas) Translate(pt vg.Point) {
	c.cur.m = c.cur.m.then(affine{a: 1, d: 1, e: pt.X.Points(), f: pt.Y.Points()})
}

// Scale scales what is drawn afterwards by x horizontally and y vertically.
func (c *pdfCanvas) Scale(x, y float64) {
	c.cur.m = c.cur.m.then(affine{a: x, d: y})
}

// Push saves the line width, dash pattern, transform and colour.
func (c *pdfCanvas) Push() {
	c.stack = append(c.stack, c.cur)
}

// Pop restores the state saved by the matching Push. It panics without
// one (a programmer error).
func (c *pdfCanvas) Pop() {
	if len(c.stack) == 0 {
		panic("reports: canvas Pop without Push")
	}
	c.cur = c.stack[len(c.stack)-1]
	c.stack = c.stack[:len(c.stack)-1]
}

// page maps a point in user space to page coordinates in document units.
func (c *pdfCanvas) page(x, y float64) (float64, float64) {
	cx, cy := c.cur.m.apply(x, y)
	return c.x0 + cx*c.unitPerPt, c.y0 + c.hU - cy*c.unitPerPt
}

// Stroke strokes path with the current line width, dashes and colour.
func (c *pdfCanvas) Stroke(p vg.Path) {
	if c.cur.lineWidth <= 0 || !c.emitPath(p) {
		return
	}
	c.f.DrawPath("S")
}

// Fill fills path with the current colour (non-zero winding rule).
func (c *pdfCanvas) Fill(p vg.Path) {
	if !c.emitPath(p) {
		return
	}
	c.f.DrawPath("f")
}

// emitPath writes the state a stroke or fill needs and then the path;
// it returns false, writing nothing, when the path is empty or holds a
// non-finite coordinate.
func (c *pdfCanvas) emitPath(p vg.Path) bool {
	if len(p) == 0 || !finitePath(p) {
		return false
	}
	c.emitState()
	var (
		has          bool    // a current point exists
		curX, curY   float64 // current point, user space
		starX, starY float64 // start of the current subpath, user space
	)
	move := func(x, y float64) {
		c.f.MoveTo(c.page(x, y))
		has, curX, curY, starX, starY = true, x, y, x, y
	}
	line := func(x, y float64) {
		if !has {
			move(x, y)
			return
		}
		c.f.LineTo(c.page(x, y))
		curX, curY = x, y
	}
	cubic := func(x1, y1, x2, y2, x, y float64) {
		px1, py1 := c.page(x1, y1)
		px2, py2 := c.page(x2, y2)
		px, py := c.page(x, y)
		c.f.CurveBezierCubicTo(px1, py1, px2, py2, px, py)
		curX, curY = x, y
	}
	for _, q := range p {
		x, y := q.Pos.X.Points(), q.Pos.Y.Points()
		switch q.Type {
		case vg.MoveComp:
			move(x, y)
		case vg.LineComp:
			line(x, y)
		case vg.ArcComp:
			r := q.Radius.Points()
			sx, sy := x+r*math.Cos(q.Start), y+r*math.Sin(q.Start)
			if !has {
				move(sx, sy)
			} else if sx != curX || sy != curY {
				line(sx, sy)
			}
			arcBeziers(x, y, r, q.Start, q.Angle, cubic)
		case vg.CurveComp:
			if !has {
				move(x, y)
				continue
			}
			switch len(q.Control) {
			case 1:
				// A quadratic Bézier with control Q is the cubic with
				// controls P0 + 2/3(Q−P0) and P1 + 2/3(Q−P1) (degree
				// elevation; Farin, Curves and Surfaces for CAGD, 5th ed., §6.1).
				qx, qy := q.Control[0].X.Points(), q.Control[0].Y.Points()
				cubic(curX+2*(qx-curX)/3, curY+2*(qy-curY)/3, x+2*(qx-x)/3, y+2*(qy-y)/3, x, y)
			case 2:
				cubic(q.Control[0].X.Points(), q.Control[0].Y.Points(),
					q.Control[1].X.Points(), q.Control[1].Y.Points(), x, y)
			default:
				line(x, y)
			}
		case vg.CloseComp:
			if has {
				c.f.ClosePath()
				curX, curY = starX, starY
			}
		}
	}
	return has
}

// arcBeziers approximates the arc of radius r about (x, y) from angle
// start through sweep (radians, anticlockwise when positive) by cubic
// Bézier segments of at most 90° each, calling cubic for each. A segment
// of angle θ has its control points on the end tangents at distance
// k·r, k = 4/3·tan(θ/4), which puts the segment's midpoint on the circle;
// the largest radial error is 2.7e-4·r at 90° (T. Dokken, M. Dæhlen,
// T. Lyche, K. Mørken, "Good approximation of circles by curvature-
// continuous Bézier curves", CAGD 7 (1990) 33–41).
func arcBeziers(x, y, r, start, sweep float64, cubic func(x1, y1, x2, y2, x3, y3 float64)) {
	if sweep == 0 || r == 0 {
		return
	}
	n := int(math.Ceil(math.Abs(sweep) / (math.Pi / 2)))
	th := sweep / float64(n)
	k := 4.0 / 3.0 * math.Tan(th/4)
	a0 := start
	s0, c0 := math.Sincos(a0)
	for i := 1; i <= n; i++ {
		a1 := start + float64(i)*th
		s1, c1 := math.Sincos(a1)
		cubic(x+r*(c0-k*s0), y+r*(s0+k*c0),
			x+r*(c1+k*s1), y+r*(s1-k*c1),
			x+r*c1, y+r*s1)
		s0, c0 = s1, c1
	}
}

func finitePath(p vg.Path) bool {
	for _, q := range p {
		if !finite(q.Pos.X.Points(), q.Pos.Y.Points(), q.Radius.Points(), q.Start, q.Angle) {
			return false
		}
		for _, k := range q.Control {
			if !finite(k.X.Points(), k.Y.Points()) {
				return false
			}
		}
	}
	return true
}

// emitState writes the colour, alpha, line width and dash pattern of the
// current state where the content stream differs.
func (c *pdfCanvas) emitState() {
	e := &c.emitted
	clr := c.cur.color
	clr.A = 255
	if !e.valid || e.stroke != clr {
		c.f.SetDrawColor(int(clr.R), int(clr.G), int(clr.B))
		e.stroke = clr
	}
	if !e.valid || e.fill != clr {
		c.f.SetFillColor(int(clr.R), int(clr.G), int(clr.B))
		e.fill = clr
	}
	c.emitAlpha()
	scale := c.cur.m.lengthScale() * c.unitPerPt
	if w := c.cur.lineWidth.Points() * scale; !e.valid || w != e.widthU {
		c.f.SetLineWidth(w)
		e.widthU = w
	}
	dash, phase := []float64{}, 0.0
	solid := true
	for _, d := range c.cur.dashes {
		if d < 0 || math.IsNaN(d.Points()) || math.IsInf(d.Points(), 0) {
			solid = true
			break
		}
		if d > 0 {
			solid = false
		}
	}
	if !solid {
		for _, d := range c.cur.dashes {
			dash = append(dash, d.Points()*scale)
		}
		if finite(c.cur.dashOffset.Points()) {
			phase = c.cur.dashOffset.Points() * scale
		}
	}
	if !e.valid || !slices.Equal(dash, e.dashU) || phase != e.dashPhaseU {
		c.f.SetDashPattern(dash, phase)
		e.dashU, e.dashPhaseU = dash, phase
	}
	e.valid = true
}

// emitAlpha writes the constant alpha of the current colour when it
// differs from fpdf's current alpha.
func (c *pdfCanvas) emitAlpha() {
	a := float64(c.cur.color.A) / 255
	if cur, bl := c.f.GetAlpha(); cur == a && bl == "Normal" {
		return
	}
	c.f.SetAlpha(a, "Normal")
}

// FillString draws text with its baseline starting at pt, in the current
// colour, in the document's font family at the face's size and weight.
func (c *pdfCanvas) FillString(face font.Face, pt vg.Point, text string) {
	size := face.Font.Size.Points() * c.cur.m.lengthScale()
	if text == "" || !(size > 0) || !finite(size, pt.X.Points(), pt.Y.Points()) {
		return
	}
	style := ""
	if face.Font.Weight >= stdfnt.WeightBold {
		style = "B"
	}
	e := &c.emitted
	clr := c.cur.color
	c.f.SetTextColor(int(clr.R), int(clr.G), int(clr.B))
	c.emitAlpha()
	if e.fontStyle != style || e.fontPt != size {
		c.f.SetFont(c.family, style, size)
		e.fontStyle, e.fontPt = style, size
	}
	x, y := c.page(pt.X.Points(), pt.Y.Points())
	// The baseline's direction on the page, anticlockwise from the x axis.
	angle := math.Atan2(c.cur.m.b, c.cur.m.a) * 180 / math.Pi
	if math.Abs(angle) < 1e-9 {
		c.f.Text(x, y, text)
		return
	}
	c.f.TransformBegin()
	c.f.TransformRotate(angle, x, y)
	c.f.Text(x, y, text)
	c.f.TransformEnd()
}

// DrawImage draws img scaled to fill rect (in user space, so that it
// follows the current transform). Images are stored once per document
// however often they are drawn.
func (c *pdfCanvas) DrawImage(rect vg.Rectangle, img image.Image) {
	w, h := (rect.Max.X - rect.Min.X).Points(), (rect.Max.Y - rect.Min.Y).Points()
	if img == nil || !(w > 0 && h > 0) || !finite(w, h, rect.Min.X.Points(), rect.Min.Y.Points()) {
		return
	}
	var buf bytes.Buffer
	if err := png.Encode(&buf, img); err != nil {
		c.f.SetError(err)
		return
	}
	sum := sha256.Sum256(buf.Bytes())
	name := "vg-" + hex.EncodeToString(sum[:12])
	opt := fpdf.ImageOptions{ImageType: "PNG"}
	if c.f.GetImageInfo(name) == nil {
		c.f.RegisterImageOptionsReader(name, opt, &buf)
	}
	// The image carries its own transparency; the current colour's does
	// not apply to it.
	if a, bl := c.f.GetAlpha(); a != 1 || bl != "Normal" {
		c.f.SetAlpha(1, "Normal")
	}
	// Place the image at rect as if the transform were the identity, then
	// apply the transform about the canvas origin: in PDF space (points, y
	// up) the canvas origin sits at (ox, oy), so the matrix to apply is
	// T(o)·m·T(−o).
	k := 1 / c.unitPerPt
	_, pageH := c.f.GetPageSize()
	ox, oy := c.x0*k, (pageH-c.y0-c.hU)*k
	m := c.cur.m
	c.f.TransformBegin()
	c.f.Transform(fpdf.TransformMatrix{A: m.a, B: m.b, C: m.c, D: m.d,
		E: m.e + ox - (m.a*ox + m.c*oy), F: m.f + oy - (m.b*ox + m.d*oy)})
	x := c.x0 + rect.Min.X.Points()*c.unitPerPt
	y := c.y0 + c.hU - rect.Max.Y.Points()*c.unitPerPt
	c.f.ImageOptions(name, x, y, w*c.unitPerPt, h*c.unitPerPt, false, opt, 0, "")
	c.f.TransformEnd()
}

var _ vg.CanvasSizer = (*pdfCanvas)(nil)
