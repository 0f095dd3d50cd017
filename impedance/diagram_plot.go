package impedance

import (
	"fmt"
	"image/color"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// diagramColours are distinguishable with the common forms of colour-vision
// deficiency: a selection from the palette of M. Okabe and K. Ito, "Color
// Universal Design" (2008), without its yellow, which is too light on white.
var diagramColours = []color.NRGBA{
	{0x00, 0x72, 0xB2, 0xFF}, // blue
	{0xD5, 0x5E, 0x00, 0xFF}, // vermillion
	{0x00, 0x9E, 0x73, 0xFF}, // bluish green
	{0xCC, 0x79, 0xA7, 0xFF}, // reddish purple
	{0xE6, 0x9F, 0x00, 0xFF}, // orange
	{0x56, 0xB4, 0xE9, 0xFF}, // sky blue
	{0x00, 0x00, 0x00, 0xFF}, // black
}

// diagramDashes cycle after the colours, so that curves stay apart in
// grey-scale print as well.
var diagramDashes = [][]vg.Length{nil, {vg.Points(6), vg.Points(3)}, {vg.Points(2), vg.Points(2)}}

// Image formats Diagram.WriteImage and Diagram.Save accept.
var diagramFormats = map[string]bool{"png": true, "svg": true, "pdf": true}

// Plot draws the diagram with gonum/plot: one line per curve in the legend,
// the parameter value written beside about five points of each curve, and
// the markers (air point) as labelled points. Axes are ΔR/X0 and X/X0.
func (d *Diagram) Plot() (*plot.Plot, error) { return d.plot(func(s string) string { return s }) }

// plot draws the diagram with every text passed through txt.
func (d *Diagram) plot(txt func(string) string) (*plot.Plot, error) {
	p := plot.New()
	p.Title.Text = txt(d.Title)
	p.X.Label.Text = txt(d.XLabel)
	p.Y.Label.Text = txt(d.YLabel)
	p.Add(plotter.NewGrid())
	// Room above the air point for the legend, which sits top right.
	xmin, xmax, ymin, ymax := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	for _, c := range d.Curves {
		for _, z := range c.Points {
			xmin, xmax = math.Min(xmin, real(z)), math.Max(xmax, real(z))
			ymin, ymax = math.Min(ymin, imag(z)), math.Max(ymax, imag(z))
		}
	}
	for _, m := range d.Markers {
		ymax = math.Max(ymax, imag(m.Point))
	}
	p.Y.Max = ymax + 0.08*(ymax-ymin)*float64(len(d.Curves)+1)
	p.Legend.Top = true
	// Labels closer than this (in axis units) to one already placed are skipped.
	minGap := 0.06 * math.Hypot(xmax-xmin, ymax-ymin)
	var placed plotter.XYs
	for i, c := range d.Curves {
		xy := make(plotter.XYs, len(c.Points))
		for j, z := range c.Points {
			xy[j] = plotter.XY{X: real(z), Y: imag(z)}
		}
		line, err := plotter.NewLine(xy)
		if err != nil {
			return nil, fmt.Errorf("curve %q: %w", c.Label, err)
		}
		col := diagramColours[i%len(diagramColours)]
		line.Color = col
		line.Width = vg.Points(1.5)
		line.Dashes = diagramDashes[(i/len(diagramColours))%len(diagramDashes)]
		p.Add(line)
		p.Legend.Add(txt(c.Label), line)

		// Parameter values at about five points of the curve.
		n := len(c.Points)
		stride := max(1, (n-1)/4)
		var lxy plotter.XYs
		var labelText []string
		for j := 0; j < n; j += stride {
			crowded := false
			for _, q := range placed {
				if math.Hypot(xy[j].X-q.X, xy[j].Y-q.Y) < minGap {
					crowded = true
				}
			}
			if crowded {
				continue
			}
			placed = append(placed, xy[j])
			lxy = append(lxy, xy[j])
			labelText = append(labelText, txt(FormatParam(d.Family, c.Values[j])))
		}
		if len(lxy) > 0 {
			dots, err := plotter.NewScatter(lxy)
			if err != nil {
				return nil, err
			}
			dots.GlyphStyle = draw.GlyphStyle{Color: col, Radius: vg.Points(2), Shape: draw.CircleGlyph{}}
			p.Add(dots)
			labels, err := plotter.NewLabels(plotter.XYLabels{XYs: lxy, Labels: labelText})
			if err != nil {
				return nil, err
			}
			for k := range labels.TextStyle {
				labels.TextStyle[k].Color = col
				labels.TextStyle[k].Font.Size = vg.Points(7)
			}
			labels.Offset = vg.Point{X: vg.Points(4), Y: vg.Points(2)}
			p.Add(labels)
		}
	}
	if len(d.Markers) > 0 {
		mxy := make(plotter.XYs, len(d.Markers))
		markerText := make([]string, len(d.Markers))
		for i, m := range d.Markers {
			mxy[i] = plotter.XY{X: real(m.Point), Y: imag(m.Point)}
			markerText[i] = txt(m.Label)
		}
		sc, err := plotter.NewScatter(mxy)
		if err != nil {
			return nil, err
		}
		sc.GlyphStyle = draw.GlyphStyle{Color: color.Black, Radius: vg.Points(3), Shape: draw.PlusGlyph{}}
		p.Add(sc)
		lb, err := plotter.NewLabels(plotter.XYLabels{XYs: mxy, Labels: markerText})
		if err != nil {
			return nil, err
		}
		lb.Offset = vg.Point{X: vg.Points(4), Y: vg.Points(-10)}
		p.Add(lb)
	}
	return p, nil
}

// WriteImage draws the diagram in format "png", "svg" or "pdf" at the given
// size and writes it to w.
func (d *Diagram) WriteImage(w io.Writer, format string, width, height vg.Length) error {
	format = strings.ToLower(format)
	if !diagramFormats[format] {
		return fmt.Errorf("image format %q: expected png, svg or pdf", format)
	}
	txt := func(s string) string { return s }
	if format == "pdf" {
		txt = pdfText
	}
	p, err := d.plot(txt)
	if err != nil {
		return err
	}
	wt, err := p.WriterTo(width, height, format)
	if err != nil {
		return err
	}
	_, err = wt.WriteTo(w)
	return err
}

// Save writes the diagram to path as PNG, SVG or PDF, chosen by the file's
// extension, 16 cm × 14 cm.
func (d *Diagram) Save(path string) (err error) {
	format := strings.TrimPrefix(strings.ToLower(filepath.Ext(path)), ".")
	if !diagramFormats[format] {
		return fmt.Errorf("%s: image format %q: expected a .png, .svg or .pdf file name", path, format)
	}
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	defer func() {
		if cerr := f.Close(); err == nil {
			err = cerr
		}
	}()
	return d.WriteImage(f, format, 16*vg.Centimeter, 14*vg.Centimeter)
}

// pdfText rewrites a label for gonum/plot's PDF canvas, whose embedded
// fonts use the Windows-1252 code page: characters of that code page are
// written as its single bytes, ΔR becomes (R-R0) (the same quantity,
// R − R0 with R0 the coil's resistance in air), μ the micro sign, ∞ "inf",
// and anything else outside the code page "?".
func pdfText(s string) string {
	s = strings.ReplaceAll(s, "ΔR", "(R-R0)")
	var b strings.Builder
	for _, r := range s {
		switch {
		case r < 0x80:
			b.WriteRune(r)
		case r >= 0xA0 && r <= 0xFF:
			b.WriteByte(byte(r))
		case r == 'μ': // Greek mu: the micro sign looks the same
			b.WriteByte(0xB5)
		case r == '…':
			b.WriteByte(0x85)
		case r == '–':
			b.WriteByte(0x96)
		case r == '—':
			b.WriteByte(0x97)
		case r == '−':
			b.WriteByte('-')
		case r == '∞':
			b.WriteString("inf")
		default:
			b.WriteByte('?')
		}
	}
	return b.String()
}
