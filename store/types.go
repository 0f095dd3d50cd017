package store

import (
	"encoding/json"
	"fmt"
	"time"
)

// Role is the declared role of a person at a workstation.
type Role string

// Roles. The permissions of each are listed in docs/records.md.
const (
	RoleLevel1 Role = "level1" // acquisition: imports data, enters the tube map and progress
	RoleLevel2 Role = "level2" // analyst: analyses, proposes calls, builds calibrations
	RoleLevel3 Role = "level3" // approves calibrations, resolves calls, manages people
	RoleQA     Role = "qa"     // records: releases reports, manages people and standards
)

// Roles lists every role in a fixed order.
var Roles = []Role{RoleLevel1, RoleLevel2, RoleLevel3, RoleQA}

// ParseRole returns the role named s ("level1", "level2", "level3", "qa").
func ParseRole(s string) (Role, error) {
	for _, r := range Roles {
		if string(r) == s {
			return r, nil
		}
	}
	return "", fmt.Errorf("unknown role %q: want one of level1, level2, level3, qa", s)
}

// certified reports whether the role requires an in-date NDT certificate.
func (r Role) certified() bool { return r == RoleLevel1 || r == RoleLevel2 || r == RoleLevel3 }

// Actor is the person acting at a workstation, as declared there.
type Actor struct {
	Name string `json:"name"`
	Role Role   `json:"role"`
}

// Person is a registered person. A person is registered again (a new
// version) when their role or certificate changes; the newest version
// counts.
type Person struct {
	Name      string `json:"name"`
	Role      Role   `json:"role"`
	CertLevel string `json:"cert_level"` // free text, e.g. "ET Level II (employer scheme)"
	// CertExpiry is the last day (YYYY-MM-DD, UTC) the certificate is
	// valid. Required for level1, level2 and level3; optional for qa.
	CertExpiry string    `json:"cert_expiry,omitempty"`
	Version    int       `json:"version"`     // set by the store
	At         time.Time `json:"recorded_at"` // set by the store
	By         string    `json:"recorded_by"` // set by the store
}

// Inspection identifies the inspection the record belongs to.
type Inspection struct {
	ID              string `json:"id"`
	Site            string `json:"site"`
	Component       string `json:"component"` // the examined equipment, e.g. a heat exchanger
	Procedure       string `json:"procedure"`
	ProcedureRev    string `json:"procedure_rev"`
	CodeEdition     string `json:"code_edition"`
	Equipment       string `json:"equipment"` // instrument and serial
	Probe           string `json:"probe"`     // probe type, size and serial
	ReferenceSerial string `json:"reference_serial"`
	// Software and SoftwareVersion are set by Create from internal/version.
	Software        string    `json:"software"`
	SoftwareVersion string    `json:"software_version"`
	Created         time.Time `json:"created"`
	CreatedBy       string    `json:"created_by"`
}

// ComponentStatus is the examination status of a tube or other component.
type ComponentStatus string

// Component statuses.
const (
	StatusPending      ComponentStatus = "pending"       // registered, nothing recorded yet
	StatusExamined     ComponentStatus = "examined"      // analysis recorded
	StatusNotExamined  ComponentStatus = "not-examined"  // with a reason (restriction, plugged, ...)
	StatusInvalidGroup ComponentStatus = "invalid-group" // its calibration group failed a check: re-test
)

// Component is one tube (identified by row and column) or other examined
// item. Row and Column are 0 when the item is not identified that way.
type Component struct {
	ID     string `json:"id"`
	Row    int    `json:"row,omitempty"`
	Column int    `json:"column,omitempty"`
	Label  string `json:"label,omitempty"`
	// Status, Reason, StatusAt and StatusBy are the newest status; set by
	// the store in query results.
	Status   ComponentStatus `json:"status"`
	Reason   string          `json:"reason,omitempty"`
	StatusAt time.Time       `json:"status_at,omitzero"`
	StatusBy string          `json:"status_by,omitempty"`
	scanID   string          // scan of the newest status, if any
}

// Scan is a raw acquisition file. The store keeps its path, size and
// SHA-256; it never opens the file for writing.
type Scan struct {
	ID        string    `json:"id"`
	Component string    `json:"component"`
	Path      string    `json:"path"`
	SizeBytes int64     `json:"size_bytes"`
	SHA256    string    `json:"sha256"` // lower-case hex
	CalGroup  string    `json:"cal_group"`
	At        time.Time `json:"recorded_at"`
	By        string    `json:"recorded_by"`
}

// Document is a JSON body kept verbatim with its SHA-256: a processing
// chain (ID) or a reference standard (ID is its serial).
type Document struct {
	ID     string          `json:"id"`
	Body   json.RawMessage `json:"body"`
	SHA256 string          `json:"sha256"` // of Body as stored (compacted JSON); set by the store
	At     time.Time       `json:"recorded_at"`
	By     string          `json:"recorded_by"`
}

// CalStatus is the approval state of a calibration version.
type CalStatus string

// Calibration states.
const (
	CalProposed CalStatus = "proposed"
	CalApproved CalStatus = "approved"
)

// Calibration is one version of a calibration (curve, set-up). Body is
// the calibration as JSON, kept verbatim; the store assigns versions
// 1, 2, ... per ID.
type Calibration struct {
	ID       string          `json:"id"`
	Version  int             `json:"version"`
	Body     json.RawMessage `json:"body"`
	SHA256   string          `json:"sha256"`             // of Body as stored; set by the store
	Standard string          `json:"standard,omitempty"` // reference-standard serial, registered first
	Note     string          `json:"note,omitempty"`
	Builder  string          `json:"builder"`
	Built    time.Time       `json:"built"`
	Status   CalStatus       `json:"status"`
	Approver string          `json:"approver,omitempty"`
	Approved time.Time       `json:"approved,omitzero"`
}

// RefCheck is one measured quantity of a calibration check on a reference
// indication, e.g. the phase of the 40 % flat-bottom hole.
type RefCheck struct {
	Reference string  `json:"reference"` // flaw on the standard, e.g. "FBH-40"
	Quantity  string  `json:"quantity"`  // e.g. "phase", "vpp"
	Unit      string  `json:"unit"`      // unit of Expected, Measured and Tolerance, e.g. "deg", "V"
	Expected  float64 `json:"expected"`
	Measured  float64 `json:"measured"`
	Tolerance float64 `json:"tolerance"`
	Pass      bool    `json:"pass"`
}

// GroupCheck is the result of a calibration check closing (or opening) a
// calibration group. When Valid is false the store sets every component
// whose scans belong to the group to [StatusInvalidGroup] and lists them
// in Retest.
type GroupCheck struct {
	Group              string     `json:"group"`
	Check              int        `json:"check"` // 1, 2, ... per group; set by the store
	CalibrationID      string     `json:"calibration_id"`
	CalibrationVersion int        `json:"calibration_version"`
	Valid              bool       `json:"valid"`
	Checks             []RefCheck `json:"checks"`
	Retest             []string   `json:"retest"` // set by the store
	Reason             string     `json:"reason,omitempty"`
	At                 time.Time  `json:"recorded_at"`
	By                 string     `json:"recorded_by"`
}

// CallStatus is the state of the call on an indication.
type CallStatus string

// Call states.
const (
	CallProposed CallStatus = "proposed"
	CallAccepted CallStatus = "accepted"
	CallRejected CallStatus = "rejected"
)

// Source tells who made an indication's first call.
type Source string

// Indication sources.
const (
	SourceAuto    Source = "auto"    // automatic detection, recorded by the analyst who ran it
	SourceAnalyst Source = "analyst" // marked by an analyst
)

// Indication is one measured indication: the measurement (immutable once
// recorded) and the current call on it.
type Indication struct {
	ID           string   `json:"id"`              // set by the store: "<scan>/<n>"
	ScanID       string   `json:"scan"`            // the scan it was measured on
	Component    string   `json:"component"`       // set by the store from the scan
	Channel      string   `json:"channel"`         // channel or mix name
	StartSample  int      `json:"start_sample"`    // measurement window, inclusive
	EndSample    int      `json:"end_sample"`      // measurement window, exclusive
	AxialM       float64  `json:"axial_m"`         // axial position in the scan's position frame
	Location     string   `json:"location"`        // relative to a landmark, e.g. "TSP-3 +12.5 mm"
	VppV         float64  `json:"vpp_v"`           // peak-to-peak amplitude
	PhaseRad     float64  `json:"phase_rad"`       // signal phase
	DepthPct     *float64 `json:"depth_pct"`       // estimated depth %TW; nil when not sized
	Uncertainty  *float64 `json:"uncertainty_pct"` // depth uncertainty in %TW; nil when not stated
	Class        string   `json:"class"`           // indication class (our own codes)
	Method       string   `json:"method"`          // sizing method
	Source       Source   `json:"source"`
	CurveID      string   `json:"curve_id,omitempty"` // calibration used for sizing; recorded first
	CurveVersion int      `json:"curve_version,omitempty"`

	// The current call. In AddIndications input only Status (default
	// proposed) and Comment are read; the rest is set by the store.
	Status      CallStatus `json:"status"`
	Comment     string     `json:"comment,omitempty"`
	CallVersion int        `json:"call_version"`
	CalledBy    string     `json:"called_by"`
	CalledRole  Role       `json:"called_role"`
	CalledAt    time.Time  `json:"called_at"`
	Resolved    bool       `json:"resolved"`
}

// Decision is a call made on an indication.
type Decision struct {
	Status  CallStatus `json:"status"`
	Class   string     `json:"class,omitempty"` // new class; empty keeps the current one
	Comment string     `json:"comment,omitempty"`
}

// CallKind tells how a call version came about.
type CallKind string

// Call kinds.
const (
	KindInitial    CallKind = "initial"    // recorded with the indication
	KindCall       CallKind = "call"       // an analyst's call or amendment
	KindResolution CallKind = "resolution" // a Level III resolution
)

// Call is one version of the call on an indication.
type Call struct {
	Indication string     `json:"indication"`
	Version    int        `json:"version"`
	Kind       CallKind   `json:"kind"`
	Status     CallStatus `json:"status"`
	Class      string     `json:"class"`
	Comment    string     `json:"comment,omitempty"`
	Reason     string     `json:"reason,omitempty"`
	By         string     `json:"by"`
	Role       Role       `json:"role"`
	At         time.Time  `json:"at"`
}

// Release is a report released by QA. HeadSeq and HeadHash are the event
// chain head just before the release.
type Release struct {
	ReportID string    `json:"report_id"`
	HeadSeq  int64     `json:"head_seq"`
	HeadHash string    `json:"head_hash"`
	Note     string    `json:"note,omitempty"`
	At       time.Time `json:"released_at"`
	By       string    `json:"released_by"`
}

// Event is one entry of the append-only event log.
type Event struct {
	Seq      int64           `json:"seq"`
	At       time.Time       `json:"at"`
	Actor    string          `json:"actor"`
	Role     Role            `json:"role"`
	ItemKind string          `json:"item_kind"` // person, component, scan, calibration, ...
	ItemID   string          `json:"item_id"`
	Action   string          `json:"action"`
	Before   json.RawMessage `json:"before"` // null for a new item
	After    json.RawMessage `json:"after"`
	Reason   string          `json:"reason,omitempty"`
	Table    string          `json:"row_table"` // the row this event created
	Row      int64           `json:"row_seq"`
	RowHash  string          `json:"row_hash"`
	PrevHash string          `json:"prev_hash"`
	Hash     string          `json:"hash"`
}
