package reports

import (
	"context"
	"encoding/json"
	"errors"
	"time"

	"whorl/store"
)

// Inspection is everything a report shows: the record of one inspection
// and, for figures, the signal around each reportable indication.
type Inspection struct {
	ReportID  string    `json:"report_id"`
	Draft     bool      `json:"draft"` // no QA release covers the record as it stands
	Generated time.Time `json:"generated"`

	Record       store.Inspection   `json:"inspection"`
	People       []store.Person     `json:"people"`
	Components   []store.Component  `json:"components"`
	Scans        []store.Scan       `json:"scans"`
	Chains       []store.Document   `json:"chains"`
	Standards    []store.Document   `json:"standards"`
	Calibrations []Calibration      `json:"calibrations"`
	Groups       []store.GroupCheck `json:"group_checks"`
	Indications  []Indication       `json:"indications"`
	Releases     []store.Release    `json:"releases"`
	Events       []store.Event      `json:"events"`
	Chain        store.VerifyResult `json:"chain"` // the verification the report was built on
}

// Calibration is a calibration version with its curve points, when it
// holds a curve.
type Calibration struct {
	store.Calibration
	Points []CurvePoint `json:"points,omitempty"`
}

// CurvePoint is one point of a phase-to-depth curve.
type CurvePoint struct {
	PhaseRad float64 `json:"phase_rad"`
	DepthPct float64 `json:"depth_pct"`
}

// Indication is an indication with its call history and, when the caller
// supplied it, the signal window for its figures.
type Indication struct {
	store.Indication
	Calls  []store.Call `json:"calls"`
	Window *Window      `json:"-"`
	// Excluded, when not empty, says why the indication is kept out of the
	// report's table and figures although its call is not rejected: its
	// calibration group failed a check ("invalid calibration group"), or
	// the procedure's reporting criteria leave it out (Options.Exclude).
	// It stays in the record and in the CSV and JSON exports.
	Excluded string `json:"excluded,omitempty"`
}

// Reportable reports whether the indication is in the report's table and
// figures: its current call is not rejected and it is not Excluded.
func (d *Indication) Reportable() bool { return d.Status != store.CallRejected && d.Excluded == "" }

// Window is the signal of one channel around an indication: X and Y in
// volts (the impedance-plane components), sample FirstSample onwards. The
// measurement window is samples [Indication.StartSample,
// Indication.EndSample). Note, when set, says in the report where the
// signal comes from (for example "channel as stored in the scan file").
type Window struct {
	Channel     string
	FirstSample int
	X, Y        []float64
	Note        string
}

// Options control FromStore.
type Options struct {
	// Now gives the report's generation time; time.Now when nil.
	Now func() time.Time
	// Curve extracts the curve points from a calibration body. When nil,
	// the body's "points" array of {"phase_rad", "depth_pct"} objects is
	// used if present.
	Curve func(c store.Calibration) ([]CurvePoint, error)
	// Window loads the signal around a reportable indication (from the
	// scan file named by its scan, processed as recorded). When nil, or
	// when it returns a nil window, the report says the signal was not
	// supplied instead of drawing figures.
	Window func(ctx context.Context, d store.Indication) (*Window, error)
	// Exclude applies the procedure's reporting criteria: it returns why an
	// indication is not reportable (for example "non-relevant: landmark" or
	// "below the reporting threshold"), or "" to report it. Nil reports
	// every indication that is not rejected. An analyst's or resolver's
	// accepted call is always reported.
	Exclude func(d store.Indication) string
}

// PointsCurve reads a calibration body of the form
// {"points":[{"phase_rad":…,"depth_pct":…},…]}; it is what FromStore uses
// when Options.Curve is nil. A body that is not an object has no points.
func PointsCurve(c store.Calibration) ([]CurvePoint, error) {
	var body struct {
		Points []CurvePoint `json:"points"`
	}
	if err := json.Unmarshal(c.Body, &body); err != nil {
		// A body that is not an object has no points; that is not an error.
		var ute *json.UnmarshalTypeError
		if errors.As(err, &ute) {
			return nil, nil
		}
		return nil, err
	}
	return body.Points, nil
}

// FromStore builds the report input from a record. It verifies the
// record first and refuses (with an error wrapping store.ErrTampered) a
// record that does not verify. The report is released (Draft false, the
// release's report ID) when the newest event is a QA release; otherwise it
// is a draft with the ID "<inspection id>-D-<first 8 hex digits of the
// chain head>". It holds the whole record in memory, with the signal
// window of every reportable indication; Open builds the same report for
// streaming, with memory that does not grow with the number of
// indications and events. A window that cannot be loaded gives a
// *WindowError.
func FromStore(ctx context.Context, s *store.Store, opt Options) (*Inspection, error) {
	in, invalid, err := head(ctx, s, opt)
	if err != nil {
		return nil, err
	}
	err = s.EachIndication(ctx, func(d store.Indication, calls []store.Call) error {
		ri := Indication{Indication: d, Calls: calls, Excluded: exclusion(d, invalid, opt)}
		if opt.Window != nil && ri.Reportable() {
			var err error
			if ri.Window, err = opt.Window(ctx, d); err != nil {
				return &WindowError{Indication: d.ID, Err: err}
			}
		}
		in.Indications = append(in.Indications, ri)
		return nil
	})
	if err != nil {
		return nil, err
	}
	if in.Events, err = s.Events(ctx); err != nil {
		return nil, err
	}
	return in, nil
}
