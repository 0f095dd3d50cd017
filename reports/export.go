package reports

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"time"

	"whorl/store"
)

// IndicationColumns are the columns of the indications CSV, in order
// (docs/report.md describes each).
var IndicationColumns = []string{
	"report_id", "inspection_id", "indication_id", "component", "scan_id", "channel",
	"start_sample", "end_sample", "axial_m", "location", "vpp_v", "phase_rad", "phase_deg",
	"depth_pct", "uncertainty_pct", "class", "method", "source", "curve_id", "curve_version",
	"call_status", "call_version", "resolved", "called_by", "called_role", "called_at", "comment",
}

// EventColumns are the columns of the record CSV (the event log), in order.
var EventColumns = []string{
	"seq", "at", "actor", "role", "item_kind", "item_id", "action", "reason",
	"before", "after", "row_table", "row_seq", "row_hash", "prev_hash", "hash",
}

func fmtFloat(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

func fmtOpt(p *float64) string {
	if p == nil {
		return ""
	}
	return fmtFloat(*p)
}

func fmtTime(t time.Time) string {
	if t.IsZero() {
		return ""
	}
	return t.UTC().Format(time.RFC3339Nano)
}

// degrees converts radians to degrees for display and the phase_deg column.
func degrees(rad float64) float64 { return rad * 180 / math.Pi }

// csvLineBreaks writes line breaks inside a field as LF: a CSV reader
// turns CR LF inside a quoted field into LF, so writing LF keeps the
// export and its re-reading the same.
var csvLineBreaks = strings.NewReplacer("\r\n", "\n", "\r", "\n")

func writeCSV(w io.Writer, header []string, rows func(emit func([]string) error) error) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(header); err != nil {
		return err
	}
	emit := func(rec []string) error {
		for i, f := range rec {
			if strings.IndexByte(f, '\r') >= 0 {
				rec[i] = csvLineBreaks.Replace(f)
			}
		}
		return cw.Write(rec)
	}
	if err := rows(emit); err != nil {
		return err
	}
	cw.Flush()
	return cw.Error()
}

// WriteIndicationsCSV writes every indication (reportable or not) with
// its current call as CSV: a header of IndicationColumns, then one row per
// indication in order of recording. Fields are UTF-8, quoted where needed
// (RFC 4180), records end in LF, and a line break inside a field is LF.
func WriteIndicationsCSV(w io.Writer, in *Inspection) error {
	return writeIndicationsCSV(w, memRecords(in))
}

func writeIndicationsCSV(w io.Writer, r *records) error {
	reportID, inspID := r.head.ReportID, r.head.Record.ID
	return writeCSV(w, IndicationColumns, func(emit func([]string) error) error {
		return r.eachIndication(func(d *Indication) error {
			curveVer := ""
			if d.CurveID != "" {
				curveVer = strconv.Itoa(d.CurveVersion)
			}
			return emit([]string{
				reportID, inspID, d.ID, d.Component, d.ScanID, d.Channel,
				strconv.Itoa(d.StartSample), strconv.Itoa(d.EndSample), fmtFloat(d.AxialM), d.Location,
				fmtFloat(d.VppV), fmtFloat(d.PhaseRad), fmtFloat(degrees(d.PhaseRad)),
				fmtOpt(d.DepthPct), fmtOpt(d.Uncertainty), d.Class, d.Method, string(d.Source), d.CurveID, curveVer,
				string(d.Status), strconv.Itoa(d.CallVersion), strconv.FormatBool(d.Resolved), d.CalledBy,
				string(d.CalledRole), fmtTime(d.CalledAt), d.Comment,
			})
		})
	})
}

// WriteRecordCSV writes the full record as CSV: its event log, one row per
// event (EventColumns), each with the item before and after the change as
// JSON, from which every item of the record can be rebuilt.
func WriteRecordCSV(w io.Writer, in *Inspection) error { return writeRecordCSV(w, memRecords(in)) }

func writeRecordCSV(w io.Writer, r *records) error {
	return writeCSV(w, EventColumns, func(emit func([]string) error) error {
		return r.eachEvent(func(e *store.Event) error {
			return emit([]string{
				strconv.FormatInt(e.Seq, 10), fmtTime(e.At), e.Actor, string(e.Role), e.ItemKind, e.ItemID, e.Action,
				e.Reason, string(e.Before), string(e.After), e.Table, strconv.FormatInt(e.Row, 10), e.RowHash,
				e.PrevHash, e.Hash,
			})
		})
	})
}

// jsonObject writes an indented JSON object field by field, and an array
// field element by element, with the bytes an encoding/json Encoder with
// SetIndent("", "  ") and SetEscapeHTML(false) writes for the whole
// object: each value is encoded on its own with the indentation of its
// place, so only one element is held at a time.
type jsonObject struct {
	w      *bufio.Writer
	buf    bytes.Buffer
	val    *json.Encoder // a field's value: prefix of one level
	elem   *json.Encoder // an array element: prefix of two levels
	fields int
}

func newJSONObject(w io.Writer) *jsonObject {
	o := &jsonObject{w: bufio.NewWriter(w)}
	o.val, o.elem = json.NewEncoder(&o.buf), json.NewEncoder(&o.buf)
	o.val.SetIndent("  ", "  ")
	o.elem.SetIndent("    ", "  ")
	o.val.SetEscapeHTML(false)
	o.elem.SetEscapeHTML(false)
	o.w.WriteByte('{')
	return o
}

func (o *jsonObject) key(name string) {
	if o.fields > 0 {
		o.w.WriteByte(',')
	}
	o.fields++
	o.w.WriteString("\n  \"" + name + "\": ")
}

func (o *jsonObject) encode(enc *json.Encoder, v any) error {
	o.buf.Reset()
	if err := enc.Encode(v); err != nil {
		return fmt.Errorf("encode JSON: %w", err)
	}
	b := o.buf.Bytes()
	_, err := o.w.Write(b[:len(b)-1]) // without the Encoder's newline
	return err
}

// field writes the field name with the value v.
func (o *jsonObject) field(name string, v any) error {
	o.key(name)
	return o.encode(o.val, v)
}

// array writes the field name with the array of the values each emits;
// no value gives null when nullEmpty, else [].
func (o *jsonObject) array(name string, nullEmpty bool, each func(emit func(v any) error) error) error {
	o.key(name)
	n := 0
	err := each(func(v any) error {
		if n == 0 {
			o.w.WriteByte('[')
		} else {
			o.w.WriteByte(',')
		}
		n++
		o.w.WriteString("\n    ")
		return o.encode(o.elem, v)
	})
	if err != nil {
		return err
	}
	switch {
	case n > 0:
		o.w.WriteString("\n  ]")
	case nullEmpty:
		o.w.WriteString("null")
	default:
		o.w.WriteString("[]")
	}
	return nil
}

// close ends the object and the document.
func (o *jsonObject) close() error {
	o.w.WriteString("\n}\n")
	return o.w.Flush()
}

// IndicationsExport is the document WriteIndicationsJSON writes.
type IndicationsExport struct {
	ReportID     string       `json:"report_id"`
	InspectionID string       `json:"inspection_id"`
	Generated    time.Time    `json:"generated"`
	Indications  []Indication `json:"indications"`
}

// WriteIndicationsJSON writes every indication with its current call and
// call history as an indented JSON document (IndicationsExport).
func WriteIndicationsJSON(w io.Writer, in *Inspection) error {
	return writeIndicationsJSON(w, memRecords(in))
}

func writeIndicationsJSON(w io.Writer, r *records) error {
	o := newJSONObject(w)
	if err := o.field("report_id", r.head.ReportID); err != nil {
		return err
	}
	if err := o.field("inspection_id", r.head.Record.ID); err != nil {
		return err
	}
	if err := o.field("generated", r.head.Generated); err != nil {
		return err
	}
	if err := o.array("indications", false, eachIndication(r)); err != nil {
		return err
	}
	return o.close()
}

func eachIndication(r *records) func(emit func(any) error) error {
	return func(emit func(any) error) error {
		return r.eachIndication(func(d *Indication) error { return emit(d) })
	}
}

// WriteRecordJSON writes the full record (the whole Inspection, without
// signal windows) as an indented JSON document.
func WriteRecordJSON(w io.Writer, in *Inspection) error { return writeRecordJSON(w, memRecords(in)) }

func writeRecordJSON(w io.Writer, r *records) error {
	h := r.head
	o := newJSONObject(w)
	for _, f := range []struct {
		name string
		v    any
	}{
		{"report_id", h.ReportID}, {"draft", h.Draft}, {"generated", h.Generated}, {"inspection", h.Record},
		{"people", h.People}, {"components", h.Components}, {"scans", h.Scans}, {"chains", h.Chains},
		{"standards", h.Standards}, {"calibrations", h.Calibrations}, {"group_checks", h.Groups},
	} {
		if err := o.field(f.name, f.v); err != nil {
			return err
		}
	}
	if err := o.array("indications", r.nilIndications, eachIndication(r)); err != nil {
		return err
	}
	if err := o.field("releases", h.Releases); err != nil {
		return err
	}
	err := o.array("events", r.nilEvents, func(emit func(any) error) error {
		return r.eachEvent(func(e *store.Event) error { return emit(e) })
	})
	if err != nil {
		return err
	}
	if err := o.field("chain", h.Chain); err != nil {
		return err
	}
	return o.close()
}

// callLabel is the analyst call as shown in the PDF table.
func callLabel(d *Indication) string {
	s := string(d.Status)
	if d.Resolved {
		s += " (resolved)"
	}
	return s
}
