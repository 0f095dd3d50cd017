package gui

import (
	"fmt"
	"math"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/layout"
	"fyne.io/fyne/v2/widget"

	"whorl/gui/viewmodel"
)

// statusMark is the symbol of a component status in the list.
func statusMark(s viewmodel.Status) string {
	switch s {
	case viewmodel.NotAnalysed:
		return "○"
	case viewmodel.Analysed:
		return "●"
	case viewmodel.WithIndications:
		return "◆"
	case viewmodel.InvalidGroup:
		return "✕"
	case viewmodel.Resolved:
		return "✓"
	}
	return "?"
}

// Review is the review desk: component list, strip charts, impedance
// plane, measurement readout and the component's calls.
type Review struct {
	ws  *viewmodel.Workstation
	th  *Theme
	win fyne.Window

	Content fyne.CanvasObject

	search     *escEntry
	filter     *widget.Select
	list       *widget.List
	listCount  *widget.Label
	comps      []viewmodel.Component
	chanChecks *fyne.Container
	parts      *widget.RadioGroup
	strips     *StripChart
	plane      *ImpedancePlane
	measChan   *widget.Select
	rotation   *widget.Slider
	readout    map[string]*widget.Label
	calls      *widget.List
	callHead   *widget.Label
	header     *widget.Label
	status     func(msg string, isErr bool)
	syncing    bool
}

// readout rows, in display order.
var readoutRows = []string{"Vpp", "phase (p-p)", "phase (max rate)", "depth", "curve", "location", "position", "S/N", "window"}

// NewReview builds the review desk over ws. status shows a message in the
// window's status line.
func NewReview(ws *viewmodel.Workstation, th *Theme, win fyne.Window, status func(string, bool)) *Review {
	r := &Review{ws: ws, th: th, win: win, status: status, readout: map[string]*widget.Label{}}
	r.build()
	ws.OnChange = r.onChange
	return r
}

func (r *Review) build() {
	ws := r.ws
	// Component column.
	r.search = newEscEntry()
	r.search.SetPlaceHolder("find tube or group")
	r.search.OnChanged = func(s string) { ws.SetSearch(s) }
	opts := []string{"all statuses"}
	for _, s := range viewmodel.Statuses {
		opts = append(opts, statusMark(s)+" "+s.String())
	}
	r.filter = widget.NewSelect(opts, func(v string) {
		for _, s := range viewmodel.Statuses {
			if v == statusMark(s)+" "+s.String() {
				ws.SetFilter(s)
				return
			}
		}
		ws.SetFilter()
	})
	r.filter.SetSelectedIndex(0)
	r.list = widget.NewList(func() int { return len(r.comps) },
		func() fyne.CanvasObject {
			l := widget.NewLabel("○ R00C000  G0  99 %TW")
			l.TextStyle = fyne.TextStyle{Monospace: true}
			l.Truncation = fyne.TextTruncateEllipsis
			return l
		},
		func(i widget.ListItemID, o fyne.CanvasObject) {
			c := r.comps[i]
			depth := ""
			if !math.IsNaN(c.MaxDepthPct) && c.Calls > 0 {
				depth = fmt.Sprintf(" %3.0f%%", c.MaxDepthPct)
			}
			o.(*widget.Label).SetText(fmt.Sprintf("%s %-8s %s%s", statusMark(c.Status), c.ID, c.CalGroup, depth))
		})
	r.list.OnSelected = func(i widget.ListItemID) {
		if r.syncing || i >= len(r.comps) {
			return
		}
		if r.comps[i].ID != ws.Current() {
			ws.Select(r.comps[i].ID)
		}
		r.unfocus()
	}
	r.listCount = widget.NewLabel("")
	legend := widget.NewLabel("○ new  ● clear  ◆ calls\n✕ group invalid  ✓ resolved")
	legend.Importance = widget.LowImportance
	left := container.NewBorder(container.NewVBox(r.search, r.filter), container.NewVBox(r.listCount, legend), nil, nil, r.list)

	// Strip charts with their controls.
	r.strips = NewStripChart(ws, r.th)
	r.strips.OnWindow = func(from, to float64) { ws.SetWindow(from, to) }
	r.strips.OnView = func() { r.strips.Refresh() }
	r.chanChecks = container.NewHBox()
	r.parts = widget.NewRadioGroup([]string{"X+Y", "X", "Y"}, func(v string) {
		switch v {
		case "X":
			ws.SetParts(viewmodel.PartX)
		case "Y":
			ws.SetParts(viewmodel.PartY)
		default:
			ws.SetParts(viewmodel.PartX, viewmodel.PartY)
		}
	})
	r.parts.Horizontal = true
	r.parts.SetSelected("X+Y")
	zoomIn := widget.NewButton("zoom +", func() { ws.Zoom(2, math.NaN()) })
	zoomOut := widget.NewButton("zoom −", func() { ws.Zoom(0.5, math.NaN()) })
	fit := widget.NewButton("whole tube", ws.Fit)
	r.header = widget.NewLabel("")
	r.header.TextStyle = fyne.TextStyle{Bold: true}
	stripBar := container.NewHBox(r.header, layout.NewSpacer(), r.parts, zoomOut, zoomIn, fit)
	centreTop := container.NewBorder(container.NewVBox(stripBar, container.NewHScroll(r.chanChecks)), nil, nil, nil, r.strips)

	// Calls.
	r.callHead = widget.NewLabel("calls")
	r.callHead.TextStyle = fyne.TextStyle{Bold: true}
	r.calls = widget.NewList(func() int { return len(ws.Calls()) },
		func() fyne.CanvasObject {
			l := widget.NewLabel("")
			l.TextStyle = fyne.TextStyle{Monospace: true}
			l.Truncation = fyne.TextTruncateEllipsis
			return l
		},
		func(i widget.ListItemID, o fyne.CanvasObject) {
			calls := ws.Calls()
			if i < len(calls) {
				o.(*widget.Label).SetText(callRow(calls[i]))
			}
		})
	r.calls.OnSelected = func(i widget.ListItemID) {
		if !r.syncing && i != ws.SelectedCall() {
			ws.SelectCall(i)
		}
		r.unfocus()
	}
	accept := widget.NewButton("accept  [a]", r.accept)
	reject := widget.NewButton("reject  [r]", r.reject)
	retype := widget.NewButton("type…  [t]", r.chooseType)
	comment := widget.NewButton("note…  [c]", r.comment)
	mark := widget.NewButton("new call here  [m]", r.markCall)
	mark.Importance = widget.HighImportance
	actions := container.NewHBox(r.callHead, layout.NewSpacer(), accept, reject, retype, comment, mark)
	head := widget.NewLabel(callHeader)
	head.TextStyle = fyne.TextStyle{Monospace: true}
	head.Importance = widget.LowImportance
	head.Truncation = fyne.TextTruncateEllipsis
	callPane := container.NewBorder(container.NewVBox(actions, head), nil, nil, nil, r.calls)

	centre := container.NewVSplit(centreTop, callPane)
	centre.SetOffset(0.70)

	// Impedance plane, its display controls and the readout.
	r.plane = NewImpedancePlane(ws, r.th)
	r.plane.OnScroll = func(d int) {
		if d > 0 {
			ws.GainPlane(1.25)
		} else {
			ws.GainPlane(0.8)
		}
	}
	r.measChan = widget.NewSelect(nil, func(v string) {
		if !r.syncing {
			ws.SetChannel(v)
		}
	})
	r.rotation = widget.NewSlider(-180, 180)
	r.rotation.Step = 1
	r.rotation.OnChanged = func(v float64) {
		if !r.syncing {
			ws.SetRotation(v * math.Pi / 180)
		}
	}
	gainUp := widget.NewButton("span ÷2", func() { ws.GainPlane(2) })
	gainDown := widget.NewButton("span ×2", func() { ws.GainPlane(0.5) })
	null := widget.NewButton("null", ws.NullPlane)
	reset := widget.NewButton("reset", ws.ResetPlane)
	planeCtl := container.NewVBox(
		container.NewBorder(nil, nil, widget.NewLabel("channel"), nil, r.measChan),
		container.NewBorder(nil, nil, widget.NewLabel("rotate °"), nil, r.rotation),
		container.NewGridWithColumns(4, gainUp, gainDown, null, reset),
	)
	form := container.New(layout.NewFormLayout())
	for _, k := range readoutRows {
		name := widget.NewLabel(k)
		name.Importance = widget.LowImportance
		v := widget.NewLabel("—")
		v.TextStyle = fyne.TextStyle{Monospace: true}
		v.Truncation = fyne.TextTruncateEllipsis
		r.readout[k] = v
		form.Add(name)
		form.Add(v)
	}
	measHead := widget.NewLabel("measurement in the window")
	measHead.TextStyle = fyne.TextStyle{Bold: true}
	right := container.NewBorder(nil, container.NewVBox(planeCtl, measHead, form), nil, nil, r.plane)

	body := container.NewHSplit(centre, right)
	body.SetOffset(0.66)
	all := container.NewHSplit(left, body)
	all.SetOffset(0.17)
	r.Content = all
}

func (r *Review) unfocus() {
	if r.win != nil {
		r.win.Canvas().Unfocus()
	}
}

// callHeader names the columns of callRow.
var callHeader = fmt.Sprintf("%-10s %-12s %-14s %-22s %7s %5s %4s  %-11s %s", "state", "call", "class", "location", "Vpp", "phase", "%TW", "channel", "origin")

// callRow formats one call for the list.
func callRow(c viewmodel.Call) string {
	depth := "  — "
	if c.DepthOK {
		depth = fmt.Sprintf("%3.0f%%", c.DepthPct)
	}
	loc := fmt.Sprintf("%s %+.1f mm", c.Landmark, c.OffsetM*1000)
	if r := []rune(loc); len(r) > 22 {
		// Keep the offset; shorten the landmark name.
		off := fmt.Sprintf(" %+.1f mm", c.OffsetM*1000)
		name := []rune(c.Landmark)
		keep := max(22-len([]rune(off))-1, 1)
		if len(name) > keep {
			name = append([]rune{'…'}, name[len(name)-keep:]...)
		}
		loc = string(name) + off
	}
	state := string(c.State)
	if c.Comment != "" {
		state += " ✎"
	}
	return fmt.Sprintf("%-10s %-12s %-14s %-22s %5.2f V %4.0f° %s  %-11s %s", state, c.ID, c.Type, loc, c.VppV, c.PhaseDeg, depth, c.Channel, c.Origin)
}

func (r *Review) accept() { r.ws.Decide(viewmodel.Decision{Kind: viewmodel.Accept}) }
func (r *Review) reject() { r.ws.Decide(viewmodel.Decision{Kind: viewmodel.Reject}) }

// cycleType changes the selected call to the next type.
func (r *Review) cycleType() {
	calls := r.ws.Calls()
	i := r.ws.SelectedCall()
	if i < 0 || i >= len(calls) {
		r.status("no call selected", true)
		return
	}
	r.ws.Decide(viewmodel.Decision{Kind: viewmodel.Retype, Type: r.ws.NextType(calls[i].Type)})
}

func (r *Review) chooseType() {
	calls := r.ws.Calls()
	i := r.ws.SelectedCall()
	if i < 0 || i >= len(calls) || r.win == nil {
		r.status("no call selected", true)
		return
	}
	sel := widget.NewSelect(r.ws.Source().CallTypes(), nil)
	sel.SetSelected(calls[i].Type)
	why := widget.NewEntry()
	dialog.ShowForm("Change the type of "+calls[i].ID, "record", "cancel",
		[]*widget.FormItem{widget.NewFormItem("type", sel), widget.NewFormItem("reason", why)},
		func(ok bool) {
			if ok && sel.Selected != "" {
				r.ws.Decide(viewmodel.Decision{Kind: viewmodel.Retype, Type: sel.Selected, Comment: why.Text})
			}
		}, r.win)
}

func (r *Review) comment() {
	calls := r.ws.Calls()
	i := r.ws.SelectedCall()
	if i < 0 || i >= len(calls) || r.win == nil {
		r.status("no call selected", true)
		return
	}
	e := widget.NewMultiLineEntry()
	e.SetText(calls[i].Comment)
	dialog.ShowForm("Note on "+calls[i].ID, "record", "cancel",
		[]*widget.FormItem{widget.NewFormItem("note", e)},
		func(ok bool) {
			if ok && strings.TrimSpace(e.Text) != "" {
				r.ws.Decide(viewmodel.Decision{Kind: viewmodel.Comment, Comment: e.Text})
			}
		}, r.win)
}

func (r *Review) markCall() {
	types := r.ws.Source().CallTypes()
	if r.win == nil || len(types) == 0 {
		return
	}
	sel := widget.NewSelect(types, nil)
	sel.SetSelectedIndex(0)
	note := widget.NewEntry()
	dialog.ShowForm("New analyst call at the window", "record", "cancel",
		[]*widget.FormItem{widget.NewFormItem("type", sel), widget.NewFormItem("note", note)},
		func(ok bool) {
			if ok {
				r.ws.AddCall(sel.Selected, note.Text)
			}
		}, r.win)
}

// onChange updates the widgets after the view-model changed.
func (r *Review) onChange(c viewmodel.Change) {
	ws := r.ws
	r.syncing = true
	defer func() { r.syncing = false }()
	if c&viewmodel.ChangedComponents != 0 {
		r.comps = ws.Components()
		r.list.Refresh()
		if i := ws.CurrentIndex(); i >= 0 {
			r.list.Select(i)
			r.list.ScrollTo(i)
		} else {
			r.list.UnselectAll()
		}
		r.listCount.SetText(fmt.Sprintf("%d of %d components", len(r.comps), ws.AllComponents()))
	}
	if c&viewmodel.ChangedTube != 0 {
		r.rebuildChannels()
	}
	if c&(viewmodel.ChangedChart|viewmodel.ChangedTube) != 0 {
		r.strips.Refresh()
	}
	if c&(viewmodel.ChangedPlane|viewmodel.ChangedMeasurement) != 0 {
		r.measChan.SetSelected(ws.Channel())
		r.rotation.SetValue(math.Round(ws.Plane().RotationRad * 180 / math.Pi))
		r.plane.Refresh()
	}
	if c&viewmodel.ChangedMeasurement != 0 {
		r.showMeasurement()
	}
	if c&viewmodel.ChangedCalls != 0 {
		r.calls.Refresh()
		if i := ws.SelectedCall(); i >= 0 {
			r.calls.Select(i)
		} else {
			r.calls.UnselectAll()
		}
		r.callHead.SetText(fmt.Sprintf("calls on %s (%d)", ws.Current(), len(ws.Calls())))
	}
	if c&viewmodel.ChangedMessage != 0 && r.status != nil {
		r.status(ws.Message())
	}
}

func (r *Review) rebuildChannels() {
	ws := r.ws
	t := ws.Tube()
	r.chanChecks.Objects = nil
	if t == nil {
		r.chanChecks.Refresh()
		return
	}
	r.header.SetText(fmt.Sprintf("%s   group %s   %d samples", t.ID, t.Scan.Meta.CalGroup, t.Scan.Len()))
	shown := map[string]bool{}
	for _, n := range ws.Shown() {
		shown[n] = true
	}
	for _, ch := range t.Scan.Channels {
		name := ch.Name
		chk := widget.NewCheck(name, nil)
		chk.SetChecked(shown[name])
		chk.OnChanged = func(on bool) {
			var names []string
			for _, o := range r.chanChecks.Objects {
				if k := o.(*widget.Check); k.Checked {
					names = append(names, k.Text)
				}
			}
			ws.SetShown(names)
		}
		r.chanChecks.Add(chk)
	}
	names := make([]string, 0, len(t.MeasureChannels))
	names = append(names, t.MeasureChannels...)
	if len(names) == 0 {
		for _, ch := range t.Scan.Channels {
			names = append(names, ch.Name)
		}
	}
	r.measChan.Options = names
	r.measChan.Refresh()
}

func (r *Review) showMeasurement() {
	m, ok := r.ws.Measurement()
	set := func(k, v string) { r.readout[k].SetText(v) }
	if !ok {
		for _, k := range readoutRows {
			set(k, "—")
		}
		return
	}
	set("Vpp", fmt.Sprintf("%.3f V", m.VppV))
	set("phase (p-p)", fmt.Sprintf("%.1f°", m.PhasePPDeg))
	set("phase (max rate)", fmt.Sprintf("%.1f°", m.PhaseMaxRateDeg))
	if m.DepthOK {
		d := fmt.Sprintf("%.0f ± %.0f %%TW", m.DepthPct, m.DepthUncPct)
		if m.DepthNote != "" {
			d += "  (" + m.DepthNote + ")"
		}
		set("depth", d)
	} else {
		set("depth", "— "+m.DepthNote)
	}
	set("curve", orText(m.Curve, "—"))
	set("location", fmt.Sprintf("%s %+.1f mm", m.Landmark, m.OffsetM*1000))
	set("position", fmt.Sprintf("%.4f m", m.PositionM))
	set("S/N", orDash("%.1f", m.SNR))
	wmm := 0.0
	if c := r.ws.Chart(); c != nil && c.AxisUnit == "m" {
		wmm = (c.WinTo - c.WinFrom) * 1000
	}
	set("window", fmt.Sprintf("%d samples, %.1f mm", m.Window.Len(), wmm))
}

func orText(s, alt string) string {
	if s == "" {
		return alt
	}
	return s
}
