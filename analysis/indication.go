package analysis

// Class is the category of an indication.
type Class string

// Indication classes.
const (
	ClassFlaw     Class = "flaw-like"
	ClassLandmark Class = "landmark"
	ClassGeometry Class = "geometry"
	ClassDeposit  Class = "deposit"
	ClassNoise    Class = "noise"
	ClassReview   Class = "analyst-review"
)

// Rule names (see the package documentation).
const (
	RuleLandmarkZone = "landmark-zone"
	RuleResidue      = "mix-residue"
	RuleGeometry     = "geometry"
	RuleComposite    = "geometry-composite"
	RuleDeposit      = "deposit"
	RuleZoneWeak     = "zone-weak"
	RuleZoneShallow  = "zone-shallow"
	RuleNoise        = "noise"
	RuleFlawPhase    = "flaw-phase"
	RuleUnresolved   = "unresolved"
)

// Indication is one measured signal: where it is, what was measured and
// how, its size and class, and which calibration produced it. It is
// JSON-serialisable for records and reports.
type Indication struct {
	Component string `json:"component"`
	Channel   string `json:"channel"`
	// Window is the measurement window [start, end) in samples.
	Window [2]int `json:"window"`
	// PositionM is the centre of the window; StartM and EndM its ends.
	PositionM float64 `json:"position_m"`
	StartM    float64 `json:"start_m"`
	EndM      float64 `json:"end_m"`
	// Landmark is the nearest landmark, LandmarkM its reference position
	// (a support's centre, a tubesheet's inner face) and OffsetM the
	// indication's signed distance from it; Location says the same in words,
	// e.g. "+0.120 m from support-3".
	Landmark     string  `json:"landmark,omitempty"`
	LandmarkKind string  `json:"landmark_kind,omitempty"`
	LandmarkM    float64 `json:"landmark_m,omitempty"`
	// LandmarkRef says which point of the landmark LandmarkM is:
	// RefCentre, RefStart or RefEnd.
	LandmarkRef string  `json:"landmark_ref,omitempty"`
	OffsetM     float64 `json:"offset_m"`
	Location    string  `json:"location"`
	// Vpp is the peak-to-peak amplitude (calibrated volts), PhaseDeg the
	// phase of its chord, MaxRatePhaseDeg the maximum-rate phase.
	Vpp             float64 `json:"vpp"`
	PhaseDeg        float64 `json:"phase_deg"`
	MaxRatePhaseDeg float64 `json:"max_rate_phase_deg"`
	// CrossVpp is the trace's extent across its chord (measure.CrossExtent).
	CrossVpp float64 `json:"cross_vpp"`
	// LandmarkRatio is the landmark (low-frequency) channel's calibrated
	// Vpp in the same window over Vpp (0 when that channel has no set-up).
	LandmarkRatio float64 `json:"landmark_ratio"`
	// DepthPct is the size in %TW (nil: not sized); UncertaintyPct its
	// uncertainty from the curve's leave-one-out residuals. OutOfRange
	// marks a reading outside the curve's calibrated range: DepthPct is
	// then the curve's value at the nearest end of its range, a bound.
	DepthPct       *float64 `json:"depth_pct,omitempty"`
	UncertaintyPct float64  `json:"uncertainty_pct,omitempty"`
	OutOfRange     bool     `json:"out_of_range,omitempty"`
	// Class and Rule say how the indication was classified.
	Class Class  `json:"class"`
	Rule  string `json:"rule"`
	// Alarms lists the alarm regions the indication falls in.
	Alarms []string `json:"alarms,omitempty"`
	// Reportable is false for flaw-like indications sized below the
	// procedure's reporting threshold.
	Reportable bool `json:"reportable"`
	// Curve, CalibrationID, CalibrationVersion and CalibrationHash identify
	// the curve and calibration used.
	Curve              string `json:"curve,omitempty"`
	CalibrationID      string `json:"calibration_id"`
	CalibrationVersion int    `json:"calibration_version"`
	CalibrationHash    string `json:"calibration_hash"`
	// SNR is Vpp over the channel's clean-window noise Vpp.
	SNR float64 `json:"snr"`
}

// Landmark is a support, tubesheet or other fixed feature found on a scan.
type Landmark struct {
	Name    string  `json:"name"`
	Kind    string  `json:"kind"` // support or tubesheet
	StartM  float64 `json:"start_m"`
	EndM    float64 `json:"end_m"`
	CentreM float64 `json:"centre_m"`
	// Window is the landmark's extent in samples [start, end).
	Window [2]int `json:"window"`
	// Ref is the point locations are measured from: the centre of a
	// support; the face of a tubesheet towards the middle of the scan
	// (RefEnd for a tubesheet at the start of the scan, RefStart at its end).
	Ref string `json:"ref"`
}

// RefM returns the position of the landmark's reference point.
func (l *Landmark) RefM() float64 {
	switch l.Ref {
	case RefStart:
		return l.StartM
	case RefEnd:
		return l.EndM
	}
	return l.CentreM
}

// Landmark reference points.
const (
	RefCentre = "centre"
	RefStart  = "start"
	RefEnd    = "end"
)

// Landmark kinds.
const (
	KindSupport   = "support"
	KindTubesheet = "tubesheet"
)

// NoiseWindow is the clean window a channel's noise was measured in.
type NoiseWindow struct {
	Channel string  `json:"channel"`
	Window  [2]int  `json:"window"`
	Vpp     float64 `json:"vpp"`
}

// Report summarises the analysis of one scan.
type Report struct {
	Component          string        `json:"component"`
	Samples            int           `json:"samples"`
	StartM             float64       `json:"start_m"`
	EndM               float64       `json:"end_m"`
	CalibrationID      string        `json:"calibration_id"`
	CalibrationVersion int           `json:"calibration_version"`
	CalibrationHash    string        `json:"calibration_hash"`
	CalibrationStatus  string        `json:"calibration_status"`
	ProcedureID        string        `json:"procedure_id"`
	ProcedureRevision  string        `json:"procedure_revision"`
	Landmarks          []Landmark    `json:"landmarks"`
	Noise              []NoiseWindow `json:"noise"`
	Counts             map[Class]int `json:"counts"`
	Warnings           []string      `json:"warnings,omitempty"`
}
