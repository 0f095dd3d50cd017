package source

import (
	"context"
	"errors"
	"strings"
	"testing"
	"time"

	"whorl/gui/viewmodel"
	"whorl/store"
)

func fixedNow() time.Time { return time.Date(2026, 10, 14, 18, 0, 0, 0, time.UTC) }

// TestDemoRecord builds the demo record once and reviews it in two roles.
func TestDemoRecord(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the demo inspection")
	}
	ctx := context.Background()
	dir := t.TempDir()
	l2 := viewmodel.Actor{Name: "analyst-2b", Role: viewmodel.Level2}
	in, err := OpenDemo(ctx, dir, l2, fixedNow, nil)
	if err != nil {
		t.Fatal(err)
	}
	defer in.Close()
	comps, err := in.Components(ctx)
	if err != nil || len(comps) != DemoTubes {
		t.Fatalf("components: %d, %v; want %d", len(comps), err, DemoTubes)
	}
	invalid, withCalls := 0, ""
	for _, c := range comps {
		if c.Status == viewmodel.InvalidGroup {
			invalid++
		}
		if c.Calls > 0 && withCalls == "" && c.Status != viewmodel.InvalidGroup {
			withCalls = c.ID
		}
	}
	if invalid == 0 {
		t.Error("no component of the drifted group is marked invalid")
	}
	if withCalls == "" {
		t.Fatal("no component with calls in a valid group")
	}
	tube, err := in.Tube(ctx, withCalls)
	if err != nil {
		t.Fatal(err)
	}
	if len(tube.Landmarks) == 0 || !tube.VoltsCalibrated || len(tube.MeasureChannels) == 0 {
		t.Errorf("tube %s: %d landmarks, calibrated %v, measure channels %v", withCalls, len(tube.Landmarks), tube.VoltsCalibrated, tube.MeasureChannels)
	}
	calls, err := in.Calls(ctx, withCalls)
	if err != nil || len(calls) == 0 {
		t.Fatalf("calls of %s: %v, %v", withCalls, calls, err)
	}
	c := calls[0]
	// Measuring the call's own window gives the recorded amplitude: both
	// come from calibrate.MeasureWindow on the same calibrated samples.
	m, err := in.Measure(ctx, tube, c.Channel, c.Window)
	if err != nil {
		t.Fatal(err)
	}
	if d := m.VppV - c.VppV; d > 1e-9*c.VppV || d < -1e-9*c.VppV {
		t.Errorf("Vpp of %s re-measured %v V, recorded %v V", c.ID, m.VppV, c.VppV)
	}
	if err := in.Decide(ctx, c.ID, viewmodel.Decision{Kind: viewmodel.Accept}); err != nil {
		t.Fatal(err)
	}
	if err := in.Decide(ctx, c.ID, viewmodel.Decision{Kind: viewmodel.Retype, Type: "deposit", Comment: "low-frequency response"}); err != nil {
		t.Fatalf("retype: %v", err)
	}
	if err := in.Decide(ctx, c.ID, viewmodel.Decision{Kind: viewmodel.Comment, Comment: "seen on the 100 kHz channel too"}); err != nil {
		t.Fatalf("comment: %v", err)
	}
	after, _ := in.Calls(ctx, withCalls)
	found := false
	for _, a := range after {
		if a.ID == c.ID {
			found = true
			if a.State != viewmodel.Accepted || a.Type != "deposit" || a.Comment != "seen on the 100 kHz channel too" {
				t.Errorf("call after accept, retype and comment: %+v", a)
			}
		}
	}
	if !found {
		t.Errorf("call %s left the list after it was retyped", c.ID)
	}
	ev, err := in.Events(ctx, c.ID)
	if err != nil {
		t.Fatal(err)
	}
	found = false
	for _, e := range ev {
		if e.Actor == l2.Name && e.Role == "level2" {
			found = true
		}
	}
	if !found {
		t.Errorf("no event by %s on %s: %+v", l2.Name, c.ID, ev)
	}
	cals, err := in.Calibrations(ctx)
	if err != nil || len(cals) == 0 {
		t.Fatalf("calibrations %v, %v", cals, err)
	}
	det, err := in.Calibration(ctx, cals[0].ID)
	if err != nil || len(det.Curves) == 0 || len(det.Located) == 0 || det.Scan == nil {
		t.Fatalf("calibration detail: %+v, %v", det, err)
	}
	err = in.Approve(ctx, cals[0].ID, "checked")
	if !errors.Is(err, viewmodel.ErrNotPermitted) || !errors.Is(err, store.ErrNotPermitted) {
		t.Errorf("Level II approval: err %v, want the store's refusal", err)
	}
	paths, err := in.Export(ctx, t.TempDir())
	if err != nil || len(paths) != 5 {
		t.Errorf("export: %v, %v; want 5 files", paths, err)
	}
	in.Close()

	l3 := viewmodel.Actor{Name: "reviewer-3t", Role: viewmodel.Level3}
	in3, err := OpenDemo(ctx, dir, l3, fixedNow, nil)
	if err != nil {
		t.Fatal(err)
	}
	defer in3.Close()
	if err := in3.Approve(ctx, cals[0].ID, "curves checked against the standard"); err != nil {
		t.Fatalf("Level III approval: %v", err)
	}
	cals, _ = in3.Calibrations(ctx)
	if cals[0].State != string(store.CalApproved) || !strings.Contains(cals[0].ApprovedBy, "reviewer-3t") {
		t.Errorf("after approval: %+v", cals[0])
	}
}
