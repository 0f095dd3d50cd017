package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	iofs "io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"text/tabwriter"
	"time"

	"whorl/acquire"
)

func init() {
	register(&command{
		name:     "scan info",
		synopsis: "describe scan files: channels, length, rates, metadata and problems found",
		usage:    "whorl scan info [--map MAP.json] [--json] FILE...",
		help: `For each FILE prints its kind (scan or raw record), component, channels
(name, frequency, coil mode), number of samples, duration and length, sample
rate or axial step, probe speed, metadata, and the problems found: NaN or
infinite values, gaps, axes that do not advance, channels that never change
or are clipped at their extremes, a time column that disagrees with the
sample rate, a position column that disagrees with the axial step, and
position over time that disagrees with the probe speed.

Files in Whorl's own CSV layouts (docs/csv-format.md) are recognised by their
first line. A file in another layout needs --map, a column-mapping file
(docs/column-map.md); with --map every FILE is read through the map.

A file that cannot be read is reported with the file, line, column and what
was expected; the other files are still reported, and the exit code is 3.

Examples:
  whorl scan info tubes/R12C034.csv
  whorl scan info --json whorl-demo/scans/*.csv
  whorl scan info --map testdata/acquire/bench-logger.map.json testdata/acquire/R03C017_pull_20260314.csv`,
		setFlags: func(fs *flag.FlagSet) {
			fs.String("map", "", "read every FILE through this column-mapping file (foreign CSV)")
			fs.Bool("json", false, "print the report as JSON")
		},
		run: runScanInfo,
	})
	register(&command{
		name:     "scan convert",
		synopsis: "convert a foreign CSV file to Whorl's scan CSV through a column map",
		usage:    "whorl scan convert --map MAP.json -o OUT.csv [--force] [--json] IN.csv",
		help: `Reads IN.csv, a CSV file written by other equipment, as described by the
column-mapping file MAP.json (docs/column-map.md), and writes the scan in
Whorl's scan CSV layout (docs/csv-format.md) to OUT.csv. Units are converted
to SI and samples are written in the shortest form that reads back to the
same values.

OUT.csv is written to a temporary file and renamed, so it is never left half
written. An existing OUT.csv is not replaced unless --force is given.

Examples:
  whorl scan convert --map bench-logger.map.json -o R03C017.csv R03C017_pull_20260314.csv
  whorl scan convert --map site.map.json -o out/T1.csv --force export/T1.csv`,
		setFlags: func(fs *flag.FlagSet) {
			fs.String("map", "", "column-mapping file describing IN.csv (required)")
			fs.String("o", "", "output Whorl scan CSV file (required)")
			fs.Bool("force", false, "replace OUT.csv if it exists")
			fs.Bool("json", false, "print a summary as JSON")
		},
		run: runScanConvert,
	})
}

// scanChannelInfo is one channel in a scan report.
type scanChannelInfo struct {
	Name   string  `json:"name"`
	FreqHz float64 `json:"frequency_hz"`
	Mode   string  `json:"mode"`
}

// scanFileInfo is the report on one file of `whorl scan info`.
type scanFileInfo struct {
	File          string            `json:"file"`
	Kind          string            `json:"kind,omitempty"` // scan, raw, or mapped
	Error         string            `json:"error,omitempty"`
	Component     string            `json:"component,omitempty"`
	Channels      []scanChannelInfo `json:"channels,omitempty"`
	Samples       int               `json:"samples"`
	DurationS     float64           `json:"duration_s,omitempty"`
	StartPosM     *float64          `json:"start_position_m,omitempty"`
	EndPosM       *float64          `json:"end_position_m,omitempty"`
	LengthM       float64           `json:"length_m,omitempty"`
	SampleRateHz  float64           `json:"sample_rate_hz,omitempty"`
	AxialStepM    float64           `json:"axial_step_m,omitempty"`
	ProbeSpeedMPS float64           `json:"probe_speed_mps,omitempty"`
	ExcitationHz  []float64         `json:"excitation_hz,omitempty"`
	SlotS         float64           `json:"slot_s,omitempty"`
	Coil          string            `json:"coil,omitempty"`
	Mode          string            `json:"mode,omitempty"` // raw records: the coil connection
	Meta          map[string]string `json:"metadata,omitempty"`
	Problems      []acquire.Problem `json:"problems"`
	err           error
}

func runScanInfo(ctx context.Context, e *env, fs *flag.FlagSet, args []string) error {
	if len(args) == 0 {
		return usagef("no FILE given")
	}
	var m *acquire.ColumnMap
	if p := flagString(fs, "map"); p != "" {
		var err error
		if m, err = acquire.LoadColumnMap(p); err != nil {
			return mapLoadError(err)
		}
	}
	var reports []scanFileInfo
	var errs []error
	for _, path := range args {
		if err := ctx.Err(); err != nil {
			return err
		}
		r := describeFile(path, m)
		if r.err != nil {
			errs = append(errs, r.err)
		}
		reports = append(reports, r)
	}
	if flagBool(fs, "json") {
		if err := writeJSON(e.stdout, reports); err != nil {
			return err
		}
	} else {
		for i, r := range reports {
			if i > 0 {
				fmt.Fprintln(e.stdout)
			}
			printScanInfo(e.stdout, &r)
		}
	}
	if len(errs) > 0 {
		return dataError(fmt.Errorf("%d of %d files could not be read:\n%w", len(errs), len(args), errors.Join(errs...)))
	}
	return nil
}

// mapLoadError classifies an error from LoadColumnMap: a missing file is a
// usage mistake, a malformed map is bad data.
func mapLoadError(err error) error {
	if errors.Is(err, iofs.ErrNotExist) {
		return usagef("--map: %v", err)
	}
	return dataError(err)
}

// describeFile reads one file and reports on it; a read error is kept in
// the report.
func describeFile(path string, m *acquire.ColumnMap) scanFileInfo {
	r := scanFileInfo{File: path, Problems: []acquire.Problem{}}
	fail := func(err error) scanFileInfo {
		r.err, r.Error = err, err.Error()
		return r
	}
	if m != nil {
		f, err := os.Open(path)
		if err != nil {
			return fail(err)
		}
		defer f.Close()
		s, err := acquire.ReadMapped(f, filepath.Base(path), m)
		if err != nil {
			return fail(err)
		}
		r.Kind = "mapped"
		fillScanInfo(&r, s)
		return r
	}
	kind, err := acquire.Sniff(path)
	if err != nil {
		return fail(err)
	}
	switch kind {
	case acquire.KindScan:
		s, err := acquire.ReadScanFile(path)
		if err != nil {
			return fail(err)
		}
		r.Kind = "scan"
		fillScanInfo(&r, s)
	case acquire.KindRaw:
		rec, err := acquire.ReadRawFile(path)
		if err != nil {
			return fail(err)
		}
		r.Kind = "raw"
		fillRawInfo(&r, rec)
	}
	return r
}

func metaMap(m *acquire.Meta) map[string]string {
	out := map[string]string{}
	put := func(k, v string) {
		if v != "" {
			out[k] = v
		}
	}
	put("probe-id", m.ProbeID)
	put("probe-type", m.ProbeType)
	put("direction", m.Direction)
	put("cal-group", m.CalGroup)
	put("procedure", m.Procedure)
	if !m.Start.IsZero() {
		out["start"] = m.Start.Format(time.RFC3339Nano)
	}
	for k, v := range m.Extra {
		out["x-"+k] = v
	}
	if len(out) == 0 {
		return nil
	}
	return out
}

func fillScanInfo(r *scanFileInfo, s *acquire.Scan) {
	r.Component = s.Meta.Component
	for _, c := range s.Channels {
		r.Channels = append(r.Channels, scanChannelInfo{Name: c.Name, FreqHz: c.FreqHz, Mode: c.Mode.String()})
	}
	r.Samples = s.Len()
	if n := len(s.TimeS); n > 0 {
		r.DurationS = s.TimeS[n-1] - s.TimeS[0]
	}
	if n := len(s.PositionM); n > 0 {
		a, b := s.PositionM[0], s.PositionM[n-1]
		r.StartPosM, r.EndPosM = &a, &b
		r.LengthM = b - a
		if r.LengthM < 0 {
			r.LengthM = -r.LengthM
		}
	}
	r.SampleRateHz, r.AxialStepM, r.ProbeSpeedMPS = s.SampleRateHz, s.AxialStepM, s.Meta.ProbeSpeedMPS
	r.Meta = metaMap(&s.Meta)
	if p := acquire.Inspect(s); p != nil {
		r.Problems = p
	}
}

func fillRawInfo(r *scanFileInfo, rec *acquire.RawRecord) {
	r.Component = rec.Meta.Component
	r.Coil = rec.Coil
	if rec.Mode != 0 {
		r.Mode = rec.Mode.String()
	}
	r.Samples = len(rec.VoltageV)
	r.SampleRateHz = rec.SampleRateHz
	if r.Samples > 1 {
		r.DurationS = float64(r.Samples-1) / rec.SampleRateHz
	}
	if n := len(rec.PositionM); n > 0 {
		a, b := rec.PositionM[0], rec.PositionM[n-1]
		r.StartPosM, r.EndPosM = &a, &b
		r.LengthM = b - a
		if r.LengthM < 0 {
			r.LengthM = -r.LengthM
		}
	}
	r.ExcitationHz, r.SlotS = rec.ExcitationHz, rec.SlotS
	r.ProbeSpeedMPS = rec.Meta.ProbeSpeedMPS
	r.Meta = metaMap(&rec.Meta)
	if p := acquire.InspectRaw(rec); p != nil {
		r.Problems = p
	}
}

// fmtSeconds prints a duration in s, ms or µs.
func fmtSeconds(s float64) string {
	switch {
	case s >= 1:
		return fmt.Sprintf("%.6g s", s)
	case s >= 1e-3:
		return fmt.Sprintf("%.6g ms", s*1e3)
	}
	return fmt.Sprintf("%.6g µs", s*1e6)
}

// fmtFreq prints a frequency in Hz, kHz or MHz.
func fmtFreq(hz float64) string {
	switch {
	case hz >= 1e6:
		return fmt.Sprintf("%.6g MHz", hz/1e6)
	case hz >= 1e3:
		return fmt.Sprintf("%.6g kHz", hz/1e3)
	}
	return fmt.Sprintf("%.6g Hz", hz)
}

func printScanInfo(w io.Writer, r *scanFileInfo) {
	if r.err != nil {
		fmt.Fprintf(w, "%s: cannot be read\n  error        %s\n", r.File, r.Error)
		return
	}
	kind := map[string]string{"scan": "Whorl scan", "raw": "Whorl raw coil-voltage record", "mapped": "foreign CSV read through the column map"}[r.Kind]
	fmt.Fprintf(w, "%s: %s\n", r.File, kind)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	row := func(k, v string) { fmt.Fprintf(tw, "  %s\t%s\n", k, v) }
	if r.Component != "" {
		row("component", r.Component)
	}
	if r.Kind == "raw" {
		if r.Coil != "" || r.Mode != "" {
			mode := ""
			if r.Mode != "" {
				mode = " (" + r.Mode + ")"
			}
			row("coil", strings.TrimSpace(r.Coil+mode))
		}
		ex := make([]string, len(r.ExcitationHz))
		for i, f := range r.ExcitationHz {
			ex[i] = fmtFreq(f)
		}
		row("excitation", strings.Join(ex, ", "))
		if r.SlotS > 0 {
			row("multiplex slot", fmt.Sprintf("%.6g ms", r.SlotS*1e3))
		}
	} else {
		wName, wFreq := 0, 0
		for _, c := range r.Channels {
			wName, wFreq = max(wName, len(c.Name)), max(wFreq, len(fmtFreq(c.FreqHz)))
		}
		for i, c := range r.Channels {
			k := ""
			if i == 0 {
				k = "channels"
			}
			row(k, fmt.Sprintf("%-*s  %*s  %s", wName, c.Name, wFreq, fmtFreq(c.FreqHz), c.Mode))
		}
		if len(r.Channels) == 0 {
			row("channels", "none")
		}
	}
	row("samples", fmt.Sprint(r.Samples))
	if r.DurationS > 0 {
		row("duration", fmtSeconds(r.DurationS))
	}
	if r.StartPosM != nil {
		row("length", fmt.Sprintf("%.6g mm (position %.6g mm to %.6g mm)", r.LengthM*1e3, *r.StartPosM*1e3, *r.EndPosM*1e3))
	}
	if r.SampleRateHz > 0 {
		row("sample rate", fmtFreq(r.SampleRateHz))
	}
	if r.AxialStepM > 0 {
		row("axial step", fmt.Sprintf("%.6g mm", r.AxialStepM*1e3))
	}
	if r.ProbeSpeedMPS > 0 {
		row("probe speed", fmt.Sprintf("%.6g m/s", r.ProbeSpeedMPS))
	}
	keys := make([]string, 0, len(r.Meta))
	for k := range r.Meta {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for i, k := range keys {
		label := ""
		if i == 0 {
			label = "metadata"
		}
		row(label, k+": "+r.Meta[k])
	}
	if len(r.Problems) == 0 {
		row("problems", "none found")
	}
	for i, p := range r.Problems {
		label := ""
		if i == 0 {
			label = "problems"
		}
		row(label, p.Kind+": "+p.Message)
	}
	tw.Flush()
}

func runScanConvert(ctx context.Context, e *env, fs *flag.FlagSet, args []string) error {
	if len(args) != 1 {
		return usagef("want exactly one input file, got %d", len(args))
	}
	mapPath, out := flagString(fs, "map"), flagString(fs, "o")
	if mapPath == "" {
		return usagef("--map is required")
	}
	if out == "" {
		return usagef("-o is required")
	}
	in := args[0]
	if abs1, err1 := filepath.Abs(in); err1 == nil {
		if abs2, err2 := filepath.Abs(out); err2 == nil && abs1 == abs2 {
			return usagef("-o %s would overwrite the input file", out)
		}
	}
	force := flagBool(fs, "force")
	if !force {
		if _, err := os.Lstat(out); err == nil {
			return usagef("%s exists; give --force to replace it", out)
		}
	}
	m, err := acquire.LoadColumnMap(mapPath)
	if err != nil {
		return mapLoadError(err)
	}
	f, err := os.Open(in)
	if err != nil {
		return err
	}
	defer f.Close()
	s, err := acquire.ReadMapped(f, filepath.Base(in), m)
	if err != nil {
		return dataError(err)
	}
	if err := ctx.Err(); err != nil {
		return err
	}
	if force {
		err = acquire.WriteScanFile(out, s)
	} else {
		err = acquire.CreateScanFile(out, s)
		if errors.Is(err, iofs.ErrExist) {
			return usagef("%s exists; give --force to replace it", out)
		}
	}
	if err != nil {
		return err
	}
	names := make([]string, len(s.Channels))
	for i, c := range s.Channels {
		names[i] = c.Name
	}
	if flagBool(fs, "json") {
		return writeJSON(e.stdout, struct {
			Input     string   `json:"input"`
			Output    string   `json:"output"`
			Component string   `json:"component,omitempty"`
			Samples   int      `json:"samples"`
			Channels  []string `json:"channels"`
		}{in, out, s.Meta.Component, s.Len(), names})
	}
	fmt.Fprintf(e.stdout, "wrote %s: %d samples, channels %s", out, s.Len(), strings.Join(names, ", "))
	if s.Meta.Component != "" {
		fmt.Fprintf(e.stdout, ", component %s", s.Meta.Component)
	}
	fmt.Fprintln(e.stdout)
	return nil
}
