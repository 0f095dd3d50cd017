package source

import (
	"context"
	"errors"
	"math"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"whorl/acquire"
	"whorl/gui/viewmodel"
	"whorl/gui/viewmodel/vmtest"
)

func TestFilesShowScansWithoutRecord(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	dir := t.TempDir()
	var paths []string
	for _, id := range []string{"R01C001", "R01C002"} {
		sc := vmtest.Scan(id, 800, 2, 2)
		sc.Meta.ProbeType = "bobbin"
		p := filepath.Join(dir, id+".csv")
		if err := acquire.WriteScanFile(p, sc); err != nil {
			t.Fatal(err)
		}
		paths = append(paths, p)
	}
	actor := viewmodel.Actor{Name: "analyst-2b", Role: viewmodel.Level2}
	src, err := Open(ctx, Options{Paths: paths, Actor: actor})
	if err != nil {
		t.Fatal(err)
	}
	defer src.Close()
	comps, err := src.Components(ctx)
	if err != nil || len(comps) != 2 || comps[1].ID != "R01C002" || comps[0].Status != viewmodel.NotAnalysed {
		t.Fatalf("components %+v, %v", comps, err)
	}
	tube, err := src.Tube(ctx, "R01C001")
	if err != nil {
		t.Fatal(err)
	}
	// vmtest.Scan's flaw at 0.42 m has a 2 V chord (gain 2, see vmtest).
	i := int(0.42 / 0.002)
	m, err := src.Measure(ctx, tube, tube.MeasureChannels[0], viewmodel.Window{Lo: i - 15, Hi: i + 15})
	if err != nil {
		t.Fatal(err)
	}
	if !scalar.EqualWithinAbsOrRel(m.VppV, 2, 0, 0.01) || m.DepthOK {
		t.Errorf("measurement %+v: want Vpp 2 V within 1 %% and no depth", m)
	}
	if !scalar.EqualWithinAbsOrRel(m.PositionM, 0.42, 0.003, 0) || math.IsNaN(m.OffsetM) {
		t.Errorf("position %v m, want 0.42 m", m.PositionM)
	}
	for name, err := range map[string]error{
		"decide":  src.Decide(ctx, "x", viewmodel.Decision{Kind: viewmodel.Accept}),
		"approve": src.Approve(ctx, "x", "r"),
	} {
		if !errors.Is(err, errNoRecord) || !strings.Contains(err.Error(), "open an inspection database") {
			t.Errorf("%s without a record: %v", name, err)
		}
	}
	if _, err := src.Measure(ctx, tube, "nope", viewmodel.Window{Lo: 0, Hi: 10}); err == nil {
		t.Error("measuring a missing channel gave no error")
	}
	if _, err := Open(ctx, Options{Paths: paths}); err == nil {
		t.Error("opening without a person gave no error")
	}
}
