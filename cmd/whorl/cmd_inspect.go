package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"time"

	"whorl/acquire"
	"whorl/calibrate"
	"whorl/internal/workflow"
	"whorl/store"
)

func init() {
	register(&command{
		name:     "demo",
		synopsis: "run the whole inspection on invented demo data: generate, calibrate, analyse, record, report",
		usage:    "whorl demo [--out DIR] [--set demo|alternate] [--tubes N] [--jobs N] [--json]",
		help: `The main job on Whorl's invented demo inspection (docs/demo-scenario.md):

  1. generate the inspection (tube scans, calibration-standard scans at the
     opening and closing of each calibration group, raw coil-voltage records,
     ground truth kept apart) with the seeded physics-based generator;
  2. build each group's calibration from its opening standard scan (rotation,
     normalisation, mixes, depth curves); the demo Level III approves it;
  3. analyse every tube: detect, measure, size and classify indications;
  4. check every group's closing calibration against its opening one; a
     failed check marks the group's tubes invalid and lists them for re-test;
  5. record everything in DIR/inspection.db (hash-chained audit trail); QA
     releases the report; write DIR/report/report.pdf and the CSV and JSON
     exports; verify the record;
  6. score the indications against the ground truth (DIR/accuracy.json) and
     write the conductivity survey (DIR/survey).

DIR (default ./whorl-demo) must be missing, empty, or hold an earlier demo,
which is replaced. The data are invented: no real plant, component or person.

Examples:
  whorl demo
  whorl demo --out /tmp/demo --json
  whorl demo --set alternate --out /tmp/alt`,
		setFlags: func(fs *flag.FlagSet) {
			fs.String("out", "whorl-demo", "output folder")
			fs.String("set", "demo", "demo data set: demo or alternate")
			fs.Int("tubes", 0, "number of tubes (default: the set's)")
			fs.Int("jobs", 0, "concurrent workers (default: all cores)")
			fs.Bool("json", false, "print the summary as JSON")
		},
		run: runDemo,
	})
	register(&command{
		name:     "inspect",
		synopsis: "analyse a folder of scans with a procedure and standard into an inspection record and report",
		usage:    "whorl inspect --procedure PROC.json --standard STD.json [--map MAP.json] [--db FILE] [--report DIR] [--jobs N] [--json] DIR",
		help: `Runs the whole inspection on a folder of your own:

  DIR/calibration/*.csv   calibration-standard scans: metadata "x-calibration"
                          is open or close, "cal-group" names the group
  DIR/scans/*.csv         one scan per component (Whorl CSV, or foreign CSV
                          read through --map)

Each group's calibration is built from its opening scan, every scan is
analysed with its group's calibration, each closing scan is checked, and
everything is recorded in --db (default DIR/inspection.db) by the person
declared in WHORL_USER and WHORL_ROLE (level2 or level3). Calibrations are
recorded as proposed: a Level III approves them in the record. The reports
go to --report (default DIR/report).

The batch is resumable: run it again after an interruption and it skips
what is already recorded and records nothing twice. A file that cannot be
read or analysed does not stop the batch; it is recorded as not examined,
with the reason, and listed in the summary and the report. The exit code is
0 when every scan was examined, 3 when some were not (see the list).

Examples:
  WHORL_USER=analyst-7 WHORL_ROLE=level2 whorl inspect \
      --procedure proc.json --standard std.json /data/hx-4
  whorl inspect --procedure proc.json --standard std.json --map vendor-map.json --jobs 2 /data/hx-4`,
		setFlags: func(fs *flag.FlagSet) {
			fs.String("procedure", "", "procedure file (JSON, docs/procedure.md)")
			fs.String("standard", "", "reference standard file (JSON, docs/standard.md)")
			fs.String("map", "", "column map for foreign scan files (docs/column-map.md)")
			fs.String("db", "", "inspection record (default DIR/inspection.db)")
			fs.String("report", "", "report folder (default DIR/report)")
			fs.String("site", "", "site, for a new record")
			fs.String("component", "", "examined equipment, for a new record")
			fs.Int("jobs", 0, "concurrent workers (default: all cores)")
			fs.Bool("json", false, "print the summary as JSON")
		},
		run: runInspect,
	})
}

func runDemo(ctx context.Context, e *env, fs *flag.FlagSet, args []string) error {
	if len(args) != 0 {
		return usagef("unexpected arguments %q", args)
	}
	out := flagString(fs, "out")
	sum, err := workflow.Demo(ctx, workflow.DemoOptions{
		Out:      out,
		Set:      flagString(fs, "set"),
		Tubes:    flagInt(fs, "tubes"),
		Jobs:     flagInt(fs, "jobs"),
		Now:      e.now,
		Progress: workflow.NewProgressPrinter(e.stderr, e.isTerminal, 5*time.Second, e.now),
	})
	if err != nil {
		return err
	}
	if flagBool(fs, "json") {
		return writeJSON(e.stdout, sum)
	}
	w := e.stdout
	fmt.Fprintf(w, "Demo inspection (invented data): %s\n", sum.Manifest.Config.Component)
	printSummary(w, sum.Inspection)
	a := sum.Accuracy
	fmt.Fprintf(w, "\nAgainst the ground truth (%s):\n", filepath.Join(sum.Out, "accuracy.json"))
	fmt.Fprintf(w, "  flaws ≥ %.0f %%TW found       %d of %d%s\n", a.DetectMinPct, a.Detected, a.ToDetect, mark(a.DetectOK))
	fmt.Fprintf(w, "  OD sizing error (%.0f–%.0f %%TW) %.1f %%TW mean absolute over %d%s\n", a.SizeRangePct[0], a.SizeRangePct[1], a.MAEPct, a.Sized, mark(a.SizingOK))
	fmt.Fprintf(w, "  false calls                 %.2f per 10 tubes%s\n", a.FalseCallsPer10, mark(a.FalseOK))
	fmt.Fprintf(w, "  supports called as flaws    %d%s\n", a.SupportCalls, mark(a.SupportOK))
	fmt.Fprintf(w, "\nRecord    %s (chain of %d events verified)\n", sum.Inspection.DBPath, sum.Verify.Events)
	fmt.Fprintf(w, "Report    %s  (id %s)\n", sum.Reports.PDF, sum.Reports.ReportID)
	fmt.Fprintf(w, "Exports   %s, %s, %s, %s\n", sum.Reports.IndicationsCSV, sum.Reports.IndicationsJSON, sum.Reports.RecordCSV, sum.Reports.RecordJSON)
	fmt.Fprintf(w, "Data      %s (scans, calibration, raw, truth.csv); survey in %s\n", sum.Data, filepath.Join(sum.Out, "survey"))
	fmt.Fprintf(w, "Took      %s\n\n%s\n", sum.Elapsed.Round(time.Second/10), caution)
	if !sum.Verify.OK {
		return checkFailed(fmt.Errorf("the record does not verify: %v", sum.Verify.Err()))
	}
	return nil
}

func mark(ok bool) string {
	if ok {
		return "  (target met)"
	}
	return "  (TARGET MISSED)"
}

func printSummary(w io.Writer, s *workflow.Summary) {
	fmt.Fprintf(w, "\nTubes examined        %d", s.Examined+s.Skipped)
	if s.Skipped > 0 {
		fmt.Fprintf(w, " (%d recorded by an earlier run)", s.Skipped)
	}
	fmt.Fprintf(w, "\nNot examined          %d\n", len(s.NotExamined))
	for _, n := range s.NotExamined {
		fmt.Fprintf(w, "  %-12s %s\n", n.Component, n.Reason)
	}
	fmt.Fprintf(w, "Indications           %d", s.Indications)
	classes := sortedCounts(s.ByClass)
	if len(classes) > 0 {
		fmt.Fprintf(w, " (%s)", strings.Join(classes, ", "))
	}
	if s.Landmarks > 0 {
		fmt.Fprintf(w, "; %d landmarks found (supports, tubesheets)", s.Landmarks)
	}
	fmt.Fprintf(w, "\nOver the reporting threshold: %d indications in %d tubes", s.Reportable, len(s.OverThreshold))
	if len(s.OverThreshold) > 0 {
		fmt.Fprintf(w, ": %s", abbreviate(s.OverThreshold, 12))
	}
	fmt.Fprintln(w)
	if len(s.OverThresholdInvalid) > 0 {
		fmt.Fprintf(w, "  and %d tubes of invalid groups, kept out of the report until re-tested: %s\n", len(s.OverThresholdInvalid), abbreviate(s.OverThresholdInvalid, 8))
	}
	fmt.Fprintf(w, "Calibration groups    %d", len(s.Groups))
	if len(s.InvalidGroups) == 0 {
		fmt.Fprintln(w, ", all closing checks passed")
	} else {
		fmt.Fprintf(w, ", INVALID: %s (re-test %d tubes: %s)\n", strings.Join(s.InvalidGroups, ", "), len(s.Retest), abbreviate(s.Retest, 8))
		for _, g := range s.Groups {
			if !g.Valid {
				fmt.Fprintf(w, "  %s: %s\n", g.Name, strings.Join(g.Failures, "; "))
			}
		}
	}
}

func sortedCounts(m map[string]int) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	out := make([]string, len(keys))
	for i, k := range keys {
		out[i] = fmt.Sprintf("%d %s", m[k], k)
	}
	return out
}

func abbreviate(s []string, n int) string {
	if len(s) <= n {
		return strings.Join(s, ", ")
	}
	return strings.Join(s[:n], ", ") + fmt.Sprintf(", … %d more", len(s)-n)
}

func runInspect(ctx context.Context, e *env, fs *flag.FlagSet, args []string) error {
	if len(args) != 1 {
		return usagef("expected one inspection folder, got %d arguments", len(args))
	}
	dir := args[0]
	pp, sp := flagString(fs, "procedure"), flagString(fs, "standard")
	if pp == "" || sp == "" {
		return usagef("--procedure and --standard are required")
	}
	proc, err := calibrate.LoadProcedure(pp)
	if err != nil {
		return dataError(err)
	}
	std, err := calibrate.LoadStandard(sp)
	if err != nil {
		return dataError(err)
	}
	var m *acquire.ColumnMap
	if p := flagString(fs, "map"); p != "" {
		if m, err = acquire.LoadColumnMap(p); err != nil {
			return dataError(err)
		}
	}
	who, err := declaredPerson(e)
	if err != nil {
		return err
	}
	db := flagString(fs, "db")
	if db == "" {
		db = filepath.Join(dir, "inspection.db")
	}
	if _, err := os.Stat(db); errors.Is(err, os.ErrNotExist) && (flagString(fs, "site") == "" || flagString(fs, "component") == "") {
		return usagef("a new record needs --site and --component (the examined equipment)")
	}
	rep := flagString(fs, "report")
	if rep == "" {
		rep = filepath.Join(dir, "report")
	}
	sum, err := workflow.Inspect(ctx, workflow.InspectOptions{
		Dir: dir, Procedure: proc, Standard: std, Map: m, DBPath: db,
		Inspection: store.Inspection{
			ID: "INSP-" + filepath.Base(filepath.Clean(dir)), Site: flagString(fs, "site"), Component: flagString(fs, "component"),
			Procedure: proc.ID, ProcedureRev: proc.Revision, CodeEdition: proc.CodeEdition, ReferenceSerial: std.Serial,
		},
		Analyst:  who,
		Jobs:     flagInt(fs, "jobs"),
		Now:      e.now,
		Progress: workflow.NewProgressPrinter(e.stderr, e.isTerminal, 5*time.Second, e.now),
	})
	if err != nil {
		return err
	}
	st, err := store.Open(ctx, db, store.WithClock(e.now))
	if err != nil {
		return err
	}
	files, err := workflow.WriteReports(ctx, st, rep, proc.ReportingPct, e.now)
	st.Close()
	if err != nil {
		return err
	}
	if flagBool(fs, "json") {
		if err := writeJSON(e.stdout, struct {
			*workflow.Summary
			Reports *workflow.ReportFiles `json:"reports"`
		}{sum, files}); err != nil {
			return err
		}
	} else {
		printSummary(e.stdout, sum)
		fmt.Fprintf(e.stdout, "\nRecord    %s\nReport    %s (id %s%s)\n\n%s\n", db, files.PDF, files.ReportID, draftNote(files.Draft), caution)
	}
	if len(sum.NotExamined) > 0 {
		return dataError(fmt.Errorf("%d scans were not examined (listed above and in the report)", len(sum.NotExamined)))
	}
	return nil
}

func draftNote(draft bool) string {
	if draft {
		return ", draft until QA releases it"
	}
	return ""
}

// declaredPerson is the person at this workstation, from WHORL_USER and
// WHORL_ROLE.
func declaredPerson(e *env) (store.Person, error) {
	name, role := e.getenv("WHORL_USER"), e.getenv("WHORL_ROLE")
	if name == "" || role == "" {
		return store.Person{}, usagef("declare who is working: set WHORL_USER (your name) and WHORL_ROLE (level2 or level3)")
	}
	r, err := store.ParseRole(role)
	if err != nil {
		return store.Person{}, usagef("WHORL_ROLE: %v", err)
	}
	expiry := e.getenv("WHORL_CERT_EXPIRY")
	if expiry == "" && r != store.RoleQA {
		return store.Person{}, usagef("WHORL_CERT_EXPIRY: the last day your certificate is valid (YYYY-MM-DD) is needed for %s", r)
	}
	return store.Person{Name: name, Role: r, CertLevel: "ET " + string(r) + " (declared at the workstation)", CertExpiry: expiry}, nil
}
