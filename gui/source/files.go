package source

import (
	"context"
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"strings"
	"sync"
	"time"

	"whorl/acquire"
	"whorl/analysis/measure"
	"whorl/calibrate"
	"whorl/gui/viewmodel"
)

// errNoRecord is returned by the actions that need an inspection record.
var errNoRecord = errors.New("scan files were opened without an inspection record: open an inspection database to record calls, approve calibrations or export reports")

// Files shows scan files without an inspection record: each file is one
// component, in raw (uncalibrated) volts, measured with package
// calibrate's MeasureWindow; nothing is recorded.
type Files struct {
	actor viewmodel.Actor
	paths []string
	mu    sync.Mutex
	tubes map[string]*viewmodel.Tube
}

// OpenFiles opens scan files for viewing.
func OpenFiles(paths []string, actor viewmodel.Actor) (*Files, error) {
	if len(paths) == 0 {
		return nil, errors.New("no scan files given")
	}
	return &Files{actor: actor, paths: paths, tubes: map[string]*viewmodel.Tube{}}, nil
}

func (f *Files) id(i int) string {
	return strings.TrimSuffix(filepath.Base(f.paths[i]), filepath.Ext(f.paths[i]))
}

// Info implements viewmodel.Source.
func (f *Files) Info() viewmodel.Info {
	return viewmodel.Info{Title: fmt.Sprintf("%d scan files (no inspection record)", len(f.paths)), Path: filepath.Dir(f.paths[0])}
}

// Actor implements viewmodel.Source.
func (f *Files) Actor() viewmodel.Actor { return f.actor }

// Components implements viewmodel.Source.
func (f *Files) Components(ctx context.Context) ([]viewmodel.Component, error) {
	out := make([]viewmodel.Component, len(f.paths))
	for i := range f.paths {
		out[i] = viewmodel.Component{ID: f.id(i), Status: viewmodel.NotAnalysed, MaxDepthPct: math.NaN()}
	}
	return out, nil
}

// Tube implements viewmodel.Source.
func (f *Files) Tube(ctx context.Context, id string) (*viewmodel.Tube, error) {
	f.mu.Lock()
	t, ok := f.tubes[id]
	f.mu.Unlock()
	if ok {
		return t, nil
	}
	for i, p := range f.paths {
		if f.id(i) != id {
			continue
		}
		sc, err := acquire.ReadScanFile(p)
		if err != nil {
			return nil, err
		}
		t = &viewmodel.Tube{ID: id, Scan: sc}
		if sc.PositionM == nil && sc.TimeS != nil && sc.Meta.ProbeSpeedMPS > 0 {
			if pos, err := calibrate.ScanPositions(sc); err == nil {
				cp := *sc
				cp.PositionM = pos
				t.Scan = &cp
			}
		}
		for _, c := range sc.Channels {
			t.MeasureChannels = append(t.MeasureChannels, c.Name)
		}
		f.mu.Lock()
		f.tubes[id] = t
		f.mu.Unlock()
		return t, nil
	}
	return nil, fmt.Errorf("no scan file for %s", id)
}

// Measure implements viewmodel.Source with calibrate.MeasureWindow (later
// lobe); there is no curve, landmark or noise window without a record.
func (f *Files) Measure(ctx context.Context, t *viewmodel.Tube, channel string, w viewmodel.Window) (viewmodel.Measurement, error) {
	ch := t.Scan.Channel(channel)
	if ch == nil {
		return viewmodel.Measurement{}, fmt.Errorf("%s has no channel %s", t.ID, channel)
	}
	if w.Lo < 0 || w.Hi > len(ch.Samples) || w.Len() < 2 {
		return viewmodel.Measurement{}, fmt.Errorf("window %d…%d is outside the %d samples of %s", w.Lo, w.Hi, len(ch.Samples), t.ID)
	}
	z := ch.Samples[w.Lo:w.Hi]
	var pp measure.PeakToPeak
	vpp, ph, mr, chord := calibrate.MeasureWindow(&pp, z, ch.Mode == acquire.Absolute, 0)
	m := viewmodel.Measurement{Channel: channel, Window: w, VppV: vpp, PhasePPDeg: ph, PhaseMaxRateDeg: mr,
		ChordA: z[chord.I], ChordB: z[chord.J], SNR: math.NaN(), DepthNote: "raw volts: no calibration", Landmark: "start"}
	if p := t.Scan.PositionM; p != nil {
		m.PositionM = (p[w.Lo] + p[w.Hi-1]) / 2
		m.OffsetM = m.PositionM - p[0]
	}
	return m, ctx.Err()
}

// Calls implements viewmodel.Source: scan files have no calls.
func (f *Files) Calls(ctx context.Context, component string) ([]viewmodel.Call, error) {
	return nil, nil
}

// Decide implements viewmodel.Source.
func (f *Files) Decide(ctx context.Context, callID string, d viewmodel.Decision) error {
	return errNoRecord
}

// AddCall implements viewmodel.Source.
func (f *Files) AddCall(ctx context.Context, component string, m viewmodel.Measurement, callType, comment string) (viewmodel.Call, error) {
	return viewmodel.Call{}, errNoRecord
}

// CallTypes implements viewmodel.Source.
func (f *Files) CallTypes() []string { return nil }

// Events implements viewmodel.Source.
func (f *Files) Events(ctx context.Context, subject string) ([]viewmodel.AuditEvent, error) {
	return nil, nil
}

// Calibrations implements viewmodel.Source.
func (f *Files) Calibrations(ctx context.Context) ([]viewmodel.CalibrationSummary, error) {
	return nil, nil
}

// Calibration implements viewmodel.Source.
func (f *Files) Calibration(ctx context.Context, id string) (*viewmodel.CalibrationDetail, error) {
	return nil, errNoRecord
}

// Approve implements viewmodel.Source.
func (f *Files) Approve(ctx context.Context, id, reason string) error { return errNoRecord }

// Export implements viewmodel.Source.
func (f *Files) Export(ctx context.Context, dir string) ([]string, error) {
	return nil, errNoRecord
}

// Close implements viewmodel.Source.
func (f *Files) Close() error { return nil }

// Options say what Open opens.
type Options struct {
	// Paths is empty (the demo), one inspection database (*.db) or scan files.
	Paths []string
	Actor viewmodel.Actor
	// DemoDir is where the demo inspection is built and kept.
	DemoDir string
	// Now is the clock of the record (time.Now when nil).
	Now func() time.Time
}

// Open opens what opt names.
func Open(ctx context.Context, opt Options) (viewmodel.Source, error) {
	if err := opt.Actor.Validate(); err != nil {
		return nil, err
	}
	switch {
	case len(opt.Paths) == 0:
		return OpenDemo(ctx, opt.DemoDir, opt.Actor, opt.Now, nil)
	case len(opt.Paths) == 1 && strings.EqualFold(filepath.Ext(opt.Paths[0]), ".db"):
		return OpenRecord(ctx, opt.Paths[0], opt.Actor, nil)
	}
	return OpenFiles(opt.Paths, opt.Actor)
}
