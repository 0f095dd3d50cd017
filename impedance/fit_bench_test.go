package impedance

import (
	"context"
	"math/rand/v2"
	"testing"
)

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
			b.ReportAllocs()
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				if _, err := cal.Invert(m, rd, InvertOptions{}); err != nil {
					b.Fatal(err)
				}
			}
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
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := Calibrate(m, pts, CalibrationOptions{Coil: surfaceCoil, LiftoffM: surfaceLiftoffM, FitLiftoff: true}); err != nil {
			b.Fatal(err)
		}
	}
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
