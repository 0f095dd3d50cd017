package main

import (
	"context"
	"errors"
	"flag"
	"fmt"

	"whorl/calibrate"
	"whorl/internal/workflow"
	"whorl/reports"
	"whorl/store"
)

func init() {
	register(&command{
		name:     "report",
		synopsis: "write the inspection report (PDF) and the record exports (CSV, JSON)",
		usage:    "whorl report --db DB [--pdf OUT.pdf] [--csv OUT.csv] [--json OUT.json] [--record-csv OUT.csv] [--indications-json OUT.json] [--signals] [--release NOTE]",
		help: `Builds the report of the inspection record DB. The record is verified
first; a record that does not verify gives no report (exit 4). The report
is "released" when the newest event of the record is a QA release, and a
draft otherwise; its ID is on every page.

Outputs (at least one):
  --pdf               the inspection report
  --csv               the indications, one row each (docs/report.md)
  --json              the full record as one JSON document
  --record-csv        the full record as CSV: its event log
  --indications-json  the indications with their call history as JSON
Each file is written whole or not at all.

--signals draws the impedance-plane and strip-chart figures of each
reportable indication from its scan file (a relative path is taken from
DB's folder), after checking the file against the size and SHA-256 in the
record; the figures show the channel or mix in calibrated volts, with the
calibration recorded for the indication.

--procedure applies the procedure's reporting criteria to the indication
table: non-relevant classes and flaw-like indications below its reporting
threshold are counted, not listed (they stay in the exports). Without it
every indication that is not rejected is listed.

--release NOTE records the QA release of the record as it stands (the
person at this workstation must be registered with role qa) and then
writes the released report.

Environment: WHORL_USER and WHORL_ROLE declare who is at the workstation
(needed for --release).

Examples:
  whorl report --db insp.whorl --pdf report.pdf --csv indications.csv --json record.json
  WHORL_USER="qa-records-2" WHORL_ROLE=qa whorl report --db insp.whorl --release "final report" --pdf report.pdf
  whorl report --db insp.whorl --signals --procedure proc.json --pdf report.pdf`,
		setFlags: func(fs *flag.FlagSet) {
			fs.String("db", "", "inspection record `file` (required)")
			fs.String("pdf", "", "write the PDF report to `file`")
			fs.String("csv", "", "write the indications CSV to `file`")
			fs.String("json", "", "write the full record JSON to `file`")
			fs.String("record-csv", "", "write the full record (event log) CSV to `file`")
			fs.String("indications-json", "", "write the indications JSON to `file`")
			fs.Bool("signals", false, "draw indication figures from the scan files")
			fs.String("procedure", "", "apply this procedure's reporting criteria (`file`)")
			fs.String("release", "", "record the QA release with this `note` before writing")
		},
		run: runReport,
	})
}

func runReport(ctx context.Context, e *env, fs *flag.FlagSet, args []string) error {
	if len(args) > 0 {
		return usagef("unexpected argument %q", args[0])
	}
	db := flagString(fs, "db")
	if db == "" {
		return usagef("--db is required")
	}
	files := reports.Files{
		PDF:             flagString(fs, "pdf"),
		IndicationsCSV:  flagString(fs, "csv"),
		RecordJSON:      flagString(fs, "json"),
		RecordCSV:       flagString(fs, "record-csv"),
		IndicationsJSON: flagString(fs, "indications-json"),
	}
	if files == (reports.Files{}) {
		return usagef("give at least one output: --pdf, --csv, --json, --record-csv or --indications-json")
	}
	s, err := openRecord(ctx, e, db)
	if err != nil {
		return err
	}
	defer s.Close()
	if flagSet(fs, "release") {
		actor, err := declaredActor(e)
		if err != nil {
			return err
		}
		rel, err := s.As(actor).ReleaseReport(ctx, flagString(fs, "release"))
		if errors.Is(err, store.ErrNotPermitted) {
			return refused(err)
		}
		if err != nil {
			return dataError(err)
		}
		fmt.Fprintf(e.stderr, "released report %s\n", rel.ReportID)
	}
	pct := workflow.NoReportingCriteria
	if p := flagString(fs, "procedure"); p != "" {
		proc, err := calibrate.LoadProcedure(p)
		if err != nil {
			return dataError(err)
		}
		pct = proc.ReportingPct
	}
	opt := workflow.ReportOptions(s, pct, e.now)
	if !flagBool(fs, "signals") {
		opt.Window = nil
	}
	in, err := reports.Open(ctx, s, opt)
	if errors.Is(err, store.ErrTampered) {
		return checkFailed(err)
	}
	if err != nil {
		return dataError(err)
	}
	written, err := in.WriteFiles(ctx, files)
	for _, w := range written {
		fmt.Fprintf(e.stdout, "%-17s %s (%d bytes, sha256 %s)\n", w.Kind, w.Path, w.Bytes, w.SHA256)
	}
	var we *reports.WindowError
	if errors.As(err, &we) {
		return dataError(err)
	}
	if err != nil {
		return err
	}
	state := "draft"
	if !in.Draft {
		state = "released"
	}
	fmt.Fprintf(e.stdout, "report %s (%s): %d indications, %d reportable\n", in.ReportID, state, in.Total, in.Reportable())
	return nil
}
