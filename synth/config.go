package synth

import (
	"fmt"
	"math"
	"sort"
	"time"

	"whorl/units"
)

// TubeSpec describes the tubing of the examined component and of its
// calibration standard.
type TubeSpec struct {
	// Alloy names the tube material, for example "Alloy 690TT".
	Alloy string `json:"alloy"`
	// OuterDiameterM is the tube outside diameter in metres.
	OuterDiameterM float64 `json:"outer_diameter_m"`
	// WallM is the nominal wall thickness in metres.
	WallM float64 `json:"wall_m"`
	// ConductivitySPerM is the electrical conductivity in S/m.
	ConductivitySPerM float64 `json:"conductivity_s_per_m"`
	// RelPermeability is the relative magnetic permeability (1 for the
	// non-magnetic alloys the generator is meant for).
	RelPermeability float64 `json:"rel_permeability"`
}

// Config describes one invented inspection: the component, its tubes and
// supports, the probe, the instrument's frequencies and the calibration
// groups. Lengths are in metres, frequencies in hertz, voltages in
// normalised volts (see the package documentation).
//
// Axial positions are measured along the direction of travel of the pull,
// from the tube end where the pull starts ("end-B") to the far end
// ("end-A") at LengthM.
type Config struct {
	// Seed selects the random realisation; the same Seed and Config give
	// identical data.
	Seed uint64 `json:"seed"`
	// Plant names the invented plant and unit.
	Plant string `json:"plant"`
	// Component names the heat exchanger; tube identifiers are unique
	// within it.
	Component string `json:"component"`
	// Procedure is the examination procedure reference and revision
	// written into every scan.
	Procedure string `json:"procedure"`
	// ProbeID is the bobbin probe's serial.
	ProbeID string `json:"probe_id"`
	// Tubes is the number of tubes in the bundle.
	Tubes int `json:"tubes"`
	// Tube is the tube size and material.
	Tube TubeSpec `json:"tube"`
	// LengthM is the tube length from end to end.
	LengthM float64 `json:"length_m"`
	// SupportsM are the support-plate centres, increasing, strictly
	// between the tubesheets.
	SupportsM []float64 `json:"supports_m"`
	// SupportThicknessM is the support-plate thickness.
	SupportThicknessM float64 `json:"support_thickness_m"`
	// TubesheetM is the thickness of each of the two tubesheets; the
	// tube is expanded into it up to ExpansionGapM short of its face.
	TubesheetM float64 `json:"tubesheet_m"`
	// ExpansionGapM is the distance from the expansion (roll) transition
	// to the tubesheet's secondary face.
	ExpansionGapM float64 `json:"expansion_gap_m"`
	// FreqsHz are the excitation frequencies, highest first. FreqsHz[0]
	// is the prime (detection and phase sizing), FreqsHz[MixIndex] the
	// support-mix partner and the last the landmark (low) frequency.
	FreqsHz []float64 `json:"freqs_hz"`
	// MixIndex is the index in FreqsHz of the support-mix partner.
	MixIndex int `json:"mix_index"`
	// SamplesPerM is the axial sampling density (samples per metre).
	SamplesPerM float64 `json:"samples_per_m"`
	// ProbeSpeedMPS is the nominal pull speed in m/s.
	ProbeSpeedMPS float64 `json:"probe_speed_mps"`
	// SpeedVariation is the peak fractional variation of the pull speed
	// along a pull (0.1 = ±10 %).
	SpeedVariation float64 `json:"speed_variation"`
	// CoilLengthM is the effective axial length of each coil's response
	// (full width at half maximum of its Gaussian sensitivity).
	CoilLengthM float64 `json:"coil_length_m"`
	// CoilSpacingM is the axial distance between the two coils of the
	// differential pair.
	CoilSpacingM float64 `json:"coil_spacing_m"`
	// NoiseV is the root-mean-square white noise on each differential
	// channel in normalised volts (absolute channels get 1.5 times this,
	// plus 1/f noise, wobble and drift).
	NoiseV float64 `json:"noise_v"`
	// Groups is the number of calibration groups; the tubes are split
	// into Groups consecutive runs of nearly equal size.
	Groups int `json:"groups"`
	// DriftedGroup is the index of the calibration group whose closing
	// calibration has drifted beyond tolerance (DriftDeg and DriftGain),
	// or -1 for none.
	DriftedGroup int `json:"drifted_group"`
	// DriftDeg is the phase drift of DriftedGroup's closing calibration
	// in degrees on every channel (counter-clockwise positive); the tubes
	// of the group drift linearly towards it.
	DriftDeg float64 `json:"drift_deg"`
	// DriftGain is the gain factor of DriftedGroup's closing
	// calibration relative to its opening (1.12 = 12 % high).
	DriftGain float64 `json:"drift_gain"`
	// FlawRate scales the per-tube probability of every condition (1 =
	// the documented rates).
	FlawRate float64 `json:"flaw_rate"`
	// Start is the start of the first opening calibration.
	Start time.Time `json:"start"`
	// Raw is the number of raw coil-voltage recordings.
	Raw int `json:"raw"`
	// RawSampleRateHz is the ADC sample rate of the raw recordings; it
	// must exceed twice the highest frequency.
	RawSampleRateHz float64 `json:"raw_sample_rate_hz"`
}

// Demo returns the main demo inspection: 288 straight Alloy 690TT tubes of
// 19.05 × 1.09 mm in an invented process-steam reboiler, examined at 400,
// 200, 100 and 20 kHz in six calibration groups, of which the fourth
// (index 3) fails its closing calibration check.
//
// Tube size and frequencies follow FIELD.md §8 and §2.3 (3/4 in × 0.043 in
// Alloy 690: 400, 200, 100 and 20–35 kHz); resistivity 115 µΩ·cm from
// FIELD.md §3.3.
func Demo() Config {
	return Config{
		Seed:      20261014,
		Plant:     "Tarnwick Bay Generating Station, Unit 2 (invented)",
		Component: "2-RB-01",
		Procedure: "TB-ET-014 rev 3",
		ProbeID:   "BP-0720-117",
		Tubes:     288,
		Tube: TubeSpec{
			Alloy:             "Alloy 690TT",
			OuterDiameterM:    19.05e-3,
			WallM:             1.09e-3,
			ConductivitySPerM: 1 / 115e-8, // ρ = 115 µΩ·cm, FIELD.md §2.3/§3.3
			RelPermeability:   1,
		},
		LengthM:           5.2,
		SupportsM:         []float64{1.05, 2.075, 3.125, 4.15},
		SupportThicknessM: 0.0222,
		TubesheetM:        0.125,
		ExpansionGapM:     0.006,
		FreqsHz:           []float64{400e3, 200e3, 100e3, 20e3},
		MixIndex:          2,
		SamplesPerM:       30 / units.MetresPerInch,
		ProbeSpeedMPS:     0.5,
		SpeedVariation:    0.08,
		CoilLengthM:       4e-3,
		CoilSpacingM:      3e-3,
		NoiseV:            0.02,
		Groups:            6,
		DriftedGroup:      3,
		DriftDeg:          9,
		DriftGain:         1.12,
		FlawRate:          1,
		Start:             time.Date(2026, 10, 14, 6, 30, 0, 0, time.UTC),
		Raw:               4,
		RawSampleRateHz:   1e6,
	}
}

// Alternate returns a second, differently configured inspection: 96
// straight 90/10 copper-nickel tubes of 25.4 × 1.24 mm (18 BWG) in an
// invented lube-oil cooler, examined at 50, 25, 12 and 3 kHz in two
// calibration groups, none drifted.
//
// Frequencies are about 10× lower than for nickel alloys, as FIELD.md §2.3
// says for copper alloys: f90 ≈ 37 kHz for 90/10 Cu-Ni at 1.24 mm wall
// (FIELD.md §2.3 table); resistivity 19.1 µΩ·cm from FIELD.md §3.3.
func Alternate() Config {
	return Config{
		Seed:      77031,
		Plant:     "Tarnwick Bay Generating Station, Unit 1 (invented)",
		Component: "1-LOC-03",
		Procedure: "TB-ET-021 rev 1",
		ProbeID:   "BP-1000-042",
		Tubes:     96,
		Tube: TubeSpec{
			Alloy:             "90/10 Cu-Ni (C70600)",
			OuterDiameterM:    25.4e-3,
			WallM:             1.24e-3,
			ConductivitySPerM: 1 / 19.1e-8, // ρ = 19.1 µΩ·cm, FIELD.md §2.3/§3.3
			RelPermeability:   1,
		},
		LengthM:           3.66,
		SupportsM:         []float64{0.95, 1.83, 2.71},
		SupportThicknessM: 0.019,
		TubesheetM:        0.05,
		ExpansionGapM:     0.004,
		FreqsHz:           []float64{50e3, 25e3, 12e3, 3e3},
		MixIndex:          2,
		SamplesPerM:       40 / units.MetresPerInch,
		ProbeSpeedMPS:     0.3,
		SpeedVariation:    0.12,
		CoilLengthM:       5e-3,
		CoilSpacingM:      3.5e-3,
		NoiseV:            0.03,
		Groups:            2,
		DriftedGroup:      -1,
		DriftDeg:          0,
		DriftGain:         1,
		FlawRate:          1.5,
		Start:             time.Date(2026, 11, 3, 13, 0, 0, 0, time.UTC),
		Raw:               3,
		RawSampleRateHz:   250e3,
	}
}

// fieldError names the bad field of a Config.
func fieldError(field string, format string, a ...any) error {
	return fmt.Errorf("config %s: %s", field, fmt.Sprintf(format, a...))
}

func positive(x float64) bool { return x > 0 && !math.IsInf(x, 1) }

// Validate reports the first impossible or inconsistent field of c, by
// name.
func (c *Config) Validate() error {
	switch {
	case c.Component == "":
		return fieldError("Component", "empty: expected the component's identifier")
	case c.Tubes < 1 || c.Tubes > 1_000_000:
		return fieldError("Tubes", "%d: expected 1 to 1000000 tubes", c.Tubes)
	case !positive(c.Tube.OuterDiameterM) || c.Tube.OuterDiameterM > 0.2:
		return fieldError("Tube.OuterDiameterM", "%v m: expected a diameter between 0 and 0.2 m", c.Tube.OuterDiameterM)
	case !positive(c.Tube.WallM) || c.Tube.WallM >= c.Tube.OuterDiameterM/4:
		return fieldError("Tube.WallM", "%v m: expected a wall thinner than a quarter of the diameter", c.Tube.WallM)
	case !positive(c.Tube.ConductivitySPerM):
		return fieldError("Tube.ConductivitySPerM", "%v S/m: expected a positive conductivity", c.Tube.ConductivitySPerM)
	case !positive(c.Tube.RelPermeability) || c.Tube.RelPermeability > 1000:
		return fieldError("Tube.RelPermeability", "%v: expected a relative permeability between 0 and 1000", c.Tube.RelPermeability)
	case !positive(c.LengthM) || c.LengthM > 50:
		return fieldError("LengthM", "%v m: expected a tube length between 0 and 50 m", c.LengthM)
	case !positive(c.TubesheetM) || 2*c.TubesheetM >= c.LengthM:
		return fieldError("TubesheetM", "%v m: expected a positive thickness, less than half the tube length", c.TubesheetM)
	case !(c.ExpansionGapM >= 0) || c.ExpansionGapM >= c.TubesheetM:
		return fieldError("ExpansionGapM", "%v m: expected 0 or more and less than TubesheetM", c.ExpansionGapM)
	case !positive(c.SupportThicknessM) || c.SupportThicknessM > 0.2:
		return fieldError("SupportThicknessM", "%v m: expected a thickness between 0 and 0.2 m", c.SupportThicknessM)
	case len(c.FreqsHz) < 2 || len(c.FreqsHz) > 8:
		return fieldError("FreqsHz", "%d frequencies: expected 2 to 8", len(c.FreqsHz))
	case c.MixIndex < 1 || c.MixIndex >= len(c.FreqsHz):
		return fieldError("MixIndex", "%d: expected an index from 1 to %d into FreqsHz", c.MixIndex, len(c.FreqsHz)-1)
	case !positive(c.SamplesPerM) || c.SamplesPerM < 100 || c.SamplesPerM > 20000:
		return fieldError("SamplesPerM", "%v: expected 100 to 20000 samples per metre", c.SamplesPerM)
	case !positive(c.ProbeSpeedMPS) || c.ProbeSpeedMPS > 5:
		return fieldError("ProbeSpeedMPS", "%v m/s: expected a speed between 0 and 5 m/s", c.ProbeSpeedMPS)
	case !(c.SpeedVariation >= 0 && c.SpeedVariation <= 0.3):
		return fieldError("SpeedVariation", "%v: expected a fraction from 0 to 0.3", c.SpeedVariation)
	case !positive(c.CoilLengthM) || c.CoilLengthM > 0.05:
		return fieldError("CoilLengthM", "%v m: expected a length between 0 and 0.05 m", c.CoilLengthM)
	case !positive(c.CoilSpacingM) || c.CoilSpacingM > 0.05:
		return fieldError("CoilSpacingM", "%v m: expected a spacing between 0 and 0.05 m", c.CoilSpacingM)
	case !(c.NoiseV >= 0 && c.NoiseV <= 10):
		return fieldError("NoiseV", "%v V: expected 0 to 10 V", c.NoiseV)
	case c.Groups < 1 || c.Groups > c.Tubes:
		return fieldError("Groups", "%d: expected 1 to Tubes (%d) calibration groups", c.Groups, c.Tubes)
	case c.DriftedGroup < -1 || c.DriftedGroup >= c.Groups:
		return fieldError("DriftedGroup", "%d: expected -1 or a group index from 0 to %d", c.DriftedGroup, c.Groups-1)
	case math.IsNaN(c.DriftDeg) || math.Abs(c.DriftDeg) > 90:
		return fieldError("DriftDeg", "%v°: expected −90° to 90°", c.DriftDeg)
	case !positive(c.DriftGain) || c.DriftGain > 10:
		return fieldError("DriftGain", "%v: expected a gain factor between 0 and 10", c.DriftGain)
	case !(c.FlawRate >= 0 && c.FlawRate <= 5):
		return fieldError("FlawRate", "%v: expected a factor from 0 to 5", c.FlawRate)
	case c.Raw < 0 || c.Raw > 64:
		return fieldError("Raw", "%d: expected 0 to 64 raw recordings", c.Raw)
	case c.Raw > 0 && !(c.RawSampleRateHz > 2*c.maxFreqHz() && c.RawSampleRateHz <= 100e6):
		return fieldError("RawSampleRateHz", "%v Hz: expected more than twice the highest frequency (%v Hz) and at most 100 MHz", c.RawSampleRateHz, c.maxFreqHz())
	}
	for i, f := range c.FreqsHz {
		if !positive(f) || f > 10e6 {
			return fieldError(fmt.Sprintf("FreqsHz[%d]", i), "%v Hz: expected a frequency between 0 and 10 MHz", f)
		}
		if i > 0 && !(f < c.FreqsHz[i-1]) {
			return fieldError(fmt.Sprintf("FreqsHz[%d]", i), "%v Hz: expected frequencies in decreasing order", f)
		}
	}
	if len(c.SupportsM) == 0 || len(c.SupportsM) > 100 {
		return fieldError("SupportsM", "%d supports: expected 1 to 100", len(c.SupportsM))
	}
	if !sort.Float64sAreSorted(c.SupportsM) {
		return fieldError("SupportsM", "expected increasing positions")
	}
	for i, z := range c.SupportsM {
		half := c.SupportThicknessM / 2
		if math.IsNaN(z) || z-half <= c.TubesheetM+0.05 || z+half >= c.LengthM-c.TubesheetM-0.05 {
			return fieldError(fmt.Sprintf("SupportsM[%d]", i), "%v m: expected a support at least 0.05 m clear of both tubesheets", z)
		}
		if i > 0 && z-c.SupportsM[i-1] < c.SupportThicknessM+0.1 {
			return fieldError(fmt.Sprintf("SupportsM[%d]", i), "%v m: expected at least 0.1 m of free span from the previous support", z)
		}
	}
	return nil
}

func (c *Config) maxFreqHz() float64 {
	m := 0.0
	for _, f := range c.FreqsHz {
		m = math.Max(m, f)
	}
	return m
}

// WithLength returns c with tubes of lengthM and its supports re-spaced
// evenly between the tubesheets at about the same pitch as before (at
// least one support), for larger inspections such as 20 m tubes
// (FIELD.md §8: a full U-tube run of 16–25 m with supports every
// 0.9–1.5 m). c itself is not changed.
func (c Config) WithLength(lengthM float64) Config {
	n0 := len(c.SupportsM)
	span0 := c.LengthM - 2*c.TubesheetM
	pitch := span0 / float64(n0+1)
	c.LengthM = lengthM
	span := lengthM - 2*c.TubesheetM
	n := max(1, int(math.Round(span/pitch))-1)
	c.SupportsM = make([]float64, n)
	for k := range n {
		c.SupportsM[k] = math.Round((c.TubesheetM+span*float64(k+1)/float64(n+1))*1e4) / 1e4
	}
	return c
}
