package source

import (
	"context"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"

	"whorl/calibrate"
	"whorl/reports"
	"whorl/store"
)

// writeReport writes the record's report with package reports: the PDF
// report, and the indication and full-record exports as CSV and JSON. The
// curve plot uses the sizing curve of the procedure's prime channel and the
// figures use the calibrated signal around each indication.
func (in *Inspection) writeReport(ctx context.Context, dir string, formats []string) ([]string, error) {
	opt := reports.Options{
		Curve: func(c store.Calibration) ([]reports.CurvePoint, error) {
			cal, err := calibrate.ParseCalibration(c.ID, c.Body)
			if err != nil {
				return nil, err
			}
			var pts []reports.CurvePoint
			for _, name := range in.proc.ChannelsWithRole(calibrate.RolePrime) {
				cc := cal.Channel(name)
				if cc == nil || cc.Curve(cc.SizingCurve) == nil {
					continue
				}
				for _, p := range cc.Curve(cc.SizingCurve).Points {
					pts = append(pts, reports.CurvePoint{PhaseRad: p.PhaseDeg * math.Pi / 180, DepthPct: p.DepthPct})
				}
			}
			return pts, nil
		},
		Window: func(ctx context.Context, d store.Indication) (*reports.Window, error) {
			t, err := in.Tube(ctx, d.Component)
			if err != nil {
				return nil, nil // the report says the signal was not supplied
			}
			ch := t.Scan.Channel(d.Channel)
			if ch == nil {
				return nil, nil
			}
			pad := max(d.EndSample-d.StartSample, 10)
			lo, hi := max(d.StartSample-pad, 0), min(d.EndSample+pad, len(ch.Samples))
			w := &reports.Window{Channel: d.Channel, FirstSample: lo}
			for _, z := range ch.Samples[lo:hi] {
				w.X, w.Y = append(w.X, real(z)), append(w.Y, imag(z))
			}
			return w, nil
		},
	}
	rep, err := reports.FromStore(ctx, in.st, opt)
	if err != nil {
		return nil, err
	}
	type out struct {
		name  string
		write func(io.Writer, *reports.Inspection) error
	}
	var plan []out
	if slices.Contains(formats, "pdf") {
		plan = append(plan, out{"report.pdf", reports.WritePDF})
	}
	if slices.Contains(formats, "csv") {
		plan = append(plan, out{"indications.csv", reports.WriteIndicationsCSV}, out{"record.csv", reports.WriteRecordCSV})
	}
	if slices.Contains(formats, "json") {
		plan = append(plan, out{"indications.json", reports.WriteIndicationsJSON}, out{"record.json", reports.WriteRecordJSON})
	}
	if len(plan) == 0 {
		return nil, fmt.Errorf("formats %v: expected pdf, csv or json", formats)
	}
	var paths []string
	for _, p := range plan {
		path := filepath.Join(dir, p.name)
		f, err := os.Create(path)
		if err != nil {
			return paths, err
		}
		err = p.write(f, rep)
		if cerr := f.Close(); err == nil {
			err = cerr
		}
		if err != nil {
			return paths, fmt.Errorf("writing %s: %w", path, err)
		}
		paths = append(paths, path)
	}
	return paths, nil
}
