package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"image/color"
	"io"
	"os"
	"path/filepath"
	"strings"
	"text/tabwriter"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/plotutil"
	"gonum.org/v1/plot/vg"

	"whorl/acquire"
	"whorl/calibrate"
)

// Commands of this file: calibrate, calibrate approve. File formats:
// docs/standard.md, docs/procedure.md, docs/calibration.md.

func init() {
	register(&command{
		name:     "calibrate",
		synopsis: "build a calibration from a reference-standard scan: located flaws, set-up, depth curves, closing check",
		usage:    "whorl calibrate --standard STD.json --procedure PROC.json [--closing CLOSE.csv] -o CAL.json [--plot curves.png] [--json] OPEN.csv",
		help: `Locates every flaw of the reference standard on the standard scan OPEN.csv
(using the expected order and spacing, allowing for speed variation and a
missing or extra signal), trains the procedure's mixes, sets the rotation
and gain of every set-up channel so that the procedure's references read
their angle and voltage, measures the flaws, fits the procedure's depth
curves through the as-built depths and writes the calibration (a draft,
version 1, with its content hash) to -o.

Printed: the located flaws, the set-up of each channel with the references
re-measured on calibrated samples, each curve with its points, residuals
and leave-one-out uncertainty, and any warnings.

With --closing, the closing standard scan of the same calibration group
is measured with the opening set-up and checked against it (reference
phase and amplitude within the procedure's tolerances, elapsed time within
its limit). A failed check prints the re-test list (the scans of the group
found in --scans DIR, by their calibration group) and exits with code 4
after writing the calibration; the group's results must be kept out of the
final report. --group-out writes the group record (status, per-reference
check, re-test list) as JSON for the record store.

The builder is $WHORL_USER (or --builder). 'whorl calibrate approve' records a
Level III approval as a new version.

Examples:
  whorl calibrate --standard whorl-demo/data/standard.json --procedure whorl-demo/data/procedure.json \
      -o cal-CG01.json --plot curves.png whorl-demo/data/calibration/CG01-open.csv
  whorl calibrate --standard whorl-demo/data/standard.json --procedure whorl-demo/data/procedure.json \
      --closing whorl-demo/data/calibration/CG04-close.csv --scans whorl-demo/data/scans -o cal-CG04.json whorl-demo/data/calibration/CG04-open.csv`,
		setFlags: func(fs *flag.FlagSet) {
			fs.String("standard", "", "reference-standard file (JSON, docs/standard.md); required")
			fs.String("procedure", "", "procedure file (JSON, docs/procedure.md); required")
			fs.String("closing", "", "closing standard scan of the same calibration group, checked against OPEN.csv")
			fs.String("scans", "", "folder of the group's scans, listed for re-test when the closing check fails")
			fs.String("group-out", "", "with --closing: write the calibration-group record (status, check, re-test list) to this JSON file")
			fs.String("o", "", "write the calibration to this JSON file; required")
			fs.String("plot", "", "draw the phase-depth curves with their points to this PNG/SVG/PDF file")
			fs.String("id", "", "calibration ID (default: from the standard serial and the time)")
			fs.String("builder", "", "person building the calibration (default: $WHORL_USER)")
			fs.Bool("json", false, "print the calibration (and the closing check) as JSON")
		},
		run: runCalibrate,
	})
	register(&command{
		name:     "calibrate approve",
		synopsis: "approve a calibration as Level III (a new version; the builder may not approve)",
		usage:    "whorl calibrate approve [--person NAME] [--role ROLE] -o NEW.json CAL.json",
		help: `Verifies the calibration's content hash, records the approval of
--person (default $WHORL_USER) in --role (default $WHORL_ROLE) and writes the
approved calibration, a new version that keeps the previous version's hash
in its history, to -o. Only role level3 may approve, and never the person who
built the calibration (exit code 5).

Example:
  WHORL_USER="B. Level3" WHORL_ROLE=level3 whorl calibrate approve -o cal-CG01-v2.json cal-CG01.json`,
		setFlags: func(fs *flag.FlagSet) {
			fs.String("person", "", "approver (default: $WHORL_USER)")
			fs.String("role", "", "approver's role (default: $WHORL_ROLE)")
			fs.String("o", "", "write the approved calibration to this file; required")
			fs.Bool("json", false, "print the approved calibration as JSON")
		},
		run: runCalibrateApprove,
	})
}

func runCalibrate(ctx context.Context, e *env, fs *flag.FlagSet, args []string) error {
	if len(args) != 1 {
		return usagef("expected one standard scan (OPEN.csv), got %d arguments", len(args))
	}
	stdPath, procPath, out := flagString(fs, "standard"), flagString(fs, "procedure"), flagString(fs, "o")
	switch {
	case stdPath == "":
		return usagef("--standard is required")
	case procPath == "":
		return usagef("--procedure is required")
	case out == "":
		return usagef("-o is required")
	}
	std, err := calibrate.LoadStandard(stdPath)
	if err != nil {
		return dataError(err)
	}
	proc, err := calibrate.LoadProcedure(procPath)
	if err != nil {
		return dataError(err)
	}
	scan, err := acquire.ReadScanFile(args[0])
	if err != nil {
		return dataError(err)
	}
	builder := flagString(fs, "builder")
	if builder == "" {
		builder = e.getenv("WHORL_USER")
	}
	cal, err := calibrate.Build(std, proc, scan, calibrate.BuildOptions{ID: flagString(fs, "id"), Builder: builder, At: e.now()})
	if err != nil {
		return dataError(fmt.Errorf("%s: %w", args[0], err))
	}
	var check *calibrate.Group
	if cp := flagString(fs, "closing"); cp != "" {
		cs, err := acquire.ReadScanFile(cp)
		if err != nil {
			return dataError(err)
		}
		closing, err := calibrate.Build(std, proc, cs, calibrate.BuildOptions{Builder: builder, At: e.now(), Opening: cal})
		if err != nil {
			return dataError(fmt.Errorf("%s: %w", cp, err))
		}
		var refs []calibrate.ScanRef
		if dir := flagString(fs, "scans"); dir != "" {
			refs, err = groupScans(ctx, dir, cal.Group)
			if err != nil {
				return dataError(err)
			}
		}
		g := calibrate.EvaluateGroup(cal.Group, cal, closing, proc, refs)
		check = &g
	}
	if err := calibrate.SaveCalibration(out, cal); err != nil {
		return err
	}
	if gp := flagString(fs, "group-out"); gp != "" {
		if check == nil {
			return usagef("--group-out needs --closing")
		}
		f, err := os.Create(gp)
		if err != nil {
			return err
		}
		if err := writeJSON(f, check); err != nil {
			f.Close()
			return fmt.Errorf("write %s: %w", gp, err)
		}
		if err := f.Close(); err != nil {
			return err
		}
	}
	if p := flagString(fs, "plot"); p != "" {
		if err := plotCurves(p, cal); err != nil {
			return err
		}
	}
	if flagBool(fs, "json") {
		if err := writeJSON(e.stdout, struct {
			Calibration *calibrate.Calibration `json:"calibration"`
			Group       *calibrate.Group       `json:"group,omitempty"`
		}{cal, check}); err != nil {
			return err
		}
	} else {
		printCalibration(e.stdout, cal, out)
		if check != nil {
			printGroup(e.stdout, check)
		}
		fmt.Fprintf(e.stdout, "\n%s\n", caution)
	}
	if check != nil && check.Status == calibrate.GroupInvalid {
		return checkFailed(fmt.Errorf("closing calibration check of group %s failed: %s", check.Name, strings.Join(check.Check.Failures, "; ")))
	}
	return nil
}

// groupScans lists the scans in dir (*.csv) whose calibration group is group.
func groupScans(ctx context.Context, dir, group string) ([]calibrate.ScanRef, error) {
	files, err := filepath.Glob(filepath.Join(dir, "*.csv"))
	if err != nil {
		return nil, err
	}
	var out []calibrate.ScanRef
	for _, f := range files {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		s, err := acquire.ReadScanFile(f)
		if err != nil {
			return nil, err
		}
		if group == "" || s.Meta.CalGroup == group {
			r := calibrate.ScanRef{Component: s.Meta.Component, File: f}
			if !s.Meta.Start.IsZero() {
				r.Start = s.Meta.Start.UTC().Format("2006-01-02T15:04:05Z07:00")
			}
			out = append(out, r)
		}
	}
	return out, nil
}

func printCalibration(w io.Writer, cal *calibrate.Calibration, path string) {
	fmt.Fprintf(w, "Calibration %s version %d (%s), written to %s\n", cal.ID, cal.Version, cal.Status, path)
	fmt.Fprintf(w, "  standard %s, procedure %s rev %s, group %s, builder %s\n  hash %s\n", cal.StandardSerial, cal.ProcedureID, cal.ProcedureRevision, orDash(cal.Group), orDash(cal.Builder), cal.Hash)
	fmt.Fprintln(w, "\nLocated flaws")
	tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "  flaw\texpected (m)\tfound (m)\twindow\t")
	for _, l := range cal.Located {
		if l.Found {
			fmt.Fprintf(tw, "  %s\t%.4f\t%.4f\t%d–%d\t\n", l.FlawID, l.ExpectedM, l.PositionM, l.Window[0], l.Window[1])
		} else {
			fmt.Fprintf(tw, "  %s\t%.4f\tNOT FOUND\t\t\n", l.FlawID, l.ExpectedM)
		}
	}
	tw.Flush()
	for _, x := range cal.Extra {
		fmt.Fprintf(w, "  extra signal at %.4f m (%.3g V raw), matching no flaw\n", x.PositionM, x.Vpp)
	}
	fmt.Fprintln(w, "\nSet-up (calibrated = gain·e^{j·rotation}·raw)")
	tw = tabwriter.NewWriter(w, 2, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "  channel\trotation (°)\tgain\trotation reference\treads (°)\tnormalisation reference\treads (V)\tlift-off axis (°)\t")
	for _, c := range cal.Channels {
		fmt.Fprintf(tw, "  %s\t%.2f\t%.4g\t%s at %g°\t%.2f\t%s at %g V\t%.3f\t%.1f\t\n", c.Channel, c.RotationDeg, c.Gain,
			c.RotationRef.Reference, c.RotationRef.AngleDeg, c.RefPhaseDeg, c.NormRef.Reference, c.NormRef.Vpp, c.RefVpp, c.LiftoffDeg)
	}
	tw.Flush()
	for _, m := range cal.Mixes {
		fmt.Fprintf(w, "  mix %s = %s − %s (%s), residue over the training window %.1f %%, condition number %.3g\n",
			m.Name, m.Primary, strings.Join(m.Inputs, ", "), m.Mix.Form, 100*m.Mix.ResidualRatio, m.Mix.ConditionNumber)
	}
	fmt.Fprintln(w, "\nCurves")
	for _, c := range cal.Channels {
		for _, cv := range c.Curves {
			mark := ""
			if cv.Name == c.SizingCurve {
				mark = " (sizing)"
			}
			fmt.Fprintf(w, "  %s / %s%s: %s, %s; uncertainty ±%.2f %%TW (leave-one-out RMS); monotone %v\n", c.Channel, cv.Name, mark, cv.Type, cv.Variable, cv.UncertaintyPct, cv.Monotone)
			tw = tabwriter.NewWriter(w, 2, 4, 2, ' ', 0)
			fmt.Fprintf(tw, "    flaw\tphase (°)\tVpp (V)\tdepth (%%TW)\tresidual\t\n")
			for i, p := range cv.Points {
				fmt.Fprintf(tw, "    %s\t%.2f\t%.3f\t%.1f\t%+.2f\t\n", p.FlawID, p.PhaseDeg, p.Vpp, p.DepthPct, cv.Residuals[i])
			}
			tw.Flush()
		}
	}
	if len(cal.Warnings) > 0 {
		fmt.Fprintln(w, "\nWarnings")
		for _, s := range cal.Warnings {
			fmt.Fprintf(w, "  %s\n", s)
		}
	}
}

func printGroup(w io.Writer, g *calibrate.Group) {
	c := g.Check
	fmt.Fprintf(w, "\nClosing check of group %s: %s\n", orDash(g.Name), strings.ToUpper(g.Status))
	if c.ElapsedKnown {
		fmt.Fprintf(w, "  elapsed %.2f h (limit %.2f h)\n", c.ElapsedS/3600, c.MaxElapsedS/3600)
	}
	tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', 0)
	fmt.Fprintf(tw, "  channel\treference\tphase change (°, ±%g)\tamplitude change (%%, ±%g)\tresult\t\n", c.PhaseTolDeg, c.AmpTolPct)
	for _, r := range c.References {
		res := "pass"
		if !r.Pass {
			res = "FAIL: " + r.Reason
		}
		fmt.Fprintf(tw, "  %s\t%s\t%+.2f\t%+.2f\t%s\t\n", r.Channel, r.FlawID, r.PhaseDiffDeg, r.AmplitudeDiffPct, res)
	}
	tw.Flush()
	if g.Status == calibrate.GroupInvalid {
		fmt.Fprintf(w, "  %s\n  re-test list (%d):", g.Note, len(g.Retest))
		for _, r := range g.Retest {
			fmt.Fprintf(w, " %s", r)
		}
		fmt.Fprintln(w)
	}
}

func orDash(s string) string {
	if s == "" {
		return "-"
	}
	return s
}

// plotCurves draws every phase curve of the calibration with its points.
func plotCurves(path string, cal *calibrate.Calibration) error {
	p := plot.New()
	p.Title.Text = fmt.Sprintf("Phase–depth curves, calibration %s v%d", cal.ID, cal.Version)
	p.X.Label.Text = "calibrated phase (°)"
	p.Y.Label.Text = "depth (%TW)"
	p.Add(plotter.NewGrid())
	i := 0
	for _, c := range cal.Channels {
		for _, cv := range c.Curves {
			if cv.Variable != calibrate.VarPhase {
				continue
			}
			const n = 200
			line := make(plotter.XYs, n+1)
			for k := range line {
				x := cv.XMin + (cv.XMax-cv.XMin)*float64(k)/n
				d, _ := cv.Depth(x, 0)
				line[k] = plotter.XY{X: x, Y: d}
			}
			pts := make(plotter.XYs, len(cv.Points))
			for k, q := range cv.Points {
				pts[k] = plotter.XY{X: q.PhaseDeg, Y: q.DepthPct}
			}
			l, err := plotter.NewLine(line)
			if err != nil {
				return err
			}
			l.Color = plotutil.Color(i)
			l.Dashes = plotutil.Dashes(i)
			s, err := plotter.NewScatter(pts)
			if err != nil {
				return err
			}
			s.Color = plotutil.Color(i)
			s.Shape = plotutil.Shape(i)
			p.Add(l, s)
			p.Legend.Add(c.Channel+" / "+cv.Name, l, s)
			i++
		}
	}
	if i == 0 {
		return errors.New("--plot: the calibration has no phase curve to draw")
	}
	p.Legend.Left = true
	p.Legend.TextStyle.Color = color.Black
	p.Y.Min, p.Y.Max = 0, 105
	if err := p.Save(7*vg.Inch, 4.5*vg.Inch, path); err != nil {
		return fmt.Errorf("--plot %s: %w", path, err)
	}
	return nil
}

func runCalibrateApprove(ctx context.Context, e *env, fs *flag.FlagSet, args []string) error {
	if len(args) != 1 {
		return usagef("expected one calibration file, got %d arguments", len(args))
	}
	out := flagString(fs, "o")
	if out == "" {
		return usagef("-o is required")
	}
	person, role := flagString(fs, "person"), flagString(fs, "role")
	if person == "" {
		person = e.getenv("WHORL_USER")
	}
	if role == "" {
		role = e.getenv("WHORL_ROLE")
	}
	if person == "" || role == "" {
		return usagef("the approver's name and role are required (--person/--role or WHORL_USER/WHORL_ROLE)")
	}
	cal, err := calibrate.LoadCalibration(args[0])
	if err != nil {
		return dataError(err)
	}
	if err := cal.Approve(person, role, e.now()); err != nil {
		if errors.Is(err, calibrate.ErrNotPermitted) {
			return refused(err)
		}
		return dataError(err)
	}
	if err := calibrate.SaveCalibration(out, cal); err != nil {
		return err
	}
	if flagBool(fs, "json") {
		return writeJSON(e.stdout, cal)
	}
	fmt.Fprintf(e.stdout, "Calibration %s approved by %s (%s): version %d, hash %s, written to %s\n", cal.ID, person, role, cal.Version, cal.Hash, out)
	for _, h := range cal.History {
		fmt.Fprintf(e.stdout, "  earlier version %d (%s) hash %s\n", h.Version, h.Status, h.Hash)
	}
	return nil
}
