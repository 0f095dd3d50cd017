package pixels

import (
	"image"
	"image/color"
)

// Canvas draws into an RGBA image.
type Canvas struct {
	Img *image.RGBA
}

// New returns a canvas on dst, reusing it when it has the size w×h, or a
// new image otherwise.
func New(dst *image.RGBA, w, h int) Canvas {
	if dst == nil || dst.Rect.Dx() != w || dst.Rect.Dy() != h {
		dst = image.NewRGBA(image.Rect(0, 0, max(w, 0), max(h, 0)))
	}
	return Canvas{Img: dst}
}

// W returns the width in pixels.
func (c Canvas) W() int { return c.Img.Rect.Dx() }

// H returns the height in pixels.
func (c Canvas) H() int { return c.Img.Rect.Dy() }

// Clear fills the whole image with col (no blending).
func (c Canvas) Clear(col color.NRGBA) {
	p := c.Img.Pix
	if len(p) == 0 {
		return
	}
	r, g, b, a := premul(col)
	p[0], p[1], p[2], p[3] = r, g, b, a
	for n := 4; n < len(p); n *= 2 {
		copy(p[n:], p[:n])
	}
}

func premul(col color.NRGBA) (r, g, b, a uint8) {
	a16 := uint32(col.A)
	return uint8(uint32(col.R) * a16 / 255), uint8(uint32(col.G) * a16 / 255), uint8(uint32(col.B) * a16 / 255), col.A
}

// Set blends col over pixel (x, y); points outside are ignored.
func (c Canvas) Set(x, y int, col color.NRGBA) {
	if x < 0 || y < 0 || x >= c.Img.Rect.Dx() || y >= c.Img.Rect.Dy() {
		return
	}
	i := y*c.Img.Stride + x*4
	p := c.Img.Pix[i : i+4 : i+4]
	if col.A == 255 {
		p[0], p[1], p[2], p[3] = col.R, col.G, col.B, 255
		return
	}
	a := uint32(col.A)
	na := 255 - a
	p[0] = uint8((uint32(col.R)*a + uint32(p[0])*na) / 255)
	p[1] = uint8((uint32(col.G)*a + uint32(p[1])*na) / 255)
	p[2] = uint8((uint32(col.B)*a + uint32(p[2])*na) / 255)
	p[3] = uint8(a + uint32(p[3])*na/255)
}

// VLine draws a vertical line at x from y0 to y1 inclusive.
func (c Canvas) VLine(x, y0, y1 int, col color.NRGBA) {
	if y0 > y1 {
		y0, y1 = y1, y0
	}
	y0, y1 = max(y0, 0), min(y1, c.H()-1)
	for y := y0; y <= y1; y++ {
		c.Set(x, y, col)
	}
}

// HLine draws a horizontal line at y from x0 to x1 inclusive.
func (c Canvas) HLine(y, x0, x1 int, col color.NRGBA) {
	if x0 > x1 {
		x0, x1 = x1, x0
	}
	x0, x1 = max(x0, 0), min(x1, c.W()-1)
	for x := x0; x <= x1; x++ {
		c.Set(x, y, col)
	}
}

// Dashed draws a vertical dashed line at x (dash and gap of d pixels).
func (c Canvas) Dashed(x, y0, y1, d int, col color.NRGBA) {
	if y0 > y1 {
		y0, y1 = y1, y0
	}
	for y := y0; y <= y1; y++ {
		if (y-y0)/d%2 == 0 {
			c.Set(x, y, col)
		}
	}
}

// FillRect blends col over the rectangle [x0, x1) × [y0, y1).
func (c Canvas) FillRect(x0, y0, x1, y1 int, col color.NRGBA) {
	x0, y0 = max(x0, 0), max(y0, 0)
	x1, y1 = min(x1, c.W()), min(y1, c.H())
	if x1 <= x0 || y1 <= y0 {
		return
	}
	if col.A == 255 {
		// Opaque: write the first row, copy it to the others.
		st := c.Img.Stride
		row := c.Img.Pix[y0*st+x0*4 : y0*st+x1*4]
		for i := 0; i < len(row); i += 4 {
			row[i], row[i+1], row[i+2], row[i+3] = col.R, col.G, col.B, 255
		}
		for y := y0 + 1; y < y1; y++ {
			copy(c.Img.Pix[y*st+x0*4:y*st+x1*4], row)
		}
		return
	}
	for y := y0; y < y1; y++ {
		for x := x0; x < x1; x++ {
			c.Set(x, y, col)
		}
	}
}

// Rect draws the outline of [x0, x1) × [y0, y1).
func (c Canvas) Rect(x0, y0, x1, y1 int, col color.NRGBA) {
	c.HLine(y0, x0, x1-1, col)
	c.HLine(y1-1, x0, x1-1, col)
	c.VLine(x0, y0, y1-1, col)
	c.VLine(x1-1, y0, y1-1, col)
}

// Line draws a one-pixel line from (x0, y0) to (x1, y1) with Bresenham's
// algorithm (J. E. Bresenham, IBM Systems Journal 4(1), 1965, 25–30).
// Lines are clipped to a generous box first so that far-away points cost
// nothing.
func (c Canvas) Line(x0, y0, x1, y1 int, col color.NRGBA) {
	const lim = 1 << 20
	if x0 < -lim || x0 > lim || x1 < -lim || x1 > lim || y0 < -lim || y0 > lim || y1 < -lim || y1 > lim {
		return
	}
	w, h := c.W(), c.H()
	if (x0 < 0 && x1 < 0) || (y0 < 0 && y1 < 0) || (x0 >= w && x1 >= w) || (y0 >= h && y1 >= h) {
		return
	}
	dx := abs(x1 - x0)
	dy := -abs(y1 - y0)
	sx, sy := 1, 1
	if x0 > x1 {
		sx = -1
	}
	if y0 > y1 {
		sy = -1
	}
	e := dx + dy
	for n := 0; n < 4*lim; n++ {
		c.Set(x0, y0, col)
		if x0 == x1 && y0 == y1 {
			return
		}
		e2 := 2 * e
		if e2 >= dy {
			e += dy
			x0 += sx
		}
		if e2 <= dx {
			e += dx
			y0 += sy
		}
	}
}

// ThickLine draws a line two pixels wide.
func (c Canvas) ThickLine(x0, y0, x1, y1 int, col color.NRGBA) {
	c.Line(x0, y0, x1, y1, col)
	if abs(x1-x0) > abs(y1-y0) {
		c.Line(x0, y0+1, x1, y1+1, col)
	} else {
		c.Line(x0+1, y0, x1+1, y1, col)
	}
}

// Marker draws a small symbol centred on (x, y): 0 square, 1 circle-ish
// diamond, 2 cross, 3 triangle.
func (c Canvas) Marker(x, y, size, kind int, col color.NRGBA) {
	r := size / 2
	switch kind {
	case 0:
		c.FillRect(x-r, y-r, x+r+1, y+r+1, col)
	case 1:
		for d := -r; d <= r; d++ {
			w := r - abs(d)
			c.HLine(y+d, x-w, x+w, col)
		}
	case 2:
		c.Line(x-r, y-r, x+r, y+r, col)
		c.Line(x-r, y+r, x+r, y-r, col)
		c.Line(x-r+1, y-r, x+r+1, y+r, col)
		c.Line(x-r+1, y+r, x+r+1, y-r, col)
	default:
		for d := 0; d <= size; d++ {
			w := d / 2
			c.HLine(y-r+d, x-w, x+w, col)
		}
	}
}

func abs(v int) int {
	if v < 0 {
		return -v
	}
	return v
}
