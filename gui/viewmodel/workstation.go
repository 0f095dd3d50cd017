package viewmodel

import (
	"context"
	"fmt"
	"math"
	"slices"
	"strings"
	"sync"
)

// Change says which parts of the workstation state changed, so views
// redraw only what they must.
type Change uint

// Parts of the workstation state.
const (
	ChangedComponents Change = 1 << iota
	ChangedTube
	ChangedChart
	ChangedPlane
	ChangedMeasurement
	ChangedCalls
	ChangedMessage
)

// worker runs background jobs and hands their results to the UI thread.
type worker struct {
	// post runs f on the UI thread (fyne.Do in the GUI; a direct call in tests).
	post func(func())
	jobs sync.WaitGroup
}

// goAndPost runs work in a goroutine and then apply on the UI thread.
func (w *worker) goAndPost(work func(), apply func()) {
	w.jobs.Add(1)
	go func() {
		defer w.jobs.Done()
		work()
		w.post(apply)
	}()
}

// Wait blocks until every background job started so far has finished and
// handed its result to the UI thread. For tests and for shutting down.
func (w *worker) Wait() { w.jobs.Wait() }

// Workstation is the review screen's state: the component list, the open
// tube with its strip-chart and impedance-plane state, the measurement in
// the analysis window and the component's calls.
type Workstation struct {
	worker
	src Source
	// OnChange is called on the UI thread after the state changed.
	OnChange func(Change)

	all     []Component
	filter  map[Status]bool // nil: all statuses
	search  string
	visible []int
	current string // selected component id

	tube      *Tube
	chart     *Chart
	plane     Plane
	autoSpan  bool
	shown     []string
	parts     []Part
	channel   string
	meas      Measurement
	measOK    bool
	calls     []Call
	callIdx   int
	message   string
	isError   bool
	loading   bool
	tubeGen   int
	measGen   int
	measStop  context.CancelFunc
	tubeStop  context.CancelFunc
	ctx       context.Context
	cancelAll context.CancelFunc
}

// NewWorkstation returns the review state over src. post must run its
// argument on the UI thread.
func NewWorkstation(src Source, post func(func())) *Workstation {
	ctx, cancel := context.WithCancel(context.Background())
	return &Workstation{worker: worker{post: post}, src: src, ctx: ctx, cancelAll: cancel,
		parts: []Part{PartX, PartY}, plane: Plane{SpanV: DefaultSpanV}, autoSpan: true, callIdx: -1}
}

// Close cancels every running job and waits for them.
func (ws *Workstation) Close() {
	ws.cancelAll()
	ws.Wait()
}

// Source returns the inspection under review.
func (ws *Workstation) Source() Source { return ws.src }

func (ws *Workstation) changed(c Change) {
	if ws.OnChange != nil {
		ws.OnChange(c)
	}
}

func (ws *Workstation) setMessage(isErr bool, format string, a ...any) {
	ws.message = fmt.Sprintf(format, a...)
	ws.isError = isErr
	ws.changed(ChangedMessage)
}

// Message returns the latest status line and whether it reports an error.
func (ws *Workstation) Message() (string, bool) { return ws.message, ws.isError }

// Load reads the component list and opens the first component with open
// indications (or the first component).
func (ws *Workstation) Load() {
	var comps []Component
	var err error
	ws.goAndPost(func() { comps, err = ws.src.Components(ws.ctx) }, func() {
		if err != nil {
			ws.setMessage(true, "reading the component list: %v", err)
			return
		}
		ws.all = comps
		ws.refilter()
		ws.changed(ChangedComponents)
		if ws.current == "" && len(ws.visible) > 0 {
			// Start on the first component with open indications.
			first := ws.all[ws.visible[0]].ID
			for _, j := range ws.visible {
				if ws.all[j].Status == WithIndications {
					first = ws.all[j].ID
					break
				}
			}
			ws.Select(first)
		}
	})
}

// refreshComponents re-reads the statuses after a decision.
func (ws *Workstation) refreshComponents() {
	var comps []Component
	var err error
	ws.goAndPost(func() { comps, err = ws.src.Components(ws.ctx) }, func() {
		if err == nil {
			ws.all = comps
			ws.refilter()
			ws.changed(ChangedComponents)
		}
	})
}

func (ws *Workstation) refilter() {
	ws.visible = ws.visible[:0]
	q := strings.ToLower(strings.TrimSpace(ws.search))
	for i, c := range ws.all {
		if ws.filter != nil && !ws.filter[c.Status] {
			continue
		}
		if q != "" && !strings.Contains(strings.ToLower(c.ID), q) && !strings.Contains(strings.ToLower(c.CalGroup), q) {
			continue
		}
		ws.visible = append(ws.visible, i)
	}
}

// SetSearch shows only components whose id or calibration group contains
// q (any case).
func (ws *Workstation) SetSearch(q string) {
	ws.search = q
	ws.refilter()
	ws.changed(ChangedComponents)
}

// SetFilter shows only components with one of the given statuses; none
// shows all.
func (ws *Workstation) SetFilter(statuses ...Status) {
	if len(statuses) == 0 {
		ws.filter = nil
	} else {
		ws.filter = map[Status]bool{}
		for _, s := range statuses {
			ws.filter[s] = true
		}
	}
	ws.refilter()
	ws.changed(ChangedComponents)
}

// Components returns the components passing the filter and search.
func (ws *Workstation) Components() []Component {
	out := make([]Component, len(ws.visible))
	for i, j := range ws.visible {
		out[i] = ws.all[j]
	}
	return out
}

// AllComponents returns the number of components in the inspection.
func (ws *Workstation) AllComponents() int { return len(ws.all) }

// Current returns the selected component id ("" before any).
func (ws *Workstation) Current() string { return ws.current }

// CurrentIndex returns the position of the selected component in
// Components(), or −1.
func (ws *Workstation) CurrentIndex() int {
	for i, j := range ws.visible {
		if ws.all[j].ID == ws.current {
			return i
		}
	}
	return -1
}

// Next selects the next component of the filtered list (d = +1) or the
// previous one (d = −1); it stops at the ends.
func (ws *Workstation) Next(d int) {
	if len(ws.visible) == 0 {
		return
	}
	i := ws.CurrentIndex()
	if i < 0 {
		i = 0
	} else {
		i = min(max(i+d, 0), len(ws.visible)-1)
	}
	id := ws.all[ws.visible[i]].ID
	if id != ws.current {
		ws.Select(id)
	}
}

// Loading reports whether a component is being opened.
func (ws *Workstation) Loading() bool { return ws.loading }

// Select opens a component: its scan, landmarks and calls.
func (ws *Workstation) Select(id string) {
	if ws.tubeStop != nil {
		ws.tubeStop()
	}
	ctx, stop := context.WithCancel(ws.ctx)
	ws.tubeStop = stop
	ws.tubeGen++
	gen := ws.tubeGen
	ws.current = id
	ws.loading = true
	ws.changed(ChangedComponents)
	var tube *Tube
	var calls []Call
	var err error
	ws.goAndPost(func() {
		tube, err = ws.src.Tube(ctx, id)
		if err == nil {
			calls, err = ws.src.Calls(ctx, id)
		}
	}, func() {
		if gen != ws.tubeGen {
			return
		}
		ws.loading = false
		if err != nil {
			ws.setMessage(true, "opening %s: %v", id, err)
			return
		}
		ws.open(tube, calls)
	})
}

// defaultWindowSamples is the width of a new analysis window in samples.
const defaultWindowSamples = 60

func (ws *Workstation) open(t *Tube, calls []Call) {
	ws.tube = t
	s := t.Scan
	name, unit, axis := "position", "m", s.PositionM
	if axis == nil && s.TimeS != nil {
		name, unit, axis = "time", "s", s.TimeS
	}
	ws.chart = NewChart(axis, s.Len(), name, unit, defaultWindowSamples)
	// Show the measured channels first, then the others, four in all.
	ws.shown = ws.shown[:0]
	for _, n := range t.MeasureChannels {
		if len(ws.shown) < 4 && s.Channel(n) != nil && !slices.Contains(ws.shown, n) {
			ws.shown = append(ws.shown, n)
		}
	}
	for _, c := range s.Channels {
		if len(ws.shown) < 4 && !slices.Contains(ws.shown, c.Name) {
			ws.shown = append(ws.shown, c.Name)
		}
	}
	if !slices.Contains(t.MeasureChannels, ws.channel) {
		ws.channel = ""
		if len(t.MeasureChannels) > 0 {
			ws.channel = t.MeasureChannels[0]
		} else if len(s.Channels) > 0 {
			ws.channel = s.Channels[0].Name
		}
	}
	ws.plane.Null = 0
	ws.calls = calls
	ws.callIdx = -1
	ws.measOK = false
	if len(calls) > 0 {
		ws.SelectCall(0)
	}
	ws.setMessage(false, "%s: %d samples, %d channels, %d calls", t.ID, s.Len(), len(s.Channels), len(calls))
	ws.changed(ChangedTube | ChangedChart | ChangedPlane | ChangedCalls)
	ws.Remeasure()
}

// Tube returns the open component, or nil.
func (ws *Workstation) Tube() *Tube { return ws.tube }

// Chart returns the strip-chart state of the open component, or nil.
func (ws *Workstation) Chart() *Chart { return ws.chart }

// Plane returns the impedance-plane display transform.
func (ws *Workstation) Plane() Plane { return ws.plane }

// Shown returns the channels drawn as strip charts.
func (ws *Workstation) Shown() []string { return ws.shown }

// SetShown chooses the channels drawn as strip charts.
func (ws *Workstation) SetShown(names []string) {
	ws.shown = slices.Clone(names)
	ws.changed(ChangedChart)
}

// Parts returns the components (X, Y) drawn on the strip charts.
func (ws *Workstation) Parts() []Part { return ws.parts }

// SetParts chooses the components drawn on the strip charts.
func (ws *Workstation) SetParts(p ...Part) {
	ws.parts = slices.Clone(p)
	ws.changed(ChangedChart)
}

// Channel returns the channel measured and drawn on the impedance plane.
func (ws *Workstation) Channel() string { return ws.channel }

// SetChannel chooses the measured channel.
func (ws *Workstation) SetChannel(name string) {
	if ws.tube == nil || ws.tube.Scan.Channel(name) == nil || name == ws.channel {
		return
	}
	ws.channel = name
	ws.changed(ChangedPlane)
	ws.Remeasure()
}

// windowChanged is called after every change of the analysis window.
func (ws *Workstation) windowChanged() {
	ws.changed(ChangedChart | ChangedPlane)
	ws.Remeasure()
}

// moveWindow applies f to the chart, then re-measures.
func (ws *Workstation) moveWindow(f func(*Chart)) {
	if ws.chart != nil {
		f(ws.chart)
		ws.windowChanged()
	}
}

// moveView applies f to the chart's view (zoom, pan): only a redraw.
func (ws *Workstation) moveView(f func(*Chart)) {
	if ws.chart != nil {
		f(ws.chart)
		ws.changed(ChangedChart)
	}
}

// StepWindow moves the analysis window by a fraction of its width.
func (ws *Workstation) StepWindow(frac float64) {
	ws.moveWindow(func(c *Chart) { c.StepWindow(frac) })
}

// ScaleWindow multiplies the analysis-window width by f.
func (ws *Workstation) ScaleWindow(f float64) {
	ws.moveWindow(func(c *Chart) { c.ScaleWindow(f) })
}

// SetWindow places the analysis window on [from, to] axis units.
func (ws *Workstation) SetWindow(from, to float64) {
	ws.moveWindow(func(c *Chart) { c.SetWindow(from, to) })
}

// CentreWindow centres the analysis window on x axis units.
func (ws *Workstation) CentreWindow(x float64) {
	ws.moveWindow(func(c *Chart) { c.CentreWindow(x) })
}

// Zoom magnifies the strip charts by f about x (NaN: the window centre).
func (ws *Workstation) Zoom(f, x float64) { ws.moveView(func(c *Chart) { c.Zoom(f, x) }) }

// Pan shifts the strip-chart view by a fraction of its width.
func (ws *Workstation) Pan(frac float64) { ws.moveView(func(c *Chart) { c.Pan(frac) }) }

// Fit shows the whole scan.
func (ws *Workstation) Fit() { ws.moveView((*Chart).Fit) }

// RotatePlane turns the impedance-plane display by d radians.
func (ws *Workstation) RotatePlane(dRad float64) {
	ws.plane.Rotate(dRad)
	ws.changed(ChangedPlane)
}

// SetRotation sets the impedance-plane display rotation in radians.
func (ws *Workstation) SetRotation(rad float64) {
	ws.plane.RotationRad = 0
	ws.plane.Rotate(rad)
	ws.changed(ChangedPlane)
}

// AutoSpan reports whether the display follows each measurement (span
// fitted to the chord, centred on its midpoint) until the user sets the
// gain or the null.
func (ws *Workstation) AutoSpan() bool { return ws.autoSpan }

// GainPlane magnifies the impedance-plane display by f.
func (ws *Workstation) GainPlane(f float64) {
	ws.autoSpan = false
	ws.plane.Gain(f)
	ws.changed(ChangedPlane)
}

// SetSpan sets the impedance-plane span in volts.
func (ws *Workstation) SetSpan(v float64) {
	if v > 1e-6 && v < 1e4 {
		ws.autoSpan = false
		ws.plane.SpanV = v
		ws.changed(ChangedPlane)
	}
}

// NullPlane centres the display on the first sample of the analysis window
// of the measured channel.
func (ws *Workstation) NullPlane() {
	if z, ok := ws.windowSample(); ok {
		ws.autoSpan = false
		ws.plane.Null = z
		ws.changed(ChangedPlane)
	}
}

// ResetPlane removes the display rotation and lets span and centre follow
// the measurement again.
func (ws *Workstation) ResetPlane() {
	ws.plane = Plane{SpanV: DefaultSpanV}
	ws.autoSpan = true
	if ws.measOK && ws.meas.VppV > 0 {
		ws.plane.SpanV = niceSpan(ws.meas.VppV * 1.3)
		ws.plane.Null = (ws.meas.ChordA + ws.meas.ChordB) / 2
	}
	ws.changed(ChangedPlane)
}

func (ws *Workstation) windowSample() (complex128, bool) {
	if ws.tube == nil || ws.chart == nil {
		return 0, false
	}
	ch := ws.tube.Scan.Channel(ws.channel)
	w := ws.chart.Samples()
	if ch == nil || w.Len() == 0 {
		return 0, false
	}
	return ch.Samples[w.Lo], true
}

// niceSpan rounds v up to 1, 2 or 5 × 10^k.
func niceSpan(v float64) float64 {
	if !(v > 0) {
		return DefaultSpanV
	}
	m := math.Pow(10, math.Floor(math.Log10(v)))
	for _, k := range []float64{1, 2, 5, 10} {
		if k*m >= v {
			return k * m
		}
	}
	return 10 * m
}

// Remeasure measures the analysis window again in the background,
// cancelling a measurement still running.
func (ws *Workstation) Remeasure() {
	if ws.tube == nil || ws.chart == nil || ws.channel == "" {
		return
	}
	if ws.measStop != nil {
		ws.measStop()
	}
	ctx, stop := context.WithCancel(ws.ctx)
	ws.measStop = stop
	ws.measGen++
	gen := ws.measGen
	tube, ch, w := ws.tube, ws.channel, ws.chart.Samples()
	var m Measurement
	var err error
	ws.goAndPost(func() { m, err = ws.src.Measure(ctx, tube, ch, w) }, func() {
		if gen != ws.measGen || ctx.Err() != nil {
			return
		}
		if err != nil {
			ws.measOK = false
			ws.setMessage(true, "measuring %s: %v", ch, err)
			ws.changed(ChangedMeasurement | ChangedPlane)
			return
		}
		ws.meas, ws.measOK = m, true
		if ws.autoSpan && m.VppV > 0 {
			// Follow the measurement: centre the chord, fit its length.
			ws.plane.SpanV = niceSpan(m.VppV * 1.3)
			ws.plane.Null = (m.ChordA + m.ChordB) / 2
		}
		ws.changed(ChangedMeasurement | ChangedPlane)
	})
}

// Measurement returns the latest measurement of the window and whether
// there is one.
func (ws *Workstation) Measurement() (Measurement, bool) { return ws.meas, ws.measOK }

// Calls returns the calls of the open component.
func (ws *Workstation) Calls() []Call { return ws.calls }

// SelectedCall returns the index of the selected call, or −1.
func (ws *Workstation) SelectedCall() int { return ws.callIdx }

// SelectCall selects call i and moves the analysis window onto it.
func (ws *Workstation) SelectCall(i int) {
	if i < 0 || i >= len(ws.calls) {
		return
	}
	ws.callIdx = i
	c := ws.calls[i]
	if ws.chart != nil && c.Window.Len() > 0 {
		ws.chart.SetWindowSamples(c.Window)
		if ws.tube != nil && ws.tube.Scan.Channel(c.Channel) != nil {
			ws.channel = c.Channel
		}
		ws.windowChanged()
	}
	ws.changed(ChangedCalls)
}

// NextCall selects the next (d = +1) or previous (d = −1) call.
func (ws *Workstation) NextCall(d int) {
	if len(ws.calls) == 0 {
		return
	}
	ws.SelectCall(min(max(ws.callIdx+d, 0), len(ws.calls)-1))
}

// Decide records a decision on the selected call; the call list and the
// component statuses are read back from the store afterwards.
func (ws *Workstation) Decide(d Decision) {
	if ws.callIdx < 0 || ws.callIdx >= len(ws.calls) {
		ws.setMessage(true, "no call selected")
		return
	}
	c := ws.calls[ws.callIdx]
	comp := ws.current
	idx := ws.callIdx
	var calls []Call
	var err error
	ws.goAndPost(func() {
		if err = ws.src.Decide(ws.ctx, c.ID, d); err == nil {
			calls, err = ws.src.Calls(ws.ctx, comp)
		}
	}, func() {
		if err != nil {
			ws.setMessage(true, "%s on %s: %v", d.Kind, c.ID, err)
			return
		}
		if comp == ws.current {
			ws.calls = calls
			ws.callIdx = min(idx, len(calls)-1)
			ws.changed(ChangedCalls)
		}
		ws.setMessage(false, "%s: %s recorded by %s", c.ID, d.Kind, ws.src.Actor())
		ws.refreshComponents()
	})
}

// AddCall records an analyst call of the given type from the current
// measurement.
func (ws *Workstation) AddCall(callType, comment string) {
	if !ws.measOK {
		ws.setMessage(true, "no measurement to record")
		return
	}
	m, comp := ws.meas, ws.current
	var calls []Call
	var added Call
	var err error
	ws.goAndPost(func() {
		added, err = ws.src.AddCall(ws.ctx, comp, m, callType, comment)
		if err == nil {
			calls, err = ws.src.Calls(ws.ctx, comp)
		}
	}, func() {
		if err != nil {
			ws.setMessage(true, "recording a call: %v", err)
			return
		}
		if comp == ws.current {
			ws.calls = calls
			ws.callIdx = slices.IndexFunc(calls, func(c Call) bool { return c.ID == added.ID })
			ws.changed(ChangedCalls)
		}
		ws.setMessage(false, "%s recorded as %s", added.ID, added.Type)
		ws.refreshComponents()
	})
}

// NextType returns the call type after t in the source's list, wrapping.
func (ws *Workstation) NextType(t string) string {
	types := ws.src.CallTypes()
	if len(types) == 0 {
		return t
	}
	i := slices.Index(types, t)
	return types[(i+1)%len(types)]
}
