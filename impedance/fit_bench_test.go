package impedance

import (
	"context"
	"math"
	"math/rand/v2"
	"sync/atomic"
	"testing"
)

// countingForward counts the model evaluations of a fit, a measure of its
// cost that does not depend on the load of the machine.
type countingForward struct {
	m PlanarForward
	n atomic.Int64
}

func (c *countingForward) Impedance(freqHz, liftoffM float64, layers []Layer) (Result, error) {
	c.n.Add(1)
	return c.m.Impedance(freqHz, liftoffM, layers)
}

// benchCalibration returns a calibration of the surface probe on the
// reference blocks, bare and under two shims, at one or two frequencies.
func benchCalibration(b *testing.B, m *PlanarModel, freqs []float64) (*Calibration, []instrument) {
	rng := rand.New(rand.NewPCG(3, 3))
	ins := make([]instrument, len(freqs))
	for k := range ins {
		ins[k] = randomInstrument(rng)
	}
	pts := calPoints(b, m, ins, freqs, surfaceLiftoffM, 1, []float64{0, 50e-6, 100e-6}, 1e-3, rng)
	cal, err := Calibrate(m, pts, CalibrationOptions{Coil: surfaceCoil, LiftoffM: surfaceLiftoffM, FitLiftoff: true})
	if err != nil {
		b.Fatal(err)
	}
	return cal, ins
}

// BenchmarkInvert is one inversion of a reading into conductivity and
// lift-off with its uncertainty (target: under 1 ms).
func BenchmarkInvert(b *testing.B) {
	for _, bc := range []struct {
		name  string
		freqs []float64
	}{{"1freq", []float64{60e3}}, {"2freq", []float64{60e3, 240e3}}} {
		b.Run(bc.name, func(b *testing.B) {
			m := newSurfaceModel(b)
			cal, ins := benchCalibration(b, m, bc.freqs)
			sp := Specimen{ConductivitySPerM: iacs(43)}
			var rd []Reading
			for k, f := range bc.freqs {
				rd = append(rd, Reading{f, ins[k].synth(b, m, f, surfaceLiftoffM+37e-6, 1, sp, 0, nil)})
			}
			cf := &countingForward{m: m}
			b.ReportAllocs()
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				if _, err := cal.Invert(cf, rd, InvertOptions{}); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(cf.n.Load())/float64(b.N), "evals/op")
		})
	}
}

// BenchmarkCalibrate fits the transform and the effective lift-off to 15
// readings (5 blocks × 3 lift-offs) at one frequency.
func BenchmarkCalibrate(b *testing.B) {
	m := newSurfaceModel(b)
	rng := rand.New(rand.NewPCG(4, 4))
	ins := []instrument{randomInstrument(rng)}
	pts := calPoints(b, m, ins, []float64{60e3}, surfaceLiftoffM, 1, []float64{0, 50e-6, 100e-6}, 1e-3, rng)
	cf := &countingForward{m: m}
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := Calibrate(cf, pts, CalibrationOptions{Coil: surfaceCoil, LiftoffM: surfaceLiftoffM, FitLiftoff: true}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(cf.n.Load())/float64(b.N), "evals/op")
}

// BenchmarkDiagram50x50 is a 50 × 50 conductivity diagram (50 lift-offs ×
// 50 conductivities) on all cores (target: under 0.2 s on 2 cores).
func BenchmarkDiagram50x50(b *testing.B) {
	m := newSurfaceModel(b)
	lo, hi := ConductivitySpan(surfaceCoil, 60e3, 1, 0.01, 1e4)
	spec := DiagramSpec{Family: FamilyConductivity, FreqHz: 60e3, Values: LogSpace(lo, hi, 50), Curves: LogSpace(0.05e-3, 2e-3, 50)}
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := ComputeDiagram(context.Background(), m, spec); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkModelEval is one evaluation of the planar model for the surface
// coil at 60 kHz over a half-space, at the accuracy the fits use (1e-8).
func BenchmarkModelEval(b *testing.B) {
	m := newSurfaceModel(b)
	layers := []Layer{{ThicknessM: math.Inf(1), ConductivitySPerM: iacs(43), RelPermeability: 1}}
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if _, err := m.Impedance(60e3, surfaceLiftoffM+float64(i%8)*1e-6, layers); err != nil {
			b.Fatal(err)
		}
	}
}
