package workflow

import (
	"context"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"sync"
	"time"

	"whorl/acquire"
	"whorl/analysis"
	"whorl/calibrate"
	"whorl/reports"
	"whorl/store"
)

// ReportFiles names the files WriteReports wrote.
type ReportFiles struct {
	ReportID        string            `json:"report_id"`
	Draft           bool              `json:"draft"`
	PDF             string            `json:"pdf"`
	IndicationsCSV  string            `json:"indications_csv"`
	IndicationsJSON string            `json:"indications_json"`
	RecordCSV       string            `json:"record_csv"`
	RecordJSON      string            `json:"record_json"`
	Written         []reports.Written `json:"written"`
}

// NoReportingCriteria, given as the reporting threshold, lists every
// indication that is not rejected (when the procedure is not known).
const NoReportingCriteria = -1.0

// ReportOptions returns the options that build a report from the record
// st: calibration curves from the recorded calibrations; figures of each
// reportable indication's signal read back from its scan file (checked
// against the recorded size and SHA-256, a relative path taken from the
// record's folder) and calibrated with the recorded calibration; and the
// procedure's reporting criteria for the threshold reportingPct (%TW), or
// none for NoReportingCriteria.
func ReportOptions(st *store.Store, reportingPct float64, now func() time.Time) reports.Options {
	src := &signalSource{st: st, dir: filepath.Dir(st.Path()), cals: map[string]*calibrate.Calibration{}, scans: map[string]*acquire.Scan{}}
	opt := reports.Options{Now: now, Curve: curvePoints, Window: src.window}
	if reportingPct >= 0 {
		opt.Exclude = reportingCriteria(reportingPct)
	}
	return opt
}

// WriteReports writes the PDF report and the CSV and JSON exports of the
// record into dir (see ReportOptions), each file whole or not at all. The
// exports are streamed from the record (reports.Open), so memory does not
// grow with the number of indications and events.
func WriteReports(ctx context.Context, st *store.Store, dir string, reportingPct float64, now func() time.Time) (*ReportFiles, error) {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, err
	}
	in, err := reports.Open(ctx, st, ReportOptions(st, reportingPct, now))
	if err != nil {
		return nil, err
	}
	files := &ReportFiles{
		ReportID:        in.ReportID,
		Draft:           in.Draft,
		PDF:             filepath.Join(dir, "report.pdf"),
		IndicationsCSV:  filepath.Join(dir, "indications.csv"),
		IndicationsJSON: filepath.Join(dir, "indications.json"),
		RecordCSV:       filepath.Join(dir, "record.csv"),
		RecordJSON:      filepath.Join(dir, "record.json"),
	}
	files.Written, err = in.WriteFiles(ctx, reports.Files{PDF: files.PDF, IndicationsCSV: files.IndicationsCSV,
		IndicationsJSON: files.IndicationsJSON, RecordCSV: files.RecordCSV, RecordJSON: files.RecordJSON})
	if err != nil {
		return nil, err
	}
	return files, nil
}

// reportingCriteria keeps out of the report's table what the procedure
// does not report: non-relevant classes, and flaw-like indications sized
// below the reporting threshold. Everything stays in the record and the
// exports; indications for the analyst, and unsized flaw-like ones, are
// reported.
func reportingCriteria(reportingPct float64) func(store.Indication) string {
	return func(d store.Indication) string {
		switch analysis.Class(d.Class) {
		case analysis.ClassLandmark:
			return "non-relevant: landmark (support, tubesheet)"
		case analysis.ClassGeometry:
			return "non-relevant: geometry (tube end, expansion, dent)"
		case analysis.ClassDeposit:
			return "non-relevant: deposit"
		case analysis.ClassNoise:
			return "noise"
		case analysis.ClassFlaw:
			if d.DepthPct != nil && *d.DepthPct < reportingPct {
				return fmt.Sprintf("flaw-like, below the reporting threshold of %g %%TW", reportingPct)
			}
		}
		return ""
	}
}

// curvePoints gives the report the sizing curve of a calibration: the
// prime channel's sizing curve points (as-built depth against calibrated
// phase). A body that is not a Whorl calibration is read as a plain list
// of points (reports.PointsCurve).
func curvePoints(c store.Calibration) ([]reports.CurvePoint, error) {
	cal, err := calibrate.ParseCalibration(c.ID, c.Body)
	if err != nil {
		return reports.PointsCurve(c)
	}
	for i := range cal.Channels {
		cc := &cal.Channels[i]
		if cc.SizingCurve == "" {
			continue
		}
		cv := cc.Curve(cc.SizingCurve)
		if cv == nil {
			continue
		}
		out := make([]reports.CurvePoint, 0, len(cv.Points))
		for _, p := range cv.Points {
			out = append(out, reports.CurvePoint{PhaseRad: p.PhaseDeg * math.Pi / 180, DepthPct: p.DepthPct})
		}
		return out, nil
	}
	return nil, nil
}

// signalSource reads indication signals back from the scan files.
type signalSource struct {
	st    *store.Store
	dir   string // the record's folder: relative scan paths start there
	mu    sync.Mutex
	cals  map[string]*calibrate.Calibration
	scans map[string]*acquire.Scan // the last few scans read, by scan ID
	order []string
	index map[string]store.Scan
}

const windowMargin = 3 // measurement windows are shown with this many times their length around them

func (s *signalSource) window(ctx context.Context, d store.Indication) (*reports.Window, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.index == nil {
		scans, err := s.st.Scans(ctx)
		if err != nil {
			return nil, err
		}
		s.index = map[string]store.Scan{}
		for _, sc := range scans {
			s.index[sc.ID] = sc
		}
	}
	rec, ok := s.index[d.ScanID]
	if !ok {
		return nil, fmt.Errorf("indication %s: scan %s is not recorded", d.ID, d.ScanID)
	}
	scan, err := s.scan(rec)
	if err != nil {
		return nil, err
	}
	var z []complex128
	var note string
	if d.CurveID == "" {
		ch := scan.Channel(d.Channel)
		if ch == nil {
			return &reports.Window{Note: fmt.Sprintf("no calibration is recorded for the indication and %s has no channel %s", rec.Path, d.Channel)}, nil
		}
		z, note = ch.Samples, fmt.Sprintf("channel %s as stored in %s (size and SHA-256 checked against the record); no calibration recorded", d.Channel, rec.Path)
	} else {
		key := fmt.Sprintf("%s v%d", d.CurveID, d.CurveVersion)
		cal := s.cals[key]
		if cal == nil {
			c, err := s.st.Calibration(ctx, d.CurveID, d.CurveVersion)
			if err != nil {
				return nil, err
			}
			if cal, err = calibrate.ParseCalibration(c.ID, c.Body); err != nil {
				return &reports.Window{Note: fmt.Sprintf("calibration %s is not a Whorl calibration: %v", key, err)}, nil
			}
			s.cals[key] = cal
		}
		if z, err = calibratedChannel(scan, cal, d.Channel); err != nil {
			return &reports.Window{Note: err.Error()}, nil
		}
		note = fmt.Sprintf("%s in calibrated volts, read back from %s (size and SHA-256 checked against the record) with calibration %s", d.Channel, rec.Path, key)
	}
	if d.StartSample < 0 || d.EndSample > len(z) || d.StartSample >= d.EndSample {
		return nil, fmt.Errorf("indication %s: measurement window [%d, %d) is outside scan %s (%d samples)", d.ID, d.StartSample, d.EndSample, rec.ID, len(z))
	}
	n := d.EndSample - d.StartSample
	lo := max(0, d.StartSample-windowMargin*n)
	hi := min(len(z), d.EndSample+windowMargin*n)
	w := &reports.Window{Channel: d.Channel, FirstSample: lo, X: make([]float64, hi-lo), Y: make([]float64, hi-lo), Note: note}
	for i := lo; i < hi; i++ {
		w.X[i-lo], w.Y[i-lo] = real(z[i]), imag(z[i])
	}
	return w, nil
}

// scan reads a recorded scan file, refusing one whose size or content no
// longer matches the record: a report never shows a signal other than the
// one that was analysed. A few scans are kept, since indications
// come grouped by scan.
func (s *signalSource) scan(rec store.Scan) (*acquire.Scan, error) {
	if sc := s.scans[rec.ID]; sc != nil {
		return sc, nil
	}
	path := rec.Path
	if !filepath.IsAbs(path) {
		path = filepath.Join(s.dir, path)
	}
	sc, size, sum, err := readScan(path, nil)
	if err != nil {
		return nil, err
	}
	if sum != rec.SHA256 || size != rec.SizeBytes {
		return nil, fmt.Errorf("scan file %s does not match the record (%d bytes, SHA-256 %.12s…; recorded %d bytes, %.12s…)", path, size, sum, rec.SizeBytes, rec.SHA256)
	}
	const keep = 4
	if len(s.order) == keep {
		delete(s.scans, s.order[0])
		s.order = s.order[1:]
	}
	s.scans[rec.ID], s.order = sc, append(s.order, rec.ID)
	return sc, nil
}

// calibratedChannel returns a channel or mix of scan in calibrated volts.
func calibratedChannel(scan *acquire.Scan, cal *calibrate.Calibration, name string) ([]complex128, error) {
	cc := cal.Channel(name)
	if cc == nil {
		return nil, fmt.Errorf("calibration %s has no set-up for %s", cal.ID, name)
	}
	var raw []complex128
	if m := cal.Mix(name); m != nil {
		samples := map[string][]complex128{}
		for _, ch := range scan.Channels {
			samples[ch.Name] = ch.Samples
		}
		var err error
		if raw, err = m.Apply(nil, samples); err != nil {
			return nil, err
		}
	} else {
		ch := scan.Channel(name)
		if ch == nil {
			return nil, fmt.Errorf("scan has no channel %s", name)
		}
		raw = ch.Samples
	}
	f := cc.Factor()
	out := make([]complex128, len(raw))
	for i, v := range raw {
		out[i] = f * v
	}
	return out, nil
}
