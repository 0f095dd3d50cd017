package reports

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"time"
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
	return writeCSV(w, IndicationColumns, func(emit func([]string) error) error {
		for _, d := range in.Indications {
			curveVer := ""
			if d.CurveID != "" {
				curveVer = strconv.Itoa(d.CurveVersion)
			}
			if err := emit([]string{
				in.ReportID, in.Record.ID, d.ID, d.Component, d.ScanID, d.Channel,
				strconv.Itoa(d.StartSample), strconv.Itoa(d.EndSample), fmtFloat(d.AxialM), d.Location,
				fmtFloat(d.VppV), fmtFloat(d.PhaseRad), fmtFloat(degrees(d.PhaseRad)),
				fmtOpt(d.DepthPct), fmtOpt(d.Uncertainty), d.Class, d.Method, string(d.Source), d.CurveID, curveVer,
				string(d.Status), strconv.Itoa(d.CallVersion), strconv.FormatBool(d.Resolved), d.CalledBy,
				string(d.CalledRole), fmtTime(d.CalledAt), d.Comment,
			}); err != nil {
				return err
			}
		}
		return nil
	})
}

// WriteRecordCSV writes the full record as CSV: its event log, one row per
// event (EventColumns), each with the item before and after the change as
// JSON, from which every item of the record can be rebuilt.
func WriteRecordCSV(w io.Writer, in *Inspection) error {
	return writeCSV(w, EventColumns, func(emit func([]string) error) error {
		for _, e := range in.Events {
			if err := emit([]string{
				strconv.FormatInt(e.Seq, 10), fmtTime(e.At), e.Actor, string(e.Role), e.ItemKind, e.ItemID, e.Action,
				e.Reason, string(e.Before), string(e.After), e.Table, strconv.FormatInt(e.Row, 10), e.RowHash,
				e.PrevHash, e.Hash,
			}); err != nil {
				return err
			}
		}
		return nil
	})
}

func writeIndented(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	if err := enc.Encode(v); err != nil {
		return fmt.Errorf("encode JSON: %w", err)
	}
	return nil
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
	inds := in.Indications
	if inds == nil {
		inds = []Indication{}
	}
	return writeIndented(w, IndicationsExport{ReportID: in.ReportID, InspectionID: in.Record.ID, Generated: in.Generated, Indications: inds})
}

// WriteRecordJSON writes the full record (the whole Inspection, without
// signal windows) as an indented JSON document.
func WriteRecordJSON(w io.Writer, in *Inspection) error {
	return writeIndented(w, in)
}

// callLabel is the analyst call as shown in the PDF table.
func callLabel(d *Indication) string {
	s := string(d.Status)
	if d.Resolved {
		s += " (resolved)"
	}
	return s
}
