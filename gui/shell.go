package gui

import (
	"fmt"
	"math"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/layout"
	"fyne.io/fyne/v2/widget"

	"whorl/gui/viewmodel"
	"whorl/internal/version"
)

// Desk names, in rail order.
const (
	DeskReview      = "review"
	DeskCalibration = "calibration"
	DeskModel       = "model"
	DeskReport      = "report"
)

// Desks lists the desks in rail order.
var Desks = []string{DeskReview, DeskCalibration, DeskModel, DeskReport}

var deskTitles = map[string]string{
	DeskReview:      "Review\nF2",
	DeskCalibration: "Calibration\nF3",
	DeskModel:       "Coil model\nF4",
	DeskReport:      "Report\nF5",
}

// Options configure the shell.
type Options struct {
	Variant Variant
	// Desk is the desk shown first (default review).
	Desk string
	// ReportDir is the suggested report folder.
	ReportDir string
	// Model is the coil model for the explorer and its starting point.
	Model       viewmodel.Model
	ModelParams viewmodel.ModelParams
	// Post runs a function on the UI thread; nil uses fyne.Do. Tests pass
	// a queue and Drain, which runs what was queued and reports whether
	// anything ran, so that results are applied on the test's goroutine.
	Post  func(func())
	Drain func() bool
}

// Shell is the whole workstation window: the desk rail, the desks, the
// status line and the keyboard.
type Shell struct {
	Win   fyne.Window
	Theme *Theme

	WS       *viewmodel.Workstation
	Cals     *viewmodel.Calibrations
	Explorer *viewmodel.Explorer

	Review      *Review
	Calibration *CalibrationDesk
	Model       *ModelDesk
	Report      *ReportDesk

	src     viewmodel.Source
	drain   func() bool
	desk    string
	rail    map[string]*widget.Button
	stack   *fyne.Container
	desks   map[string]fyne.CanvasObject
	status  *widget.Label
	content fyne.CanvasObject
}

// NewShell builds the workstation over an open inspection and puts it in
// win. It starts loading the component list and the calibrations.
func NewShell(win fyne.Window, src viewmodel.Source, opt Options) *Shell {
	th := &Theme{Variant: opt.Variant}
	if a := fyne.CurrentApp(); a != nil {
		a.Settings().SetTheme(th)
	}
	s := &Shell{Win: win, Theme: th, src: src, drain: opt.Drain, rail: map[string]*widget.Button{}, desks: map[string]fyne.CanvasObject{}}
	post := opt.Post
	if post == nil {
		post = fyne.Do
	}
	s.status = widget.NewLabel("")
	s.status.Truncation = fyne.TextTruncateEllipsis
	s.WS = viewmodel.NewWorkstation(src, post)
	s.Cals = viewmodel.NewCalibrations(src, post)
	s.Review = NewReview(s.WS, th, win, s.setStatus)
	s.Calibration = NewCalibrationDesk(s.Cals, th, win, s.setStatus)
	s.Report = NewReportDesk(src, win, opt.ReportDir, s.setStatus)
	s.Report.post = post
	s.desks[DeskReview] = s.Review.Content
	s.desks[DeskCalibration] = s.Calibration.Content
	s.desks[DeskReport] = s.Report.Content
	if opt.Model != nil {
		s.Explorer = viewmodel.NewExplorer(opt.Model, opt.ModelParams, post)
		s.Model = NewModelDesk(s.Explorer, th)
		s.desks[DeskModel] = s.Model.Content
	} else {
		l := widget.NewLabel("The coil model is not available in this build.")
		s.desks[DeskModel] = container.NewCenter(l)
	}
	s.stack = container.NewStack()
	for _, d := range Desks {
		s.stack.Add(s.desks[d])
	}
	railBox := container.NewVBox()
	for _, d := range Desks {
		d := d
		b := widget.NewButton(deskTitles[d], func() { s.ShowDesk(d) })
		s.rail[d] = b
		railBox.Add(b)
	}
	railBox.Add(layout.NewSpacer())
	themeBtn := widget.NewButton("light/dark", s.toggleTheme)
	about := widget.NewButton("about  F1", s.ShowAbout)
	railBox.Add(themeBtn)
	railBox.Add(about)

	info := src.Info()
	brand := canvas.NewText("whorl", th.pal().primary)
	brand.TextStyle = fyne.TextStyle{Bold: true}
	brand.TextSize = 18
	title := widget.NewLabel(info.Title)
	who := widget.NewLabel(fmt.Sprintf("%s · %s", src.Actor().Name, src.Actor().Role))
	who.TextStyle = fyne.TextStyle{Bold: true}
	top := container.NewBorder(nil, nil, container.NewHBox(container.NewPadded(brand), title), who)
	hint := widget.NewLabel("F1 help")
	hint.Importance = widget.LowImportance
	bottom := container.NewBorder(nil, nil, nil, hint, s.status)
	s.content = container.NewBorder(container.NewVBox(top, widget.NewSeparator()), bottom, container.NewHBox(railBox, widget.NewSeparator()), nil, s.stack)
	win.SetContent(s.content)
	win.Canvas().SetOnTypedKey(s.typedKey)
	win.Canvas().SetOnTypedRune(s.typedRune)
	desk := opt.Desk
	if desk == "" {
		desk = DeskReview
	}
	s.ShowDesk(desk)
	s.WS.Load()
	s.Cals.Load()
	if s.Explorer != nil {
		s.Explorer.Evaluate()
	}
	return s
}

// Close stops background work.
func (s *Shell) Close() {
	s.WS.Close()
	s.Cals.Wait()
	if s.Explorer != nil {
		s.Explorer.Close()
	}
}

// Wait blocks until all background work has finished and its results
// have been applied (including work that applying results started).
func (s *Shell) Wait() {
	for {
		s.WS.Wait()
		s.Cals.Wait()
		s.Report.jobs.Wait()
		if s.Explorer != nil {
			s.Explorer.Wait()
		}
		if s.drain == nil || !s.drain() {
			return
		}
	}
}

// Desk returns the desk shown.
func (s *Shell) Desk() string { return s.desk }

// ShowDesk brings a desk to the front.
func (s *Shell) ShowDesk(name string) {
	if _, ok := s.desks[name]; !ok {
		return
	}
	s.desk = name
	for d, obj := range s.desks {
		if d == name {
			obj.Show()
		} else {
			obj.Hide()
		}
		if b := s.rail[d]; b != nil {
			if d == name {
				b.Importance = widget.HighImportance
			} else {
				b.Importance = widget.MediumImportance
			}
			b.Refresh()
		}
	}
	s.stack.Refresh()
}

func (s *Shell) setStatus(msg string, isErr bool) {
	s.status.SetText(msg)
	if isErr {
		s.status.Importance = widget.DangerImportance
	} else {
		s.status.Importance = widget.MediumImportance
	}
	s.status.Refresh()
}

func (s *Shell) toggleTheme() {
	if s.Theme.Variant == Dark {
		s.Theme.Variant = Light
	} else {
		s.Theme.Variant = Dark
	}
	if a := fyne.CurrentApp(); a != nil {
		a.Settings().SetTheme(s.Theme)
	}
	s.content.Refresh()
}

// Keys is the keyboard reference shown by F1 and in docs/gui.md.
var Keys = [][2]string{
	{"F2 F3 F4 F5", "review, calibration, coil model, report desk"},
	{"n / p", "next / previous component in the list"},
	{"← / →", "move the analysis window by a quarter of its width"},
	{", / .", "narrow / widen the analysis window"},
	{"+ / −", "zoom the strip charts in / out about the window"},
	{"Page Up / Page Down", "pan the strip charts by half a screen"},
	{"Home", "show the whole component"},
	{"↑ / ↓", "previous / next call (the window jumps to it)"},
	{"a / r", "accept / reject the selected call"},
	{"t", "change the selected call to the next type"},
	{"c", "add a note to the selected call"},
	{"m", "record a new analyst call at the window"},
	{"1 … 8", "measure channel 1 … 8 of the component"},
	{"q / e", "rotate the impedance-plane display by −5° / +5°"},
	{"w / s", "impedance-plane span smaller / larger (display gain)"},
	{"x / 0", "null the display at the window start / reset the display"},
	{"Esc", "leave a text field so the keys above work again"},
}

func (s *Shell) typedKey(ev *fyne.KeyEvent) {
	switch ev.Name {
	case fyne.KeyF1:
		s.ShowAbout()
		return
	case fyne.KeyF2:
		s.ShowDesk(DeskReview)
		return
	case fyne.KeyF3:
		s.ShowDesk(DeskCalibration)
		return
	case fyne.KeyF4:
		s.ShowDesk(DeskModel)
		return
	case fyne.KeyF5:
		s.ShowDesk(DeskReport)
		return
	}
	if s.desk != DeskReview {
		return
	}
	ws := s.WS
	switch ev.Name {
	case fyne.KeyLeft:
		ws.StepWindow(-0.25)
	case fyne.KeyRight:
		ws.StepWindow(0.25)
	case fyne.KeyUp:
		ws.NextCall(-1)
	case fyne.KeyDown:
		ws.NextCall(1)
	case fyne.KeyPageUp:
		ws.Pan(-0.5)
	case fyne.KeyPageDown:
		ws.Pan(0.5)
	case fyne.KeyHome:
		ws.Fit()
	}
}

func (s *Shell) typedRune(r rune) {
	if s.desk != DeskReview {
		return
	}
	ws := s.WS
	switch r {
	case 'n':
		ws.Next(1)
	case 'p':
		ws.Next(-1)
	case ',':
		ws.ScaleWindow(0.8)
	case '.':
		ws.ScaleWindow(1.25)
	case '+', '=':
		ws.Zoom(2, math.NaN())
	case '-':
		ws.Zoom(0.5, math.NaN())
	case 'a':
		s.Review.accept()
	case 'r':
		s.Review.reject()
	case 't':
		s.Review.cycleType()
	case 'c':
		s.Review.comment()
	case 'm':
		s.Review.markCall()
	case 'q':
		ws.RotatePlane(-5 * math.Pi / 180)
	case 'e':
		ws.RotatePlane(5 * math.Pi / 180)
	case 'w':
		ws.GainPlane(1.25)
	case 's':
		ws.GainPlane(0.8)
	case 'x':
		ws.NullPlane()
	case '0':
		ws.ResetPlane()
	default:
		if r >= '1' && r <= '8' {
			if t := ws.Tube(); t != nil {
				names := t.MeasureChannels
				if len(names) == 0 {
					for _, c := range t.Scan.Channels {
						names = append(names, c.Name)
					}
				}
				if i := int(r - '1'); i < len(names) {
					ws.SetChannel(names[i])
				}
			}
		}
	}
}

// AboutText is the about box's text.
func AboutText() string {
	var b strings.Builder
	fmt.Fprintf(&b, "%s %s — eddy-current signal analysis workstation\n\n", version.Name, version.String())
	b.WriteString("Caution: " + Caution + "\n\n")
	b.WriteString("Channel colours: Okabe & Ito (2008), Color Universal Design, chosen to stay\ndistinct for common colour-vision deficiencies.\n")
	return b.String()
}

// ShowAbout shows the about box with the caution and the keyboard reference.
func (s *Shell) ShowAbout() {
	text := widget.NewLabel(AboutText())
	text.Wrapping = fyne.TextWrapWord
	keys := container.New(layout.NewFormLayout())
	for _, k := range Keys {
		kl := widget.NewLabel(k[0])
		kl.TextStyle = fyne.TextStyle{Monospace: true, Bold: true}
		keys.Add(kl)
		keys.Add(widget.NewLabel(k[1]))
	}
	body := container.NewVScroll(container.NewVBox(text, widget.NewSeparator(), keys))
	body.SetMinSize(fyne.NewSize(560, 440))
	dialog.ShowCustom("About "+version.Name, "close", body, s.Win)
}

// SignIn fills win with a small sign-in form (name and role) and calls
// done with the person once they confirm.
func SignIn(win fyne.Window, done func(viewmodel.Actor)) {
	name := widget.NewEntry()
	name.SetPlaceHolder("your name as certified")
	roles := make([]string, len(viewmodel.Roles))
	for i, r := range viewmodel.Roles {
		roles[i] = string(r)
	}
	role := widget.NewSelect(roles, nil)
	role.SetSelected(string(viewmodel.Level2))
	msg := widget.NewLabel("")
	msg.Importance = widget.DangerImportance
	var form *widget.Form
	form = widget.NewForm(widget.NewFormItem("name", name), widget.NewFormItem("role", role))
	form.SubmitText = "sign in"
	form.OnSubmit = func() {
		a := viewmodel.Actor{Name: strings.TrimSpace(name.Text), Role: viewmodel.Role(role.Selected)}
		if err := a.Validate(); err != nil {
			msg.SetText(err.Error())
			return
		}
		done(a)
	}
	name.OnSubmitted = func(string) { form.OnSubmit() }
	head := widget.NewLabel("Who is at this workstation? Every call and approval is recorded under this name and role.")
	head.Wrapping = fyne.TextWrapWord
	caution := widget.NewLabel("Caution: " + Caution)
	caution.Wrapping = fyne.TextWrapWord
	caution.Importance = widget.WarningImportance
	box := container.NewGridWrap(fyne.NewSize(480, 300), container.NewVBox(head, form, msg, caution))
	win.SetContent(container.NewCenter(box))
}
