package reports

import (
	"context"
	"fmt"
	"io"
	"time"

	"whorl/store"
)

// records is what the export writers read: the head of the record (every
// field of Inspection but Indications and Events) and walks over its
// indications and events, from memory or from the store.
type records struct {
	head           *Inspection
	eachIndication func(fn func(*Indication) error) error
	eachEvent      func(fn func(*store.Event) error) error
	// nilIndications and nilEvents make the record JSON write null, not
	// [], when there is no indication or event (as encoding/json writes a
	// nil slice).
	nilIndications, nilEvents bool
}

// memRecords reads the indications and events of in.
func memRecords(in *Inspection) *records {
	return &records{
		head: in,
		eachIndication: func(fn func(*Indication) error) error {
			for i := range in.Indications {
				if err := fn(&in.Indications[i]); err != nil {
					return err
				}
			}
			return nil
		},
		eachEvent: func(fn func(*store.Event) error) error {
			for i := range in.Events {
				if err := fn(&in.Events[i]); err != nil {
					return err
				}
			}
			return nil
		},
		nilIndications: in.Indications == nil,
		nilEvents:      in.Events == nil,
	}
}

// Report is a report built for streaming from a record: it holds the
// head of the record (identification, people, components, scans,
// documents, calibrations, group checks, releases, verification), the
// reportable indications with their call histories (what the PDF lists
// and draws), and counts of the rest. Its writers read every indication
// and event from the store again, a batch at a time, so that memory does
// not grow with their number. The store must stay open while it is used.
type Report struct {
	// Inspection is the head of the record; its Indications are the
	// reportable ones (without signal windows: those are loaded one at a
	// time while the PDF is drawn) and its Events are nil.
	Inspection
	// Total is the number of indications recorded, Rejected the number
	// whose current call is rejected, Excluded the number of the others
	// kept out of the report's table, by reason.
	Total, Rejected int
	Excluded        map[string]int
	// EventKinds counts the events by item kind, Signed by actor.
	EventKinds, Signed map[string]int

	st      *store.Store
	opt     Options
	invalid map[string]bool // components in an invalid calibration group
}

// WindowError is the error of a signal window that could not be loaded
// (Options.Window failed), with the indication it was loaded for: a data
// problem (for example a scan file that no longer matches the record).
type WindowError struct {
	Indication string
	Err        error
}

// Error names the indication and gives the loader's error.
func (e *WindowError) Error() string {
	return fmt.Sprintf("indication %s: signal window: %v", e.Indication, e.Err)
}

// Unwrap returns the error of Options.Window.
func (e *WindowError) Unwrap() error { return e.Err }

// Reportable returns the number of reportable indications.
func (r *Report) Reportable() int { return len(r.Indications) }

// exclusion says why d is kept out of the report's table ("" to report
// it, unless rejected).
func exclusion(d store.Indication, invalid map[string]bool, opt Options) string {
	switch {
	case invalid[d.Component]:
		return "invalid calibration group: re-test"
	case d.Status == store.CallAccepted && d.CallVersion > 1:
		// A person accepted it: reported whatever the criteria say.
		return ""
	case opt.Exclude != nil:
		return opt.Exclude(d)
	}
	return ""
}

// head verifies the record and reads everything but its indications and
// events; it also returns the components in an invalid calibration group.
func head(ctx context.Context, s *store.Store, opt Options) (*Inspection, map[string]bool, error) {
	now := opt.Now
	if now == nil {
		now = time.Now
	}
	curve := opt.Curve
	if curve == nil {
		curve = PointsCurve
	}
	res, err := s.Verify(ctx)
	if err != nil {
		return nil, nil, err
	}
	if err := res.Err(); err != nil {
		return nil, nil, err
	}
	in := &Inspection{Generated: now().UTC(), Chain: res}
	if in.Record, err = s.Inspection(ctx); err != nil {
		return nil, nil, err
	}
	if in.People, err = s.People(ctx); err != nil {
		return nil, nil, err
	}
	if in.Components, err = s.Components(ctx); err != nil {
		return nil, nil, err
	}
	if in.Scans, err = s.Scans(ctx); err != nil {
		return nil, nil, err
	}
	if in.Chains, err = s.Chains(ctx); err != nil {
		return nil, nil, err
	}
	if in.Standards, err = s.Standards(ctx); err != nil {
		return nil, nil, err
	}
	cals, err := s.Calibrations(ctx)
	if err != nil {
		return nil, nil, err
	}
	for _, c := range cals {
		pts, err := curve(c)
		if err != nil {
			return nil, nil, fmt.Errorf("calibration %s v%d: curve points: %w", c.ID, c.Version, err)
		}
		in.Calibrations = append(in.Calibrations, Calibration{Calibration: c, Points: pts})
	}
	if in.Groups, err = s.GroupChecks(ctx); err != nil {
		return nil, nil, err
	}
	if in.Releases, err = s.Releases(ctx); err != nil {
		return nil, nil, err
	}
	in.Draft = true
	in.ReportID = fmt.Sprintf("%s-D-%s", in.Record.ID, res.HeadHash[:8])
	if n := len(in.Releases); n > 0 && in.Releases[n-1].HeadSeq == res.HeadSeq-1 {
		in.Draft, in.ReportID = false, in.Releases[n-1].ReportID
	}
	invalid := map[string]bool{}
	for _, c := range in.Components {
		invalid[c.ID] = c.Status == store.StatusInvalidGroup
	}
	return in, invalid, nil
}

// Open builds a streaming report of the record s (see Report): it
// verifies the record first and refuses (with an error wrapping
// store.ErrTampered) a record that does not verify, reads the head of the
// record, and walks the indications and events once for the reportable
// indications and the counts. Draft and ReportID are set as by FromStore.
// Options.Window is called only while the PDF is written, once for each
// reportable indication, and the window is dropped once drawn.
func Open(ctx context.Context, s *store.Store, opt Options) (*Report, error) {
	in, invalid, err := head(ctx, s, opt)
	if err != nil {
		return nil, err
	}
	r := &Report{Inspection: *in, Excluded: map[string]int{}, EventKinds: map[string]int{}, Signed: map[string]int{},
		st: s, opt: opt, invalid: invalid}
	err = s.EachIndication(ctx, func(d store.Indication, calls []store.Call) error {
		r.Total++
		ri := Indication{Indication: d, Excluded: exclusion(d, invalid, opt)}
		switch {
		case d.Status == store.CallRejected:
			r.Rejected++
		case ri.Excluded != "":
			r.Excluded[ri.Excluded]++
		default:
			ri.Calls = calls
			r.Indications = append(r.Indications, ri)
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	err = s.EachEvent(ctx, func(e store.Event) error {
		r.EventKinds[e.ItemKind]++
		r.Signed[e.Actor]++
		return nil
	})
	if err != nil {
		return nil, err
	}
	return r, nil
}

// records reads every indication and event of r from the store.
func (r *Report) records(ctx context.Context) *records {
	return &records{
		head: &r.Inspection,
		eachIndication: func(fn func(*Indication) error) error {
			return r.st.EachIndication(ctx, func(d store.Indication, calls []store.Call) error {
				return fn(&Indication{Indication: d, Calls: calls, Excluded: exclusion(d, r.invalid, r.opt)})
			})
		},
		eachEvent: func(fn func(*store.Event) error) error {
			return r.st.EachEvent(ctx, func(e store.Event) error { return fn(&e) })
		},
		// FromStore leaves the slices nil when the record has none.
		nilIndications: true,
		nilEvents:      true,
	}
}

// pdfInput builds the PDF's input: the reportable indications, loading
// each one's signal window with Options.Window when it is drawn.
func (r *Report) pdfInput(ctx context.Context) *pdfInput {
	pi := &pdfInput{Inspection: &r.Inspection, total: r.Total, rejected: r.Rejected, excluded: r.Excluded,
		kinds: r.EventKinds, signed: r.Signed}
	for i := range r.Indications {
		pi.reportable = append(pi.reportable, &r.Indications[i])
	}
	if r.opt.Window != nil {
		pi.window = func(d *Indication) (*Window, error) {
			w, err := r.opt.Window(ctx, d.Indication)
			if err != nil {
				return nil, &WindowError{Indication: d.ID, Err: err}
			}
			return w, nil
		}
	}
	return pi
}

// WritePDF writes the inspection report as PDF (as WritePDF does for the
// whole record in memory; the same record gives the same text).
func (r *Report) WritePDF(ctx context.Context, w io.Writer) error {
	return writePDF(w, r.pdfInput(ctx))
}

// WriteIndicationsCSV writes every indication as WriteIndicationsCSV does,
// reading them from the store a batch at a time.
func (r *Report) WriteIndicationsCSV(ctx context.Context, w io.Writer) error {
	return writeIndicationsCSV(w, r.records(ctx))
}

// WriteRecordCSV writes the event log as WriteRecordCSV does, reading it
// from the store a batch at a time.
func (r *Report) WriteRecordCSV(ctx context.Context, w io.Writer) error {
	return writeRecordCSV(w, r.records(ctx))
}

// WriteIndicationsJSON writes every indication with its call history as
// WriteIndicationsJSON does, reading them from the store a batch at a time.
func (r *Report) WriteIndicationsJSON(ctx context.Context, w io.Writer) error {
	return writeIndicationsJSON(w, r.records(ctx))
}

// WriteRecordJSON writes the full record as WriteRecordJSON does for the
// Inspection FromStore builds (the same bytes), reading the indications
// and events from the store a batch at a time.
func (r *Report) WriteRecordJSON(ctx context.Context, w io.Writer) error {
	return writeRecordJSON(w, r.records(ctx))
}

// WriteFiles writes the named outputs of r as WriteFiles does.
func (r *Report) WriteFiles(ctx context.Context, f Files) ([]Written, error) {
	return writeFiles(f, [5]func(io.Writer) error{
		func(w io.Writer) error { return r.WritePDF(ctx, w) },
		func(w io.Writer) error { return r.WriteIndicationsCSV(ctx, w) },
		func(w io.Writer) error { return r.WriteRecordJSON(ctx, w) },
		func(w io.Writer) error { return r.WriteRecordCSV(ctx, w) },
		func(w io.Writer) error { return r.WriteIndicationsJSON(ctx, w) },
	})
}
