package impedance

import (
	"errors"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// surfaceCoil is an invented pancake probe coil of a conductivity meter.
var surfaceCoil = Coil{InnerRadiusM: 1e-3, OuterRadiusM: 2.5e-3, LengthM: 1.5e-3, Turns: 200}

const (
	surfaceLiftoffM = 0.3e-3 // effective lift-off of the winding on a bare surface
	surfaceFreqHz   = 60e3
)

func iacs(p float64) float64 { return p * 58e4 }

// refBlocks are invented reference blocks spanning the aluminium ranges of
// conductivity standards (25–32, 32–38 and 38–72 %IACS).
var refBlocks = []float64{26.5, 34.8, 41.2, 50.6, 61.9}

// handbookAlloys are typical conductivities of common alloys (Aluminum
// Association typical values as reproduced in distributor tables; ASNT ET
// programmed instruction, Table 9.1).
var handbookAlloys = []struct {
	name string
	iacs float64
}{
	{"2024-T3", 30}, {"7075-T6", 33}, {"2024-T6", 38}, {"6061-T4", 40},
	{"6061-T6", 43}, {"6061-O", 47}, {"1100-O", 59}, {"pure aluminium", 61},
}

func newSurfaceModel(t testing.TB) *PlanarModel {
	t.Helper()
	m, err := NewPlanarModel(surfaceCoil, 1e-8)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// instrument is a known instrument transform V = g·Zn + c.
type instrument struct {
	gain, offset complex128
}

func randomInstrument(rng *rand.Rand) instrument {
	return instrument{
		gain:   cmplx.Rect(1+4*rng.Float64(), 2*math.Pi*rng.Float64()),
		offset: complex(2*rng.Float64()-1, 2*rng.Float64()-1),
	}
}

// synth returns the reading of the instrument on the specimen at extra
// lift-off l, with Gaussian noise of standard deviation noiseV per
// component.
func (in instrument) synth(t testing.TB, m PlanarForward, freqHz, h, scale float64, sp Specimen, noiseV float64, rng *rand.Rand) complex128 {
	t.Helper()
	z, err := NormalizedImpedance(m, freqHz, h, scale, sp)
	if err != nil {
		t.Fatal(err)
	}
	v := in.gain*z + in.offset
	if noiseV > 0 {
		v += complex(noiseV*rng.NormFloat64(), noiseV*rng.NormFloat64())
	}
	return v
}

// calPoints synthesises readings on every block, bare and under shims.
func calPoints(t testing.TB, m PlanarForward, ins []instrument, freqs []float64, h, scale float64, shims []float64, noiseV float64, rng *rand.Rand) []CalPoint {
	var pts []CalPoint
	for k, f := range freqs {
		for _, b := range refBlocks {
			for _, s := range shims {
				sp := Specimen{ConductivitySPerM: iacs(b)}
				pts = append(pts, CalPoint{Block: "b", FreqHz: f, Specimen: sp, ExtraLiftoffM: s,
					ReadingV: ins[k].synth(t, m, f, h+s, scale, sp, noiseV, rng)})
			}
		}
	}
	return pts
}

// TestInversionRoundTrip: readings synthesised from the model through a
// known random instrument transform are inverted back to the handbook
// conductivities within 0.1 %IACS and the lift-off within 1 µm, without
// noise (acceptance target of the conductivity inversion; round trip
// inverse(forward(x))).
func TestInversionRoundTrip(t *testing.T) {
	t.Parallel()
	m := newSurfaceModel(t)
	tests := []struct {
		name      string
		trueH     float64 // true effective lift-off
		trueScale float64 // true coil scale
		fitH      bool
		fitScale  bool
		freqs     []float64
	}{
		{"nominal probe", surfaceLiftoffM, 1, false, false, []float64{surfaceFreqHz}},
		{"worn probe face fitted", surfaceLiftoffM + 37e-6, 1, true, false, []float64{surfaceFreqHz}},
		{"coil 3 percent large fitted", surfaceLiftoffM + 20e-6, 1.03, true, true, []float64{surfaceFreqHz}},
		{"two frequencies", surfaceLiftoffM + 10e-6, 1, true, false, []float64{surfaceFreqHz, 240e3}},
	}
	for i, tc := range tests {
		tc := tc
		seed := uint64(i + 1)
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			rng := rand.New(rand.NewPCG(seed, 7))
			ins := make([]instrument, len(tc.freqs))
			for k := range ins {
				ins[k] = randomInstrument(rng)
			}
			pts := calPoints(t, m, ins, tc.freqs, tc.trueH, tc.trueScale, []float64{0, 50e-6, 100e-6}, 0, rng)
			cal, err := Calibrate(m, pts, CalibrationOptions{Coil: surfaceCoil, LiftoffM: surfaceLiftoffM, FitLiftoff: tc.fitH, FitCoilScale: tc.fitScale})
			if err != nil {
				t.Fatal(err)
			}
			for _, r := range cal.Residuals {
				if d := cmplx.Abs(r.ResidualV()); d > 1e-9 {
					t.Errorf("calibration residual %g V at %g %%IACS, shim %g m, want < 1e-9", d, r.ConductivitySPerM/58e4, r.ExtraLiftoffM)
				}
			}
			for _, a := range handbookAlloys {
				for _, l := range []float64{0, 23e-6, 76e-6} {
					sp := Specimen{ConductivitySPerM: iacs(a.iacs)}
					var rd []Reading
					for k, f := range tc.freqs {
						rd = append(rd, Reading{FreqHz: f, V: ins[k].synth(t, m, f, tc.trueH+l, tc.trueScale, sp, 0, nil)})
					}
					inv, err := cal.Invert(m, rd, InvertOptions{})
					if err != nil {
						t.Fatalf("%s, lift-off %g: %v", a.name, l, err)
					}
					gotIACS := inv.ConductivitySPerM / 58e4
					if !scalar.EqualWithinAbs(gotIACS, a.iacs, 0.1) {
						t.Errorf("%s at lift-off %g µm: got %.4f %%IACS, want %g ± 0.1", a.name, l*1e6, gotIACS, a.iacs)
					}
					if !scalar.EqualWithinAbs(inv.ExtraLiftoffM, l, 1e-6) {
						t.Errorf("%s at lift-off %g µm: got lift-off %.4f µm, want ± 1 µm", a.name, l*1e6, inv.ExtraLiftoffM*1e6)
					}
				}
			}
		})
	}
}

// TestInversionCoverage: with noisy readings the reported standard
// uncertainties agree with the actual errors. Over many independent
// calibrations (random instrument, fresh noise) about 68.3 % of the errors
// fall within 1u and 95.4 % within 2u (normal distribution). The tolerance
// allows for the sample size, for the correlation of errors that share
// one calibration, and for the noise being estimated from 20–50 degrees of
// freedom (Student's t puts about 0.67 and 0.94 within 1u and 2u). Cases:
// one frequency with the effective lift-off
// fitted; two frequencies (over-determined inversion); a coating set-up
// on a single base block and shims, lift-off kept at its nominal value.
func TestInversionCoverage(t *testing.T) {
	t.Parallel()
	if testing.Short() {
		t.Skip("many calibrations")
	}
	m := newSurfaceModel(t)
	tests := []struct {
		name     string
		freqs    []float64
		coating  bool
		noiseRel float64 // reading noise relative to the gain
		trials   int
		seed     uint64
	}{
		{"one frequency", []float64{surfaceFreqHz}, false, 2e-3, 40, 11},
		{"two frequencies", []float64{surfaceFreqHz, 240e3}, false, 2e-3, 25, 12},
		{"coating on one base", []float64{240e3}, true, 5e-4, 40, 13},
	}
	for _, tc := range tests {
		tc := tc
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			var n, in1S, in2S, in1L, in2L int
			rng := rand.New(rand.NewPCG(2026, tc.seed))
			base := Specimen{ConductivitySPerM: iacs(43)}
			for trial := 0; trial < tc.trials; trial++ {
				ins := make([]instrument, len(tc.freqs))
				for k := range ins {
					ins[k] = randomInstrument(rng)
				}
				noise := tc.noiseRel * cmplx.Abs(ins[0].gain)
				var pts []CalPoint
				var opt CalibrationOptions
				trueH := surfaceLiftoffM
				if tc.coating {
					opt = CalibrationOptions{Coil: surfaceCoil, LiftoffM: surfaceLiftoffM}
					f := tc.freqs[0]
					pts = append(pts, CalPoint{Block: "air", FreqHz: f, ReadingV: ins[0].synth(t, m, f, trueH, 1, Specimen{}, noise, rng)})
					for _, shim := range []float64{0, 25.4e-6, 50.8e-6, 101.6e-6} {
						for rep := 0; rep < 3; rep++ {
							pts = append(pts, CalPoint{Block: "base", FreqHz: f, Specimen: base, ExtraLiftoffM: shim,
								ReadingV: ins[0].synth(t, m, f, trueH+shim, 1, base, noise, rng)})
						}
					}
				} else {
					trueH += 30e-6 * rng.Float64()
					opt = CalibrationOptions{Coil: surfaceCoil, LiftoffM: surfaceLiftoffM, FitLiftoff: true}
					pts = calPoints(t, m, ins, tc.freqs, trueH, 1, []float64{0, 50e-6, 100e-6}, noise, rng)
				}
				cal, err := Calibrate(m, pts, opt)
				if err != nil {
					t.Fatal(err)
				}
				for _, a := range handbookAlloys {
					l := 80e-6 * rng.Float64()
					sp := Specimen{ConductivitySPerM: iacs(a.iacs)}
					if tc.coating {
						// Base conductivity within ±0.5 %IACS of the set-up's.
						sp.ConductivitySPerM = iacs(43 + rng.Float64() - 0.5)
					}
					var rd []Reading
					for k, f := range tc.freqs {
						rd = append(rd, Reading{f, ins[k].synth(t, m, f, trueH+l, 1, sp, noise, rng)})
					}
					inv, err := cal.Invert(m, rd, InvertOptions{})
					if err != nil {
						t.Fatal(err)
					}
					zs := math.Abs(inv.ConductivitySPerM-sp.ConductivitySPerM) / inv.UConductivitySPerM
					zl := math.Abs(inv.ExtraLiftoffM-l) / inv.UExtraLiftoffM
					n++
					if zs <= 1 {
						in1S++
					}
					if zs <= 2 {
						in2S++
					}
					if zl <= 1 {
						in1L++
					}
					if zl <= 2 {
						in2L++
					}
				}
			}
			for _, c := range []struct {
				name      string
				got, want float64
				tol       float64
			}{
				{"conductivity within 1u", float64(in1S) / float64(n), 0.683, 0.1},
				{"conductivity within 2u", float64(in2S) / float64(n), 0.954, 0.05},
				{"lift-off within 1u", float64(in1L) / float64(n), 0.683, 0.1},
				{"lift-off within 2u", float64(in2L) / float64(n), 0.954, 0.05},
			} {
				if !scalar.EqualWithinAbs(c.got, c.want, c.tol) {
					t.Errorf("%s: fraction %.3f of %d, want %.3f ± %g", c.name, c.got, n, c.want, c.tol)
				} else {
					t.Logf("%s: fraction %.3f of %d (normal: %.3f)", c.name, c.got, n, c.want)
				}
			}
		})
	}
}

// TestInvertThickness: plate thickness and lift-off from one frequency at
// known conductivity, and conductivity, lift-off and thickness together
// from two frequencies (round trip).
func TestInvertThickness(t *testing.T) {
	t.Parallel()
	m := newSurfaceModel(t)
	rng := rand.New(rand.NewPCG(5, 5))
	freqs := []float64{20e3, 120e3}
	ins := []instrument{randomInstrument(rng), randomInstrument(rng)}
	pts := calPoints(t, m, ins, freqs, surfaceLiftoffM, 1, []float64{0, 100e-6}, 0, rng)
	cal, err := Calibrate(m, pts, CalibrationOptions{Coil: surfaceCoil, LiftoffM: surfaceLiftoffM, FitLiftoff: true})
	if err != nil {
		t.Fatal(err)
	}
	sp := Specimen{ConductivitySPerM: iacs(43), ThicknessM: 0.6e-3} // 6061-T6 sheet, δ = 0.65 mm at 20 kHz
	l := 40e-6
	var rd []Reading
	for k, f := range freqs {
		rd = append(rd, Reading{f, ins[k].synth(t, m, f, surfaceLiftoffM+l, 1, sp, 0, nil)})
	}
	t.Run("thickness at known conductivity", func(t *testing.T) {
		t.Parallel()
		inv, err := cal.Invert(m, rd[:1], InvertOptions{Solve: SolveThickness | SolveLiftoff, Specimen: Specimen{ConductivitySPerM: sp.ConductivitySPerM, ThicknessM: 1e-3}})
		if err != nil {
			t.Fatal(err)
		}
		if !scalar.EqualWithinRel(inv.ThicknessM, sp.ThicknessM, 1e-4) || !scalar.EqualWithinAbs(inv.ExtraLiftoffM, l, 1e-7) {
			t.Errorf("got t = %g m, ℓ = %g m; want %g, %g", inv.ThicknessM, inv.ExtraLiftoffM, sp.ThicknessM, l)
		}
	})
	t.Run("three unknowns at two frequencies", func(t *testing.T) {
		t.Parallel()
		inv, err := cal.Invert(m, rd, InvertOptions{Solve: SolveConductivity | SolveThickness | SolveLiftoff, Specimen: Specimen{ThicknessM: 1e-3}})
		if err != nil {
			t.Fatal(err)
		}
		if !scalar.EqualWithinRel(inv.ThicknessM, sp.ThicknessM, 1e-4) || !scalar.EqualWithinAbs(inv.ExtraLiftoffM, l, 1e-7) ||
			!scalar.EqualWithinAbs(inv.ConductivitySPerM/58e4, 43, 0.01) {
			t.Errorf("got σ = %g %%IACS, t = %g m, ℓ = %g m; want 43, %g, %g", inv.ConductivitySPerM/58e4, inv.ThicknessM, inv.ExtraLiftoffM, sp.ThicknessM, l)
		}
	})
}

func TestCalibrateErrors(t *testing.T) {
	t.Parallel()
	m := newSurfaceModel(t)
	good := CalPoint{FreqHz: 60e3, ReadingV: 1, Specimen: Specimen{ConductivitySPerM: 1e7}}
	tests := []struct {
		name string
		pts  []CalPoint
		opt  CalibrationOptions
		want error
	}{
		{"no readings", nil, CalibrationOptions{Coil: surfaceCoil, LiftoffM: 1e-4}, ErrTooFewReadings},
		{"one condition", []CalPoint{good, good}, CalibrationOptions{Coil: surfaceCoil, LiftoffM: 1e-4}, ErrTooFewReadings},
		{"zero lift-off", []CalPoint{good}, CalibrationOptions{Coil: surfaceCoil}, nil},
		{"bad coil", []CalPoint{good}, CalibrationOptions{LiftoffM: 1e-4}, nil},
		{"NaN reading", []CalPoint{{FreqHz: 60e3, ReadingV: complex(math.NaN(), 0)}}, CalibrationOptions{Coil: surfaceCoil, LiftoffM: 1e-4}, nil},
		{"negative conductivity", []CalPoint{{FreqHz: 60e3, Specimen: Specimen{ConductivitySPerM: -1}}}, CalibrationOptions{Coil: surfaceCoil, LiftoffM: 1e-4}, nil},
	}
	for _, tc := range tests {
		tc := tc
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			_, err := Calibrate(m, tc.pts, tc.opt)
			if err == nil {
				t.Fatal("no error")
			}
			if tc.want != nil && !errors.Is(err, tc.want) {
				t.Errorf("error %v, want %v", err, tc.want)
			}
		})
	}
}

func TestLevenbergMarquardtRosenbrock(t *testing.T) {
	t.Parallel()
	// Rosenbrock's function as least squares, r = (10(y − x²), 1 − x):
	// minimum 0 at (1, 1) (Moré, Garbow & Hillstrom, ACM TOMS 7, 17 (1981),
	// problem 1, start (−1.2, 1)).
	prob := &lmProblem{m: 2, step: []float64{1e-7, 1e-7}, residual: func(dst, p []float64) error {
		dst[0] = 10 * (p[1] - p[0]*p[0])
		dst[1] = 1 - p[0]
		return nil
	}}
	res, err := prob.solve([]float64{-1.2, 1})
	if err != nil {
		t.Fatal(err)
	}
	if !scalar.EqualWithinAbs(res.p[0], 1, 1e-6) || !scalar.EqualWithinAbs(res.p[1], 1, 1e-6) {
		t.Errorf("minimum at %v, want (1, 1)", res.p)
	}
}

// TestNormalizedImpedanceCoilScale checks the coil-scale similarity used by
// the fits against a model built for the scaled coil: scaling every length
// by s and σ by 1/s² leaves Zn unchanged (Dodd–Deeds dimensionless form,
// parameter ωμ0σr̄²).
func TestNormalizedImpedanceCoilScale(t *testing.T) {
	t.Parallel()
	m := newSurfaceModel(t)
	for _, s := range []float64{0.9, 1.07, 1.5} {
		big := Coil{surfaceCoil.InnerRadiusM * s, surfaceCoil.OuterRadiusM * s, surfaceCoil.LengthM * s, surfaceCoil.Turns}
		ms, err := NewPlanarModel(big, 1e-10)
		if err != nil {
			t.Fatal(err)
		}
		for _, sp := range []Specimen{{ConductivitySPerM: iacs(30)}, {ConductivitySPerM: iacs(43), ThicknessM: 0.5e-3}} {
			got, err := NormalizedImpedance(m, 60e3, 0.35e-3, s, sp)
			if err != nil {
				t.Fatal(err)
			}
			want, err := NormalizedImpedance(ms, 60e3, 0.35e-3, 1, sp)
			if err != nil {
				t.Fatal(err)
			}
			// Both models are accurate to about 1e-8 relative.
			if d := cmplx.Abs(got - want); d > 1e-7 {
				t.Errorf("s = %g, %+v: scaled %v, direct %v, differ by %g", s, sp, got, want, d)
			}
		}
	}
}
