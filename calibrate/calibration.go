package calibrate

import (
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"time"
)

// Calibration statuses.
const (
	StatusDraft    = "draft"
	StatusApproved = "approved"
)

// RoleLevel3 is the only role that may approve a calibration.
const RoleLevel3 = "level3"

// ErrNotPermitted is returned when a person's role or relation to a
// calibration does not allow the action.
var ErrNotPermitted = errors.New("not permitted")

// Calibration is the result of calibrating on a reference-standard scan:
// where each flaw was found, the set-up of every analysed channel and mix
// (rotation, gain), the trained mixes and the depth curves, with the
// identity of the standard, procedure, builder and approver. It is the file
// `whorl calibrate` writes (JSON).
//
// Hash is the SHA-256 of the calibration's canonical JSON with Hash empty
// (see ComputeHash); it changes with every version.
type Calibration struct {
	ID       string `json:"id"`
	Version  int    `json:"version"`
	Hash     string `json:"hash"`
	Status   string `json:"status"`
	Builder  string `json:"builder"`
	BuiltAt  string `json:"built_at"` // RFC 3339
	Approver string `json:"approver,omitempty"`
	// ApproverRole and ApprovedAt are set with Approver.
	ApproverRole string `json:"approver_role,omitempty"`
	ApprovedAt   string `json:"approved_at,omitempty"`
	// History lists the earlier versions of this calibration, oldest first.
	History []VersionEntry `json:"history,omitempty"`

	StandardSerial    string         `json:"standard_serial"`
	AsBuilt           []AsBuiltDepth `json:"as_built"`
	ProcedureID       string         `json:"procedure_id"`
	ProcedureRevision string         `json:"procedure_revision"`
	CodeEdition       string         `json:"code_edition"`
	// Scan identifies the standard scan: its component name and start time.
	ScanComponent string `json:"scan_component"`
	ScanStart     string `json:"scan_start,omitempty"` // RFC 3339; empty when unknown
	ProbeID       string `json:"probe_id,omitempty"`
	// Group is the calibration group of the standard scan (its
	// Meta.CalGroup); scans of the same group are analysed with it.
	Group string `json:"group,omitempty"`
	// OpeningID names the opening calibration whose mixes a closing
	// calibration reused (empty for an opening calibration).
	OpeningID string `json:"opening_id,omitempty"`
	// Lobe is the procedure's lobe convention the phases were measured with.
	Lobe string `json:"lobe"`

	Located  []LocatedFlaw `json:"located"`
	Extra    []ExtraSignal `json:"extra_signals,omitempty"`
	Mixes    []MixRecord   `json:"mixes,omitempty"`
	Channels []ChannelCal  `json:"channels"`
	// LandmarkThresholdV is the landmark detection threshold in raw volts
	// on the landmark channel (procedure fraction × the reference's Vpp).
	LandmarkChannel    string   `json:"landmark_channel"`
	LandmarkThresholdV float64  `json:"landmark_threshold_v"`
	Warnings           []string `json:"warnings,omitempty"`
}

// VersionEntry records one earlier version of a calibration.
type VersionEntry struct {
	Version int    `json:"version"`
	Hash    string `json:"hash"`
	Status  string `json:"status"`
}

// AsBuiltDepth is the as-built depth of one standard flaw used by a calibration.
type AsBuiltDepth struct {
	FlawID   string  `json:"flaw_id"`
	DepthPct float64 `json:"depth_pct"`
}

// LocatedFlaw says where a standard flaw's signal was found on the scan.
type LocatedFlaw struct {
	FlawID    string  `json:"flaw_id"`
	ExpectedM float64 `json:"expected_m"` // on the standard
	Found     bool    `json:"found"`
	PositionM float64 `json:"position_m,omitempty"` // on the scan
	Sample    int     `json:"sample,omitempty"`
	// Window is the measurement window [start, end) in samples.
	Window [2]int `json:"window"`
	// Note explains a flaw that was not found.
	Note string `json:"note,omitempty"`
}

// ExtraSignal is a signal on the standard scan that matches no flaw.
type ExtraSignal struct {
	PositionM float64 `json:"position_m"`
	Sample    int     `json:"sample"`
	Vpp       float64 `json:"vpp"`
}

// FlawMeasurement is one standard flaw measured on one channel: raw
// (as recorded) and calibrated.
type FlawMeasurement struct {
	FlawID          string  `json:"flaw_id"`
	RawVpp          float64 `json:"raw_vpp"`
	RawPhaseDeg     float64 `json:"raw_phase_deg"`
	Vpp             float64 `json:"vpp"`
	PhaseDeg        float64 `json:"phase_deg"`
	MaxRatePhaseDeg float64 `json:"max_rate_phase_deg"`
	Window          [2]int  `json:"window"`
}

// ChannelCal is the set-up of one analysed channel or mix: calibrated
// samples are Gain·e^{j·RotationDeg}·raw (rotation anticlockwise), the
// reference measurements that set them, the flaws measured, and the
// fitted curves.
type ChannelCal struct {
	Channel     string  `json:"channel"`
	Mode        string  `json:"mode"` // differential or absolute (mixes: differential)
	RotationDeg float64 `json:"rotation_deg"`
	Gain        float64 `json:"gain"`
	// RotationRef and NormRef repeat the procedure's rule.
	RotationRef RotationRule `json:"rotation_ref"`
	NormRef     NormRule     `json:"norm_ref"`
	// RefPhaseDeg and RefVpp are the references re-measured on the
	// calibrated samples (the set-up check).
	RefPhaseDeg  float64           `json:"ref_phase_deg"`
	RefVpp       float64           `json:"ref_vpp"`
	Measurements []FlawMeasurement `json:"measurements"`
	Curves       []*Curve          `json:"curves,omitempty"`
	SizingCurve  string            `json:"sizing_curve,omitempty"`
	// LiftoffDeg is the measured lift-off axis of the calibrated channel
	// in [0, 180) degrees (0, the horizontal, when the procedure names no
	// lift-off reference); LiftoffWindow is where it was measured.
	LiftoffDeg    float64 `json:"liftoff_deg"`
	LiftoffWindow [2]int  `json:"liftoff_window,omitempty"`
}

// Factor returns the complex factor Gain·e^{j·RotationDeg} that turns raw
// samples into calibrated ones.
func (c *ChannelCal) Factor() complex128 {
	return complex(c.Gain, 0) * cmplx.Rect(1, c.RotationDeg*math.Pi/180)
}

// Curve returns the named curve, or nil.
func (c *ChannelCal) Curve(name string) *Curve {
	for _, cv := range c.Curves {
		if cv.Name == name {
			return cv
		}
	}
	return nil
}

// Measurement returns the measurement of the named flaw, or nil.
func (c *ChannelCal) Measurement(flawID string) *FlawMeasurement {
	for i := range c.Measurements {
		if c.Measurements[i].FlawID == flawID {
			return &c.Measurements[i]
		}
	}
	return nil
}

// Channel returns the set-up of the named channel or mix, or nil.
func (c *Calibration) Channel(name string) *ChannelCal {
	for i := range c.Channels {
		if c.Channels[i].Channel == name {
			return &c.Channels[i]
		}
	}
	return nil
}

// Mix returns the named trained mix, or nil.
func (c *Calibration) Mix(name string) *MixRecord {
	for i := range c.Mixes {
		if c.Mixes[i].Name == name {
			return &c.Mixes[i]
		}
	}
	return nil
}

// LocatedFlaw returns the location record of the named flaw, or nil.
func (c *Calibration) LocatedFlaw(id string) *LocatedFlaw {
	for i := range c.Located {
		if c.Located[i].FlawID == id {
			return &c.Located[i]
		}
	}
	return nil
}

// ComputeHash returns the SHA-256 (hex) of c's canonical JSON: the
// encoding/json encoding of c with Hash empty (struct fields in declaration
// order, no indentation), which is deterministic for a given content.
func (c *Calibration) ComputeHash() (string, error) {
	cp := *c
	cp.Hash = ""
	b, err := json.Marshal(&cp)
	if err != nil {
		return "", fmt.Errorf("calibration %s: hash: %w", c.ID, err)
	}
	sum := sha256.Sum256(b)
	return hex.EncodeToString(sum[:]), nil
}

// Seal sets c.Hash from its content.
func (c *Calibration) Seal() error {
	h, err := c.ComputeHash()
	if err != nil {
		return err
	}
	c.Hash = h
	return nil
}

// Verify reports whether c.Hash matches its content.
func (c *Calibration) Verify() error {
	h, err := c.ComputeHash()
	if err != nil {
		return err
	}
	if h != c.Hash {
		return fmt.Errorf("calibration %s version %d: content hash %s does not match the recorded %s: the file was changed after it was written", c.ID, c.Version, h, c.Hash)
	}
	return nil
}

// Approve records person's approval of c in role at time at: it keeps the
// current version in History, increments Version, sets the status to
// approved and re-seals the hash. Only RoleLevel3 may approve, and never
// the calibration's own builder; both refusals wrap ErrNotPermitted. An
// already approved calibration cannot be approved again.
func (c *Calibration) Approve(person, role string, at time.Time) error {
	switch {
	case person == "":
		return fmt.Errorf("calibration %s: approval needs the approver's name", c.ID)
	case role != RoleLevel3:
		return fmt.Errorf("calibration %s: role %q may not approve a calibration, only %s: %w", c.ID, role, RoleLevel3, ErrNotPermitted)
	case person == c.Builder:
		return fmt.Errorf("calibration %s: %s built it and may not approve it: %w", c.ID, person, ErrNotPermitted)
	case c.Status == StatusApproved:
		return fmt.Errorf("calibration %s version %d is already approved by %s", c.ID, c.Version, c.Approver)
	}
	if c.Hash == "" {
		if err := c.Seal(); err != nil {
			return err
		}
	}
	c.History = append(c.History, VersionEntry{Version: c.Version, Hash: c.Hash, Status: c.Status})
	c.Version++
	c.Status = StatusApproved
	c.Approver = person
	c.ApproverRole = role
	c.ApprovedAt = at.UTC().Format(time.RFC3339)
	return c.Seal()
}

// ParseCalibration decodes a calibration file and verifies its hash.
func ParseCalibration(name string, data []byte) (*Calibration, error) {
	var c Calibration
	if err := decodeStrict(name, data, &c); err != nil {
		return nil, err
	}
	switch {
	case c.ID == "":
		return nil, fieldErr(name, "id", "missing")
	case c.Status != StatusDraft && c.Status != StatusApproved:
		return nil, fieldErr(name, "status", "%q: expected draft or approved", c.Status)
	case len(c.Channels) == 0:
		return nil, fieldErr(name, "channels", "empty: a calibration needs at least one channel set-up")
	}
	for i, ch := range c.Channels {
		if !pos(ch.Gain) || !finite(ch.RotationDeg) {
			return nil, fieldErr(name, fmt.Sprintf("channels[%d] (%s)", i, ch.Channel), "gain %v, rotation %v°: expected a positive gain and a finite rotation", ch.Gain, ch.RotationDeg)
		}
		for k, cv := range ch.Curves {
			if cv == nil || !cv.valid() {
				return nil, fieldErr(name, fmt.Sprintf("channels[%d] (%s).curves[%d]", i, ch.Channel, k), "malformed curve")
			}
		}
	}
	if err := c.Verify(); err != nil {
		return nil, &FileError{File: name, Field: "hash", Err: err}
	}
	return &c, nil
}

// valid reports whether a decoded curve can be evaluated.
func (c *Curve) valid() bool {
	if !finite(c.XMin) || !finite(c.XMax) || c.XMin > c.XMax {
		return false
	}
	switch c.Type {
	case CurvePiecewiseLinear, CurveMonotoneCubic:
		if len(c.Xs) < 2 || len(c.Ys) != len(c.Xs) || c.Coefficients != nil {
			return false
		}
		if c.Type == CurveMonotoneCubic && len(c.Slopes) != len(c.Xs) {
			return false
		}
		for i := 1; i < len(c.Xs); i++ {
			if !(c.Xs[i] > c.Xs[i-1]) {
				return false
			}
		}
	case CurvePolynomial:
		want := c.Order + 1
		if c.Variable == VarPhaseAmplitude {
			want++
		}
		if c.Order < 1 || c.Order > 5 || len(c.Coefficients) != want || !(c.Scale > 0) {
			return false
		}
	default:
		return false
	}
	return c.Variable == VarPhase || c.Variable == VarAmplitude || c.Variable == VarPhaseAmplitude
}

// LoadCalibration reads a calibration file and verifies its hash.
func LoadCalibration(path string) (*Calibration, error) {
	b, err := readFile(path)
	if err != nil {
		return nil, err
	}
	return ParseCalibration(path, b)
}

// SaveCalibration seals c and writes it to path as indented JSON.
func SaveCalibration(path string, c *Calibration) error {
	if err := c.Seal(); err != nil {
		return err
	}
	return writeFileJSON(path, c)
}
