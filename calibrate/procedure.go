package calibrate

import (
	"fmt"
	"math"
	"strings"
)

// Role says what a channel of a procedure is used for.
type Role string

// Channel roles.
const (
	// RolePrime is the prime differential channel: detection and phase sizing.
	RolePrime Role = "prime"
	// RoleAbsolute is an absolute channel kept for gradual wall loss and long flaws.
	RoleAbsolute Role = "absolute"
	// RoleMixInput is a channel used only as an input of a mix.
	RoleMixInput Role = "mix-input"
	// RoleLandmark is the channel landmarks (supports, tube ends) are found on.
	RoleLandmark Role = "landmark"
	// RoleAuxiliary is any other recorded channel the procedure names.
	RoleAuxiliary Role = "auxiliary"
)

// Curve types.
const (
	CurvePiecewiseLinear = "piecewise-linear"
	CurveMonotoneCubic   = "monotone-cubic"
	CurvePolynomial      = "polynomial"
)

// Curve variables.
const (
	VarPhase          = "phase"           // depth from calibrated phase
	VarAmplitude      = "amplitude"       // depth from calibrated Vpp
	VarPhaseAmplitude = "phase+amplitude" // depth from phase and ln(Vpp) (least squares)
)

// Lobe conventions: which direction of the peak-to-peak chord counts.
const (
	// LobeLater takes the chord from the endpoint reached earlier in scan
	// order to the one reached later.
	LobeLater = "later"
	// LobeEarlier takes the opposite direction (adds 180°).
	LobeEarlier = "earlier"
)

// Alarm region kinds.
const (
	AlarmSector = "sector" // a phase range and an amplitude range of the chord
	AlarmBox    = "box"    // a rectangle in X and Y of the chord vector
)

// Procedure is a written analysis procedure in machine-readable form: the
// channels and their roles, mixes, the set-up rules (rotation and
// normalisation references), curves, detection thresholds, alarm regions,
// landmark and classification rules, the reporting threshold and the
// calibration-check tolerances. All angles, references and voltages that
// calibration and analysis use come from here. The file format is
// described in docs/procedure.md.
//
// Angles are in degrees and voltages in calibrated volts (the volts the
// normalisation defines), lengths in metres and times in seconds, as the
// field names say.
type Procedure struct {
	ID          string `json:"id"`
	Revision    string `json:"revision"`
	Title       string `json:"title,omitempty"`
	CodeEdition string `json:"code_edition"`
	// Lobe is LobeLater or LobeEarlier (default later).
	Lobe string `json:"lobe,omitempty"`
	// ProbeDirection is the direction of travel the lobe refers to ("pull" or "push").
	ProbeDirection string        `json:"probe_direction,omitempty"`
	Channels       []ChannelRole `json:"channels"`
	Mixes          []MixDef      `json:"mixes,omitempty"`
	Locate         LocateRule    `json:"locate"`
	Setups         []SetupRule   `json:"setups"`
	Detection      []DetectRule  `json:"detection"`
	Alarms         []AlarmRegion `json:"alarms,omitempty"`
	Landmarks      LandmarkRule  `json:"landmarks"`
	Classification ClassRules    `json:"classification"`
	ReportingPct   float64       `json:"reporting_threshold_pct"`
	// ReportBelowRange reports flaw-like indications whose reading lies
	// beyond the shallow end of the sizing curve (their depth is only known
	// to be less than the shallowest reference); false leaves them in the
	// indication list, flagged out of range, but not reportable.
	ReportBelowRange bool            `json:"report_below_range,omitempty"`
	Check            CheckTolerances `json:"check"`
	// Conductivity holds the conductivity set-up, when the procedure has one.
	Conductivity *ConductivitySetup `json:"conductivity,omitempty"`
}

// ChannelRole names a recorded channel the procedure uses, with the
// frequency and coil mode it must have.
type ChannelRole struct {
	Name   string  `json:"name"`
	FreqHz float64 `json:"freq_hz"`
	Mode   string  `json:"mode"` // "differential" or "absolute"
	Role   Role    `json:"role"`
}

// MixDef defines a multi-frequency mix: Primary minus a combination of
// Inputs trained to cancel the signals in the training windows (centred
// on the named standard flaws, each WindowM long).
type MixDef struct {
	Name    string   `json:"name"`
	Primary string   `json:"primary"`
	Inputs  []string `json:"inputs"`
	// Form is the mix model: "affine" (general 2×2 matrix and offset per
	// input) or "rotate-scale" (one complex weight per input).
	Form          string   `json:"form"`
	TrainingFlaws []string `json:"training_flaws"`
	WindowM       float64  `json:"window_m"`
	// ResidueWindowM, when positive, keeps what the mix leaves of the
	// first training flaw (its residue) over this length, with that
	// flaw's landmark-channel signal, so that analysis can subtract the
	// residue expected at each support scaled by the support's own
	// landmark-channel signal (see analysis).
	ResidueWindowM float64 `json:"residue_window_m,omitempty"`
}

// LocateRule says how flaw signals are found on a standard scan.
type LocateRule struct {
	// Channel is the channel searched for the standard's flaw signals.
	Channel string `json:"channel"`
	// WindowM is the measurement window length centred on each signal.
	WindowM float64 `json:"window_m"`
	// ToleranceM is how far a signal may sit from its expected position
	// after the best fit of offset and scale (speed variation).
	ToleranceM float64 `json:"tolerance_m"`
	// MinFraction is the smallest signal accepted, as a fraction of the
	// largest signal of the scan on Channel.
	MinFraction float64 `json:"min_fraction"`
}

// SetupRule is the set-up of one analysed channel or mix.
type SetupRule struct {
	Channel       string       `json:"channel"`
	Rotation      RotationRule `json:"rotation"`
	Normalisation NormRule     `json:"normalisation"`
	Curves        []CurveSpec  `json:"curves,omitempty"`
	// SizingCurve names the curve used to size indications on this channel
	// (empty: indications are not sized on it).
	SizingCurve string `json:"sizing_curve,omitempty"`
	// Liftoff, when given, says where on the standard scan the lift-off
	// (probe motion) direction of the calibrated channel is measured;
	// geometry signals are then judged against that direction instead of
	// the horizontal.
	Liftoff *LiftoffRule `json:"liftoff,omitempty"`
}

// LiftoffRule names the signal that shows the lift-off direction: a flaw
// of the standard (for example a dent or an expansion), or the probe
// entering ("scan-start") or leaving ("scan-end") the standard, measured
// in a window of WindowM metres.
type LiftoffRule struct {
	Reference string  `json:"reference"`
	WindowM   float64 `json:"window_m"`
}

// Lift-off references that are not flaws.
const (
	LiftoffScanStart = "scan-start"
	LiftoffScanEnd   = "scan-end"
)

// RotationRule puts the Reference flaw's peak-to-peak phase at AngleDeg.
// With a reference that is a probe-motion or lift-off-like signal and an
// angle of 0 or 180 the same rule makes that signal horizontal.
type RotationRule struct {
	Reference string  `json:"reference"`
	AngleDeg  float64 `json:"angle_deg"`
}

// NormRule sets the gain so that the Reference flaw reads Vpp calibrated volts.
type NormRule struct {
	Reference string  `json:"reference"`
	Vpp       float64 `json:"vpp"`
}

// CurveSpec asks for one depth curve through the as-built depths of Flaws.
type CurveSpec struct {
	Name     string   `json:"name"`
	Variable string   `json:"variable"` // phase, amplitude, phase+amplitude
	Type     string   `json:"type"`     // piecewise-linear, monotone-cubic, polynomial
	Order    int      `json:"order,omitempty"`
	Flaws    []string `json:"flaws"`
}

// DetectRule is a detection threshold on one channel or mix: a sliding
// window of WindowM metres whose peak-to-peak amplitude reaches
// ThresholdVpp calibrated volts.
type DetectRule struct {
	Channel      string  `json:"channel"`
	ThresholdVpp float64 `json:"threshold_vpp"`
	WindowM      float64 `json:"window_m"`
	// Zone limits detection on the channel: ZoneAll (or empty) everywhere,
	// ZoneLandmarks only inside landmark zones (a support mix), ZoneFreeSpan
	// only outside them.
	Zone string `json:"zone,omitempty"`
}

// Detection zones.
const (
	ZoneAll       = "all"
	ZoneLandmarks = "landmarks"
	ZoneFreeSpan  = "free-span"
)

// AlarmRegion is a region of the impedance plane tested against the
// peak-to-peak chord vector of a window (its tail at the origin): a sector
// (phase from MinPhaseDeg anticlockwise to MaxPhaseDeg, Vpp from MinVpp
// to MaxVpp, MaxVpp 0 meaning no upper limit) or a box (X and Y of the
// chord in volts). MinVpp must be positive for a sector; a box must not
// contain the origin.
type AlarmRegion struct {
	Name        string  `json:"name"`
	Channel     string  `json:"channel"`
	Kind        string  `json:"kind"`
	MinPhaseDeg float64 `json:"min_phase_deg,omitempty"`
	MaxPhaseDeg float64 `json:"max_phase_deg,omitempty"`
	MinVpp      float64 `json:"min_vpp,omitempty"`
	MaxVpp      float64 `json:"max_vpp,omitempty"`
	XMinV       float64 `json:"x_min_v,omitempty"`
	XMaxV       float64 `json:"x_max_v,omitempty"`
	YMinV       float64 `json:"y_min_v,omitempty"`
	YMaxV       float64 `json:"y_max_v,omitempty"`
}

// LandmarkRule says how supports and other landmarks are found.
type LandmarkRule struct {
	Channel string `json:"channel"`
	// Reference is the standard flaw (usually the support ring) whose
	// signal on Channel defines the landmark scale; Fraction of its Vpp
	// is the detection threshold.
	Reference string  `json:"reference"`
	Fraction  float64 `json:"fraction"`
	WindowM   float64 `json:"window_m"`
	// MinSpacingM merges detections closer than this into one landmark.
	MinSpacingM float64 `json:"min_spacing_m"`
	// ExtendedM: a landmark response longer than this is a tubesheet, not a support.
	ExtendedM float64 `json:"extended_m"`
}

// ClassRules holds the numbers of the classification rules (see the
// analysis package for the rules themselves).
type ClassRules struct {
	// SupportZoneM is the half-length around a landmark centre inside
	// which a prime-channel signal is the landmark's own.
	SupportZoneM float64 `json:"support_zone_m"`
	// FlawPhaseDeg is the band [low, high] of calibrated phase of
	// flaw-like signals on the sizing channels.
	FlawPhaseDeg [2]float64 `json:"flaw_phase_deg"`
	// GeometryBandDeg: a signal within this many degrees of horizontal
	// (probe motion, lift-off) and above GeometryMinVpp is a dent or
	// other geometry signal.
	GeometryBandDeg float64 `json:"geometry_band_deg"`
	GeometryMinVpp  float64 `json:"geometry_min_vpp"`
	// GeometryMaxCross is the largest cross extent of a geometry signal
	// as a fraction of its Vpp: a lift-off-like trace that bulges more
	// than this across its chord carries another signal and goes to an
	// analyst.
	GeometryMaxCross float64 `json:"geometry_max_cross"`
	// ResidueMaxVpp: on a mix in a landmark zone, a straight (cross extent
	// at most GeometryMaxCross × Vpp) signal of at most this Vpp outside
	// the flaw phase band is the landmark's mix residue (0: no such rule).
	ResidueMaxVpp float64 `json:"residue_max_vpp,omitempty"`
	// ZonePhaseMarginDeg widens the sizing curve's calibrated phase range
	// [XMin, XMax] into the zone flaw band of a mix (from the lower of
	// FlawPhaseDeg[0] and XMin − margin to XMax + margin): in a landmark
	// zone, a mix signal of at most ResidueMaxVpp whose phase lies outside
	// that band is the landmark's mix residue, and one inside it is judged
	// by ZoneMinSNR (0: neither rule; see the analysis package).
	ZonePhaseMarginDeg float64 `json:"zone_phase_margin_deg,omitempty"`
	// ZoneMinSNR: in a landmark zone, a mix signal inside the zone flaw
	// band with S/N from ZoneMinSNR up to MinSNR goes to an analyst
	// instead of being dismissed as noise (0: no such rule).
	ZoneMinSNR float64 `json:"zone_min_snr,omitempty"`
	// DepositRatio: a signal whose landmark-channel Vpp exceeds this
	// multiple of its prime Vpp, away from a landmark, is a deposit.
	DepositRatio float64 `json:"deposit_ratio"`
	// MinSNR: a signal below this signal-to-noise ratio is noise.
	MinSNR float64 `json:"min_snr"`
	// NoiseWindowM is the length of the clean window S/N is measured in.
	NoiseWindowM float64 `json:"noise_window_m"`
}

// CheckTolerances are the calibration-check limits between an opening and
// a closing calibration.
type CheckTolerances struct {
	PhaseTolDeg     float64  `json:"phase_tol_deg"`
	AmplitudeTolPct float64  `json:"amplitude_tol_pct"`
	MaxElapsedS     float64  `json:"max_elapsed_s,omitempty"` // 0: the default, 4 h
	References      []string `json:"references,omitempty"`    // flaws checked; empty: each setup's rotation and normalisation references
	// Channels lists the set-up channels checked; empty: every set-up.
	Channels []string `json:"channels,omitempty"`
}

// DefaultMaxElapsedS is the longest time between an opening and a closing
// calibration when a procedure does not say: 4 hours (ASME V Art. 8
// App. II, from memory; FIELD.md §1.5).
const DefaultMaxElapsedS = 4 * 3600

// MaxElapsed returns the procedure's limit in seconds, or the default.
func (c CheckTolerances) MaxElapsed() float64 {
	if c.MaxElapsedS > 0 {
		return c.MaxElapsedS
	}
	return DefaultMaxElapsedS
}

// Channel returns the named channel role, or nil.
func (p *Procedure) Channel(name string) *ChannelRole {
	for i := range p.Channels {
		if p.Channels[i].Name == name {
			return &p.Channels[i]
		}
	}
	return nil
}

// Mix returns the named mix definition, or nil.
func (p *Procedure) Mix(name string) *MixDef {
	for i := range p.Mixes {
		if p.Mixes[i].Name == name {
			return &p.Mixes[i]
		}
	}
	return nil
}

// Setup returns the set-up rule of the named channel or mix, or nil.
func (p *Procedure) Setup(name string) *SetupRule {
	for i := range p.Setups {
		if p.Setups[i].Channel == name {
			return &p.Setups[i]
		}
	}
	return nil
}

// ChannelsWithRole returns the names of the channels with role r, in order.
func (p *Procedure) ChannelsWithRole(r Role) []string {
	var out []string
	for _, c := range p.Channels {
		if c.Role == r {
			out = append(out, c.Name)
		}
	}
	return out
}

// ParseProcedure decodes and validates a procedure file held in data; name
// is used in error messages.
func ParseProcedure(name string, data []byte) (*Procedure, error) {
	var p Procedure
	if err := decodeStrict(name, data, &p); err != nil {
		return nil, err
	}
	if err := p.validate(name); err != nil {
		return nil, err
	}
	return &p, nil
}

// LoadProcedure reads and validates a procedure file.
func LoadProcedure(path string) (*Procedure, error) {
	b, err := readFile(path)
	if err != nil {
		return nil, err
	}
	return ParseProcedure(path, b)
}

// SaveProcedure validates p and writes it to path as indented JSON.
func SaveProcedure(path string, p *Procedure) error {
	if err := p.validate(path); err != nil {
		return err
	}
	return writeFileJSON(path, p)
}

// Validate reports the first problem of p as a *FileError (File empty).
func (p *Procedure) Validate() error { return p.validate("procedure") }

func pos(v float64) bool { return finite(v) && v > 0 }

func (p *Procedure) validate(file string) error {
	bad := func(field, format string, a ...any) error { return fieldErr(file, field, format, a...) }
	switch {
	case p.ID == "":
		return bad("id", "missing: the procedure needs an identifier")
	case p.Revision == "":
		return bad("revision", "missing: the procedure needs a revision")
	case p.CodeEdition == "":
		return bad("code_edition", "missing: name the code and edition the procedure follows")
	case len(p.Channels) == 0:
		return bad("channels", "empty: list the channels the procedure analyses")
	}
	switch p.Lobe {
	case "", LobeLater, LobeEarlier:
	default:
		return bad("lobe", "%q: expected %q or %q", p.Lobe, LobeLater, LobeEarlier)
	}
	switch p.ProbeDirection {
	case "", "pull", "push":
	default:
		return bad("probe_direction", "%q: expected pull or push", p.ProbeDirection)
	}
	names := map[string]string{} // name → "channel" or "mix"
	for i, c := range p.Channels {
		at := fmt.Sprintf("channels[%d]", i)
		if c.Name == "" {
			return bad(at+".name", "missing")
		}
		if _, dup := names[c.Name]; dup {
			return bad(at+".name", "%q: duplicate channel", c.Name)
		}
		names[c.Name] = "channel"
		if !pos(c.FreqHz) {
			return bad(at+".freq_hz", "%v: expected a positive frequency in Hz", c.FreqHz)
		}
		if m := strings.ToLower(c.Mode); m != "differential" && m != "absolute" {
			return bad(at+".mode", "%q: expected differential or absolute", c.Mode)
		}
		switch c.Role {
		case RolePrime, RoleAbsolute, RoleMixInput, RoleLandmark, RoleAuxiliary:
		default:
			return bad(at+".role", "%q: expected prime, absolute, mix-input, landmark or auxiliary", c.Role)
		}
	}
	if len(p.ChannelsWithRole(RolePrime)) != 1 {
		return bad("channels", "expected exactly one channel with role prime, found %d", len(p.ChannelsWithRole(RolePrime)))
	}
	isChannel := func(n string) bool { return names[n] == "channel" }
	for i, m := range p.Mixes {
		at := fmt.Sprintf("mixes[%d]", i)
		if m.Name == "" {
			return bad(at+".name", "missing")
		}
		if _, dup := names[m.Name]; dup {
			return bad(at+".name", "%q: already used by a channel or mix", m.Name)
		}
		if !isChannel(m.Primary) {
			return bad(at+".primary", "%q: not a channel of the procedure", m.Primary)
		}
		if len(m.Inputs) == 0 || len(m.Inputs) > 2 {
			return bad(at+".inputs", "%d inputs: a mix takes one or two inputs besides the primary", len(m.Inputs))
		}
		for k, in := range m.Inputs {
			if !isChannel(in) || in == m.Primary {
				return bad(fmt.Sprintf("%s.inputs[%d]", at, k), "%q: expected a channel of the procedure other than the primary", in)
			}
		}
		if m.Form != "affine" && m.Form != "rotate-scale" {
			return bad(at+".form", "%q: expected affine or rotate-scale", m.Form)
		}
		if len(m.TrainingFlaws) == 0 {
			return bad(at+".training_flaws", "empty: name the standard flaws (e.g. the support ring) the mix is trained on")
		}
		if !pos(m.WindowM) {
			return bad(at+".window_m", "%v: expected a positive window length in metres", m.WindowM)
		}
		if !finite(m.ResidueWindowM) || m.ResidueWindowM < 0 {
			return bad(at+".residue_window_m", "%v: expected 0 (none) or a positive length in metres", m.ResidueWindowM)
		}
		names[m.Name] = "mix"
	}
	known := func(n string) bool { _, ok := names[n]; return ok }
	if !isChannel(p.Locate.Channel) {
		return bad("locate.channel", "%q: not a channel of the procedure", p.Locate.Channel)
	}
	if !pos(p.Locate.WindowM) {
		return bad("locate.window_m", "%v: expected a positive length in metres", p.Locate.WindowM)
	}
	if !pos(p.Locate.ToleranceM) {
		return bad("locate.tolerance_m", "%v: expected a positive length in metres", p.Locate.ToleranceM)
	}
	if !finite(p.Locate.MinFraction) || p.Locate.MinFraction <= 0 || p.Locate.MinFraction >= 1 {
		return bad("locate.min_fraction", "%v: expected a fraction between 0 and 1", p.Locate.MinFraction)
	}
	if len(p.Setups) == 0 {
		return bad("setups", "empty: at least the prime channel needs a set-up")
	}
	setups := map[string]bool{}
	for i, s := range p.Setups {
		at := fmt.Sprintf("setups[%d]", i)
		if !known(s.Channel) {
			return bad(at+".channel", "%q: not a channel or mix of the procedure", s.Channel)
		}
		if setups[s.Channel] {
			return bad(at+".channel", "%q: a second set-up for the same channel", s.Channel)
		}
		setups[s.Channel] = true
		if s.Rotation.Reference == "" {
			return bad(at+".rotation.reference", "missing: name the standard flaw the rotation is set on")
		}
		if !finite(s.Rotation.AngleDeg) || s.Rotation.AngleDeg < -360 || s.Rotation.AngleDeg > 360 {
			return bad(at+".rotation.angle_deg", "%v: expected an angle from -360 to 360 degrees", s.Rotation.AngleDeg)
		}
		if s.Normalisation.Reference == "" {
			return bad(at+".normalisation.reference", "missing: name the standard flaw the gain is set on")
		}
		if !pos(s.Normalisation.Vpp) {
			return bad(at+".normalisation.vpp", "%v: expected a positive voltage", s.Normalisation.Vpp)
		}
		curves := map[string]bool{}
		for k, c := range s.Curves {
			cat := fmt.Sprintf("%s.curves[%d]", at, k)
			if c.Name == "" {
				return bad(cat+".name", "missing")
			}
			if curves[c.Name] {
				return bad(cat+".name", "%q: duplicate curve name on this channel", c.Name)
			}
			curves[c.Name] = true
			if err := c.check(); err != nil {
				return bad(cat, "%v", err)
			}
		}
		if s.Liftoff != nil {
			if s.Liftoff.Reference == "" {
				return bad(at+".liftoff.reference", "missing: name a standard flaw, scan-start or scan-end")
			}
			if !pos(s.Liftoff.WindowM) {
				return bad(at+".liftoff.window_m", "%v: expected a positive length in metres", s.Liftoff.WindowM)
			}
		}
		if s.SizingCurve != "" && !curves[s.SizingCurve] {
			return bad(at+".sizing_curve", "%q: not one of this set-up's curves", s.SizingCurve)
		}
	}
	if p.Setup(p.ChannelsWithRole(RolePrime)[0]) == nil {
		return bad("setups", "the prime channel %q has no set-up", p.ChannelsWithRole(RolePrime)[0])
	}
	if len(p.Detection) == 0 {
		return bad("detection", "empty: at least the prime channel needs a detection threshold")
	}
	for i, d := range p.Detection {
		at := fmt.Sprintf("detection[%d]", i)
		if !setups[d.Channel] {
			return bad(at+".channel", "%q: detection needs a channel or mix with a set-up (thresholds are in calibrated volts)", d.Channel)
		}
		if !pos(d.ThresholdVpp) {
			return bad(at+".threshold_vpp", "%v: expected a positive voltage", d.ThresholdVpp)
		}
		if !pos(d.WindowM) {
			return bad(at+".window_m", "%v: expected a positive length in metres", d.WindowM)
		}
		switch d.Zone {
		case "", ZoneAll, ZoneLandmarks, ZoneFreeSpan:
		default:
			return bad(at+".zone", "%q: expected all, landmarks or free-span", d.Zone)
		}
	}
	for i, a := range p.Alarms {
		at := fmt.Sprintf("alarms[%d]", i)
		if a.Name == "" {
			return bad(at+".name", "missing")
		}
		if !setups[a.Channel] {
			return bad(at+".channel", "%q: an alarm region needs a channel or mix with a set-up", a.Channel)
		}
		for _, v := range []float64{a.MinPhaseDeg, a.MaxPhaseDeg, a.MinVpp, a.MaxVpp, a.XMinV, a.XMaxV, a.YMinV, a.YMaxV} {
			if !finite(v) {
				return bad(at, "non-finite limit %v", v)
			}
		}
		switch a.Kind {
		case AlarmSector:
			if !(a.MinVpp > 0) {
				return bad(at+".min_vpp", "%v: a sector needs a positive minimum Vpp", a.MinVpp)
			}
			if a.MaxVpp != 0 && a.MaxVpp <= a.MinVpp {
				return bad(at+".max_vpp", "%v: expected 0 (no limit) or more than min_vpp %v", a.MaxVpp, a.MinVpp)
			}
		case AlarmBox:
			if a.XMaxV <= a.XMinV || a.YMaxV <= a.YMinV {
				return bad(at, "box [%v, %v] × [%v, %v] V: expected x_min < x_max and y_min < y_max", a.XMinV, a.XMaxV, a.YMinV, a.YMaxV)
			}
			if a.XMinV <= 0 && a.XMaxV >= 0 && a.YMinV <= 0 && a.YMaxV >= 0 {
				return bad(at, "box contains the origin, so every window would trip it")
			}
		default:
			return bad(at+".kind", "%q: expected sector or box", a.Kind)
		}
	}
	lm := p.Landmarks
	if !isChannel(lm.Channel) {
		return bad("landmarks.channel", "%q: not a channel of the procedure", lm.Channel)
	}
	if lm.Reference == "" {
		return bad("landmarks.reference", "missing: name the standard flaw (support ring) that scales landmark signals")
	}
	if !finite(lm.Fraction) || lm.Fraction <= 0 || lm.Fraction > 1 {
		return bad("landmarks.fraction", "%v: expected a fraction in (0, 1]", lm.Fraction)
	}
	for _, f := range []struct {
		n string
		v float64
	}{{"window_m", lm.WindowM}, {"min_spacing_m", lm.MinSpacingM}, {"extended_m", lm.ExtendedM}} {
		if !pos(f.v) {
			return bad("landmarks."+f.n, "%v: expected a positive length in metres", f.v)
		}
	}
	c := p.Classification
	switch {
	case !finite(c.SupportZoneM) || c.SupportZoneM < 0:
		return bad("classification.support_zone_m", "%v: expected a non-negative length in metres", c.SupportZoneM)
	case !finite(c.FlawPhaseDeg[0]) || !finite(c.FlawPhaseDeg[1]) || c.FlawPhaseDeg[0] >= c.FlawPhaseDeg[1]:
		return bad("classification.flaw_phase_deg", "%v: expected [low, high] degrees with low < high", c.FlawPhaseDeg)
	case !finite(c.GeometryBandDeg) || c.GeometryBandDeg < 0 || c.GeometryBandDeg >= 90:
		return bad("classification.geometry_band_deg", "%v: expected 0 to 90 degrees", c.GeometryBandDeg)
	case !finite(c.GeometryMinVpp) || c.GeometryMinVpp < 0:
		return bad("classification.geometry_min_vpp", "%v: expected a non-negative voltage", c.GeometryMinVpp)
	case !finite(c.GeometryMaxCross) || c.GeometryMaxCross <= 0 || c.GeometryMaxCross > 1:
		return bad("classification.geometry_max_cross", "%v: expected a fraction in (0, 1]", c.GeometryMaxCross)
	case !finite(c.ResidueMaxVpp) || c.ResidueMaxVpp < 0:
		return bad("classification.residue_max_vpp", "%v: expected a non-negative voltage", c.ResidueMaxVpp)
	case !finite(c.ZonePhaseMarginDeg) || c.ZonePhaseMarginDeg < 0 || c.ZonePhaseMarginDeg >= 90:
		return bad("classification.zone_phase_margin_deg", "%v: expected 0 (no zone band) to 90 degrees", c.ZonePhaseMarginDeg)
	case !finite(c.ZoneMinSNR) || c.ZoneMinSNR < 0 || c.ZoneMinSNR > c.MinSNR:
		return bad("classification.zone_min_snr", "%v: expected 0 (no zone rule) up to min_snr %v", c.ZoneMinSNR, c.MinSNR)
	case !finite(c.DepositRatio) || c.DepositRatio <= 0:
		return bad("classification.deposit_ratio", "%v: expected a positive ratio", c.DepositRatio)
	case !finite(c.MinSNR) || c.MinSNR < 0:
		return bad("classification.min_snr", "%v: expected a non-negative ratio", c.MinSNR)
	case !pos(c.NoiseWindowM):
		return bad("classification.noise_window_m", "%v: expected a positive length in metres", c.NoiseWindowM)
	}
	if !finite(p.ReportingPct) || p.ReportingPct < 0 || p.ReportingPct > 100 {
		return bad("reporting_threshold_pct", "%v: expected 0 to 100 %%TW", p.ReportingPct)
	}
	ck := p.Check
	switch {
	case !pos(ck.PhaseTolDeg) || ck.PhaseTolDeg > 180:
		return bad("check.phase_tol_deg", "%v: expected a positive tolerance up to 180 degrees", ck.PhaseTolDeg)
	case !pos(ck.AmplitudeTolPct):
		return bad("check.amplitude_tol_pct", "%v: expected a positive tolerance in percent", ck.AmplitudeTolPct)
	case !finite(ck.MaxElapsedS) || ck.MaxElapsedS < 0:
		return bad("check.max_elapsed_s", "%v: expected a non-negative time in seconds (0: 4 h)", ck.MaxElapsedS)
	}
	for i, c := range ck.Channels {
		if !setups[c] {
			return bad(fmt.Sprintf("check.channels[%d]", i), "%q: not a channel or mix with a set-up", c)
		}
	}
	if p.Conductivity != nil {
		if err := p.Conductivity.validate(); err != nil {
			return bad("conductivity", "%v", err)
		}
	}
	return nil
}

// check reports a problem with a curve specification.
func (c CurveSpec) check() error {
	switch c.Variable {
	case VarPhase, VarAmplitude, VarPhaseAmplitude:
	default:
		return fmt.Errorf("variable %q: expected phase, amplitude or phase+amplitude", c.Variable)
	}
	switch c.Type {
	case CurvePiecewiseLinear, CurveMonotoneCubic:
		if c.Variable == VarPhaseAmplitude {
			return fmt.Errorf("type %q: a phase+amplitude curve must be a polynomial", c.Type)
		}
		if c.Order != 0 {
			return fmt.Errorf("order %d: only polynomial curves take an order", c.Order)
		}
		if len(c.Flaws) < 2 {
			return fmt.Errorf("flaws: %d given, an interpolating curve needs at least 2", len(c.Flaws))
		}
	case CurvePolynomial:
		if c.Order < 1 || c.Order > 5 {
			return fmt.Errorf("order %d: expected 1 to 5", c.Order)
		}
		need := c.Order + 1
		if c.Variable == VarPhaseAmplitude {
			need++
		}
		if len(c.Flaws) < need {
			return fmt.Errorf("flaws: %d given, a polynomial of order %d on %s needs at least %d", len(c.Flaws), c.Order, c.Variable, need)
		}
	default:
		return fmt.Errorf("type %q: expected piecewise-linear, monotone-cubic or polynomial", c.Type)
	}
	seen := map[string]bool{}
	for _, f := range c.Flaws {
		if f == "" || seen[f] {
			return fmt.Errorf("flaws: %q empty or repeated", f)
		}
		seen[f] = true
	}
	return nil
}

// lobeOffsetRad returns the angle added to a chord phase for the
// procedure's lobe convention.
func (p *Procedure) lobeOffsetRad() float64 {
	if p.Lobe == LobeEarlier {
		return math.Pi
	}
	return 0
}

// CheckStandard reports flaws the procedure names that the standard lacks.
func (p *Procedure) CheckStandard(s *Standard) error {
	need := func(field, id string) error {
		if s.Flaw(id) == nil {
			return fmt.Errorf("procedure %s %s: flaw %q is not on standard %s", p.ID, field, id, s.Serial)
		}
		return nil
	}
	for i, m := range p.Mixes {
		for _, f := range m.TrainingFlaws {
			if err := need(fmt.Sprintf("mixes[%d].training_flaws", i), f); err != nil {
				return err
			}
		}
	}
	for i, su := range p.Setups {
		if err := need(fmt.Sprintf("setups[%d].rotation.reference", i), su.Rotation.Reference); err != nil {
			return err
		}
		if err := need(fmt.Sprintf("setups[%d].normalisation.reference", i), su.Normalisation.Reference); err != nil {
			return err
		}
		if lo := su.Liftoff; lo != nil && lo.Reference != LiftoffScanStart && lo.Reference != LiftoffScanEnd {
			if err := need(fmt.Sprintf("setups[%d].liftoff.reference", i), lo.Reference); err != nil {
				return err
			}
		}
		for k, c := range su.Curves {
			for _, f := range c.Flaws {
				if err := need(fmt.Sprintf("setups[%d].curves[%d].flaws", i, k), f); err != nil {
					return err
				}
			}
		}
	}
	if err := need("landmarks.reference", p.Landmarks.Reference); err != nil {
		return err
	}
	for _, f := range p.Check.References {
		if err := need("check.references", f); err != nil {
			return err
		}
	}
	return nil
}
