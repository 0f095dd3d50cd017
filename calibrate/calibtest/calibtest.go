// Package calibtest holds fixtures for tests of calibration and analysis:
// a reference standard, a procedure for it, and a small deterministic
// scan model that draws flaw, support and noise signals with known phase
// and amplitude.
//
// The model is deliberately simple and independent of the demo
// generator: a flaw occupying the wall from xa to xb (metres from the
// coil-side surface) responds as
//
//	A·conj(∫_{xa}^{xb} e^{−(1+j)·2x/δ} dx)/δ
//
// (the plane-wave attenuation and phase lag 2x/δ of Cecco, Van Drunen &
// Sharp, AECL-7523, 1983, from memory), conjugated so that the phase lag
// turns the trace counter-clockwise as displayed, with A proportional to
// the flaw's face area. The differential shape is the difference of two
// Gaussian coil sensitivities a coil spacing apart; the absolute shape is
// one Gaussian.
package calibtest

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"strconv"

	"whorl/acquire"
	"whorl/calibrate"
)

// Standard returns the reference standard of
// testdata/calibrate/example-standard.json: an Alloy 690 tube
// 19.05 × 1.09 mm with a through-wall hole, OD flat-bottom holes of
// 80/60/40 %TW and four of 20 %TW, OD and ID grooves and a support ring
// (the older ASME layout of FIELD.md §1.2), 0.1 m apart.
func Standard() *calibrate.Standard {
	return &calibrate.Standard{
		Serial: "NWX-STD-0750-043-07", Material: "Alloy 690TT", Heat: "NX4471-B (invented)",
		OuterDiameterM: 0.01905, WallM: 0.00109, LengthM: 1.2,
		CertificateID: "NWX-CERT-2026-0311", CertificateDate: "2026-03-11",
		CodeEdition: "ASME BPVC Section V (2023), Article 8, Appendix II",
		Flaws: []calibrate.Flaw{
			{ID: "TWH-100", Type: calibrate.ThroughHole, NominalDepthPct: 100, AsBuiltDepthPct: 100, DiameterM: 0.00132, AxialPositionM: 0.15, AnglesDeg: []float64{0}},
			{ID: "FBH-80", Type: calibrate.FlatBottomHole, Origin: calibrate.OD, NominalDepthPct: 80, AsBuiltDepthPct: 78.9, DiameterM: 0.00198, AxialPositionM: 0.25, AnglesDeg: []float64{0}},
			{ID: "FBH-60", Type: calibrate.FlatBottomHole, Origin: calibrate.OD, NominalDepthPct: 60, AsBuiltDepthPct: 61.2, DiameterM: 0.00278, AxialPositionM: 0.35, AnglesDeg: []float64{0}},
			{ID: "FBH-40", Type: calibrate.FlatBottomHole, Origin: calibrate.OD, NominalDepthPct: 40, AsBuiltDepthPct: 40.6, DiameterM: 0.00476, AxialPositionM: 0.45, AnglesDeg: []float64{0}},
			{ID: "FBH-20x4", Type: calibrate.FlatBottomHole, Origin: calibrate.OD, NominalDepthPct: 20, AsBuiltDepthPct: 19.4, DiameterM: 0.00476, AxialPositionM: 0.55, AnglesDeg: []float64{0, 90, 180, 270}},
			{ID: "GRV-OD-20", Type: calibrate.Groove, Origin: calibrate.OD, NominalDepthPct: 20, AsBuiltDepthPct: 20.8, WidthM: 0.003175, AxialPositionM: 0.65},
			{ID: "GRV-ID-10", Type: calibrate.Groove, Origin: calibrate.ID, NominalDepthPct: 10, AsBuiltDepthPct: 10.3, WidthM: 0.0015875, AxialPositionM: 0.75},
			{ID: "RING-SP", Type: calibrate.SupportRing, NominalDepthPct: 0, AsBuiltDepthPct: 0, WidthM: 0.0222, ThicknessM: 0.0222, AxialPositionM: 0.95},
		},
	}
}

// Model describes a scan drawn by the fixture model.
type Model struct {
	// FreqsHz are the frequencies; each gives a "<kHz>k-diff" and a
	// "<kHz>k-abs" channel.
	FreqsHz []float64
	// ConductivitySPerM and WallM describe the tube.
	ConductivitySPerM float64
	WallM             float64
	// StepM is the sample spacing; LengthM the scanned length.
	StepM, LengthM float64
	// Scale and OffsetM map true positions to recorded ones:
	// recorded = OffsetM + Scale·true (speed error and start offset).
	Scale, OffsetM float64
	// CoilSigmaM is the coil sensitivity's standard deviation and
	// SpacingM the differential coil spacing.
	CoilSigmaM, SpacingM float64
	// NoiseV is the standard deviation of white noise per component.
	NoiseV float64
	// RotRad and Gain are the instrument's rotation and gain per
	// frequency (applied to both coils); nil: 0 and 1.
	RotRad, Gain []float64
}

// Demo returns a model like the demo inspection: four frequencies
// 400/200/100/20 kHz on 19.05 × 1.09 mm Alloy 690 (ρ = 115 µΩ·cm), 30
// samples per inch, a 1.2 m standard.
func Demo() Model {
	return Model{
		FreqsHz:           []float64{400e3, 200e3, 100e3, 20e3},
		ConductivitySPerM: 1 / 115e-8,
		WallM:             0.00109,
		StepM:             0.0254 / 30,
		LengthM:           1.2,
		Scale:             1,
		CoilSigmaM:        0.0017,
		SpacingM:          0.003,
		NoiseV:            0.002,
		RotRad:            []float64{0.7, -1.2, 2.0, 0.3},
		Gain:              []float64{0.8, 1.3, 0.6, 2.0},
	}
}

// Feature is one signal source in a scan.
type Feature struct {
	CentreM float64
	// Response is the complex amplitude per frequency (before the instrument).
	Response []complex128
	// LengthM widens the absolute response of long features.
	LengthM float64
}

// SkinDepthM returns δ = 1/sqrt(π f μ0 σ) for μr = 1.
func SkinDepthM(freqHz, sigmaSPerM float64) float64 {
	return 1 / math.Sqrt(math.Pi*freqHz*4e-7*math.Pi*sigmaSPerM)
}

// layer returns conj(∫_{xa}^{xb} e^{−(1+j)2x/δ} dx)/δ in closed form.
func layer(xa, xb, delta float64) complex128 {
	k := complex(2/delta, 2/delta)
	v := (cmplx.Exp(-k*complex(xa, 0)) - cmplx.Exp(-k*complex(xb, 0))) / k
	return cmplx.Conj(v) / complex(delta, 0)
}

// FlawResponse returns the fixture model's response of a flaw of the
// given depth, origin and face area (m²) at each frequency.
func (m Model) FlawResponse(depthPct float64, origin calibrate.Origin, areaM2 float64) []complex128 {
	out := make([]complex128, len(m.FreqsHz))
	d := depthPct / 100 * m.WallM
	for i, f := range m.FreqsHz {
		delta := SkinDepthM(f, m.ConductivitySPerM)
		var xa, xb float64
		if origin == calibrate.ID {
			xa, xb = 0, d
		} else {
			xa, xb = m.WallM-d, m.WallM
		}
		out[i] = complex(1e6*areaM2, 0) * layer(xa, xb, delta)
	}
	return out
}

// SupportResponse returns a support plate's response: large, with a phase
// that turns strongly with frequency (so that a two-frequency mix can
// cancel it).
func (m Model) SupportResponse(scale float64) []complex128 {
	out := make([]complex128, len(m.FreqsHz))
	for i, f := range m.FreqsHz {
		ph := 200*math.Pi/180 - 0.9*math.Log2(f/100e3)
		out[i] = cmplx.Rect(scale*3*math.Sqrt(100e3/f), ph)
	}
	return out
}

// StandardFeatures returns the features of a scan of std in the model.
func (m Model) StandardFeatures(std *calibrate.Standard) []Feature {
	var fs []Feature
	for _, f := range std.Flaws {
		var resp []complex128
		switch f.Type {
		case calibrate.SupportRing:
			resp = m.SupportResponse(1)
		case calibrate.Groove:
			// A 360° groove: face area = circumference × width.
			resp = m.FlawResponse(f.AsBuiltDepthPct, f.Origin, math.Pi*std.OuterDiameterM*f.WidthM/4)
		default:
			n := math.Max(1, float64(len(f.AnglesDeg)))
			origin := f.Origin
			if f.Type == calibrate.ThroughHole {
				origin = calibrate.OD
			}
			resp = m.FlawResponse(f.AsBuiltDepthPct, origin, n*math.Pi*f.DiameterM*f.DiameterM/4)
		}
		fs = append(fs, Feature{CentreM: f.AxialPositionM, Response: resp, LengthM: math.Max(f.WidthM, f.ThicknessM)})
	}
	return fs
}

// shape is the absolute coil's response at z to a feature: a uniform
// feature of length LengthM blurred by the Gaussian coil sensitivity,
// ½[erf((z−z1)/(√2σ)) − erf((z−z2)/(√2σ))], scaled to 1 at the centre
// (a Gaussian for a short feature).
func (m Model) shape(z float64, ft Feature) float64 {
	s := math.Sqrt2 * m.CoilSigmaM
	h := ft.LengthM / 2
	if h < 1e-6 {
		u := (z - ft.CentreM) / m.CoilSigmaM
		return math.Exp(-u * u / 2)
	}
	return (math.Erf((z-ft.CentreM+h)/s) - math.Erf((z-ft.CentreM-h)/s)) / (2 * math.Erf(h/s))
}

// Scan draws a scan of the features with noise from rng.
func (m Model) Scan(component string, features []Feature, rng *rand.Rand) *acquire.Scan {
	n := int(m.LengthM/m.StepM) + 1
	s := &acquire.Scan{Meta: acquire.Meta{Component: component, ProbeType: "bobbin"}, AxialStepM: m.StepM * m.Scale}
	s.PositionM = make([]float64, n)
	for i := range s.PositionM {
		s.PositionM[i] = m.OffsetM + m.Scale*float64(i)*m.StepM
	}
	for fi, f := range m.FreqsHz {
		rot, gain := 0.0, 1.0
		if m.RotRad != nil {
			rot, gain = m.RotRad[fi], m.Gain[fi]
		}
		inst := cmplx.Rect(gain, rot)
		name := formatKHz(f)
		diff := make([]complex128, n)
		abs := make([]complex128, n)
		for i := 0; i < n; i++ {
			z := float64(i) * m.StepM
			for _, ft := range features {
				if math.Abs(z-ft.CentreM) > 8*m.CoilSigmaM+ft.LengthM {
					continue
				}
				d := m.shape(z-m.SpacingM/2, ft) - m.shape(z+m.SpacingM/2, ft)
				diff[i] += ft.Response[fi] * complex(d, 0)
				abs[i] += ft.Response[fi] * complex(m.shape(z, ft), 0)
			}
			diff[i] = inst*diff[i] + complex(m.NoiseV*rng.NormFloat64(), m.NoiseV*rng.NormFloat64())
			abs[i] = inst*abs[i] + complex(1.5*m.NoiseV*rng.NormFloat64(), 1.5*m.NoiseV*rng.NormFloat64())
		}
		s.Channels = append(s.Channels,
			acquire.Channel{Name: name + "-diff", FreqHz: f, Mode: acquire.Differential, Samples: diff},
			acquire.Channel{Name: name + "-abs", FreqHz: f, Mode: acquire.Absolute, Samples: abs})
	}
	return s
}

func formatKHz(f float64) string {
	return strconv.FormatFloat(f/1000, 'f', -1, 64) + "k"
}
