package gui

import (
	"context"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"testing"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/test"

	"whorl/gui/viewmodel"
	"whorl/gui/viewmodel/vmtest"
	"whorl/impedance"
)

func testParams() viewmodel.ModelParams {
	return viewmodel.ModelParams{Coil: impedance.Coil{InnerRadiusM: 1e-3, OuterRadiusM: 2e-3, LengthM: 1e-3, Turns: 200},
		LiftoffM: 0.2e-3, ThicknessM: math.Inf(1), SigmaSPerM: 17e6, MuR: 1, FreqHz: 100e3}
}

// queue collects results of background work; the test applies them on
// its own goroutine (Shell.Wait drains it), as the UI thread would.
type queue struct {
	mu sync.Mutex
	fs []func()
}

func (q *queue) post(f func()) {
	q.mu.Lock()
	q.fs = append(q.fs, f)
	q.mu.Unlock()
}

func (q *queue) drain() bool {
	q.mu.Lock()
	fs := q.fs
	q.fs = nil
	q.mu.Unlock()
	for _, f := range fs {
		f()
	}
	return len(fs) > 0
}

// openShell opens the workstation on src in a 1366×768 test window.
func openShell(t *testing.T, src viewmodel.Source, variant Variant) (*Shell, fyne.Window) {
	t.Helper()
	test.NewTempApp(t)
	w := test.NewTempWindow(t, nil)
	w.Resize(fyne.NewSize(1366, 768))
	q := &queue{}
	s := NewShell(w, src, Options{Variant: variant, Model: vmtest.Model{}, ModelParams: testParams(), ReportDir: t.TempDir(),
		Post: q.post, Drain: q.drain})
	t.Cleanup(s.Close)
	s.Wait()
	return s, w
}

// capture writes the window image under $WHORL_GUI_CAPTURE (when set) for
// a look at the layout.
func capture(t *testing.T, w fyne.Window, name string) {
	dir := os.Getenv("WHORL_GUI_CAPTURE")
	if dir == "" {
		return
	}
	f, err := os.Create(filepath.Join(dir, name+".png"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if err := png.Encode(f, w.Canvas().Capture()); err != nil {
		t.Fatal(err)
	}
}

func typeRune(w fyne.Window, r rune)        { w.Canvas().OnTypedRune()(r) }
func typeKey(w fyne.Window, k fyne.KeyName) { w.Canvas().OnTypedKey()(&fyne.KeyEvent{Name: k}) }

func readout(s *Shell, k string) string { return s.Review.readout[k].Text }

// volts parses "1.234 V".
func volts(t *testing.T, s string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(strings.TrimSuffix(s, " V"), 64)
	if err != nil {
		t.Fatalf("readout %q: %v", s, err)
	}
	return v
}

func TestReviewDesk(t *testing.T) {
	src := vmtest.New(viewmodel.Actor{Name: "R. Quill", Role: viewmodel.Level2}, 5, 1200)
	s, w := openShell(t, src, Dark)
	capture(t, w, "review-dark")
	if got := s.WS.Current(); got != "T01" {
		t.Fatalf("opened %q first, want T01", got)
	}
	if got := s.Review.listCount.Text; got != "5 of 5 components" {
		t.Errorf("list count %q", got)
	}
	// Select a tube from the list.
	s.Review.list.Select(2)
	s.Wait()
	if got := s.WS.Current(); got != "T03" {
		t.Errorf("after selecting row 3: %q, want T03", got)
	}
	// The window sits on the first call: the readout shows its chord.
	// vmtest.Scan gain for T03 is 3 V peak-to-peak.
	if v := volts(t, readout(s, "Vpp")); math.Abs(v-3) > 0.03 {
		t.Errorf("Vpp readout %v V on T03's first call, want 3 V ± 1 %%", v)
	}
	// Move the window with the keyboard: the readout follows.
	before := readout(s, "window")
	for range 8 {
		typeKey(w, fyne.KeyRight)
	}
	s.Wait()
	if v := volts(t, readout(s, "Vpp")); v > 1 {
		t.Errorf("Vpp after moving off the flaw = %v V, want the small wobble", v)
	}
	// Drag the window back over the flaw with the mouse.
	c := s.WS.Chart()
	x0 := s.Review.strips.xOf((c.WinFrom + c.WinTo) / 2)
	target := s.Review.strips.xOf(0.42)
	pos := fyne.NewPos(x0, 100)
	s.Review.strips.Dragged(&fyne.DragEvent{PointEvent: fyne.PointEvent{Position: pos.AddXY(target-x0, 0)}, Dragged: fyne.NewDelta(target-x0, 0)})
	s.Review.strips.DragEnd()
	s.Wait()
	if v := volts(t, readout(s, "Vpp")); math.Abs(v-3) > 0.1 {
		t.Errorf("Vpp after dragging the window back onto the flaw at 0.42 m = %v V, want 3 V", v)
	}
	if readout(s, "window") == "—" || before == "" {
		t.Error("window readout empty")
	}
	// Widen and zoom with keys; next and previous component.
	w0 := s.WS.Chart().WinTo - s.WS.Chart().WinFrom
	typeRune(w, '.')
	if w1 := s.WS.Chart().WinTo - s.WS.Chart().WinFrom; !(w1 > w0) {
		t.Errorf("'.' did not widen the window: %v → %v", w0, w1)
	}
	v0 := s.WS.Chart().ViewTo - s.WS.Chart().ViewFrom
	typeRune(w, '+')
	if v1 := s.WS.Chart().ViewTo - s.WS.Chart().ViewFrom; !(v1 < v0) {
		t.Errorf("'+' did not zoom in: %v → %v", v0, v1)
	}
	typeRune(w, 'n')
	s.Wait()
	if got := s.WS.Current(); got != "T04" {
		t.Errorf("'n' opened %q, want T04", got)
	}
	typeRune(w, 'p')
	s.Wait()
	if got := s.WS.Current(); got != "T03" {
		t.Errorf("'p' opened %q, want T03", got)
	}
	// Display controls change only the display.
	samples := append([]complex128(nil), s.WS.Tube().Scan.Channels[0].Samples[:50]...)
	typeRune(w, 'e')
	typeRune(w, 'x')
	typeRune(w, 'w')
	if r := s.WS.Plane().RotationRad; math.Abs(r-5*math.Pi/180) > 1e-12 {
		t.Errorf("'e' rotation %v rad, want 5°", r)
	}
	for i, z := range s.WS.Tube().Scan.Channels[0].Samples[:50] {
		if z != samples[i] {
			t.Fatalf("display controls changed sample %d: %v → %v", i, samples[i], z)
		}
	}
	typeRune(w, '0')
	if p := s.WS.Plane(); p.RotationRad != 0 || !s.WS.AutoSpan() {
		t.Errorf("'0' left %+v, auto %v", p, s.WS.AutoSpan())
	}
	// Typing in the search field filters the list; Esc gives the keys back.
	w.Canvas().Focus(s.Review.search)
	test.Type(s.Review.search, "t05")
	if n := len(s.WS.Components()); n != 1 {
		t.Errorf("search t05 lists %d components, want 1", n)
	}
	s.Review.search.TypedKey(&fyne.KeyEvent{Name: fyne.KeyEscape})
	if f := w.Canvas().Focused(); f != nil {
		t.Errorf("focus after Esc: %v, want none", f)
	}
	capture(t, w, "review-after-keys")
}

func TestCallsAcceptRejectWithAudit(t *testing.T) {
	src := vmtest.New(viewmodel.Actor{Name: "R. Quill", Role: viewmodel.Level2}, 3, 1000)
	s, w := openShell(t, src, Light)
	calls := s.WS.Calls()
	if len(calls) != 2 {
		t.Fatalf("T01 has %d calls, want 2", len(calls))
	}
	typeRune(w, 'a') // accept the selected (first) call
	s.Wait()
	typeKey(w, fyne.KeyDown)
	s.Wait()
	typeRune(w, 'r')
	s.Wait()
	typeRune(w, 't') // change the rejected call's type
	s.Wait()
	got := s.WS.Calls()
	if got[0].State != viewmodel.Accepted || got[1].State != viewmodel.Rejected || got[1].Type != "wear" {
		t.Errorf("calls after a, ↓, r, t: %+v", got)
	}
	for id, want := range map[string][]string{calls[0].ID: {"call accept"}, calls[1].ID: {"call reject", "call change type"}} {
		ev, err := src.Events(context.Background(), id)
		if err != nil || len(ev) != len(want) {
			t.Fatalf("events of %s: %+v, %v; want %v", id, ev, err, want)
		}
		for i := range want {
			if ev[i].Action != want[i] || ev[i].Actor != "R. Quill" || ev[i].Role != "level2" {
				t.Errorf("event %d of %s = %+v, want %q by R. Quill (level2)", i, id, ev[i], want[i])
			}
		}
	}
	if row := callRow(s.WS.Calls()[0]); !strings.Contains(row, "accepted") {
		t.Errorf("list row %q does not show the decision", row)
	}
	capture(t, w, "review-light")
}

func TestCalibrationApprovalByRole(t *testing.T) {
	for _, tc := range []struct {
		role      viewmodel.Role
		wantState string
		wantMsg   string
	}{
		{viewmodel.Level2, "draft", "approval refused"},
		{viewmodel.Level3, "approved", "approved by"},
	} {
		t.Run(string(tc.role), func(t *testing.T) {
			src := vmtest.New(viewmodel.Actor{Name: "K. Fenn", Role: tc.role}, 1, 400)
			s, w := openShell(t, src, Dark)
			typeKey(w, fyne.KeyF3)
			if s.Desk() != DeskCalibration {
				t.Fatalf("F3 shows %q", s.Desk())
			}
			// Selecting a located flaw puts the window on it.
			s.Calibration.flaws.Select(1)
			if c := s.Calibration.stripSrc.chart; c == nil || c.WinFrom > 1.13 || c.WinTo < 1.13 {
				t.Errorf("window after selecting flaw F2 (at 1.13 m): %+v", c)
			}
			s.Calibration.reason.SetText("curve checked")
			test.Tap(s.Calibration.approve)
			s.Wait()
			if got := s.Cals.Detail().State; got != tc.wantState {
				t.Errorf("state %q, want %q", got, tc.wantState)
			}
			if got := s.Calibration.message.Text; !strings.Contains(got, tc.wantMsg) {
				t.Errorf("message %q, want it to contain %q", got, tc.wantMsg)
			}
			capture(t, w, "calibration-"+string(tc.role))
		})
	}
}

func TestModelAndReportDesks(t *testing.T) {
	src := vmtest.New(viewmodel.Actor{Name: "K. Fenn", Role: viewmodel.QA}, 1, 400)
	s, w := openShell(t, src, Dark)
	typeKey(w, fyne.KeyF4)
	s.Model.freq.SetValue(math.Log10(250e3))
	s.Wait()
	if f := s.Explorer.Params().FreqHz; math.Abs(f-250e3) > 250e3*0.025 { // the slider steps by 0.01 in log10 f (2.3 %)
		t.Errorf("slider set f = %v Hz, want 250 kHz", f)
	}
	if len(s.Model.families.Curves) == 0 {
		t.Error("no impedance-plane family drawn")
	}
	capture(t, w, "model")
	typeKey(w, fyne.KeyF5)
	if s.Desk() != DeskReport {
		t.Fatalf("F5 shows %q", s.Desk())
	}
	var err error
	s.Report.done = func(_ []string, e error) { err = e }
	s.Report.Export()
	s.Wait()
	if err == nil || !strings.Contains(s.Report.result.Text, "export failed") {
		t.Errorf("export of the test inspection: err %v, text %q", err, s.Report.result.Text)
	}
	capture(t, w, "report")
	s.toggleTheme()
	if s.Theme.Variant != Light {
		t.Errorf("theme after toggling dark: %v, want light", s.Theme.Variant)
	}
	capture(t, w, "report-light")
	if !strings.Contains(AboutText(), Caution) {
		t.Error("about text lacks the caution")
	}
}

func TestCallRowKeepsColumns(t *testing.T) {
	c := viewmodel.Call{ID: "R04C002-1/5", Type: "flaw-like", Channel: "400k-diff", Landmark: "the end face of tubesheet-1",
		OffsetM: 0.095, VppV: 1.54, PhaseDeg: 95, DepthPct: 54, DepthOK: true, State: viewmodel.Accepted, Origin: "auto"}
	row := callRow(c)
	// The Vpp column starts where the header's does.
	runeIndex := func(s, sub string) int { return len([]rune(s[:strings.Index(s, sub)])) }
	if h, r := runeIndex(callHeader, "Vpp")-4, runeIndex(row, "1.54 V")-1; h != r {
		t.Errorf("row %q\nheader %q: Vpp column misaligned", row, callHeader)
	}
	if !strings.Contains(row, "tubesheet-1 +95.0 mm") {
		t.Errorf("row %q lost the landmark or offset", row)
	}
}
