package gui

import (
	"context"
	"fmt"
	"strings"
	"testing"
	"time"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/test"

	"whorl/gui/source"
	"whorl/gui/viewmodel"
)

// TestDemoInspection drives the workstation on the real demo record: the
// demo is built (generated, calibrated, analysed, recorded), a Level II
// reviews a tube with the keyboard and calls indications, which the record
// store keeps with their audit events; calibration approval is refused for
// the Level II and done by a Level III.
func TestDemoInspection(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the demo inspection")
	}
	ctx := context.Background()
	dir := t.TempDir()
	now := func() time.Time { return time.Date(2026, 10, 14, 18, 0, 0, 0, time.UTC) }
	l2 := viewmodel.Actor{Name: "analyst-2b", Role: viewmodel.Level2}
	src, err := source.OpenDemo(ctx, dir, l2, now, nil)
	if err != nil {
		t.Fatal(err)
	}
	defer src.Close()
	s, w := openShell(t, src, Dark)
	// Select, from the list, a tube with at least two open calls.
	for i, c := range s.WS.Components() {
		if c.Status == viewmodel.WithIndications && c.Calls >= 2 {
			s.Review.list.Select(i)
			break
		}
	}
	s.Wait()
	capture(t, w, "demo-review")
	comp := s.WS.Current()
	calls := s.WS.Calls()
	if comp == "" || len(calls) < 2 {
		t.Fatalf("opened %q with %d calls; want a component with at least two calls", comp, len(calls))
	}
	// The window sits on the first call: the readout is its recorded Vpp.
	if got, want := readout(s, "Vpp"), calls[0].VppV; !strings.HasPrefix(got, strings.TrimSuffix(fmtV(want), " V")) {
		t.Errorf("Vpp readout %q on call %s, want %s", got, calls[0].ID, fmtV(want))
	}
	// Move the window with the keyboard: the measurement follows.
	before := readout(s, "position")
	typeKey(w, fyne.KeyRight)
	typeKey(w, fyne.KeyRight)
	s.Wait()
	if after := readout(s, "position"); after == before {
		t.Errorf("position readout stayed %q after moving the window", after)
	}
	// Accept the first call, reject the second, with the keyboard.
	typeKey(w, fyne.KeyUp) // back to the first call
	s.Wait()
	first := s.WS.Calls()[s.WS.SelectedCall()].ID
	typeRune(w, 'a')
	s.Wait()
	typeKey(w, fyne.KeyDown)
	s.Wait()
	second := s.WS.Calls()[s.WS.SelectedCall()].ID
	typeRune(w, 'r')
	s.Wait()
	st := src.Store()
	for id, want := range map[string]string{first: "accepted", second: "rejected"} {
		ind, err := st.Indication(ctx, id)
		if err != nil {
			t.Fatal(err)
		}
		if string(ind.Status) != want || ind.CalledBy != l2.Name {
			t.Errorf("record of %s: %s by %s, want %s by %s", id, ind.Status, ind.CalledBy, want, l2.Name)
		}
		ev, err := src.Events(ctx, id)
		if err != nil {
			t.Fatal(err)
		}
		if len(ev) == 0 || ev[len(ev)-1].Actor != l2.Name || !strings.Contains(ev[len(ev)-1].After, want) {
			t.Errorf("last audit event of %s: %+v, want one by %s showing %s", id, ev, l2.Name, want)
		}
	}
	capture(t, w, "demo-called")
	// Approval is refused for the Level II with the store's message.
	typeKey(w, fyne.KeyF3)
	s.Wait()
	if s.Cals.Detail() == nil {
		t.Fatal("no calibration on the calibration desk")
	}
	test.Tap(s.Calibration.approve)
	s.Wait()
	msg, _, refused := s.Cals.Message()
	if !refused || !strings.Contains(msg, "not permitted") {
		t.Errorf("Level II approval message %q (refused %v), want the store's refusal", msg, refused)
	}
	capture(t, w, "demo-calibration-refused")
	s.Close()
	src.Close()

	l3 := viewmodel.Actor{Name: "reviewer-3t", Role: viewmodel.Level3}
	src3, err := source.OpenDemo(ctx, dir, l3, now, nil)
	if err != nil {
		t.Fatal(err)
	}
	defer src3.Close()
	s3, w3 := openShell(t, src3, Light)
	typeKey(w3, fyne.KeyF3)
	s3.Wait()
	s3.Calibration.reason.SetText("curves and set-up checked against the standard")
	test.Tap(s3.Calibration.approve)
	s3.Wait()
	if d := s3.Cals.Detail(); d == nil || d.State != "approved" || d.ApprovedBy != l3.Name {
		t.Errorf("after Level III approval: %+v", d)
	}
	capture(t, w3, "demo-calibration-approved")
}

// fmtV formats volts as the readout does.
func fmtV(v float64) string { return fmt.Sprintf("%.3f V", v) }
