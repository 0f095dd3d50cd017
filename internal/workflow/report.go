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
	ReportID        string `json:"report_id"`
	Draft           bool   `json:"draft"`
	PDF             string `json:"pdf"`
	IndicationsCSV  string `json:"indications_csv"`
	IndicationsJSON string `json:"indications_json"`
	RecordCSV       string `json:"record_csv"`
	RecordJSON      string `json:"record_json"`
}

// WriteReports writes the PDF report and the CSV and JSON exports of the
// record into dir. Figures show each reportable indication's signal read
// back from its scan file (verified against the recorded SHA-256) and
// calibrated with the recorded calibration.
func WriteReports(ctx context.Context, st *store.Store, dir string, reportingPct float64, now func() time.Time) (*ReportFiles, error) {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, err
	}
	src := &signalSource{st: st, cals: map[string]*calibrate.Calibration{}, scans: map[string]*acquire.Scan{}}
	in, err := reports.FromStore(ctx, st, reports.Options{Now: now, Curve: curvePoints, Window: src.window, Exclude: reportingCriteria(reportingPct)})
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
	writers := []struct {
		path  string
		write func(*os.File) error
	}{
		{files.PDF, func(f *os.File) error { return reports.WritePDF(f, in) }},
		{files.IndicationsCSV, func(f *os.File) error { return reports.WriteIndicationsCSV(f, in) }},
		{files.IndicationsJSON, func(f *os.File) error { return reports.WriteIndicationsJSON(f, in) }},
		{files.RecordCSV, func(f *os.File) error { return reports.WriteRecordCSV(f, in) }},
		{files.RecordJSON, func(f *os.File) error { return reports.WriteRecordJSON(f, in) }},
	}
	for _, w := range writers {
		if err := writeAtomic(w.path, w.write); err != nil {
			return nil, err
		}
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

// writeAtomic writes a file through a temporary file and a rename, so a
// reader never sees half a report.
func writeAtomic(path string, write func(*os.File) error) error {
	f, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".*")
	if err != nil {
		return err
	}
	tmp := f.Name()
	err = f.Chmod(0o644)
	if err == nil {
		err = write(f)
	}
	if err == nil {
		err = f.Sync()
	}
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		err = os.Rename(tmp, path)
	}
	if err != nil {
		os.Remove(tmp)
		return fmt.Errorf("write %s: %w", path, err)
	}
	return nil
}

// curvePoints gives the report the sizing curve of a calibration: the
// prime channel's sizing curve points (as-built depth against calibrated
// phase).
func curvePoints(c store.Calibration) ([]reports.CurvePoint, error) {
	cal, err := calibrate.ParseCalibration(c.ID, c.Body)
	if err != nil {
		return nil, err
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
		return &reports.Window{Note: "signal not shown: " + err.Error()}, nil
	}
	key := fmt.Sprintf("%s#%d", d.CurveID, d.CurveVersion)
	cal := s.cals[key]
	if cal == nil {
		c, err := s.st.Calibration(ctx, d.CurveID, d.CurveVersion)
		if err != nil {
			return nil, err
		}
		if cal, err = calibrate.ParseCalibration(c.ID, c.Body); err != nil {
			return nil, err
		}
		s.cals[key] = cal
	}
	z, err := calibratedChannel(scan, cal, d.Channel)
	if err != nil {
		return &reports.Window{Note: "signal not shown: " + err.Error()}, nil
	}
	n := d.EndSample - d.StartSample
	lo := max(0, d.StartSample-windowMargin*n)
	hi := min(len(z), d.EndSample+windowMargin*n)
	w := &reports.Window{Channel: d.Channel, FirstSample: lo, X: make([]float64, hi-lo), Y: make([]float64, hi-lo),
		Note: "read back from " + filepath.Base(rec.Path) + " (SHA-256 verified) with calibration " + key}
	for i := lo; i < hi; i++ {
		w.X[i-lo], w.Y[i-lo] = real(z[i]), imag(z[i])
	}
	return w, nil
}

// scan reads a recorded scan file, refusing one whose content no longer
// matches the recorded SHA-256. A few scans are kept, since indications
// come grouped by scan.
func (s *signalSource) scan(rec store.Scan) (*acquire.Scan, error) {
	if sc := s.scans[rec.ID]; sc != nil {
		return sc, nil
	}
	sc, _, sum, err := readScan(rec.Path, nil)
	if err != nil {
		return nil, err
	}
	if sum != rec.SHA256 {
		return nil, fmt.Errorf("%s has changed since it was recorded (SHA-256 %s, recorded %s)", rec.Path, sum[:12], rec.SHA256[:12])
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
