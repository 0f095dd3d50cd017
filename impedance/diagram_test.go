package impedance

import (
	"bytes"
	"context"
	"errors"
	"math"
	"math/cmplx"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/plot/vg"
)

func TestDiagramConductivityCurveEnds(t *testing.T) {
	t.Parallel()
	m := newSurfaceModel(t)
	lo, hi := ConductivitySpan(surfaceCoil, surfaceFreqHz, 1, 1e-6, 1e6)
	spec := DiagramSpec{Family: FamilyConductivity, FreqHz: surfaceFreqHz, Values: LogSpace(lo, hi, 49), Curves: []float64{0.2e-3, 0.5e-3}}
	d, err := ComputeDiagram(context.Background(), m, spec)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range d.Curves {
		// σ → 0: the air point 0 + 1j (Zn = 1j exactly in air; ΔZ ∝ ωσ
		// to first order, Dodd & Deeds low-frequency limit).
		if g := cmplx.Abs(c.Points[0] - 1i); g > 1e-5 {
			t.Errorf("%s: first point %v is %g from the air point, want < 1e-5", c.Label, c.Points[0], g)
		}
		// σ → ∞: the perfect-conductor point, approached along 45° with a
		// distance ∝ δ ∝ σ^(−1/2) (surface-impedance limit φ ≈ −1 + 2α/α1).
		pec, err := NormalizedImpedance(m, surfaceFreqHz, c.Value, 1, Specimen{ConductivitySPerM: hi * 1e8})
		if err != nil {
			t.Fatal(err)
		}
		n := len(c.Points)
		d1 := c.Points[n-1] - pec // β = 1e6
		d2 := c.Points[n-9] - pec // β = 1e6 / 10^(8·12/48) = 1e4
		ratio := cmplx.Abs(d2) / cmplx.Abs(d1)
		if !scalar.EqualWithinRel(ratio, 10, 0.03) {
			t.Errorf("%s: distance to the PEC point falls by %.4f over a factor 100 in σ, want 10 (δ ∝ σ^−1/2)", c.Label, ratio)
		}
		if ang := cmplx.Phase(d1) * 180 / math.Pi; !scalar.EqualWithinAbs(ang, 45, 1) {
			t.Errorf("%s: approach to the PEC point at %.2f°, want 45° ± 1", c.Label, ang)
		}
		// The PEC point lies below the air point on the reactance axis.
		if !(imag(pec) < 1) || math.Abs(real(pec)) > 1e-6 {
			t.Errorf("%s: PEC point %v, want (0, x < 1)", c.Label, pec)
		}
	}
}

func TestDiagramLiftoffLines(t *testing.T) {
	t.Parallel()
	m := newSurfaceModel(t)
	spec := DiagramSpec{Family: FamilyLiftoff, FreqHz: surfaceFreqHz, Values: LogSpace(0.05e-3, 20e-3, 25), Curves: []float64{iacs(30), iacs(61)}}
	d, err := ComputeDiagram(context.Background(), m, spec)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range d.Curves {
		prev := math.Inf(1)
		for j, z := range c.Points {
			g := cmplx.Abs(z - 1i)
			if !(g < prev) {
				t.Errorf("%s: point %d (lift-off %g m) is %g from air, not nearer than the previous %g", c.Label, j, c.Values[j], g, prev)
			}
			prev = g
		}
		// At 20 mm (8 coil radii) the coupling is nearly gone: ΔZ ∝ e^{−2αz}.
		if prev > 1e-3 {
			t.Errorf("%s: %g from air at 20 mm lift-off, want < 1e-3", c.Label, prev)
		}
	}
}

func TestDiagramThicknessEndsAtHalfSpace(t *testing.T) {
	t.Parallel()
	m := newSurfaceModel(t)
	sigma := iacs(43)
	delta := SkinDepthM(surfaceFreqHz, sigma, 1)
	spec := DiagramSpec{Family: FamilyThickness, FreqHz: surfaceFreqHz, LiftoffM: surfaceLiftoffM, Values: LogSpace(0.01*delta, 20*delta, 30), Curves: []float64{sigma}}
	d, err := ComputeDiagram(context.Background(), m, spec)
	if err != nil {
		t.Fatal(err)
	}
	half, err := NormalizedImpedance(m, surfaceFreqHz, surfaceLiftoffM, 1, Specimen{ConductivitySPerM: sigma})
	if err != nil {
		t.Fatal(err)
	}
	// A plate of 20δ is the half-space (e^{−20} ≈ 2e-9; thickness limit).
	last := d.Curves[0].Points[29]
	if g := cmplx.Abs(last - half); g > 1e-7 {
		t.Errorf("20δ plate %v, half-space %v: differ by %g, want < 1e-7", last, half, g)
	}
}

func TestDiagramFrequencyAndPermeability(t *testing.T) {
	t.Parallel()
	m := newSurfaceModel(t)
	for _, spec := range []DiagramSpec{
		{Family: FamilyFrequency, LiftoffM: surfaceLiftoffM, Values: LogSpace(100, 1e6, 10), Curves: []float64{iacs(43)}},
		{Family: FamilyPermeability, FreqHz: 1e3, LiftoffM: surfaceLiftoffM, Values: []float64{1, 2, 5, 20, 100}, Curves: []float64{5e6}},
	} {
		d, err := ComputeDiagram(context.Background(), m, spec)
		if err != nil {
			t.Fatalf("%s: %v", spec.Family, err)
		}
		var buf bytes.Buffer
		if err := d.WriteCSV(&buf); err != nil {
			t.Fatal(err)
		}
		if got, want := strings.Count(buf.String(), "\n"), 1+len(spec.Values); got != want {
			t.Errorf("%s: CSV has %d lines, want %d", spec.Family, got, want)
		}
		if spec.Family == FamilyPermeability {
			// A magnetic, conducting half-space at low frequency raises X
			// above the air point once μr is large (φ → (μr−1)/(μr+1) > 0
			// as σ → 0).
			if x := imag(d.Curves[0].Points[4]); !(x > 1) {
				t.Errorf("μr = 100 at 1 kHz: X/X0 = %g, want > 1", x)
			}
		}
	}
}

func TestDiagramErrorsAndCancel(t *testing.T) {
	t.Parallel()
	m := newSurfaceModel(t)
	bad := []DiagramSpec{
		{Family: "colour", FreqHz: 1e3, Values: []float64{1, 2}, Curves: []float64{1}},
		{Family: FamilyConductivity, Values: []float64{1, 2}, Curves: []float64{1e-3}},
		{Family: FamilyConductivity, FreqHz: 1e3, Values: []float64{1}, Curves: []float64{1e-3}},
		{Family: FamilyConductivity, FreqHz: 1e3, Values: []float64{1, math.NaN()}, Curves: []float64{1e-3}},
		{Family: FamilyThickness, FreqHz: 1e3, Values: []float64{1e-3, 2e-3}, Curves: []float64{1e6}},
	}
	for i, s := range bad {
		if _, err := ComputeDiagram(context.Background(), m, s); err == nil {
			t.Errorf("spec %d: no error", i)
		}
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	spec := DiagramSpec{Family: FamilyConductivity, FreqHz: 1e4, Values: LogSpace(1e5, 1e8, 50), Curves: []float64{1e-4, 2e-4, 3e-4}}
	if _, err := ComputeDiagram(ctx, m, spec); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled context: error %v, want context.Canceled", err)
	}
}

func TestDiagramImages(t *testing.T) {
	t.Parallel()
	m := newSurfaceModel(t)
	lo, hi := ConductivitySpan(surfaceCoil, surfaceFreqHz, 1, 0.01, 1e4)
	d, err := ComputeDiagram(context.Background(), m, DiagramSpec{Family: FamilyConductivity, FreqHz: surfaceFreqHz, Values: LogSpace(lo, hi, 30), Curves: []float64{0.2e-3, 0.4e-3}})
	if err != nil {
		t.Fatal(err)
	}
	magic := map[string]string{"png": "\x89PNG", "svg": "<?xml", "pdf": "%PDF"}
	for format, want := range magic {
		var buf bytes.Buffer
		if err := d.WriteImage(&buf, format, 10*vg.Centimeter, 8*vg.Centimeter); err != nil {
			t.Fatalf("%s: %v", format, err)
		}
		if !strings.HasPrefix(buf.String(), want) {
			t.Errorf("%s output starts %q, want %q", format, buf.String()[:min(8, buf.Len())], want)
		}
		if format == "svg" && !strings.Contains(buf.String(), "ΔR/X0") {
			t.Errorf("svg lacks the axis label ΔR/X0")
		}
	}
	dir := t.TempDir()
	if err := d.Save(filepath.Join(dir, "d.png")); err != nil {
		t.Error(err)
	}
	if err := d.Save(filepath.Join(dir, "d.gif")); err == nil {
		t.Error("Save accepted a .gif name")
	}
}

func TestPDFText(t *testing.T) {
	t.Parallel()
	tests := []struct{ in, want string }{
		{"ΔR/X0", "(R-R0)/X0"},
		{"lift-off 50 µm", "lift-off 50 \xb5m"},
		{"μr 20", "\xb5r 20"},
		{"20 °C", "20 \xb0C"},
		{"thickness ∞", "thickness inf"},
		{"Ω", "?"},
	}
	for _, tc := range tests {
		if got := pdfText(tc.in); got != tc.want {
			t.Errorf("pdfText(%q) = %q, want %q", tc.in, got, tc.want)
		}
	}
}
