package reports

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"image"
	"image/color"
	"io"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"codeberg.org/go-fonts/liberation/liberationsansbold"
	"codeberg.org/go-fonts/liberation/liberationsansregular"
	"codeberg.org/go-pdf/fpdf"
	stdfnt "golang.org/x/image/font"
	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// The test canvas: 100 mm × 50 mm with its top-left corner at (20 mm,
// 30 mm) on an A4 portrait page (297 mm high).
const (
	tcX, tcY, tcW, tcH = 20.0, 30.0, 100.0, 50.0
	a4HeightMM         = 297.0
	ptPerMM            = 72 / 25.4 // PDF user space unit is 1/72 inch (PDF 32000-1:2008, 8.3.2.3)
)

// pdfPoint returns where canvas point (xMM, yMM) (millimetres from the
// canvas's bottom-left corner, y up) lands in PDF user space (points from
// the page's bottom-left corner, y up): a closed form of the canvas
// geometry.
func pdfPoint(xMM, yMM float64) (float64, float64) {
	bottom := a4HeightMM - tcY - tcH
	return (tcX + xMM) * ptPerMM, (bottom + yMM) * ptPerMM
}

// op is one content-stream operator with its operands.
type op struct {
	name string
	args []string
}

func (o op) num(t *testing.T, i int) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(strings.Trim(o.args[i], "[]"), 64)
	if err != nil {
		t.Fatalf("operand %d of %s %v is not a number", i, o.name, o.args)
	}
	return v
}

// drawOps draws with fn on the test canvas of a one-page uncompressed PDF
// and returns the operators written between the canvas's creation and
// its finish, and the whole PDF.
func drawOps(t *testing.T, fn func(c *pdfCanvas)) ([]op, []byte) {
	t.Helper()
	f := fpdf.New("P", "mm", "A4", "")
	f.SetCompression(false)
	f.AddUTF8FontFromBytes("sans", "", liberationsansregular.TTF)
	f.AddUTF8FontFromBytes("sans", "B", liberationsansbold.TTF)
	f.AddPage()
	f.SetFont("sans", "", 9)
	f.RawWriteStr("%canvas-begin\n")
	c := newPDFCanvas(f, "sans", tcX, tcY, tcW, tcH)
	fn(c)
	c.finish()
	f.RawWriteStr("%canvas-end\n")
	var b bytes.Buffer
	if err := f.Output(&b); err != nil {
		t.Fatalf("PDF output: %v", err)
	}
	s := b.String()
	i, j := strings.Index(s, "%canvas-begin\n"), strings.Index(s, "%canvas-end\n")
	if i < 0 || j < i {
		t.Fatalf("canvas markers not found in the content stream")
	}
	return tokenize(s[i+len("%canvas-begin\n") : j]), b.Bytes()
}

// drawPlot draws the plot fig makes on the test canvas, as drawOps.
func drawPlot(t *testing.T, fig func() (*plot.Plot, error)) ([]op, []byte) {
	t.Helper()
	p, err := fig()
	if err != nil {
		t.Fatal(err)
	}
	return drawOps(t, func(c *pdfCanvas) { p.Draw(draw.New(c)) })
}

// tokenize splits a content stream into operators and their operands:
// numbers, names, arrays and literal strings (PDF 32000-1:2008, 7.8.2).
func tokenize(s string) []op {
	var ops []op
	var args []string
	for i := 0; i < len(s); {
		switch ch := s[i]; {
		case ch == ' ' || ch == '\n' || ch == '\r' || ch == '\t':
			i++
		case ch == '%':
			for i < len(s) && s[i] != '\n' {
				i++
			}
		case ch == '(':
			j, depth := i+1, 1
			for ; j < len(s) && depth > 0; j++ {
				switch s[j] {
				case '\\':
					j++
				case '(':
					depth++
				case ')':
					depth--
				}
			}
			args = append(args, s[i:j])
			i = j
		case ch == '[':
			j := strings.IndexByte(s[i:], ']') + i
			args = append(args, s[i:j+1])
			i = j + 1
		default:
			j := i
			for j < len(s) && !strings.ContainsRune(" \n\r\t([%", rune(s[j])) {
				j++
			}
			tok := s[i:j]
			i = j
			if _, err := strconv.ParseFloat(tok, 64); err == nil || strings.HasPrefix(tok, "/") {
				args = append(args, tok)
				continue
			}
			ops = append(ops, op{name: tok, args: args})
			args = nil
		}
	}
	return ops
}

func find(ops []op, name string) []op {
	var out []op
	for _, o := range ops {
		if o.name == name {
			out = append(out, o)
		}
	}
	return out
}

const posTol = 0.011 // fpdf writes coordinates with 2 decimals, in points

func checkXY(t *testing.T, what string, o op, i int, wantX, wantY float64) {
	t.Helper()
	gx, gy := o.num(t, i), o.num(t, i+1)
	if !scalar.EqualWithinAbs(gx, wantX, posTol) || !scalar.EqualWithinAbs(gy, wantY, posTol) {
		t.Errorf("%s: %s at (%.3f, %.3f) pt; want (%.3f, %.3f) ± %g", what, o.name, gx, gy, wantX, wantY, posTol)
	}
}

func mm(v float64) vg.Length { return vg.Length(v) * vg.Millimeter }

func TestCanvasSize(t *testing.T) {
	t.Parallel()
	drawOps(t, func(c *pdfCanvas) {
		w, h := c.Size()
		// 100 mm and 50 mm in points: 100·72/25.4, 50·72/25.4.
		if !scalar.EqualWithinAbsOrRel(w.Points(), 283.46456692913387, 1e-12, 1e-12) ||
			!scalar.EqualWithinAbsOrRel(h.Points(), 141.73228346456693, 1e-12, 1e-12) {
			t.Errorf("Size() = %v × %v pt; want 283.4646 × 141.7323", w.Points(), h.Points())
		}
	})
}

func TestCanvasStrokeTransforms(t *testing.T) {
	t.Parallel()
	type seg struct{ x0, y0, x1, y1 float64 } // canvas millimetres, y up
	tests := []struct {
		name  string
		setup func(c *pdfCanvas)
		// The path drawn is always (0,0)–(5 mm, 0) in user space.
		want      seg
		wantWidth float64 // points; the line width set is 1 pt
	}{
		{"identity", func(c *pdfCanvas) {}, seg{0, 0, 5, 0}, 1},
		{"translate", func(c *pdfCanvas) { c.Translate(vg.Point{X: mm(10), Y: mm(20)}) }, seg{10, 20, 15, 20}, 1},
		{"rotate 90° anticlockwise", func(c *pdfCanvas) { c.Rotate(math.Pi / 2) }, seg{0, 0, 0, 5}, 1},
		{"scale", func(c *pdfCanvas) { c.Scale(2, 3) }, seg{0, 0, 10, 0}, math.Sqrt(6)},
		{"translate then rotate then scale", func(c *pdfCanvas) {
			c.Translate(vg.Point{X: mm(10), Y: mm(10)})
			c.Rotate(math.Pi / 2)
			c.Scale(2, 2)
		}, seg{10, 10, 10, 20}, 2},
		{"rotate then translate", func(c *pdfCanvas) {
			// The translation is in the rotated frame: +x user is +y canvas.
			c.Rotate(math.Pi / 2)
			c.Translate(vg.Point{X: mm(10)})
		}, seg{0, 10, 0, 15}, 1},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			ops, _ := drawOps(t, func(c *pdfCanvas) {
				c.SetLineWidth(vg.Points(1))
				tc.setup(c)
				var p vg.Path
				p.Move(vg.Point{})
				p.Line(vg.Point{X: mm(5)})
				c.Stroke(p)
			})
			m, l, s, w := find(ops, "m"), find(ops, "l"), find(ops, "S"), find(ops, "w")
			if len(m) != 1 || len(l) != 1 || len(s) != 1 || len(w) < 1 {
				t.Fatalf("got %d m, %d l, %d S, %d w operators; want 1, 1, 1 and at least 1", len(m), len(l), len(s), len(w))
			}
			x0, y0 := pdfPoint(tc.want.x0, tc.want.y0)
			x1, y1 := pdfPoint(tc.want.x1, tc.want.y1)
			checkXY(t, "start", m[0], 0, x0, y0)
			checkXY(t, "end", l[0], 0, x1, y1)
			if got := w[0].num(t, 0); !scalar.EqualWithinAbs(got, tc.wantWidth, 0.006) {
				t.Errorf("line width %.3f pt; want %.3f (1 pt × sqrt|det|)", got, tc.wantWidth)
			}
		})
	}
}

func TestCanvasPushPop(t *testing.T) {
	t.Parallel()
	ops, _ := drawOps(t, func(c *pdfCanvas) {
		line := func() {
			var p vg.Path
			p.Move(vg.Point{})
			p.Line(vg.Point{X: mm(5)})
			c.Stroke(p)
		}
		c.SetColor(color.RGBA{R: 255, A: 255})
		c.SetLineWidth(vg.Points(0.5))
		c.Push()
		c.Translate(vg.Point{X: mm(10), Y: mm(10)})
		c.Rotate(math.Pi / 2)
		c.Scale(2, 2)
		c.SetColor(color.RGBA{B: 255, A: 255})
		c.SetLineWidth(vg.Points(3))
		c.SetLineDash([]vg.Length{vg.Points(2), vg.Points(1)}, 0)
		c.Push()
		c.Translate(vg.Point{X: mm(1)})
		c.Pop()
		line() // transformed, blue, 6 pt, dashed
		c.Pop()
		line() // as before the Push: red, 0.5 pt, solid, identity
	})
	m, l := find(ops, "m"), find(ops, "l")
	if len(m) != 2 || len(l) != 2 {
		t.Fatalf("got %d m and %d l operators; want 2 each", len(m), len(l))
	}
	x, y := pdfPoint(10, 10)
	checkXY(t, "inside Push", m[0], 0, x, y)
	x, y = pdfPoint(10, 20)
	checkXY(t, "inside Push", l[0], 0, x, y)
	x, y = pdfPoint(0, 0)
	checkXY(t, "after Pop", m[1], 0, x, y)
	x, y = pdfPoint(5, 0)
	checkXY(t, "after Pop", l[1], 0, x, y)

	// The state written before each path: colour, width and dashes.
	var seq []string
	for _, o := range ops {
		switch o.name {
		case "RG", "w", "d", "S":
			seq = append(seq, strings.TrimSpace(strings.Join(o.args, " ")+" "+o.name))
		}
	}
	// Up to the second stroke; what follows is finish restoring fpdf's state.
	got := strings.Join(seq, "; ")
	if i := strings.LastIndex(got, "; S"); i >= 0 {
		got = got[:i+3]
	}
	// fpdf writes colours as 0–1 with 3 decimals and lengths in points
	// with 2 decimals; 3 pt scaled by 2 is 6 pt, dashes 2 pt and 1 pt
	// become 4 and 2.
	want := "0.000 0.000 1.000 RG; 6.00 w; [4.00 2.00] 0.00 d; S; " +
		"1.000 0.000 0.000 RG; 0.50 w; [] 0.00 d; S"
	if got != want {
		t.Errorf("state written around the two strokes:\n got %s\nwant %s", got, want)
	}
}

func TestCanvasPopWithoutPushPanics(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name string
		fn   func(c *pdfCanvas)
	}{
		{"Pop without Push", func(c *pdfCanvas) { c.Pop() }},
		{"finish with an open Push", func(c *pdfCanvas) { c.Push(); c.finish() }},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			f := fpdf.New("P", "mm", "A4", "")
			f.AddPage()
			c := newPDFCanvas(f, "sans", tcX, tcY, tcW, tcH)
			defer func() {
				if r := recover(); r == nil {
					t.Errorf("%s did not panic", tc.name)
				}
			}()
			tc.fn(c)
		})
	}
}

func TestCanvasColoursDashesAlpha(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name  string
		clr   color.Color
		dash  []vg.Length
		off   vg.Length
		fill  bool
		wants []string // substrings of the operator list, in order
	}{
		{"trace blue, solid", traceDark, nil, 0, false,
			// 20/255, 40/255, 110/255 to 3 decimals.
			[]string{"0.078 0.157 0.431 RG", "[] 0.00 d", "S"}},
		{"grey is written as a grey level", traceGrey, nil, 0, false,
			[]string{"0.667 G", "S"}}, // 170/255
		{"red, dashed 3 on 2 off, offset 1", traceRed, []vg.Length{3, 2}, 1, false,
			[]string{"0.667 0.118 0.118 RG", "[3.00 2.00] 1.00 d", "S"}},
		{"all-zero pattern is solid", color.Black, []vg.Length{0, 0}, 0, false,
			[]string{"0.000 G", "[] 0.00 d", "S"}},
		{"fill", color.RGBA{R: 255, G: 128, A: 255}, nil, 0, true,
			[]string{"1.000 0.502 0.000 rg", "f"}},
		{"half-transparent fill sets an alpha state", color.NRGBA{B: 255, A: 128}, nil, 0, true,
			[]string{"0.000 0.000 1.000 rg", "gs", "f"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			ops, pdf := drawOps(t, func(c *pdfCanvas) {
				c.SetColor(tc.clr)
				c.SetLineDash(tc.dash, tc.off)
				var p vg.Path
				p.Move(vg.Point{})
				p.Line(vg.Point{X: 10, Y: 10})
				p.Line(vg.Point{X: 20})
				p.Close()
				if tc.fill {
					c.Fill(p)
				} else {
					c.Stroke(p)
				}
			})
			var seq []string
			for _, o := range ops {
				seq = append(seq, strings.TrimSpace(strings.Join(o.args, " ")+" "+o.name))
			}
			got := strings.Join(seq, "; ")
			at := 0
			for _, w := range tc.wants {
				k := strings.Index(got[at:], w)
				if k < 0 {
					t.Fatalf("operators lack %q after position %d:\n%s", w, at, got)
				}
				at += k + len(w)
			}
			if a, ok := tc.clr.(color.NRGBA); ok && a.A < 255 {
				// fpdf writes the alpha into an ExtGState: 128/255 = 0.502.
				if !bytes.Contains(pdf, []byte("/ca 0.502")) || !bytes.Contains(pdf, []byte("/CA 0.502")) {
					t.Errorf("PDF lacks the ExtGState with alpha 0.502")
				}
				// One gs sets the alpha, one restores it when the canvas is finished.
				if n := len(find(ops, "gs")); n != 2 {
					t.Errorf("%d gs operators; want 2 (set alpha, restore it)", n)
				}
			}
		})
	}
}

func TestCanvasArc(t *testing.T) {
	t.Parallel()
	// A full circle of radius 10 mm about (50, 25) mm, as gonum/plot's
	// circle glyph draws it: Move to the start, Arc through 2π, Close.
	ops, _ := drawOps(t, func(c *pdfCanvas) {
		ctr := vg.Point{X: mm(50), Y: mm(25)}
		var p vg.Path
		p.Move(vg.Point{X: ctr.X + mm(10), Y: ctr.Y})
		p.Arc(ctr, mm(10), 0, 2*math.Pi)
		p.Close()
		c.Stroke(p)
	})
	cs := find(ops, "c")
	if len(cs) != 4 {
		t.Fatalf("%d Bézier segments for a full circle; want 4 quarter arcs", len(cs))
	}
	if len(find(ops, "l")) != 0 {
		t.Errorf("a line joins the move to the arc start although they coincide")
	}
	// Quarter arc from 0 to π/2: control points (r, k·r) and (k·r, r)
	// about the centre, k = 4/3·tan(π/8) = 0.5522847498307936 (closed form).
	const k = 0.5522847498307936
	x, y := pdfPoint(50+10, 25+10*k)
	checkXY(t, "first control point", cs[0], 0, x, y)
	x, y = pdfPoint(50+10*k, 25+10)
	checkXY(t, "second control point", cs[0], 2, x, y)
	x, y = pdfPoint(50, 35)
	checkXY(t, "quarter end", cs[0], 4, x, y)
	x, y = pdfPoint(60, 25)
	checkXY(t, "circle end", cs[3], 4, x, y)
}

func TestArcBeziersOnCircle(t *testing.T) {
	t.Parallel()
	// Every segment's end points lie on the circle and its midpoint,
	// B(1/2) = (P0 + 3P1 + 3P2 + P3)/8, lies on it too (the property that
	// fixes k = 4/3·tan(θ/4)).
	tests := []struct{ start, sweep float64 }{
		{0, 2 * math.Pi}, {0.3, math.Pi / 5}, {1, -3}, {-2, 4.5},
	}
	for _, tc := range tests {
		t.Run(fmt.Sprintf("start %g sweep %g", tc.start, tc.sweep), func(t *testing.T) {
			t.Parallel()
			const cx, cy, r = 3.0, -2.0, 7.0
			n := 0
			px, py := cx+r*math.Cos(tc.start), cy+r*math.Sin(tc.start)
			arcBeziers(cx, cy, r, tc.start, tc.sweep, func(x1, y1, x2, y2, x3, y3 float64) {
				n++
				mx, my := (px+3*x1+3*x2+x3)/8, (py+3*y1+3*y2+y3)/8
				for _, q := range [][2]float64{{x3, y3}, {mx, my}} {
					if d := math.Hypot(q[0]-cx, q[1]-cy); !scalar.EqualWithinAbsOrRel(d, r, 1e-12, 1e-12) {
						t.Errorf("segment %d point %v is %.15g from the centre; want %g", n, q, d, r)
					}
				}
				px, py = x3, y3
			})
			ex, ey := cx+r*math.Cos(tc.start+tc.sweep), cy+r*math.Sin(tc.start+tc.sweep)
			if !scalar.EqualWithinAbs(px, ex, 1e-12) || !scalar.EqualWithinAbs(py, ey, 1e-12) {
				t.Errorf("arc ends at (%g, %g); want (%g, %g)", px, py, ex, ey)
			}
			if want := int(math.Ceil(math.Abs(tc.sweep) / (math.Pi / 2))); n != want {
				t.Errorf("%d segments; want %d (at most 90° each)", n, want)
			}
		})
	}
}

func TestCanvasSkipsNonFinitePaths(t *testing.T) {
	t.Parallel()
	ops, _ := drawOps(t, func(c *pdfCanvas) {
		var p vg.Path
		p.Move(vg.Point{})
		p.Line(vg.Point{X: vg.Length(math.NaN())})
		c.Stroke(p)
		c.Fill(p)
		c.Stroke(nil)
		c.SetLineWidth(0)
		var q vg.Path
		q.Move(vg.Point{})
		q.Line(vg.Point{X: 10})
		c.Stroke(q) // zero width: not stroked
	})
	for _, name := range []string{"m", "l", "S", "f"} {
		if n := len(find(ops, name)); n != 0 {
			t.Errorf("%d %q operators for paths that must not be drawn", n, name)
		}
	}
}

func TestCanvasText(t *testing.T) {
	t.Parallel()
	face := plot.DefaultTextHandler.Cache().Lookup(font.Font{Typeface: "Liberation", Variant: "Sans", Size: 10}, 10)
	bold := face
	bold.Font.Weight = stdfnt.WeightBold
	tests := []struct {
		name   string
		setup  func(c *pdfCanvas)
		face   font.Face
		pt     [2]float64 // user-space mm of the baseline start
		at     [2]float64 // canvas mm of the baseline start
		rotDeg float64
		wantPt float64
	}{
		{"regular", func(c *pdfCanvas) {}, face, [2]float64{10, 20}, [2]float64{10, 20}, 0, 10},
		{"bold, translated", func(c *pdfCanvas) { c.Translate(vg.Point{X: mm(5), Y: mm(5)}) }, bold,
			[2]float64{10, 20}, [2]float64{15, 25}, 0, 10},
		{"rotated 90°", func(c *pdfCanvas) {
			c.Translate(vg.Point{X: mm(10), Y: mm(20)})
			c.Rotate(math.Pi / 2)
		}, face, [2]float64{0, 0}, [2]float64{10, 20}, 90, 10},
		{"scaled 1.5", func(c *pdfCanvas) { c.Scale(1.5, 1.5) }, face, [2]float64{2, 4}, [2]float64{3, 6}, 0, 15},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			ops, _ := drawOps(t, func(c *pdfCanvas) {
				c.SetColor(traceRed)
				tc.setup(c)
				c.FillString(tc.face, vg.Point{X: mm(tc.pt[0]), Y: mm(tc.pt[1])}, "Volts")
			})
			tf, td := find(ops, "Tf"), find(ops, "Td")
			// The second Tf is finish restoring the document's font.
			if len(tf) != 2 || len(td) != 1 {
				t.Fatalf("got %d Tf and %d Td operators; want 2 and 1", len(tf), len(td))
			}
			if got := tf[0].num(t, 1); !scalar.EqualWithinAbs(got, tc.wantPt, 0.006) {
				t.Errorf("font size %.2f pt; want %.2f", got, tc.wantPt)
			}
			x, y := pdfPoint(tc.at[0], tc.at[1])
			checkXY(t, "baseline start", td[0], 0, x, y)
			rg := find(ops, "rg")
			if len(rg) == 0 || strings.Join(rg[len(rg)-1].args, " ") != "0.667 0.118 0.118" {
				t.Errorf("text colour operators %v; want 0.667 0.118 0.118 rg", rg)
			}
			cm := find(ops, "cm")
			if tc.rotDeg == 0 {
				if len(cm) != 0 {
					t.Errorf("unrotated text written with a transform %v", cm)
				}
				return
			}
			if len(cm) != 1 {
				t.Fatalf("%d cm operators for rotated text; want 1", len(cm))
			}
			s, co := math.Sincos(tc.rotDeg * math.Pi / 180)
			if a, b := cm[0].num(t, 0), cm[0].num(t, 1); !scalar.EqualWithinAbs(a, co, 1e-5) || !scalar.EqualWithinAbs(b, s, 1e-5) {
				t.Errorf("rotation matrix starts %g %g; want cos, sin = %g %g", a, b, co, s)
			}
		})
	}
}

func TestCanvasImage(t *testing.T) {
	t.Parallel()
	// Opaque, so that fpdf stores no soft mask beside it.
	img := image.NewRGBA(image.Rect(0, 0, 2, 2))
	for i := range img.Pix {
		img.Pix[i] = 255
	}
	img.Set(0, 0, color.RGBA{R: 255, A: 255})
	ops, pdf := drawOps(t, func(c *pdfCanvas) {
		r := vg.Rectangle{Min: vg.Point{X: mm(10), Y: mm(10)}, Max: vg.Point{X: mm(30), Y: mm(20)}}
		c.DrawImage(r, img)
		c.DrawImage(r, img)
	})
	if n := bytes.Count(pdf, []byte("/Subtype /Image")); n != 1 {
		t.Errorf("%d image objects for one image drawn twice; want 1", n)
	}
	cm := find(ops, "cm")
	if len(cm) != 4 { // per image: the canvas transform and fpdf's placement
		t.Fatalf("%d cm operators; want 4", len(cm))
	}
	// fpdf's placement: width, 0, 0, height, left, bottom in points.
	x, y := pdfPoint(10, 10)
	pl := cm[1]
	if w, h := pl.num(t, 0), pl.num(t, 3); !scalar.EqualWithinAbs(w, 20*ptPerMM, posTol) || !scalar.EqualWithinAbs(h, 10*ptPerMM, posTol) {
		t.Errorf("image size %.2f × %.2f pt; want %.2f × %.2f", w, h, 20*ptPerMM, 10*ptPerMM)
	}
	checkXY(t, "image corner", pl, 4, x, y)
}

func TestCanvasRestoresFpdfState(t *testing.T) {
	t.Parallel()
	f := fpdf.New("P", "mm", "A4", "")
	f.AddUTF8FontFromBytes("sans", "", liberationsansregular.TTF)
	f.AddPage()
	f.SetFont("sans", "", 9)
	f.SetDrawColor(10, 20, 30)
	f.SetFillColor(40, 50, 60)
	f.SetTextColor(70, 80, 90)
	f.SetLineWidth(0.3)
	c := newPDFCanvas(f, "sans", tcX, tcY, tcW, tcH)
	c.SetColor(color.NRGBA{R: 200, A: 100})
	c.SetLineWidth(5)
	c.SetLineDash([]vg.Length{1, 1}, 0)
	var p vg.Path
	p.Move(vg.Point{})
	p.Line(vg.Point{X: 10})
	c.Stroke(p)
	c.Fill(p)
	face := plot.DefaultTextHandler.Cache().Lookup(font.Font{Typeface: "Liberation", Variant: "Sans", Size: 14}, 14)
	c.FillString(face, vg.Point{}, "x")
	c.finish()
	type rgb [3]int
	get := func(fn func() (int, int, int)) rgb { r, g, b := fn(); return rgb{r, g, b} }
	if got := get(f.GetDrawColor); got != (rgb{10, 20, 30}) {
		t.Errorf("draw colour %v after the canvas; want 10 20 30", got)
	}
	if got := get(f.GetFillColor); got != (rgb{40, 50, 60}) {
		t.Errorf("fill colour %v after the canvas; want 40 50 60", got)
	}
	if got := get(f.GetTextColor); got != (rgb{70, 80, 90}) {
		t.Errorf("text colour %v after the canvas; want 70 80 90", got)
	}
	if got := f.GetLineWidth(); got != 0.3 {
		t.Errorf("line width %g after the canvas; want 0.3", got)
	}
	if a, bl := f.GetAlpha(); a != 1 || bl != "Normal" {
		t.Errorf("alpha %g %q after the canvas; want 1 Normal", a, bl)
	}
	if pt, _ := f.GetFontSize(); pt != 9 || f.GetFontFamily() != "sans" {
		t.Errorf("font %s %g pt after the canvas; want sans 9", f.GetFontFamily(), pt)
	}
	if err := f.Error(); err != nil {
		t.Errorf("fpdf error: %v", err)
	}
}

// word is one word of pdftotext -bbox output, in points from the page's
// top-left corner.
type word struct {
	text                   string
	xMin, yMin, xMax, yMax float64
}

var wordRE = regexp.MustCompile(`<word xMin="([\d.]+)" yMin="([\d.]+)" xMax="([\d.]+)" yMax="([\d.]+)">([^<]*)</word>`)

// pdfWords runs pdftotext -bbox (poppler-utils) on pdf; it skips the test
// when pdftotext is absent.
func pdfWords(t *testing.T, pdf []byte) []word {
	t.Helper()
	exe, err := exec.LookPath("pdftotext")
	if err != nil {
		t.Skip("pdftotext (poppler-utils) not installed: text positions not checked")
	}
	path := filepath.Join(t.TempDir(), "f.pdf")
	if err := os.WriteFile(path, pdf, 0o644); err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command(exe, "-bbox", path, "-").Output()
	if err != nil {
		t.Fatalf("pdftotext -bbox: %v", err)
	}
	var ws []word
	for _, m := range wordRE.FindAllStringSubmatch(string(out), -1) {
		var v [4]float64
		for i := range v {
			v[i], _ = strconv.ParseFloat(m[i+1], 64)
		}
		ws = append(ws, word{m[5], v[0], v[1], v[2], v[3]})
	}
	return ws
}

// testIndication is an indication with a synthetic signal window: one
// sine period along 2 rad over the measurement window, a small drift.
func testIndication() *Indication {
	d := &Indication{}
	d.StartSample, d.EndSample, d.PhaseRad, d.VppV = 40, 60, 2, 1.5
	w := &Window{FirstSample: 20, X: make([]float64, 60), Y: make([]float64, 60)}
	for i := range w.X {
		u := float64(i+w.FirstSample-d.StartSample) / 20
		if u >= 0 && u < 1 {
			a := 0.75 * math.Sin(2*math.Pi*u)
			w.X[i], w.Y[i] = a*math.Cos(2), a*math.Sin(2)
		}
		w.X[i] += 0.001 * float64(i)
	}
	d.Window = w
	return d
}

// TestFigureTextLayout draws the report's figures on the test canvas and
// checks with pdftotext where their words land: all inside the figure,
// none overlapping another, the title centred (which holds only when
// gonum/plot's measurement of the text agrees with the PDF's glyphs), and
// tick labels centred under their ticks.
func TestFigureTextLayout(t *testing.T) {
	t.Parallel()
	d := testIndication()
	tests := []struct {
		name  string
		fig   func() (*plot.Plot, error)
		title string
	}{
		{"impedance plane", func() (*plot.Plot, error) { return lissajousFigure(d) }, "Impedance plane"},
		{"strip chart", func() (*plot.Plot, error) { return stripFigure(d) }, "Strip chart"},
		{"curve", func() (*plot.Plot, error) {
			return curveFigure(&Calibration{Points: []CurvePoint{{PhaseRad: 0.7, DepthPct: 100}, {PhaseRad: 2.2, DepthPct: 20}}})
		}, "Phase to depth"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			_, pdf := drawPlot(t, tc.fig)
			words := pdfWords(t, pdf)
			if len(words) < 8 {
				t.Fatalf("%d words found; want the title, axis labels and tick labels", len(words))
			}
			left, top := tcX*ptPerMM, tcY*ptPerMM
			right, bottom := (tcX+tcW)*ptPerMM, (tcY+tcH)*ptPerMM
			// pdftotext's word boxes run from the font's ascent (0.905 em for
			// Liberation Sans, hhea table) to its descent (0.212 em), above
			// and below the glyphs themselves (capitals 0.69 em high): let a
			// box pass the figure's edge by 0.2 em of the 12 pt title.
			const slack = 2.4
			for _, w := range words {
				if w.xMin < left-slack || w.xMax > right+slack || w.yMin < top-slack || w.yMax > bottom+slack {
					t.Errorf("word %q at [%.1f, %.1f]×[%.1f, %.1f] pt lies outside the figure [%.1f, %.1f]×[%.1f, %.1f]",
						w.text, w.xMin, w.xMax, w.yMin, w.yMax, left, right, top, bottom)
				}
			}
			for i, a := range words {
				for _, b := range words[i+1:] {
					// For the same reason boxes of stacked lines may overlap
					// by the ascent above the capitals plus the descent (0.21 +
					// 0.21 em): allow 0.3 of the smaller box.
					ox := math.Min(a.xMax, b.xMax) - math.Max(a.xMin, b.xMin)
					oy := math.Min(a.yMax, b.yMax) - math.Max(a.yMin, b.yMin)
					hx := math.Min(a.xMax-a.xMin, b.xMax-b.xMin)
					hy := math.Min(a.yMax-a.yMin, b.yMax-b.yMin)
					if ox > 0.3*hx && oy > 0.3*hy {
						t.Errorf("words %q and %q overlap by %.1f × %.1f pt", a.text, b.text, ox, oy)
					}
				}
			}
			// The title is centred on the figure.
			tw := strings.Fields(tc.title)
			var first, last *word
			for i := range words {
				if words[i].text == tw[0] && first == nil {
					first = &words[i]
				}
				if words[i].text == tw[len(tw)-1] {
					last = &words[i]
				}
			}
			if first == nil || last == nil {
				t.Fatalf("title %q not found in %v", tc.title, words)
			}
			mid := (first.xMin + last.xMax) / 2
			if want := (left + right) / 2; math.Abs(mid-want) > 0.5 {
				t.Errorf("title centred at %.2f pt; want %.2f ± 0.5 (the figure's centre)", mid, want)
			}
		})
	}
}

// TestFigureStyles checks the stroke style (colour, width, dashes) of the
// report's figures as written to the PDF: every style the figure functions
// set must be there, with gonum/plot's grid (grey 128, 0.25 pt,
// plotter.DefaultGridLineStyle) under it.
func TestFigureStyles(t *testing.T) {
	t.Parallel()
	d := testIndication()
	// Colours as fpdf writes them: 0–1 to 3 decimals; traceDark is
	// 20, 40, 110; traceRed 170, 30, 30; traceGrey 170; the grid 128.
	const (
		dark = "0.078 0.157 0.431 RG"
		red  = "0.667 0.118 0.118 RG"
		grey = "0.667 G"
		grid = "0.502 G"
	)
	tests := []struct {
		name  string
		fig   func() (*plot.Plot, error)
		wants []string // colour | width | dash
	}{
		{"impedance plane", func() (*plot.Plot, error) { return lissajousFigure(d) }, []string{
			grid + " | 0.25 w | [] 0.00 d",
			grey + " | 1.00 w | [] 0.00 d",
			dark + " | 1.50 w | [] 0.00 d", // the measurement window
			"0.000 G | 0.50 w | [] 0.00 d", // axes: plot.Axis line width 0.5 pt
		}},
		{"strip chart", func() (*plot.Plot, error) { return stripFigure(d) }, []string{
			grid + " | 0.25 w | [] 0.00 d",
			dark + " | 1.00 w | [] 0.00 d",
			red + " | 1.00 w | [3.00 2.00] 0.00 d",
			grey + " | 1.00 w | [1.00 2.00] 0.00 d", // window markers
		}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			ops, _ := drawPlot(t, tc.fig)
			var clr, w, dash string
			got := map[string]bool{}
			for _, o := range ops {
				a := strings.Join(o.args, " ")
				switch o.name {
				case "RG", "G":
					clr = a + " " + o.name
				case "w":
					w = a + " w"
				case "d":
					dash = a + " d"
				case "S":
					got[clr+" | "+w+" | "+dash] = true
				}
			}
			for _, want := range tc.wants {
				if !got[want] {
					t.Errorf("no stroke with %s; strokes have %v", want, got)
				}
			}
		})
	}
}

// FuzzFigureData draws the impedance-plane and strip-chart figures of
// arbitrary signal windows (the bytes are read as float64 X, Y pairs) and
// checks that drawing neither panics nor leaves fpdf in error, whatever
// the values: equal, tiny, huge or non-finite (those are refused with an
// error before drawing).
func FuzzFigureData(f *testing.F) {
	enc := func(vs ...float64) []byte {
		b := make([]byte, 0, 8*len(vs))
		for _, v := range vs {
			b = binary.LittleEndian.AppendUint64(b, math.Float64bits(v))
		}
		return b
	}
	f.Add(enc(0, 0, 1, 1, 2, 0, 3, -1))
	f.Add(enc(1, 1, 1, 1, 1, 1, 1, 1))
	f.Add(enc(1e-300, 0, -1e-300, 5e-324, 0, 0, 1e-300, 1e-300))
	f.Add(enc(1e300, -1e300, -1e300, 1e300, 1.7e308, 0, 0, -1.7e308))
	f.Add(enc(math.NaN(), 0, 1, math.Inf(1), 2, 2, 3, 3))
	// Registering the font is most of the cost of a document, so one
	// document takes many executions (a worker runs them one at a time),
	// a page each, and is replaced every 64 pages.
	var ff *fpdf.Fpdf
	f.Fuzz(func(t *testing.T, data []byte) {
		n := len(data) / 16
		if n < 2 || n > 512 {
			return
		}
		w := &Window{FirstSample: 10, X: make([]float64, n), Y: make([]float64, n)}
		for i := range n {
			w.X[i] = math.Float64frombits(binary.LittleEndian.Uint64(data[16*i:]))
			w.Y[i] = math.Float64frombits(binary.LittleEndian.Uint64(data[16*i+8:]))
		}
		d := &Indication{Window: w}
		d.StartSample, d.EndSample = 10, 10+n
		if ff == nil || ff.PageNo() >= 64 {
			ff = fpdf.New("P", "mm", "A4", "")
			ff.AddUTF8FontFromBytes("sans", "", liberationsansregular.TTF)
		}
		ff.AddPage()
		for _, fig := range []func(*Indication) (*plot.Plot, error){lissajousFigure, stripFigure} {
			p, err := fig(d)
			if err != nil {
				continue
			}
			c := newPDFCanvas(ff, "sans", tcX, tcY, tcW, tcH)
			p.Draw(draw.New(c))
			c.finish()
		}
		if err := ff.Error(); err != nil {
			t.Fatalf("fpdf error after drawing X %v Y %v: %v", w.X, w.Y, err)
		}
		if ff.PageNo() == 64 {
			if err := ff.Output(io.Discard); err != nil {
				t.Fatalf("PDF output: %v", err)
			}
		}
	})
}

func TestFigureRefusesUnplottableRange(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name string
		x, y []float64
	}{
		// The padded span, 1.05·(1.7e308 + 1.7e308), overflows float64.
		{"X spans the float64 range", []float64{-1.7e308, 0, 1.7e308}, []float64{0, 1, 0}},
		{"Y spans the float64 range", []float64{0, 1, 0}, []float64{-1.7e308, 0, 1.7e308}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			d := &Indication{Window: &Window{FirstSample: 0, X: tc.x, Y: tc.y}}
			d.StartSample, d.EndSample = 0, 3
			for name, fig := range map[string]func(*Indication) (*plot.Plot, error){"impedance plane": lissajousFigure, "strip chart": stripFigure} {
				if _, err := fig(d); err == nil || !strings.Contains(err.Error(), "too large a range") {
					t.Errorf("%s of X %v Y %v: error %v; want a refusal naming the range", name, tc.x, tc.y, err)
				}
			}
		})
	}
}
