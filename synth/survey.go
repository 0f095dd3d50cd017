package synth

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"

	"whorl/impedance"
)

// Files written by WriteConductivitySurvey, in the order returned.
const (
	SurveyProbeFile       = "probe.json"
	SurveyBlocksFile      = "blocks.csv"
	SurveyShimsFile       = "shims.csv"
	SurveyCalFile         = "conductivity-calibration.csv"
	SurveyReadingsFile    = "conductivity-readings.csv"
	SurveyCoatingCalFile  = "coating-calibration.csv"
	SurveyCoatingFile     = "coating-readings.csv"
	SurveyTruthFile       = "survey-truth.csv"
	surveyAlphaPerC       = 0.002 // aluminium-alloy coefficient of the survey (see impedance.TempCoefficients)
	surveyNoiseV          = 0.5e-3
	surveyCoatingBaseID   = "BASE-6061"
	surveyCoatingFreqHz   = 240e3
	surveyModelRelTol     = 1e-8
	surveyTrueLiftoffM    = 0.318e-3 // effective lift-off of the worn probe face
	surveyNominalLiftoffM = 0.30e-3  // stated on the probe sheet
)

// surveyProbe is the invented surface probe SP-12 of the survey.
var surveyProbe = impedance.Probe{
	ID: "SP-12", InnerRadiusM: 1.0e-3, OuterRadiusM: 2.5e-3, LengthM: 1.5e-3, Turns: 200,
	LiftoffM: surveyNominalLiftoffM, FreqsHz: []float64{60e3, 240e3},
}

// surveyInstrument is the invented instrument transform V = g·Zn + c of
// each survey frequency.
var surveyInstrument = map[float64]struct{ gain, offset complex128 }{
	60e3:  {cmplx.Rect(3.2, -37*math.Pi/180), complex(0.15, -0.42)},
	240e3: {cmplx.Rect(2.1, 121*math.Pi/180), complex(-0.30, 0.20)},
}

// surveyBlocks are invented certified reference blocks, one in each of the
// aluminium ranges of conductivity standards, plus a bare sample of the
// coated panels' alloy for the coating set-up.
var surveyBlocks = []impedance.RefBlock{
	{ID: "RB-26", ConductivitySPerM: 26.4 * 58e4, UConductivitySPerM: 0.2 * 58e4, ThicknessM: 12.5e-3, Material: "aluminium", Certificate: "CERT-RB-0426"},
	{ID: "RB-35", ConductivitySPerM: 34.9 * 58e4, UConductivitySPerM: 0.2 * 58e4, ThicknessM: 12.5e-3, Material: "aluminium", Certificate: "CERT-RB-0427"},
	{ID: "RB-42", ConductivitySPerM: 41.8 * 58e4, UConductivitySPerM: 0.2 * 58e4, ThicknessM: 12.5e-3, Material: "aluminium", Certificate: "CERT-RB-0428"},
	{ID: "RB-51", ConductivitySPerM: 50.7 * 58e4, UConductivitySPerM: 0.25 * 58e4, ThicknessM: 12.5e-3, Material: "aluminium", Certificate: "CERT-RB-0429"},
	{ID: "RB-62", ConductivitySPerM: 61.6 * 58e4, UConductivitySPerM: 0.3 * 58e4, ThicknessM: 12.5e-3, Material: "aluminium", Certificate: "CERT-RB-0430"},
	{ID: surveyCoatingBaseID, ConductivitySPerM: 43.0 * 58e4, UConductivitySPerM: 0.3 * 58e4, ThicknessM: 6e-3, Material: "aluminium-alloy", Certificate: "CERT-BS-0077"},
}

// surveyShims are invented certified plastic shims.
var surveyShims = []impedance.Shim{
	{ID: "SH-025", ThicknessM: 25.4e-6, UThicknessM: 0.5e-6, Certificate: "CERT-SH-1101"},
	{ID: "SH-051", ThicknessM: 50.8e-6, UThicknessM: 0.8e-6, Certificate: "CERT-SH-1102"},
	{ID: "SH-102", ThicknessM: 101.6e-6, UThicknessM: 1.2e-6, Certificate: "CERT-SH-1103"},
}

// surveyPanel is an invented aluminium panel of the survey.
type surveyPanel struct {
	id         string
	iacs20     float64 // true conductivity at 20 °C, %IACS
	thicknessM float64
}

var surveyPanels = []surveyPanel{
	{"PNL-A01", 30.4, 2.0e-3},  // a 2024-T3-like skin
	{"PNL-A02", 33.1, 3.2e-3},  // 7075-T6-like
	{"PNL-A03", 43.5, 2.5e-3},  // 6061-T6-like
	{"PNL-A04", 39.2, 1.6e-3},  // overaged 7075-like
	{"PNL-A05", 42.6, 0.8e-3},  // thin 6061 sheet: thinner than 3δ at 60 kHz
	{"PNL-A06", 57.8, 4.0e-3},  // 1100-like
	{"PNL-A07", 47.9, 12.0e-3}, // heat-damaged 6061-like plate
}

// WriteConductivitySurvey writes an invented conductivity and coating
// survey to dir (created if needed): the probe, certified blocks and
// shims, calibration readings, measurement readings on invented aluminium
// panels (several spots each, some painted, at two frequencies and at the
// part temperature), coating calibration and measurement readings, and the
// ground truth. Readings are synthesised with the planar Dodd–Deeds model
// through a fixed invented instrument transform, with Gaussian noise of
// 0.5 mV per component from a generator seeded with seed. It returns the
// paths written.
func WriteConductivitySurvey(dir string, seed uint64) ([]string, error) {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, err
	}
	m, err := impedance.NewPlanarModel(surveyProbe.Coil(), surveyModelRelTol)
	if err != nil {
		return nil, err
	}
	rng := rand.New(rand.NewPCG(seed, 0x5e1f))
	read := func(freq, extraM float64, sp impedance.Specimen) (complex128, error) {
		z, err := impedance.NormalizedImpedance(m, freq, surveyTrueLiftoffM+extraM, 1, sp)
		if err != nil {
			return 0, err
		}
		in := surveyInstrument[freq]
		return in.gain*z + in.offset + complex(surveyNoiseV*rng.NormFloat64(), surveyNoiseV*rng.NormFloat64()), nil
	}
	var paths []string
	write := func(name string, rows [][]string) error {
		p := filepath.Join(dir, name)
		f, err := os.Create(p)
		if err != nil {
			return err
		}
		w := csv.NewWriter(f)
		if err := w.WriteAll(rows); err != nil {
			f.Close()
			return fmt.Errorf("%s: %w", p, err)
		}
		if err := f.Close(); err != nil {
			return err
		}
		paths = append(paths, p)
		return nil
	}
	g := func(v float64, prec int) string { return strconv.FormatFloat(v, 'f', prec, 64) }

	// Probe.
	pb, err := json.MarshalIndent(surveyProbe, "", "  ")
	if err != nil {
		return nil, err
	}
	pp := filepath.Join(dir, SurveyProbeFile)
	if err := os.WriteFile(pp, append(pb, '\n'), 0o644); err != nil {
		return nil, err
	}
	paths = append(paths, pp)

	// Blocks and shims.
	rows := [][]string{{"block_id", "conductivity_pct_iacs", "u_conductivity_pct_iacs", "thickness_mm", "material", "certificate"}}
	for _, b := range surveyBlocks {
		rows = append(rows, []string{b.ID, g(b.ConductivitySPerM/58e4, 2), g(b.UConductivitySPerM/58e4, 2), g(b.ThicknessM*1e3, 2), b.Material, b.Certificate})
	}
	if err := write(SurveyBlocksFile, rows); err != nil {
		return nil, err
	}
	rows = [][]string{{"shim_id", "thickness_um", "u_thickness_um", "certificate"}}
	for _, s := range surveyShims {
		rows = append(rows, []string{s.ID, g(s.ThicknessM*1e6, 1), g(s.UThicknessM*1e6, 1), s.Certificate})
	}
	if err := write(SurveyShimsFile, rows); err != nil {
		return nil, err
	}

	calRow := func(block, shim string, freq float64, v complex128) []string {
		return []string{block, shim, g(freq, 0), g(real(v), 5), g(imag(v), 5)}
	}
	// Conductivity calibration: every range block bare and under each
	// shim, at both frequencies.
	rows = [][]string{{"block_id", "shim_id", "freq_hz", "x_v", "y_v"}}
	for _, f := range surveyProbe.FreqsHz {
		// The probe held in air first (σ = 0: Zn = 1j whatever the lift-off).
		v, err := read(f, 0, impedance.Specimen{})
		if err != nil {
			return nil, err
		}
		rows = append(rows, calRow("air", "", f, v))
		for _, b := range surveyBlocks[:5] {
			sp := impedance.Specimen{ConductivitySPerM: b.ConductivitySPerM, ThicknessM: b.ThicknessM}
			for si := -1; si < len(surveyShims); si++ {
				shim, extra := "", 0.0
				if si >= 0 {
					shim, extra = surveyShims[si].ID, surveyShims[si].ThicknessM
				}
				v, err := read(f, extra, sp)
				if err != nil {
					return nil, err
				}
				rows = append(rows, calRow(b.ID, shim, f, v))
			}
		}
	}
	if err := write(SurveyCalFile, rows); err != nil {
		return nil, err
	}

	// Panels: four spots each; some painted; part temperature 18–29 °C.
	truth := [][]string{{"file", "spot", "conductivity_pct_iacs_20c", "conductivity_pct_iacs_at_t", "liftoff_um", "thickness_mm", "temperature_c"}}
	rows = [][]string{{"spot", "freq_hz", "x_v", "y_v", "temperature_c", "thickness_mm", "material"}}
	for _, p := range surveyPanels {
		tempC := 18 + 11*rng.Float64()
		for k := 1; k <= 4; k++ {
			spot := fmt.Sprintf("%s-%d", p.id, k)
			paint := 0.0
			if k >= 3 {
				paint = 20e-6 + 70e-6*rng.Float64()
			}
			// Local variation of ±0.3 %IACS around the panel value.
			iacs20 := p.iacs20 + 0.3*(2*rng.Float64()-1)
			sigmaT := iacs20 * 58e4 / (1 + surveyAlphaPerC*(tempC-20))
			sp := impedance.Specimen{ConductivitySPerM: sigmaT, ThicknessM: p.thicknessM}
			for _, f := range surveyProbe.FreqsHz {
				v, err := read(f, paint, sp)
				if err != nil {
					return nil, err
				}
				rows = append(rows, []string{spot, g(f, 0), g(real(v), 5), g(imag(v), 5), g(tempC, 1), g(p.thicknessM*1e3, 2), "aluminium-alloy"})
			}
			truth = append(truth, []string{SurveyReadingsFile, spot, g(iacs20, 3), g(sigmaT/58e4, 3), g(paint*1e6, 2), g(p.thicknessM*1e3, 2), g(tempC, 1)})
		}
	}
	if err := write(SurveyReadingsFile, rows); err != nil {
		return nil, err
	}

	// Coating set-up: the bare base sample and each shim on it.
	base := surveyBlocks[5]
	baseSp := impedance.Specimen{ConductivitySPerM: base.ConductivitySPerM, ThicknessM: base.ThicknessM}
	rows = [][]string{{"block_id", "shim_id", "freq_hz", "x_v", "y_v"}}
	v, err := read(surveyCoatingFreqHz, 0, impedance.Specimen{})
	if err != nil {
		return nil, err
	}
	rows = append(rows, calRow("air", "", surveyCoatingFreqHz, v))
	for si := -1; si < len(surveyShims); si++ {
		shim, extra := "", 0.0
		if si >= 0 {
			shim, extra = surveyShims[si].ID, surveyShims[si].ThicknessM
		}
		for rep := 0; rep < 2; rep++ {
			v, err := read(surveyCoatingFreqHz, extra, baseSp)
			if err != nil {
				return nil, err
			}
			rows = append(rows, calRow(base.ID, shim, surveyCoatingFreqHz, v))
		}
	}
	if err := write(SurveyCoatingCalFile, rows); err != nil {
		return nil, err
	}
	// Coated 6061 panel: ten spots with 15–110 µm of paint; the base
	// conductivity varies by ±0.5 %IACS from spot to spot.
	rows = [][]string{{"spot", "freq_hz", "x_v", "y_v"}}
	for k := 1; k <= 10; k++ {
		spot := fmt.Sprintf("PNL-C01-%02d", k)
		coat := 15e-6 + 95e-6*rng.Float64()
		iacs := 43.0 + 0.5*(2*rng.Float64()-1)
		sp := impedance.Specimen{ConductivitySPerM: iacs * 58e4, ThicknessM: 6e-3}
		v, err := read(surveyCoatingFreqHz, coat, sp)
		if err != nil {
			return nil, err
		}
		rows = append(rows, []string{spot, g(surveyCoatingFreqHz, 0), g(real(v), 5), g(imag(v), 5)})
		truth = append(truth, []string{SurveyCoatingFile, spot, g(iacs, 3), g(iacs, 3), g(coat*1e6, 2), "6.00", "20.0"})
	}
	if err := write(SurveyCoatingFile, rows); err != nil {
		return nil, err
	}
	if err := write(SurveyTruthFile, truth); err != nil {
		return nil, err
	}
	return paths, nil
}
