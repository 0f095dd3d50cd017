package main

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"strconv"
	"sync"
	"text/tabwriter"

	"whorl/acquire"
	"whorl/analysis"
	"whorl/calibrate"
	"whorl/synth"
)

// Commands of this file: analyze. Indication fields: docs/calibration.md.

func init() {
	register(&command{
		name:     "analyze",
		synopsis: "detect, measure, size and classify indications on scans with a calibration",
		usage:    "whorl analyze --calibration CAL.json [--calibration ...] --procedure PROC.json [--csv OUT.csv] [--all] [--json] [--truth TRUTH.csv --manifest MANIFEST.json] SCAN.csv|DIR...",
		help: `Analyses each scan (a Whorl scan CSV, or every *.csv in a folder) with
the calibration of its calibration group (the scan's cal-group; with a single
--calibration, that one for every scan) under the procedure the calibration
was built with: detection in calibrated volts and alarm regions on the
channels the procedure names, landmarks, measurement (Vpp, phase,
maximum-rate phase, window, location from the nearest landmark, S/N),
sizing from the calibration's curve with its uncertainty (out-of-range
readings flagged, never extrapolated) and rule-based classification
(docs/calibration.md lists the rules).

The table lists calls and other non-landmark indications (--all: every
indication); --csv writes every indication; --json prints indications and
per-scan reports.

With --truth (a ground-truth CSV as written by 'whorl synth') the calls are
scored: detection of every flaw of 40 %TW or deeper, sizing mean absolute
error of OD flaws 20–100 %TW (target 5 %TW), false calls per 10 tubes
(target 1) and support signals reported as flaws (target 0). --manifest
gives the true landmark positions that indication locations are mapped
through. A missed target exits with code 4.

Examples:
  whorl analyze --calibration cal-CG01.json --procedure whorl-demo/data/procedure.json \
      --csv ind.csv whorl-demo/data/scans/R02C010.csv
  whorl analyze --calibration cal-CG01.json --calibration cal-CG02.json \
      --procedure whorl-demo/data/procedure.json \
      --truth whorl-demo/data/truth.csv --manifest whorl-demo/data/manifest.json whorl-demo/data/scans`,
		setFlags: func(fs *flag.FlagSet) {
			fs.Var(&stringList{}, "calibration", "calibration file (repeatable: one per calibration group); required")
			fs.String("procedure", "", "procedure file the calibrations were built with; required")
			fs.String("csv", "", "write every indication to this CSV file")
			fs.Bool("all", false, "list landmark indications in the table too")
			fs.Bool("json", false, "print indications and reports as JSON")
			fs.String("truth", "", "ground-truth CSV to score the calls against")
			fs.String("manifest", "", "inspection manifest (JSON) with the true landmark positions, for --truth")
			fs.Int("workers", 0, "scans analysed at once (default: the number of CPUs)")
		},
		run: runAnalyze,
	})
}

// scanResult is the analysis of one scan file.
type scanResult struct {
	file string
	ind  []analysis.Indication
	rep  *analysis.Report
	err  error
}

func runAnalyze(ctx context.Context, e *env, fs *flag.FlagSet, args []string) error {
	calPaths := flagStrings(fs, "calibration")
	procPath := flagString(fs, "procedure")
	switch {
	case len(calPaths) == 0:
		return usagef("--calibration is required")
	case procPath == "":
		return usagef("--procedure is required")
	case len(args) == 0:
		return usagef("expected at least one scan file or folder")
	}
	proc, err := calibrate.LoadProcedure(procPath)
	if err != nil {
		return dataError(err)
	}
	cals := map[string]*calibrate.Calibration{}
	var only *calibrate.Calibration
	for _, p := range calPaths {
		c, err := calibrate.LoadCalibration(p)
		if err != nil {
			return dataError(err)
		}
		if _, err := analysis.NewAnalyzer(c, proc); err != nil {
			return dataError(fmt.Errorf("%s: %w", p, err))
		}
		if prev, dup := cals[c.Group]; dup {
			return usagef("calibrations %s and %s are both for group %q", prev.ID, c.ID, c.Group)
		}
		cals[c.Group] = c
		only = c
	}
	if len(cals) > 1 {
		only = nil
	}
	var files []string
	for _, a := range args {
		st, err := os.Stat(a)
		if err != nil {
			return dataError(err)
		}
		if st.IsDir() {
			m, err := filepath.Glob(filepath.Join(a, "*.csv"))
			if err != nil {
				return err
			}
			sort.Strings(m)
			files = append(files, m...)
		} else {
			files = append(files, a)
		}
	}
	if len(files) == 0 {
		return dataError(fmt.Errorf("no scan files in %v", args))
	}
	results := make([]scanResult, len(files))
	workers := flagInt(fs, "workers")
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	jobs := make(chan int)
	var wg sync.WaitGroup
	for w := 0; w < min(workers, len(files)); w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			analyzers := map[*calibrate.Calibration]*analysis.Analyzer{}
			for i := range jobs {
				r := &results[i]
				r.file = files[i]
				if err := ctx.Err(); err != nil {
					r.err = err
					continue
				}
				s, err := acquire.ReadScanFile(files[i])
				if err != nil {
					r.err = err
					continue
				}
				c := only
				if c == nil {
					if c = cals[s.Meta.CalGroup]; c == nil {
						r.err = fmt.Errorf("%s: no calibration for group %q", files[i], s.Meta.CalGroup)
						continue
					}
				}
				a := analyzers[c]
				if a == nil {
					a, _ = analysis.NewAnalyzer(c, proc) // checked above
					analyzers[c] = a
				}
				r.ind, r.rep, r.err = a.Analyze(ctx, s)
				if r.err != nil {
					r.err = fmt.Errorf("%s: %w", files[i], r.err)
				}
			}
		}()
	}
	for i := range files {
		jobs <- i
	}
	close(jobs)
	wg.Wait()
	var all []analysis.Indication
	var reps []*analysis.Report
	for _, r := range results {
		if r.err != nil {
			if ctx.Err() != nil {
				return ctx.Err()
			}
			return dataError(r.err)
		}
		all = append(all, r.ind...)
		reps = append(reps, r.rep)
	}
	if p := flagString(fs, "csv"); p != "" {
		if err := writeIndicationsCSV(p, all); err != nil {
			return err
		}
	}
	var acc *analysis.Accuracy
	if tp := flagString(fs, "truth"); tp != "" {
		a, err := scoreAgainst(tp, flagString(fs, "manifest"), all, reps)
		if err != nil {
			return dataError(err)
		}
		acc = &a
	}
	if flagBool(fs, "json") {
		if err := writeJSON(e.stdout, struct {
			Indications []analysis.Indication `json:"indications"`
			Reports     []*analysis.Report    `json:"reports"`
			Accuracy    *analysis.Accuracy    `json:"accuracy,omitempty"`
		}{all, reps, acc}); err != nil {
			return err
		}
	} else {
		printIndications(e.stdout, all, reps, flagBool(fs, "all"))
		if acc != nil {
			printAccuracy(e.stdout, acc)
		}
		fmt.Fprintf(e.stdout, "\n%s\n", caution)
	}
	if acc != nil && !acc.Pass {
		return checkFailed(fmt.Errorf("accuracy targets missed: detection %v, sizing %v, false calls %v, supports %v", acc.DetectOK, acc.SizingOK, acc.FalseOK, acc.SupportOK))
	}
	return nil
}

// scoreAgainst reads a truth CSV (and optionally the manifest's landmarks)
// and scores the indications.
func scoreAgainst(truthPath, manifestPath string, ind []analysis.Indication, reps []*analysis.Report) (analysis.Accuracy, error) {
	f, err := os.Open(truthPath)
	if err != nil {
		return analysis.Accuracy{}, err
	}
	defer f.Close()
	tr, err := synth.ReadTruth(f)
	if err != nil {
		return analysis.Accuracy{}, fmt.Errorf("%s: %w", truthPath, err)
	}
	analysed := map[string]bool{}
	for _, r := range reps {
		analysed[r.Component] = true
	}
	var truth []analysis.Truth
	for _, x := range tr {
		if analysed[x.Component] {
			truth = append(truth, analysis.Truth{Component: x.Component, Kind: x.Kind, AxialPositionM: x.AxialPositionM, LengthM: x.LengthM, DepthPct: x.DepthPct, Origin: string(x.Origin), Flaw: x.IsFlaw()})
		}
	}
	opt := analysis.ScoreOptions{Tubes: len(reps)}
	if manifestPath != "" {
		b, err := os.ReadFile(manifestPath)
		if err != nil {
			return analysis.Accuracy{}, err
		}
		var m struct {
			Landmarks []synth.Landmark `json:"landmarks"`
		}
		if err := json.Unmarshal(b, &m); err != nil {
			return analysis.Accuracy{}, fmt.Errorf("%s: %w", manifestPath, err)
		}
		for _, l := range m.Landmarks {
			if l.Kind == analysis.KindSupport || l.Kind == analysis.KindTubesheet {
				opt.Landmarks = append(opt.Landmarks, analysis.Landmark{Name: l.Name, Kind: l.Kind, StartM: l.StartM, EndM: l.EndM, CentreM: l.CentreM})
			}
		}
	}
	return analysis.Score(ind, truth, opt), nil
}

func depthText(x *analysis.Indication) string {
	if x.DepthPct == nil {
		return "-"
	}
	s := fmt.Sprintf("%.0f ±%.0f", *x.DepthPct, x.UncertaintyPct)
	if x.OutOfRange {
		s = fmt.Sprintf("%.0f (out of range)", *x.DepthPct)
	}
	return s
}

func printIndications(w io.Writer, ind []analysis.Indication, reps []*analysis.Report, all bool) {
	tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', 0)
	fmt.Fprintf(tw, "component\tchannel\tlocation\tVpp (V)\tphase (°)\tmax-rate (°)\tdepth (%%TW)\tclass\trule\tnotes\t\n")
	shown := 0
	for i := range ind {
		x := &ind[i]
		if x.Class == analysis.ClassLandmark && !all {
			continue
		}
		shown++
		notes := ""
		if !x.Reportable {
			notes = "not reportable"
		}
		for _, a := range x.Alarms {
			notes += " alarm:" + a
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%.2f\t%.0f\t%.0f\t%s\t%s\t%s\t%s\t\n", x.Component, x.Channel, x.Location, x.Vpp, x.PhaseDeg, x.MaxRatePhaseDeg, depthText(x), x.Class, x.Rule, notes)
	}
	tw.Flush()
	calls := 0
	for i := range ind {
		if analysis.IsCall(&ind[i]) {
			calls++
		}
	}
	fmt.Fprintf(w, "\n%d scans, %d indications (%d listed), %d calls (flaw-like or analyst review, reportable)\n", len(reps), len(ind), shown, calls)
	seen := map[string]int{}
	var order []string
	for _, r := range reps {
		for _, s := range r.Warnings {
			if seen[s] == 0 {
				order = append(order, s)
			}
			seen[s]++
		}
	}
	for _, s := range order {
		fmt.Fprintf(w, "  warning (%d scans): %s\n", seen[s], s)
	}
}

func printAccuracy(w io.Writer, a *analysis.Accuracy) {
	ok := func(b bool) string {
		if b {
			return "met"
		}
		return "MISSED"
	}
	fmt.Fprintf(w, "\nAccuracy against ground truth (%d tubes)\n", a.Tubes)
	fmt.Fprintf(w, "  detection of flaws ≥ %g %%TW: %d of %d found (%s)\n", a.DetectMinPct, a.Detected, a.ToDetect, ok(a.DetectOK))
	for _, m := range a.Missed {
		fmt.Fprintf(w, "    missed %s %s at %.3f m, %.0f %%TW\n", m.Component, m.Kind, m.PositionM, m.DepthPct)
	}
	fmt.Fprintf(w, "  sizing MAE of OD flaws %g–%g %%TW: %.2f %%TW over %d of %d sized (target ≤ 5; %s)\n", a.SizeRangePct[0], a.SizeRangePct[1], a.MAEPct, a.Sized, a.ToSize, ok(a.SizingOK))
	fmt.Fprintf(w, "  false calls: %d, %.2f per 10 tubes (target ≤ 1; %s)\n", a.FalseCalls, a.FalseCallsPer10, ok(a.FalseOK))
	fmt.Fprintf(w, "  support signals reported as flaws: %d (target 0; %s)\n", a.SupportCalls, ok(a.SupportOK))
}

var indicationHeader = []string{"component", "channel", "window_start", "window_end", "position_m", "landmark", "offset_m", "location",
	"vpp", "phase_deg", "max_rate_phase_deg", "cross_vpp", "depth_pct", "uncertainty_pct", "out_of_range", "class", "rule", "alarms",
	"reportable", "snr", "curve", "calibration_id", "calibration_version", "calibration_hash"}

func writeIndicationsCSV(path string, ind []analysis.Indication) error {
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	cw := csv.NewWriter(f)
	cw.Write(indicationHeader)
	ff := func(v float64) string { return strconv.FormatFloat(v, 'g', 8, 64) }
	for _, x := range ind {
		d := ""
		if x.DepthPct != nil {
			d = ff(*x.DepthPct)
		}
		alarms := ""
		for i, a := range x.Alarms {
			if i > 0 {
				alarms += ";"
			}
			alarms += a
		}
		cw.Write([]string{x.Component, x.Channel, strconv.Itoa(x.Window[0]), strconv.Itoa(x.Window[1]), ff(x.PositionM), x.Landmark, ff(x.OffsetM), x.Location,
			ff(x.Vpp), ff(x.PhaseDeg), ff(x.MaxRatePhaseDeg), ff(x.CrossVpp), d, ff(x.UncertaintyPct), strconv.FormatBool(x.OutOfRange), string(x.Class), x.Rule, alarms,
			strconv.FormatBool(x.Reportable), ff(x.SNR), x.Curve, x.CalibrationID, strconv.Itoa(x.CalibrationVersion), x.CalibrationHash})
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		f.Close()
		return fmt.Errorf("write %s: %w", path, err)
	}
	return f.Close()
}
