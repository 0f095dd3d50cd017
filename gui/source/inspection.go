package source

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"
	"sort"
	"strings"
	"sync"
	"time"

	"whorl/acquire"
	"whorl/analysis"
	"whorl/analysis/measure"
	"whorl/calibrate"
	"whorl/gui/viewmodel"
	"whorl/internal/demodata"
	"whorl/internal/workflow"
	"whorl/store"
)

// ReportWriter writes the report of an open record into dir and returns
// the paths written. A nil ReportWriter uses the command line's report
// workflow.
type ReportWriter func(ctx context.Context, st *store.Store, dir string) ([]string, error)

// Inspection is an inspection record (package store) opened for review:
// scans are read from the paths the record holds, calibrated with the
// record's calibration of their group, and analysed again on opening to
// find their landmarks and noise; calls and approvals are written to the
// record under the person's name and role.
type Inspection struct {
	info  viewmodel.Info
	actor viewmodel.Actor
	st    *store.Store
	ss    *store.Session
	proc  *calibrate.Procedure
	// report writes the report; nil uses workflow.WriteReports.
	report ReportWriter
	// calScans, when set, gives the file of a calibration's standard scan.
	calScans func(calID string) string

	mu     sync.Mutex
	scans  map[string]store.Scan // newest scan per component
	cals   map[string]calEntry   // by group
	tubes  map[string]*tubeData  // opened components, at most keepTubes
	opened []string              // their ids, oldest first
	closed bool
	now    func() time.Time
}

type calEntry struct {
	rec store.Calibration
	cal *calibrate.Calibration
}

// tubeData is an opened component with what measurements need.
type tubeData struct {
	tube   *viewmodel.Tube
	cal    *calibrate.Calibration
	lms    []analysis.Landmark
	noiseV map[string]float64
}

// OpenRecord opens the inspection record at path for actor. The
// procedure is read from the record (a processing-chain document holding
// a procedure); report may be nil.
func OpenRecord(ctx context.Context, path string, actor viewmodel.Actor, report ReportWriter) (*Inspection, error) {
	st, err := store.Open(ctx, path)
	if err != nil {
		return nil, err
	}
	in, err := newInspection(ctx, st, actor, report)
	if err != nil {
		st.Close()
		return nil, err
	}
	return in, nil
}

func newInspection(ctx context.Context, st *store.Store, actor viewmodel.Actor, report ReportWriter) (*Inspection, error) {
	insp, err := st.Inspection(ctx)
	if err != nil {
		return nil, err
	}
	in := &Inspection{actor: actor, st: st, now: time.Now, ss: st.As(store.Actor{Name: actor.Name, Role: store.Role(actor.Role)}), report: report,
		tubes: map[string]*tubeData{}}
	in.info = viewmodel.Info{Title: fmt.Sprintf("%s · %s · %s", insp.Site, insp.Component, insp.ID), Path: st.Path(),
		Procedure: strings.TrimSpace(insp.Procedure + " rev " + insp.ProcedureRev)}
	if in.proc, err = findProcedure(ctx, st, insp); err != nil {
		return nil, err
	}
	// The standard scans of a record written by `whorl demo` or
	// `whorl inspect`: data/calibration/<group>-open.csv beside the record.
	calDir := filepath.Join(filepath.Dir(st.Path()), "data", "calibration")
	if _, err := os.Stat(calDir); err == nil {
		in.calScans = func(calID string) string { return filepath.Join(calDir, groupOf(calID)+"-open.csv") }
	}
	if err := in.reload(ctx); err != nil {
		return nil, err
	}
	return in, nil
}

// findProcedure returns the record's procedure: a processing-chain
// document that is a procedure, else a procedure.json beside the record or
// in its data folder, else the built-in demo procedure with the record's
// procedure id and revision.
func findProcedure(ctx context.Context, st *store.Store, insp store.Inspection) (*calibrate.Procedure, error) {
	chains, err := st.Chains(ctx)
	if err != nil {
		return nil, err
	}
	for _, d := range chains {
		if p, err := calibrate.ParseProcedure(d.ID, d.Body); err == nil {
			return p, nil
		}
	}
	dir := filepath.Dir(st.Path())
	for _, p := range []string{filepath.Join(dir, "procedure.json"), filepath.Join(dir, "data", "procedure.json")} {
		if _, err := os.Stat(p); err == nil {
			return calibrate.LoadProcedure(p)
		}
	}
	for _, set := range demodata.Sets {
		if p, err := demodata.Procedure(set); err == nil && p.ID == insp.Procedure && p.Revision == insp.ProcedureRev {
			return p, nil
		}
	}
	return nil, fmt.Errorf("%s: no procedure: the record holds none, there is no procedure.json beside it, and %s rev %s is not a built-in procedure",
		st.Path(), insp.Procedure, insp.ProcedureRev)
}

// reload reads the scans and the newest calibration of each group.
func (in *Inspection) reload(ctx context.Context) error {
	scans, err := in.st.Scans(ctx)
	if err != nil {
		return err
	}
	bySc := map[string]store.Scan{}
	for _, s := range scans {
		bySc[s.Component] = s
	}
	recs, err := in.st.Calibrations(ctx)
	if err != nil {
		return err
	}
	cals := map[string]calEntry{}
	for _, r := range recs {
		c, err := calibrate.ParseCalibration(r.ID, r.Body)
		if err != nil {
			return fmt.Errorf("calibration %s v%d in the record: %w", r.ID, r.Version, err)
		}
		if c.OpeningID != "" {
			continue // a closing calibration: checks the group, does not size
		}
		g := groupOf(r.ID)
		if old, ok := cals[g]; !ok || r.Version >= old.rec.Version {
			cals[g] = calEntry{rec: r, cal: c}
		}
	}
	in.mu.Lock()
	in.scans, in.cals = bySc, cals
	in.mu.Unlock()
	return nil
}

// groupOf returns the calibration group named in a calibration id of the
// form "[CAL-]<group>-open" or "-close" (the conventions of the
// workstation's demo and of `whorl inspect`); other ids are their own
// group.
func groupOf(id string) string {
	id = strings.TrimPrefix(id, "CAL-")
	return strings.TrimSuffix(strings.TrimSuffix(id, "-open"), "-close")
}

// Info implements viewmodel.Source.
func (in *Inspection) Info() viewmodel.Info { return in.info }

// Actor implements viewmodel.Source.
func (in *Inspection) Actor() viewmodel.Actor { return in.actor }

// Components implements viewmodel.Source.
func (in *Inspection) Components(ctx context.Context) ([]viewmodel.Component, error) {
	comps, err := in.st.Components(ctx)
	if err != nil {
		return nil, err
	}
	in.mu.Lock()
	scans := in.scans
	in.mu.Unlock()
	out := make([]viewmodel.Component, 0, len(comps))
	for _, c := range comps {
		vc := viewmodel.Component{ID: c.ID, CalGroup: scans[c.ID].CalGroup, MaxDepthPct: math.NaN()}
		inds, err := in.st.Indications(ctx, c.ID)
		if err != nil {
			return nil, err
		}
		open := 0
		for _, ind := range inds {
			if listed(ind) {
				vc.Calls++
				if ind.Status == store.CallProposed {
					open++
				}
				if ind.DepthPct != nil && (math.IsNaN(vc.MaxDepthPct) || *ind.DepthPct > vc.MaxDepthPct) {
					vc.MaxDepthPct = *ind.DepthPct
				}
			}
		}
		switch {
		case c.Status == store.StatusInvalidGroup:
			vc.Status = viewmodel.InvalidGroup
		case c.Status == store.StatusPending || c.Status == store.StatusNotExamined:
			vc.Status = viewmodel.NotAnalysed
		case open > 0:
			vc.Status = viewmodel.WithIndications
		case vc.Calls > 0:
			vc.Status = viewmodel.Resolved
		default:
			vc.Status = viewmodel.Analysed
		}
		out = append(out, vc)
	}
	return out, nil
}

// Tube implements viewmodel.Source: the scan is read, calibrated (each
// channel and mix of the group's calibration: Gain·e^{jθ}·raw) and
// analysed for its landmarks and noise.
func (in *Inspection) Tube(ctx context.Context, id string) (*viewmodel.Tube, error) {
	in.mu.Lock()
	if td, ok := in.tubes[id]; ok {
		in.mu.Unlock()
		return td.tube, nil
	}
	sc, ok := in.scans[id]
	cal := in.cals[sc.CalGroup].cal
	in.mu.Unlock()
	if !ok {
		return nil, fmt.Errorf("component %s has no scan in the record", id)
	}
	raw, err := acquire.ReadScanFile(in.resolve(sc.Path))
	if err != nil {
		return nil, err
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	td := &tubeData{cal: cal, noiseV: map[string]float64{}}
	t := &viewmodel.Tube{ID: id, Scan: raw}
	if cal != nil {
		t.Scan, t.MeasureChannels, td.lms, err = calibrated(raw, cal, in.proc)
		if err != nil {
			return nil, err
		}
		t.VoltsCalibrated = true
		for _, l := range td.lms {
			t.Landmarks = append(t.Landmarks, viewmodel.Landmark{Name: l.Name, PositionM: l.CentreM})
		}
		// The noise windows of the automatic analysis give the S/N.
		if _, rep, err := analysis.Analyze(ctx, raw, cal, in.proc); err == nil {
			for _, nw := range rep.Noise {
				td.noiseV[nw.Channel] = nw.Vpp
			}
		}
	}
	td.tube = t
	in.mu.Lock()
	in.tubes[id] = td
	in.opened = append(in.opened, id)
	for len(in.opened) > keepTubes {
		delete(in.tubes, in.opened[0])
		in.opened = in.opened[1:]
	}
	in.mu.Unlock()
	return t, nil
}

// resolve returns a scan path of the record: relative paths are relative
// to the record's folder.
func (in *Inspection) resolve(path string) string {
	if filepath.IsAbs(path) {
		return path
	}
	return filepath.Join(filepath.Dir(in.st.Path()), path)
}

// keepTubes is the number of opened components kept in memory (about
// 1 MB each for a 20 m tube with eight channels and a mix).
const keepTubes = 24

// calibrated returns a copy of raw with every channel and mix the
// calibration sets up in calibrated volts (analysis.Analyzer.Calibrated:
// the same samples the automatic analysis measures), the names of the
// set-up channels (detection channels first) and the landmarks found.
func calibrated(raw *acquire.Scan, cal *calibrate.Calibration, proc *calibrate.Procedure) (*acquire.Scan, []string, []analysis.Landmark, error) {
	a, err := analysis.NewAnalyzer(cal, proc)
	if err != nil {
		return nil, nil, nil, err
	}
	chans, lms, err := a.Calibrated(raw)
	if err != nil {
		return nil, nil, nil, err
	}
	out := *raw
	out.Channels = nil
	var names []string
	for _, d := range proc.Detection {
		if !slices.Contains(names, d.Channel) && chans[d.Channel] != nil {
			names = append(names, d.Channel)
		}
	}
	for _, c := range raw.Channels {
		if z, ok := chans[c.Name]; ok {
			c.Samples = z
			if !slices.Contains(names, c.Name) {
				names = append(names, c.Name)
			}
		}
		out.Channels = append(out.Channels, c) // not set up: raw volts
	}
	for _, cc := range cal.Channels {
		if raw.Channel(cc.Channel) != nil {
			continue
		}
		mx := cal.Mix(cc.Channel)
		if mx == nil || chans[cc.Channel] == nil {
			continue
		}
		freq := 0.0
		if p := raw.Channel(mx.Primary); p != nil {
			freq = p.FreqHz
		}
		out.Channels = append(out.Channels, acquire.Channel{Name: cc.Channel, FreqHz: freq, Mode: acquire.Differential, Samples: chans[cc.Channel]})
		if !slices.Contains(names, cc.Channel) {
			names = append(names, cc.Channel)
		}
	}
	return &out, names, lms, nil
}

// Measure implements viewmodel.Source: the peak-to-peak chord and
// maximum-rate phase of package calibrate's MeasureWindow (the same
// function the automatic analysis uses), the depth from the channel's
// sizing curve, the location from the nearest landmark the analysis found
// and the S/N against the analysis's noise window.
func (in *Inspection) Measure(ctx context.Context, t *viewmodel.Tube, channel string, w viewmodel.Window) (viewmodel.Measurement, error) {
	in.mu.Lock()
	td := in.tubes[t.ID]
	in.mu.Unlock()
	ch := t.Scan.Channel(channel)
	if ch == nil {
		return viewmodel.Measurement{}, fmt.Errorf("component %s has no channel %s", t.ID, channel)
	}
	if w.Lo < 0 || w.Hi > len(ch.Samples) || w.Len() < 2 {
		return viewmodel.Measurement{}, fmt.Errorf("window %d…%d is outside the %d samples of %s", w.Lo, w.Hi, len(ch.Samples), t.ID)
	}
	posM, err := calibrate.ScanPositions(t.Scan)
	if err != nil {
		return viewmodel.Measurement{}, err
	}
	z := ch.Samples[w.Lo:w.Hi]
	var pp measure.PeakToPeak
	lobe := 0.0
	if in.proc.Lobe == calibrate.LobeEarlier {
		lobe = math.Pi
	}
	vpp, ph, mr, chord := calibrate.MeasureWindow(&pp, z, ch.Mode == acquire.Absolute, lobe)
	m := viewmodel.Measurement{Channel: channel, Window: w, VppV: vpp, PhasePPDeg: ph, PhaseMaxRateDeg: mr,
		ChordA: z[chord.I], ChordB: z[chord.J], PositionM: (posM[w.Lo] + posM[w.Hi-1]) / 2, SNR: math.NaN()}
	if td != nil {
		if nv := td.noiseV[channel]; nv > 0 {
			m.SNR = vpp / nv
		}
		best := math.Inf(1)
		for _, l := range td.lms {
			if d := math.Abs(m.PositionM - l.CentreM); d < best {
				best, m.Landmark, m.OffsetM = d, l.Name, m.PositionM-l.CentreM
			}
		}
		if td.cal != nil {
			if cc := td.cal.Channel(channel); cc != nil && cc.SizingCurve != "" {
				if cv := cc.Curve(cc.SizingCurve); cv != nil {
					d, err := cv.Depth(ph, vpp)
					m.Curve = fmt.Sprintf("%s %s v%d", td.cal.ID, cv.Name, td.cal.Version)
					m.DepthPct, m.DepthOK = d, true
					m.DepthUncPct = curveUncertainty(cv)
					if errors.Is(err, calibrate.ErrOutOfRange) {
						m.DepthNote = "bound"
					} else if err != nil {
						m.DepthOK, m.DepthNote = false, err.Error()
					}
				}
			}
		}
	}
	if !m.DepthOK && m.DepthNote == "" {
		m.DepthNote = "no sizing curve for " + channel
	}
	return m, ctx.Err()
}

// curveUncertainty is the RMS of the curve's leave-one-out residuals, the
// uncertainty the analysis states with each depth.
func curveUncertainty(cv *calibrate.Curve) float64 {
	if len(cv.LOOResiduals) == 0 {
		return math.NaN()
	}
	s := 0.0
	for _, r := range cv.LOOResiduals {
		s += r * r
	}
	return math.Sqrt(s / float64(len(cv.LOOResiduals)))
}

// listed reports whether an indication is one an analyst acts on:
// flaw-like, for review, marked by an analyst, or already called by a
// person (so that a retyped call stays in the list). Other landmark,
// geometry, deposit and noise indications stay in the record unlisted.
func listed(ind store.Indication) bool {
	return ind.Class == string(analysis.ClassFlaw) || ind.Class == string(analysis.ClassReview) ||
		ind.Source == store.SourceAnalyst || ind.CallVersion > 1
}

// Calls implements viewmodel.Source: the indications an analyst acts on
// (see listed).
func (in *Inspection) Calls(ctx context.Context, component string) ([]viewmodel.Call, error) {
	inds, err := in.st.Indications(ctx, component)
	if err != nil {
		return nil, err
	}
	var out []viewmodel.Call
	for _, ind := range inds {
		if !listed(ind) {
			continue
		}
		c := viewmodel.Call{ID: ind.ID, Component: ind.Component, Origin: string(ind.Source), Type: ind.Class, Channel: ind.Channel,
			Window: viewmodel.Window{Lo: ind.StartSample, Hi: ind.EndSample}, PositionM: ind.AxialM, VppV: ind.VppV,
			PhaseDeg: ind.PhaseRad * 180 / math.Pi, State: viewmodel.CallState(ind.Status), Comment: ind.Comment, By: ind.CalledBy}
		c.Landmark, c.OffsetM = splitLocation(ind.Location)
		if ind.DepthPct != nil {
			c.DepthPct, c.DepthOK = *ind.DepthPct, true
		}
		out = append(out, c)
	}
	sort.SliceStable(out, func(i, j int) bool { return out[i].PositionM < out[j].PositionM })
	return out, nil
}

// splitLocation reads the analysis's location text, "+0.120 m from
// support-3", into the landmark name and the signed offset in metres.
// Text in another form is returned whole as the name.
func splitLocation(s string) (string, float64) {
	num, name, ok := strings.Cut(s, " from ")
	if !ok {
		return s, 0
	}
	f := strings.Fields(num)
	var v float64
	if len(f) != 2 || (f[1] != "m" && f[1] != "mm") {
		return s, 0
	}
	if _, err := fmt.Sscanf(f[0], "%g", &v); err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return s, 0
	}
	if f[1] == "mm" {
		v /= 1000
	}
	return strings.TrimSpace(name), v
}

// Decide implements viewmodel.Source with the record's call, which writes
// the call version and its audit event in one transaction.
func (in *Inspection) Decide(ctx context.Context, callID string, d viewmodel.Decision) error {
	ind, err := in.st.Indication(ctx, callID)
	if err != nil {
		return err
	}
	dec := store.Decision{Status: ind.Status, Comment: d.Comment}
	switch d.Kind {
	case viewmodel.Accept:
		dec.Status = store.CallAccepted
	case viewmodel.Reject:
		dec.Status = store.CallRejected
	case viewmodel.Retype:
		dec.Class = d.Type
	case viewmodel.Comment:
	default:
		return fmt.Errorf("unknown decision %v", d.Kind)
	}
	reason := d.Comment
	if reason == "" {
		reason = d.Kind.String() + " at the workstation"
	}
	return permission(in.ss.Call(ctx, callID, dec, reason))
}

// permission maps the store's refusal onto the view-model's sentinel,
// keeping the store's message.
func permission(err error) error {
	if errors.Is(err, store.ErrNotPermitted) && !errors.Is(err, viewmodel.ErrNotPermitted) {
		return fmt.Errorf("%w (%w)", err, viewmodel.ErrNotPermitted)
	}
	return err
}

// AddCall implements viewmodel.Source: an analyst indication on the
// component's scan with the measurement as it stands.
func (in *Inspection) AddCall(ctx context.Context, component string, m viewmodel.Measurement, callType, comment string) (viewmodel.Call, error) {
	in.mu.Lock()
	sc, ok := in.scans[component]
	in.mu.Unlock()
	if !ok {
		return viewmodel.Call{}, fmt.Errorf("component %s has no scan in the record", component)
	}
	ind := store.Indication{ScanID: sc.ID, Channel: m.Channel, StartSample: m.Window.Lo, EndSample: m.Window.Hi, AxialM: m.PositionM,
		Location: fmt.Sprintf("%+.1f mm from %s", m.OffsetM*1000, m.Landmark), VppV: m.VppV, PhaseRad: m.PhasePPDeg * math.Pi / 180,
		Class: callType, Method: "analyst window", Source: store.SourceAnalyst, Comment: comment}
	if m.DepthOK {
		d, u := m.DepthPct, m.DepthUncPct
		ind.DepthPct = &d
		if !math.IsNaN(u) {
			ind.Uncertainty = &u
		}
	}
	ids, err := in.ss.AddIndications(ctx, sc.ID, []store.Indication{ind})
	if err != nil {
		return viewmodel.Call{}, permission(err)
	}
	return viewmodel.Call{ID: ids[0], Component: component, Origin: "analyst", Type: callType}, nil
}

// CallTypes implements viewmodel.Source: the analysis classes.
func (in *Inspection) CallTypes() []string {
	return []string{string(analysis.ClassFlaw), string(analysis.ClassReview), string(analysis.ClassGeometry),
		string(analysis.ClassDeposit), string(analysis.ClassLandmark), string(analysis.ClassNoise)}
}

// Events implements viewmodel.Source from the record's event log.
func (in *Inspection) Events(ctx context.Context, subject string) ([]viewmodel.AuditEvent, error) {
	items, err := in.st.FindItems(ctx, subject)
	if err != nil {
		return nil, err
	}
	var out []viewmodel.AuditEvent
	for _, it := range items {
		ev, err := in.st.History(ctx, it.Kind, it.ID)
		if err != nil {
			return nil, err
		}
		for _, e := range ev {
			out = append(out, viewmodel.AuditEvent{Seq: e.Seq, Actor: e.Actor, Role: string(e.Role), Action: e.Action,
				Subject: e.ItemID, Before: string(e.Before), After: string(e.After), Reason: e.Reason, At: e.At.Format("2006-01-02 15:04:05Z")})
		}
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Seq < out[j].Seq })
	return out, nil
}

// Calibrations implements viewmodel.Source.
func (in *Inspection) Calibrations(ctx context.Context) ([]viewmodel.CalibrationSummary, error) {
	recs, err := in.st.Calibrations(ctx)
	if err != nil {
		return nil, err
	}
	newest := map[string]store.Calibration{}
	var ids []string
	for _, r := range recs {
		if _, ok := newest[r.ID]; !ok {
			ids = append(ids, r.ID)
		}
		if r.Version >= newest[r.ID].Version {
			newest[r.ID] = r
		}
	}
	out := make([]viewmodel.CalibrationSummary, 0, len(ids))
	for _, id := range ids {
		r := newest[id]
		out = append(out, viewmodel.CalibrationSummary{ID: r.ID, Group: groupOf(r.ID), Version: r.Version, State: string(r.Status), ApprovedBy: r.Approver})
	}
	return out, nil
}

// Calibration implements viewmodel.Source.
func (in *Inspection) Calibration(ctx context.Context, id string) (*viewmodel.CalibrationDetail, error) {
	recs, err := in.st.Calibrations(ctx)
	if err != nil {
		return nil, err
	}
	var rec *store.Calibration
	for i := range recs {
		if recs[i].ID == id && (rec == nil || recs[i].Version > rec.Version) {
			rec = &recs[i]
		}
	}
	if rec == nil {
		return nil, fmt.Errorf("no calibration %s in the record", id)
	}
	cal, err := calibrate.ParseCalibration(rec.ID, rec.Body)
	if err != nil {
		return nil, err
	}
	d := &viewmodel.CalibrationDetail{CalibrationSummary: viewmodel.CalibrationSummary{ID: rec.ID, Group: groupOf(rec.ID),
		Version: rec.Version, State: string(rec.Status), ApprovedBy: rec.Approver}}
	var std calibrate.Standard
	if docs, err := in.st.Standards(ctx); err == nil {
		for _, doc := range docs {
			if doc.ID == cal.StandardSerial {
				if json.Unmarshal(doc.Body, &std) == nil {
					d.Standard = viewmodel.StandardInfo{Serial: std.Serial, Material: std.Material, CertificateID: std.CertificateID}
				}
			}
		}
	}
	// The standard scan, when its file is known.
	in.mu.Lock()
	sc, ok := in.scans[cal.ScanComponent]
	in.mu.Unlock()
	path := ""
	switch {
	case in.calScans != nil:
		path = in.calScans(rec.ID)
	case ok:
		path = in.resolve(sc.Path)
	}
	if path != "" {
		if raw, err := acquire.ReadScanFile(path); err == nil {
			if s, _, _, err := calibrated(raw, cal, in.proc); err == nil {
				d.Scan = s
			}
		}
	}
	prime := ""
	if ps := in.proc.ChannelsWithRole(calibrate.RolePrime); len(ps) > 0 {
		prime = ps[0]
	}
	d.Channel = prime
	for _, lf := range cal.Located {
		f := viewmodel.LocatedFlaw{FlawID: lf.FlawID, PositionM: lf.PositionM, Found: lf.Found, Window: viewmodel.Window{Lo: lf.Window[0], Hi: lf.Window[1]},
			Note: lf.Note, VppV: math.NaN(), PhaseDeg: math.NaN()}
		if sf := std.Flaw(lf.FlawID); sf != nil {
			f.Type = string(sf.Type)
			if sf.Origin != "" {
				f.Type += " " + string(sf.Origin)
			}
		}
		for _, ab := range cal.AsBuilt {
			if ab.FlawID == lf.FlawID {
				f.DepthPct = ab.DepthPct
			}
		}
		if cc := cal.Channel(prime); cc != nil {
			if m := cc.Measurement(lf.FlawID); m != nil {
				f.VppV, f.PhaseDeg = m.Vpp, m.PhaseDeg
			}
		}
		d.Located = append(d.Located, f)
	}
	for _, cc := range cal.Channels {
		for _, cv := range cc.Curves {
			vc := viewmodel.Curve{Name: cc.Channel + " " + cv.Name, XName: "phase", XUnit: "°"}
			if cv.Variable == calibrate.VarAmplitude {
				vc.XName, vc.XUnit = "amplitude", "V"
			}
			for i, p := range cv.Points {
				x := p.PhaseDeg
				if cv.Variable == calibrate.VarAmplitude {
					x = p.Vpp
				}
				fit, _ := cv.Depth(p.PhaseDeg, p.Vpp)
				cp := viewmodel.CurvePoint{X: x, DepthPct: p.DepthPct, FitPct: fit, ResidualPct: p.DepthPct - fit, Label: p.FlawID}
				if i < len(cv.LOOResiduals) {
					cp.ResidualPct = cv.LOOResiduals[i]
				}
				vc.Points = append(vc.Points, cp)
			}
			for k := range 61 {
				x := cv.XMin + (cv.XMax-cv.XMin)*float64(k)/60
				ph, vpp := x, cv.VppMin
				if cv.Variable == calibrate.VarAmplitude {
					ph, vpp = 0, x
				}
				if dd, err := cv.Depth(ph, vpp); err == nil {
					vc.FitX, vc.FitDepthPct = append(vc.FitX, x), append(vc.FitDepthPct, dd)
				}
			}
			vc.Warning = strings.Join(cv.Warnings, "; ")
			d.Curves = append(d.Curves, vc)
		}
	}
	checks, err := in.st.GroupChecks(ctx)
	if err != nil {
		return nil, err
	}
	for _, g := range checks {
		if g.Group != d.Group {
			continue
		}
		for _, c := range g.Checks {
			d.Checks = append(d.Checks, viewmodel.Check{Name: c.Reference + " " + c.Quantity, Pass: c.Pass,
				Detail: fmt.Sprintf("%+.2f %s (limit %.2f ± %.2f)", c.Measured, c.Unit, c.Expected, c.Tolerance)})
		}
		verdict := "group valid"
		if !g.Valid {
			verdict = fmt.Sprintf("group INVALID: %d components to re-test", len(g.Retest))
		}
		d.Checks = append(d.Checks, viewmodel.Check{Name: "closing check " + fmt.Sprint(g.Check), Pass: g.Valid, Detail: verdict})
	}
	return d, nil
}

// Approve implements viewmodel.Source: the record refuses any role but
// Level III, with its own message.
func (in *Inspection) Approve(ctx context.Context, id, reason string) error {
	cs, err := in.Calibrations(ctx)
	if err != nil {
		return err
	}
	for _, c := range cs {
		if c.ID == id {
			if reason == "" {
				reason = "approved at the workstation"
			}
			return permission(in.ss.ApproveCalibration(ctx, id, c.Version, reason))
		}
	}
	return fmt.Errorf("no calibration %s in the record", id)
}

// Export implements viewmodel.Source with the report workflow of the
// command line (`whorl report`): the procedure's reporting threshold
// applies, figures show the recorded signals, and a record that does not
// verify is refused.
func (in *Inspection) Export(ctx context.Context, dir string) ([]string, error) {
	if in.report != nil {
		return in.report(ctx, in.st, dir)
	}
	f, err := workflow.WriteReports(ctx, in.st, dir, in.proc.ReportingPct, in.now)
	if err != nil {
		return nil, err
	}
	return []string{f.PDF, f.IndicationsCSV, f.IndicationsJSON, f.RecordCSV, f.RecordJSON}, nil
}

// Store returns the open record (for tests and the command line).
func (in *Inspection) Store() *store.Store { return in.st }

// Close closes the record.
func (in *Inspection) Close() error {
	in.mu.Lock()
	defer in.mu.Unlock()
	if in.closed {
		return nil
	}
	in.closed = true
	return in.st.Close()
}
