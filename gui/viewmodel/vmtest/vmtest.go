// Package vmtest provides an in-memory inspection for testing the
// workstation's view-models and views without the record store: a few
// tubes with invented signals, calls with decisions and an audit trail, a
// calibration that only a Level III may approve, and a coil model stand-in.
// Measurements use the real measurement functions of package
// analysis/measure.
package vmtest

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"slices"
	"sort"
	"sync"

	"whorl/acquire"
	"whorl/analysis/measure"
	"whorl/gui/viewmodel"
)

// Source is an in-memory viewmodel.Source. Its zero value is not usable;
// call New.
type Source struct {
	actor viewmodel.Actor

	mu       sync.Mutex
	tubes    map[string]*viewmodel.Tube
	order    []string
	calls    map[string][]viewmodel.Call
	events   []viewmodel.AuditEvent
	approved bool
	nextID   int
	// MeasureCalls counts Measure calls.
	MeasureCalls int
}

// Flaw positions of the invented tubes, in metres.
var flawAt = []float64{0.42, 1.13}

// New returns an inspection of n tubes of samples samples each (2 mm
// apart) with two channels, for the given person.
func New(actor viewmodel.Actor, n, samples int) *Source {
	s := &Source{actor: actor, tubes: map[string]*viewmodel.Tube{}, calls: map[string][]viewmodel.Call{}}
	for k := range n {
		id := fmt.Sprintf("T%02d", k+1)
		sc := Scan(id, samples, 2, float64(k+1))
		t := &viewmodel.Tube{ID: id, Scan: sc, MeasureChannels: []string{"400k-diff", "100k-diff"}, VoltsCalibrated: true,
			Landmarks: []viewmodel.Landmark{{Name: "end A", PositionM: 0}, {Name: "plate 1", PositionM: 0.8}}}
		s.tubes[id] = t
		s.order = append(s.order, id)
		if k%2 == 0 {
			for j, at := range flawAt {
				i := int(at / 0.002)
				s.nextID++
				s.calls[id] = append(s.calls[id], viewmodel.Call{ID: fmt.Sprintf("I%03d", s.nextID), Component: id, Origin: "auto",
					Type: "pit", Channel: "400k-diff", Window: viewmodel.Window{Lo: i - 15, Hi: i + 15}, PositionM: at,
					Landmark: "end A", OffsetM: at, VppV: float64(k+1) * 2, PhaseDeg: 100 + 10*float64(j), DepthPct: 40, DepthOK: true,
					State: viewmodel.Proposed})
			}
		}
	}
	return s
}

// Scan returns an invented two-channel scan: noise-free differential
// responses (a Gaussian derivative along a fixed direction) at flawAt,
// with amplitude gain volts.
func Scan(id string, n, channels int, gain float64) *acquire.Scan {
	sc := &acquire.Scan{Meta: acquire.Meta{Component: id, CalGroup: "G1"}, AxialStepM: 0.002}
	sc.PositionM = make([]float64, n)
	for i := range sc.PositionM {
		sc.PositionM[i] = float64(i) * 0.002
	}
	freqs := []float64{400e3, 100e3, 300e3, 20e3, 400e3, 100e3, 300e3, 20e3}
	for c := range channels {
		name := fmt.Sprintf("%gk-diff", freqs[c%len(freqs)]/1e3)
		mode := acquire.Differential
		if c >= 4 {
			name = fmt.Sprintf("%gk-abs", freqs[c%len(freqs)]/1e3)
			mode = acquire.Absolute
		}
		dir := cmplx.Rect(gain, (40+25*float64(c))*math.Pi/180)
		ch := acquire.Channel{Name: name, FreqHz: freqs[c%len(freqs)], Mode: mode, Samples: make([]complex128, n)}
		for i, x := range sc.PositionM {
			var v complex128
			for _, at := range flawAt {
				u := (x - at) / 0.006
				v += complex(-u*math.Exp(-u*u)*1.1658, 0) // peak-to-peak 1 along dir
			}
			// A small lift-off wobble so the charts are not flat.
			v += complex(0.02*math.Sin(float64(i)*0.05), 0)
			ch.Samples[i] = v * dir
		}
		sc.Channels = append(sc.Channels, ch)
	}
	return sc
}

// Info implements viewmodel.Source.
func (s *Source) Info() viewmodel.Info {
	return viewmodel.Info{Title: "test inspection", Path: ":memory:", Procedure: "TP-1 rev 0"}
}

// Actor implements viewmodel.Source.
func (s *Source) Actor() viewmodel.Actor { return s.actor }

// Components implements viewmodel.Source.
func (s *Source) Components(ctx context.Context) ([]viewmodel.Component, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	var out []viewmodel.Component
	for _, id := range s.order {
		c := viewmodel.Component{ID: id, CalGroup: "G1", Status: viewmodel.Analysed, MaxDepthPct: math.NaN()}
		calls := s.calls[id]
		c.Calls = len(calls)
		open := 0
		for _, k := range calls {
			if k.State == viewmodel.Proposed {
				open++
			}
			c.MaxDepthPct = 40
		}
		switch {
		case len(calls) > 0 && open > 0:
			c.Status = viewmodel.WithIndications
		case len(calls) > 0:
			c.Status = viewmodel.Resolved
		}
		out = append(out, c)
	}
	return out, nil
}

// Tube implements viewmodel.Source.
func (s *Source) Tube(ctx context.Context, id string) (*viewmodel.Tube, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	t, ok := s.tubes[id]
	if !ok {
		return nil, fmt.Errorf("no component %q", id)
	}
	return t, nil
}

// Measure implements viewmodel.Source with package analysis/measure.
func (s *Source) Measure(ctx context.Context, t *viewmodel.Tube, channel string, w viewmodel.Window) (viewmodel.Measurement, error) {
	s.mu.Lock()
	s.MeasureCalls++
	s.mu.Unlock()
	ch := t.Scan.Channel(channel)
	if ch == nil {
		return viewmodel.Measurement{}, fmt.Errorf("no channel %q", channel)
	}
	if w.Lo < 0 || w.Hi > len(ch.Samples) || w.Len() < 2 {
		return viewmodel.Measurement{}, fmt.Errorf("window %d…%d outside the scan", w.Lo, w.Hi)
	}
	z := ch.Samples[w.Lo:w.Hi]
	c := measure.Vpp(z)
	r := measure.MaxRate(z)
	mid := t.Scan.PositionM[(w.Lo+w.Hi)/2]
	m := viewmodel.Measurement{Channel: channel, Window: w, VppV: c.Vpp, PhasePPDeg: c.PhaseRad * 180 / math.Pi,
		PhaseMaxRateDeg: r.PhaseRad * 180 / math.Pi, PositionM: mid, ChordA: z[c.I], ChordB: z[c.J],
		DepthOK: false, DepthNote: "no curve in the test inspection", SNR: math.NaN()}
	best := math.Inf(1)
	for _, lm := range t.Landmarks {
		if d := math.Abs(mid - lm.PositionM); d < best {
			best, m.Landmark, m.OffsetM = d, lm.Name, mid-lm.PositionM
		}
	}
	return m, ctx.Err()
}

// Calls implements viewmodel.Source.
func (s *Source) Calls(ctx context.Context, component string) ([]viewmodel.Call, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	return slices.Clone(s.calls[component]), nil
}

func (s *Source) event(action, subject, before, after, reason string) {
	s.events = append(s.events, viewmodel.AuditEvent{Seq: int64(len(s.events) + 1), Actor: s.actor.Name, Role: string(s.actor.Role),
		Action: action, Subject: subject, Before: before, After: after, Reason: reason, At: "2026-01-01T00:00:00Z"})
}

// Decide implements viewmodel.Source; level1 and qa may not decide.
func (s *Source) Decide(ctx context.Context, callID string, d viewmodel.Decision) error {
	if s.actor.Role != viewmodel.Level2 && s.actor.Role != viewmodel.Level3 {
		return fmt.Errorf("%s may not decide calls: %w", s.actor.Role, viewmodel.ErrNotPermitted)
	}
	s.mu.Lock()
	defer s.mu.Unlock()
	for comp, calls := range s.calls {
		for i := range calls {
			c := &calls[i]
			if c.ID != callID {
				continue
			}
			before := string(c.State) + " " + c.Type
			switch d.Kind {
			case viewmodel.Accept:
				c.State = viewmodel.Accepted
			case viewmodel.Reject:
				c.State = viewmodel.Rejected
			case viewmodel.Retype:
				c.Type = d.Type
			case viewmodel.Comment:
				c.Comment = d.Comment
			default:
				return errors.New("unknown decision")
			}
			c.By = s.actor.Name
			s.calls[comp] = calls
			s.event("call "+d.Kind.String(), callID, before, string(c.State)+" "+c.Type, d.Comment)
			return nil
		}
	}
	return fmt.Errorf("no call %q", callID)
}

// AddCall implements viewmodel.Source.
func (s *Source) AddCall(ctx context.Context, component string, m viewmodel.Measurement, callType, comment string) (viewmodel.Call, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	s.nextID++
	c := viewmodel.Call{ID: fmt.Sprintf("I%03d", s.nextID), Component: component, Origin: "analyst", Type: callType, Channel: m.Channel,
		Window: m.Window, PositionM: m.PositionM, Landmark: m.Landmark, OffsetM: m.OffsetM, VppV: m.VppV, PhaseDeg: m.PhasePPDeg,
		State: viewmodel.Proposed, Comment: comment, By: s.actor.Name}
	s.calls[component] = append(s.calls[component], c)
	sort.Slice(s.calls[component], func(i, j int) bool { return s.calls[component][i].PositionM < s.calls[component][j].PositionM })
	s.event("call add", c.ID, "", callType, comment)
	return c, nil
}

// CallTypes implements viewmodel.Source.
func (s *Source) CallTypes() []string {
	return []string{"pit", "wear", "crack", "dent", "deposit", "noise"}
}

// Events implements viewmodel.Source.
func (s *Source) Events(ctx context.Context, subject string) ([]viewmodel.AuditEvent, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	var out []viewmodel.AuditEvent
	for _, e := range s.events {
		if subject == "" || e.Subject == subject {
			out = append(out, e)
		}
	}
	return out, nil
}

// CalibrationID is the id of the test inspection's calibration.
const CalibrationID = "CAL-G1"

// Calibrations implements viewmodel.Source.
func (s *Source) Calibrations(ctx context.Context) ([]viewmodel.CalibrationSummary, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	return []viewmodel.CalibrationSummary{s.calSummary()}, nil
}

func (s *Source) calSummary() viewmodel.CalibrationSummary {
	c := viewmodel.CalibrationSummary{ID: CalibrationID, Group: "G1", Version: 1, State: "draft"}
	if s.approved {
		c.State, c.ApprovedBy = "approved", "someone"
	}
	return c
}

// Calibration implements viewmodel.Source.
func (s *Source) Calibration(ctx context.Context, id string) (*viewmodel.CalibrationDetail, error) {
	if id != CalibrationID {
		return nil, fmt.Errorf("no calibration %q", id)
	}
	s.mu.Lock()
	defer s.mu.Unlock()
	d := &viewmodel.CalibrationDetail{CalibrationSummary: s.calSummary(), Channel: "400k-diff", Scan: Scan("STD", 800, 2, 4),
		Standard: viewmodel.StandardInfo{Serial: "STD-1", Material: "invented alloy"}}
	depths := []float64{100, 80, 60, 40, 20}
	phases := []float64{40, 70, 95, 120, 145}
	c := viewmodel.Curve{Name: "phase→depth 400k-diff", XName: "phase", XUnit: "°"}
	for i := range depths {
		fit := 100 - (phases[i]-40)*(80.0/105)
		c.Points = append(c.Points, viewmodel.CurvePoint{X: phases[i], DepthPct: depths[i], FitPct: fit, ResidualPct: depths[i] - fit})
	}
	for p := 40.0; p <= 145; p += 5 {
		c.FitX, c.FitDepthPct = append(c.FitX, p), append(c.FitDepthPct, 100-(p-40)*(80.0/105))
	}
	d.Curves = []viewmodel.Curve{c}
	for i, at := range flawAt {
		d.Located = append(d.Located, viewmodel.LocatedFlaw{FlawID: fmt.Sprintf("F%d", i+1), Type: "flat-bottom-hole", DepthPct: depths[i], PositionM: at, Found: true, VppV: 4, PhaseDeg: phases[i]})
	}
	d.Checks = []viewmodel.Check{{Name: "closing phase", Pass: true, Detail: "within 3°"}}
	return d, nil
}

// Approve implements viewmodel.Source: only a Level III may approve.
func (s *Source) Approve(ctx context.Context, id, reason string) error {
	if s.actor.Role != viewmodel.Level3 {
		return fmt.Errorf("%s (%s) may not approve calibrations; a Level III approves: %w", s.actor.Name, s.actor.Role, viewmodel.ErrNotPermitted)
	}
	s.mu.Lock()
	defer s.mu.Unlock()
	s.approved = true
	s.event("calibration approve", id, "draft", "approved", reason)
	return nil
}

// Export implements viewmodel.Source by refusing: the test inspection has
// no report writer.
func (s *Source) Export(ctx context.Context, dir string) ([]string, error) {
	return nil, errors.New("the test inspection has no report writer")
}

// Close implements viewmodel.Source.
func (s *Source) Close() error { return nil }
