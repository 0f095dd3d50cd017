package viewmodel

import (
	"context"
	"errors"
	"fmt"
	"strings"
	"sync"

	"whorl/acquire"
)

// Role is the declared role of the person at the workstation.
type Role string

// Roles a person can declare.
const (
	Level1 Role = "level1"
	Level2 Role = "level2"
	Level3 Role = "level3"
	QA     Role = "qa"
)

// Roles lists the roles in the order the sign-in dialog offers them.
var Roles = []Role{Level1, Level2, Level3, QA}

// ParseRole reads a role name such as "level2" (any case, "l2" and "ii"
// accepted too).
func ParseRole(s string) (Role, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "level1", "l1", "i":
		return Level1, nil
	case "level2", "l2", "ii":
		return Level2, nil
	case "level3", "l3", "iii":
		return Level3, nil
	case "qa":
		return QA, nil
	}
	return "", fmt.Errorf("role %q: expected level1, level2, level3 or qa", s)
}

// Actor is the person at the workstation; every decision is recorded under
// this name and role.
type Actor struct {
	Name string
	Role Role
}

// Validate reports an empty name or an unknown role.
func (a Actor) Validate() error {
	if strings.TrimSpace(a.Name) == "" {
		return errors.New("no name given for the person at the workstation")
	}
	if _, err := ParseRole(string(a.Role)); err != nil {
		return err
	}
	return nil
}

// String returns "name (role)".
func (a Actor) String() string { return fmt.Sprintf("%s (%s)", a.Name, a.Role) }

// Status is the review state of one component.
type Status int

// Component states, in the order the status filter lists them.
const (
	NotAnalysed Status = iota
	Analysed
	WithIndications
	InvalidGroup
	Resolved
)

// Statuses lists every status.
var Statuses = []Status{NotAnalysed, Analysed, WithIndications, InvalidGroup, Resolved}

// String returns the status as shown in the component list.
func (s Status) String() string {
	switch s {
	case NotAnalysed:
		return "not yet analysed"
	case Analysed:
		return "analysed, no calls"
	case WithIndications:
		return "indications open"
	case InvalidGroup:
		return "calibration group invalid"
	case Resolved:
		return "resolved"
	}
	return fmt.Sprintf("Status(%d)", int(s))
}

// Component is one examined item (a tube) in the component list.
type Component struct {
	ID       string
	CalGroup string
	Status   Status
	// Calls is the number of indications recorded for the component.
	Calls int
	// MaxDepthPct is the deepest sized call in %TW, or NaN when none.
	MaxDepthPct float64
}

// Landmark is a structural feature (support plate, tube end, tubesheet)
// at a known axial position.
type Landmark struct {
	Name      string
	PositionM float64
}

// Tube is one component opened for review: its (calibrated) scan and its
// landmarks.
type Tube struct {
	ID   string
	Scan *acquire.Scan
	// Landmarks are sorted by position.
	Landmarks []Landmark
	// MeasureChannels names the channels (including mixes) measurements may
	// be taken on, prime channel first.
	MeasureChannels []string
	// VoltsCalibrated reports whether the samples are in calibrated volts
	// (rotation and gain of the approved set-up applied).
	VoltsCalibrated bool

	envMu     sync.Mutex
	envelopes map[string]*Envelope
}

// Envelope returns the block envelope of channel name, built on first use.
func (t *Tube) Envelope(name string) *Envelope {
	t.envMu.Lock()
	defer t.envMu.Unlock()
	if e, ok := t.envelopes[name]; ok {
		return e
	}
	ch := t.Scan.Channel(name)
	if ch == nil || len(ch.Samples) == 0 {
		return nil
	}
	if t.envelopes == nil {
		t.envelopes = map[string]*Envelope{}
	}
	e := NewEnvelope(ch.Samples)
	t.envelopes[name] = e
	return e
}

// Window is a half-open range [Lo, Hi) of sample indices.
type Window struct{ Lo, Hi int }

// Len returns Hi − Lo.
func (w Window) Len() int { return w.Hi - w.Lo }

// Measurement is what the analysis functions report for the samples of
// one channel inside an analysis window.
type Measurement struct {
	Channel string
	Window  Window
	// VppV is the peak-to-peak amplitude (longest chord) in volts.
	VppV float64
	// PhasePPDeg is the angle of the peak-to-peak chord in degrees.
	PhasePPDeg float64
	// PhaseMaxRateDeg is the maximum-rate phase in degrees.
	PhaseMaxRateDeg float64
	// DepthPct and DepthUncPct are the estimated depth and its uncertainty
	// in %TW from the active curve; DepthOK is false when no depth could be
	// given, with the reason in DepthNote (also used for range warnings).
	DepthPct, DepthUncPct float64
	DepthOK               bool
	DepthNote             string
	// Curve names the curve and its version that gave the depth.
	Curve string
	// PositionM is the axial position of the window centre in metres.
	PositionM float64
	// Landmark and OffsetM locate the window from the nearest landmark.
	Landmark string
	OffsetM  float64
	// SNR is the signal-to-noise ratio (amplitude ratio, not dB).
	SNR float64
	// ChordA and ChordB are the ends of the peak-to-peak chord in volts.
	ChordA, ChordB complex128
}

// CallState is the review state of one indication.
type CallState string

// Indication states.
const (
	Proposed CallState = "proposed"
	Accepted CallState = "accepted"
	Rejected CallState = "rejected"
)

// Call is one automatic or analyst indication of a component.
type Call struct {
	ID        string
	Component string
	// Origin is "auto" or "analyst".
	Origin    string
	Type      string
	Channel   string
	Window    Window
	PositionM float64
	Landmark  string
	OffsetM   float64
	VppV      float64
	PhaseDeg  float64
	DepthPct  float64
	DepthOK   bool
	State     CallState
	Comment   string
	// By is who made the latest decision (empty for untouched automatic calls).
	By string
}

// DecisionKind is what an analyst does to a call.
type DecisionKind int

// Decisions on a call.
const (
	Accept DecisionKind = iota + 1
	Reject
	Retype
	Comment
)

// String returns the decision name as written to the audit trail.
func (k DecisionKind) String() string {
	switch k {
	case Accept:
		return "accept"
	case Reject:
		return "reject"
	case Retype:
		return "change type"
	case Comment:
		return "comment"
	}
	return fmt.Sprintf("DecisionKind(%d)", int(k))
}

// Decision is one change to a call: the kind, the new type (Retype) and a
// comment or reason.
type Decision struct {
	Kind    DecisionKind
	Type    string
	Comment string
}

// AuditEvent is one entry of the record store's audit trail as shown to
// the user.
type AuditEvent struct {
	Seq     int64
	Actor   string
	Role    string
	Action  string
	Subject string
	Before  string
	After   string
	Reason  string
	At      string
}

// CurvePoint is one calibration point with the fitted value.
type CurvePoint struct {
	// X is the abscissa: phase in degrees or amplitude in volts.
	X        float64
	DepthPct float64
	// FitPct is the curve's depth at X; ResidualPct = DepthPct − FitPct.
	FitPct      float64
	ResidualPct float64
	Label       string
}

// Curve is a fitted depth curve of a calibration.
type Curve struct {
	Name string
	// XName and XUnit describe the abscissa ("phase", "°"; "amplitude", "V").
	XName, XUnit string
	Points       []CurvePoint
	// FitX and FitDepthPct sample the fitted curve for drawing.
	FitX, FitDepthPct []float64
	Warning           string
}

// LocatedFlaw is a reference-standard flaw found (or not) in the
// calibration scan.
type LocatedFlaw struct {
	FlawID    string
	Type      string
	DepthPct  float64
	PositionM float64
	Found     bool
	VppV      float64
	PhaseDeg  float64
	Window    Window
	Note      string
}

// Check is one calibration-group check result.
type Check struct {
	Name   string
	Pass   bool
	Detail string
}

// CalibrationSummary identifies one calibration in the inspection.
type CalibrationSummary struct {
	ID      string
	Group   string
	Version int
	// State is "draft", "approved" or "superseded".
	State      string
	ApprovedBy string
}

// StandardInfo identifies a reference standard.
type StandardInfo struct {
	Serial, Material, CertificateID string
}

// CalibrationDetail is one calibration with everything the calibration
// view shows.
type CalibrationDetail struct {
	CalibrationSummary
	// Standard identifies the reference standard: serial, material and
	// certificate.
	Standard StandardInfo
	Scan     *acquire.Scan
	Channel  string
	Located  []LocatedFlaw
	Curves   []Curve
	Checks   []Check
}

// Info describes the open inspection.
type Info struct {
	Title     string
	Path      string
	Procedure string
	// Demo is true for the generated demo inspection.
	Demo bool
}

// ErrNotPermitted is returned (wrapped) when the record store refuses an
// action for the declared role; the error text is the store's message.
var ErrNotPermitted = errors.New("not permitted for this role")

// Source is the open inspection as the workstation uses it. It is
// implemented over the inspection workflow; every method may be called from
// any goroutine.
type Source interface {
	Info() Info
	Actor() Actor
	Components(ctx context.Context) ([]Component, error)
	Tube(ctx context.Context, id string) (*Tube, error)
	// Measure measures the samples of channel inside w with the analysis
	// functions.
	Measure(ctx context.Context, t *Tube, channel string, w Window) (Measurement, error)
	Calls(ctx context.Context, component string) ([]Call, error)
	// Decide records a decision on a call with its audit event.
	Decide(ctx context.Context, callID string, d Decision) error
	// AddCall records an analyst call from a measurement.
	AddCall(ctx context.Context, component string, m Measurement, callType, comment string) (Call, error)
	// CallTypes lists the indication types an analyst may choose.
	CallTypes() []string
	// Events returns the audit events about one subject (a call id, a
	// calibration id), oldest first.
	Events(ctx context.Context, subject string) ([]AuditEvent, error)
	Calibrations(ctx context.Context) ([]CalibrationSummary, error)
	Calibration(ctx context.Context, id string) (*CalibrationDetail, error)
	// Approve approves a calibration; it fails with an error wrapping
	// ErrNotPermitted for roles that may not approve.
	Approve(ctx context.Context, id, reason string) error
	// Export writes the inspection report (PDF) and the indication and
	// full-record exports (CSV and JSON) into dir and returns the paths
	// written.
	Export(ctx context.Context, dir string) ([]string, error)
	Close() error
}
