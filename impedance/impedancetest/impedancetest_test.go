package impedancetest

import (
	"math/cmplx"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// TestPlanarCases runs the fixture cases through the model.
func TestPlanarCases(t *testing.T) {
	t.Parallel()
	for _, c := range PlanarCases {
		t.Run(c.Name, func(t *testing.T) {
			t.Parallel()
			p := c.Planar()
			r, err := p.Impedance(c.FreqHz)
			if err != nil {
				t.Fatal(err)
			}
			if e := cmplx.Abs(r.DZOhm-c.DZOhm) / cmplx.Abs(c.DZOhm); e > c.RelTol {
				t.Errorf("ΔZ = %v, want %v (%s), rel %.2g > %g", r.DZOhm, c.DZOhm, c.Source, e, c.RelTol)
			}
			if c.L0H != 0 && !scalar.EqualWithinRel(r.L0H, c.L0H, 1e-8) {
				t.Errorf("L0 = %.12g, want %.12g (%s)", r.L0H, c.L0H, c.Source)
			}
		})
	}
}

// TestTubeCases runs the cylindrical fixture cases through the model.
func TestTubeCases(t *testing.T) {
	t.Parallel()
	for _, c := range TubeCases {
		r, err := c.Probe.Impedance(c.FreqHz)
		if err != nil {
			t.Fatalf("%s: %v", c.Name, err)
		}
		if e := cmplx.Abs(r.DZOhm-c.DZOhm) / cmplx.Abs(c.DZOhm); e > c.RelTol {
			t.Errorf("%s: ΔZ = %v, want %v (%s), rel %.2g > %g", c.Name, r.DZOhm, c.DZOhm, c.Source, e, c.RelTol)
		}
	}
}
