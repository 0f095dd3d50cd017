package pixels

import (
	"image/color"
	"testing"

	"whorl/gui/viewmodel"
)

var (
	black = color.NRGBA{0, 0, 0, 255}
	white = color.NRGBA{255, 255, 255, 255}
)

func TestLineReachesBothEnds(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct{ x0, y0, x1, y1 int }{
		{0, 0, 9, 9}, {9, 0, 0, 9}, {2, 5, 8, 5}, {5, 1, 5, 8}, {0, 9, 9, 3},
	} {
		c := New(nil, 10, 10)
		c.Clear(black)
		c.Line(tc.x0, tc.y0, tc.x1, tc.y1, white)
		for _, p := range [][2]int{{tc.x0, tc.y0}, {tc.x1, tc.y1}} {
			if got := c.Img.RGBAAt(p[0], p[1]); got.R != 255 {
				t.Errorf("Line(%v): end %v not drawn", tc, p)
			}
		}
		// Bresenham sets exactly max(|dx|, |dy|) + 1 pixels.
		n := 0
		for i := 0; i < len(c.Img.Pix); i += 4 {
			if c.Img.Pix[i] == 255 {
				n++
			}
		}
		if want := max(abs(tc.x1-tc.x0), abs(tc.y1-tc.y0)) + 1; n != want {
			t.Errorf("Line(%v) set %d pixels, want %d", tc, n, want)
		}
	}
}

func TestBlendHalf(t *testing.T) {
	t.Parallel()
	c := New(nil, 2, 2)
	c.Clear(black)
	c.FillRect(0, 0, 2, 2, color.NRGBA{255, 255, 255, 128})
	// Source-over: 255·128/255 + 0 = 128.
	if got := c.Img.RGBAAt(1, 1).R; got != 128 {
		t.Errorf("half-white over black = %d, want 128", got)
	}
}

func TestDrawIgnoresDegenerateAreas(t *testing.T) {
	t.Parallel()
	c := New(nil, 30, 20)
	st := Style{Background: black, Plot: black, Grid: white, Axis: white, Window: white, WindowEdge: white, Landmark: white, Chord: white}
	sc := &StripScene{Panels: []StripPanel{{Area: Rect{5, 5, 5, 5}}, {Area: Rect{0, 0, 30, 20}, YLo: -1, YHi: 1,
		Traces: []Trace{{Spans: make([]viewmodel.Span, 30), Colour: white}}}}, WinFrom: -1, WinTo: 2, Style: st}
	DrawStrips(c, sc)
	DrawPlane(c, &PlaneScene{Area: Rect{0, 0, 20, 20}, Samples: []complex128{0, 1e300, complex(-1e300, 1)}, Transform: viewmodel.Plane{SpanV: 1}, Style: st})
	DrawXY(c, &XYScene{Area: Rect{0, 0, 1, 1}, Style: st})
}
