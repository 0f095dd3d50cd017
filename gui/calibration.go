package gui

import (
	"fmt"
	"math"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/widget"

	"whorl/gui/pixels"
	"whorl/gui/viewmodel"
)

// calStrip adapts a calibration scan to the strip-chart widget: the located
// flaws are shown as landmarks.
type calStrip struct {
	chart *viewmodel.Chart
	tube  *viewmodel.Tube
	shown []string
}

func (c *calStrip) Chart() *viewmodel.Chart { return c.chart }
func (c *calStrip) Tube() *viewmodel.Tube   { return c.tube }
func (c *calStrip) Shown() []string         { return c.shown }
func (c *calStrip) Parts() []viewmodel.Part {
	return []viewmodel.Part{viewmodel.PartX, viewmodel.PartY}
}

// CalibrationDesk shows a calibration: its scan with the located flaws,
// the fitted curves with their points and residuals, the group checks, and
// the approval.
type CalibrationDesk struct {
	cv  *viewmodel.Calibrations
	th  *Theme
	win fyne.Window

	Content fyne.CanvasObject

	pick     *widget.Select
	state    *widget.Label
	standard *widget.Label
	strip    *StripChart
	stripSrc *calStrip
	curves   *fyne.Container
	flaws    *widget.List
	flawHead *widget.Label
	flawRows []string
	located  []viewmodel.LocatedFlaw
	checks   *widget.Label
	events   *widget.Label
	reason   *escEntry
	approve  *widget.Button
	message  *widget.Label
	ids      []string
	status   func(string, bool)
}

// NewCalibrationDesk builds the calibration desk over cv.
func NewCalibrationDesk(cv *viewmodel.Calibrations, th *Theme, win fyne.Window, status func(string, bool)) *CalibrationDesk {
	d := &CalibrationDesk{cv: cv, th: th, win: win, status: status}
	d.build()
	cv.OnChange = d.refresh
	return d
}

func (d *CalibrationDesk) build() {
	d.pick = widget.NewSelect(nil, func(v string) {
		for i, o := range d.pick.Options {
			if o == v && i < len(d.ids) {
				if det := d.cv.Detail(); det == nil || det.ID != d.ids[i] {
					d.cv.Open(d.ids[i])
				}
			}
		}
	})
	d.state = widget.NewLabel("")
	d.state.TextStyle = fyne.TextStyle{Bold: true}
	d.standard = widget.NewLabel("")
	d.standard.Truncation = fyne.TextTruncateEllipsis
	d.stripSrc = &calStrip{}
	d.strip = NewStripChart(d.stripSrc, d.th)
	d.strip.OnWindow = func(from, to float64) {
		if d.stripSrc.chart != nil {
			d.stripSrc.chart.SetWindow(from, to)
			d.strip.Refresh()
		}
	}
	d.strip.OnView = func() { d.strip.Refresh() }
	d.curves = container.NewGridWithColumns(2)
	mono := func() *widget.Label {
		l := widget.NewLabel("")
		l.TextStyle = fyne.TextStyle{Monospace: true}
		return l
	}
	d.checks, d.events = mono(), mono()
	d.flawHead = mono()
	d.flawHead.Truncation = fyne.TextTruncateEllipsis
	d.flaws = widget.NewList(func() int { return len(d.flawRows) },
		func() fyne.CanvasObject {
			l := widget.NewLabel("")
			l.TextStyle = fyne.TextStyle{Monospace: true}
			l.Truncation = fyne.TextTruncateEllipsis
			return l
		},
		func(i widget.ListItemID, o fyne.CanvasObject) { o.(*widget.Label).SetText(d.flawRows[i]) })
	d.flaws.OnSelected = func(i widget.ListItemID) { d.showFlaw(i) }
	d.reason = newEscEntry()
	d.reason.SetPlaceHolder("reason for approval (recorded)")
	d.approve = widget.NewButton("approve as Level III", func() { d.cv.Approve(d.reason.Text) })
	d.approve.Importance = widget.HighImportance
	d.message = widget.NewLabel("")
	d.message.Wrapping = fyne.TextWrapWord

	top := container.NewVBox(container.NewBorder(nil, nil, widget.NewLabel("calibration"), container.NewHBox(d.state), d.pick), d.standard)
	approveRow := container.NewBorder(nil, nil, nil, d.approve, d.reason)
	flawHead := widget.NewLabel("located reference flaws (prime channel; select one to show it)")
	flawHead.TextStyle = fyne.TextStyle{Bold: true}
	checkHead := widget.NewLabel("group checks")
	checkHead.TextStyle = fyne.TextStyle{Bold: true}
	evHead := widget.NewLabel("record")
	evHead.TextStyle = fyne.TextStyle{Bold: true}
	lower := container.NewHSplit(
		container.NewBorder(container.NewVBox(flawHead, d.flawHead), nil, nil, nil, d.flaws),
		container.NewBorder(checkHead, nil, nil, nil, container.NewScroll(container.NewVBox(d.checks, evHead, d.events))),
	)
	lower.SetOffset(0.55)
	upper := container.NewHSplit(d.strip, container.NewVScroll(d.curves))
	upper.SetOffset(0.5)
	body := container.NewVSplit(upper, lower)
	body.SetOffset(0.6)
	d.Content = container.NewBorder(top, container.NewVBox(approveRow, d.message), nil, nil, body)
}

func (d *CalibrationDesk) refresh() {
	cv := d.cv
	list := cv.List()
	d.ids = d.ids[:0]
	opts := make([]string, 0, len(list))
	for _, c := range list {
		d.ids = append(d.ids, c.ID)
		opts = append(opts, fmt.Sprintf("%s  v%d  group %s  (%s)", c.ID, c.Version, c.Group, c.State))
	}
	d.pick.Options = opts
	det := cv.Detail()
	if det != nil {
		for i, id := range d.ids {
			if id == det.ID {
				d.pick.SetSelectedIndex(i)
			}
		}
		st := det.State
		if det.ApprovedBy != "" {
			st += " by " + det.ApprovedBy
		}
		d.state.SetText(st)
		d.showDetail(det)
	}
	d.pick.Refresh()
	msg, isErr, refused := cv.Message()
	d.message.SetText(msg)
	switch {
	case refused:
		d.message.Importance = widget.DangerImportance
	case isErr:
		d.message.Importance = widget.WarningImportance
	default:
		d.message.Importance = widget.SuccessImportance
	}
	d.message.Refresh()
	if msg != "" && d.status != nil {
		d.status(msg, isErr)
	}
	switch {
	case det != nil && det.State == "approved":
		d.approve.SetText("approved")
		d.approve.Disable()
	case cv.CanApprove():
		d.approve.SetText("approve as Level III")
		d.approve.Enable()
	default:
		d.approve.SetText("approve (needs Level III)")
		d.approve.Enable()
	}
}

func (d *CalibrationDesk) showDetail(det *viewmodel.CalibrationDetail) {
	std := det.Standard
	if std.Serial != "" {
		d.standard.SetText(fmt.Sprintf("reference standard %s · %s · certificate %s · scan channel shown: %s", std.Serial, std.Material, orText(std.CertificateID, "—"), det.Channel))
	} else {
		d.standard.SetText("reference standard not in the record · scan channel shown: " + det.Channel)
	}
	// Scan with located flaws as markers.
	if det.Scan != nil {
		t := &viewmodel.Tube{ID: det.ID, Scan: det.Scan}
		for _, f := range det.Located {
			if f.Found {
				t.Landmarks = append(t.Landmarks, viewmodel.Landmark{Name: f.FlawID, PositionM: f.PositionM})
			}
		}
		axis, name, unit := det.Scan.PositionM, "position", "m"
		if axis == nil {
			axis, name, unit = det.Scan.TimeS, "time", "s"
		}
		d.stripSrc.tube = t
		d.stripSrc.chart = viewmodel.NewChart(axis, det.Scan.Len(), name, unit, 40)
		d.stripSrc.shown = nil
		if det.Scan.Channel(det.Channel) != nil {
			d.stripSrc.shown = []string{det.Channel}
		} else if len(det.Scan.Channels) > 0 {
			d.stripSrc.shown = []string{det.Scan.Channels[0].Name}
		}
		d.strip.Refresh()
	}
	// Curves with points and residuals.
	d.curves.Objects = nil
	for _, c := range det.Curves {
		var px, py, rx, ry []float64
		for _, p := range c.Points {
			px, py = append(px, p.X), append(py, p.DepthPct)
			rx, ry = append(rx, p.X), append(ry, p.ResidualPct)
		}
		title := c.Name
		if c.Warning != "" {
			title += "  ⚠ " + c.Warning
		}
		fit := NewXYPlot(d.th, title, c.XName+" / "+c.XUnit, "depth / %TW")
		fit.Curves = []Curve{
			{Series: pixels.Series{X: c.FitX, Y: c.FitDepthPct, Line: true, Marker: -1}, Name: "fitted curve", ColourIndex: 0},
			{Series: pixels.Series{X: px, Y: py, Marker: 0}, Name: "standard flaws", ColourIndex: -1},
		}
		res := NewXYPlot(d.th, "residuals of "+c.Name, c.XName+" / "+c.XUnit, "residual / %TW")
		res.Curves = []Curve{{Series: pixels.Series{X: rx, Y: ry, Marker: 1, Stems: true}, Name: "as-built − fitted", ColourIndex: 1}}
		d.curves.Add(fit)
		d.curves.Add(res)
	}
	d.curves.Refresh()
	// Located flaws.
	d.flawHead.SetText(fmt.Sprintf("%-12s %-19s %5s %8s %8s %7s", "flaw", "type", "%TW", "at / mm", "Vpp / V", "phase"))
	d.located, d.flawRows = det.Located, d.flawRows[:0]
	for _, f := range det.Located {
		if !f.Found {
			d.flawRows = append(d.flawRows, fmt.Sprintf("%-12s %-19s %5.0f %8s %8s %7s  not found: %s", f.FlawID, f.Type, f.DepthPct, "—", "—", "—", f.Note))
			continue
		}
		d.flawRows = append(d.flawRows, fmt.Sprintf("%-12s %-19s %5.0f %8.1f %8s %7s  %s", f.FlawID, f.Type, f.DepthPct, f.PositionM*1000, orDash("%.3f", f.VppV), orDash("%.1f°", f.PhaseDeg), f.Note))
	}
	d.flaws.UnselectAll()
	d.flaws.Refresh()
	ck := ""
	for _, c := range det.Checks {
		mark := "pass"
		if !c.Pass {
			mark = "FAIL"
		}
		ck += fmt.Sprintf("%-4s  %s: %s\n", mark, c.Name, c.Detail)
	}
	if ck == "" {
		ck = "no group check recorded yet"
	}
	d.checks.SetText(ck)
	ev := ""
	for _, e := range d.cv.Events() {
		ev += fmt.Sprintf("%s  %s (%s)  %s  %s\n", e.At, e.Actor, e.Role, e.Action, e.Reason)
	}
	d.events.SetText(orText(ev, "no events"))
}

// showFlaw puts the analysis window of the calibration scan on located
// flaw i and zooms the chart to it.
func (d *CalibrationDesk) showFlaw(i int) {
	c := d.stripSrc.chart
	if c == nil || i < 0 || i >= len(d.located) || !d.located[i].Found {
		return
	}
	f := d.located[i]
	if f.Window.Len() > 0 {
		c.SetWindowSamples(f.Window)
	} else {
		c.CentreWindow(f.PositionM)
	}
	c.Fit()
	c.Zoom(4, math.NaN())
	d.strip.Refresh()
}
