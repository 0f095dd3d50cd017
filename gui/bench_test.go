package gui

import (
	"testing"

	"whorl/acquire"

	"whorl/gui/pixels"
	"whorl/gui/viewmodel"
	"whorl/gui/viewmodel/vmtest"
)

// benchPlane is the impedance-plane input of the benchmark.
type benchPlane struct {
	tube  *viewmodel.Tube
	chart *viewmodel.Chart
	m     viewmodel.Measurement
}

func (b *benchPlane) Tube() *viewmodel.Tube                      { return b.tube }
func (b *benchPlane) Chart() *viewmodel.Chart                    { return b.chart }
func (b *benchPlane) Channel() string                            { return b.tube.Scan.Channels[0].Name }
func (b *benchPlane) Plane() viewmodel.Plane                     { return viewmodel.Plane{SpanV: 2.5} }
func (b *benchPlane) Measurement() (viewmodel.Measurement, bool) { return b.m, true }

// BenchmarkRedraw measures one full redraw of the review desk's plots for
// a 200,000-sample, 8-channel scan: min/max decimation of every channel's
// X and Y over the whole scan into 8 stacked strip charts 1000 pixels wide
// (the size the desk has at 1366×768), the analysis window, landmarks and
// grid, plus the impedance plane (340×340 pixels) of a 2,000-sample window.
func BenchmarkRedraw(b *testing.B) {
	const n, channels = 200_000, 8
	sc := vmtest.Scan("BENCH", n, channels, 1)
	tube := &viewmodel.Tube{ID: "BENCH", Scan: sc, Landmarks: []viewmodel.Landmark{{Name: "plate 1", PositionM: 100}, {Name: "plate 2", PositionM: 250}}}
	chart := viewmodel.NewChart(sc.PositionM, n, "position", "m", 2000)
	th := &Theme{Variant: Dark}
	style := th.PlotStyle()
	var chs []*acquire.Channel
	var idx []int
	for i := range sc.Channels {
		chs = append(chs, &sc.Channels[i])
		idx = append(idx, i)
	}
	const w, h = 1000, 600
	rects := make([]pixels.Rect, channels)
	ph := h / channels
	for i := range rects {
		rects[i] = pixels.Rect{X0: 60, Y0: i*ph + 14, X1: w - 8, Y1: (i+1)*ph - 2}
	}
	parts := []viewmodel.Part{viewmodel.PartX, viewmodel.PartY}
	var strip pixels.StripScene
	var plane pixels.PlaneScene
	ps := &benchPlane{tube: tube, chart: chart}
	stripImg := pixels.New(nil, w, h)
	planeImg := pixels.New(nil, 340, 340)
	area := pixels.Rect{X0: 0, Y0: 0, X1: 340, Y1: 340}
	for _, c := range chs {
		tube.Envelope(c.Name) // built once when the component is opened
	}
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		fillStripScene(&strip, chart, tube, chs, idx, parts, rects, style)
		pixels.DrawStrips(stripImg, &strip)
		fillPlaneScene(&plane, ps, area, style)
		pixels.DrawPlane(planeImg, &plane)
	}
}
