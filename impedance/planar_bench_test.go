package impedance

import (
	"context"
	"math"
	"testing"

	"whorl/impedance/cbessel"
)

var benchSink complex128

// BenchmarkPlanarModelImpedance is one ΔZ evaluation to 1e-8 relative with
// L0 and the coil integral cached: T15 coil, 0.88 mm lift-off, half-space
// 30.6 MS/m, 900 Hz.
func BenchmarkPlanarModelImpedance(b *testing.B) {
	m, err := NewPlanarModel(coilT15, 1e-8)
	if err != nil {
		b.Fatal(err)
	}
	layers := halfSpace(30.6e6, 1)
	b.ReportAllocs()
	for b.Loop() {
		r, _ := m.Impedance(900, 0.88e-3, layers)
		benchSink = r.DZOhm
	}
}

// BenchmarkPlanarModelImpedancePlate is the same on a 1 mm plate over a
// half-space of another alloy (two layers).
func BenchmarkPlanarModelImpedanceTwoLayer(b *testing.B) {
	m, err := NewPlanarModel(coilT15, 1e-8)
	if err != nil {
		b.Fatal(err)
	}
	layers := []Layer{{1e-3, 5e6, 1}, {math.Inf(1), 30.6e6, 1}}
	b.ReportAllocs()
	for b.Loop() {
		r, _ := m.Impedance(1e4, 0.88e-3, layers)
		benchSink = r.DZOhm
	}
}

// BenchmarkNewPlanarModel builds the coil cache (nodes, χ², L0).
func BenchmarkNewPlanarModel(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		m, _ := NewPlanarModel(coilT15, 1e-8)
		benchSink = complex(m.L0H(), 0)
	}
}

// BenchmarkImpedancePlaneGrid50x50 computes a 50 × 50 impedance-plane
// diagram (conductivity 1–60 MS/m × lift-off 0–5 mm at 10 kHz, C9 coil)
// with SweepPlanar on 2 workers, model construction included.
func BenchmarkImpedancePlaneGrid50x50(b *testing.B) {
	pts := make([]PlanarPoint, 0, 2500)
	for i := 0; i < 50; i++ {
		sigma := 1e6 * math.Pow(60, float64(i)/49)
		for j := 0; j < 50; j++ {
			pts = append(pts, PlanarPoint{FreqHz: 1e4, LiftoffM: 5e-3 * float64(j) / 49, Layers: halfSpace(sigma, 1)})
		}
	}
	b.ReportAllocs()
	for b.Loop() {
		m, _ := NewPlanarModel(coilC9, 1e-8)
		r, err := SweepPlanar(context.Background(), m, pts, 2)
		if err != nil {
			b.Fatal(err)
		}
		benchSink = r[len(r)-1].DZOhm
	}
}

// BenchmarkTubeBobbin is one bobbin-coil evaluation in a 19.05 × 1.09 mm
// tube at 100 kHz (L0 included).
func BenchmarkTubeBobbin(b *testing.B) {
	p := TubeProbe{Coil: Coil{InnerRadiusM: 7e-3, OuterRadiusM: 7.6e-3, LengthM: 1.5e-3, Turns: 60}, Placement: Bobbin,
		TubeInnerRadiusM: 8.435e-3, TubeOuterRadiusM: 9.525e-3, ConductivitySPerM: 1e6, RelPermeability: 1}
	b.ReportAllocs()
	for b.Loop() {
		r, _ := p.Impedance(1e5)
		benchSink = r.DZOhm
	}
}

// BenchmarkBesselK01Scaled evaluates K0, K1 at arguments of the three
// methods (series, trapezoid, asymptotic).
func BenchmarkBesselK01Scaled(b *testing.B) {
	zs := []complex128{1 + 1i, 5 + 5i, 30 + 30i}
	b.ReportAllocs()
	for b.Loop() {
		for _, z := range zs {
			k0, _ := cbessel.K01Scaled(z)
			benchSink = k0
		}
	}
}
