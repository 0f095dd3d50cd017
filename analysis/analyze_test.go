package analysis_test

import (
	"context"
	"encoding/json"
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
	"time"

	"whorl/acquire"
	"whorl/analysis"
	"whorl/analysis/measure"
	"whorl/calibrate"
	"whorl/calibrate/calibtest"
)

const exampleProcedure = "../testdata/calibrate/example-procedure.json"

// fixture builds a calibration on the calibtest standard and a 3 m tube
// of the same model with two supports, an 80 %TW and a 40 %TW OD hole in
// the free span, and a 60 %TW hole under the second support.
func fixture(t testing.TB) (*calibrate.Calibration, *calibrate.Procedure, *acquire.Scan) {
	t.Helper()
	proc, err := calibrate.LoadProcedure(exampleProcedure)
	if err != nil {
		t.Fatal(err)
	}
	m := calibtest.Demo()
	std := calibtest.Standard()
	ss := m.Scan("STD", m.StandardFeatures(std), rand.New(rand.NewPCG(1, 1)))
	cal, err := calibrate.Build(std, proc, ss, calibrate.BuildOptions{Builder: "analyst-2a", At: time.Date(2026, 10, 14, 6, 0, 0, 0, time.UTC)})
	if err != nil {
		t.Fatal(err)
	}
	m.LengthM = 3
	hole := func(z, depth, diaM float64) calibtest.Feature {
		return calibtest.Feature{CentreM: z, Response: m.FlawResponse(depth, calibrate.OD, math.Pi*diaM*diaM/4)}
	}
	feats := []calibtest.Feature{
		{CentreM: 1.0, Response: m.SupportResponse(1), LengthM: 0.0222},
		{CentreM: 2.0, Response: m.SupportResponse(1), LengthM: 0.0222},
		hole(0.5, 80, 0.00198),
		hole(1.5, 40, 0.00476),
		hole(2.0, 60, 0.00278),
	}
	tube := m.Scan("R01C001", feats, rand.New(rand.NewPCG(2, 2)))
	return cal, proc, tube
}

func TestAnalyzeFixtureTube(t *testing.T) {
	t.Parallel()
	cal, proc, tube := fixture(t)
	ind, rep, err := analysis.Analyze(context.Background(), tube, cal, proc)
	if err != nil {
		t.Fatal(err)
	}
	if len(rep.Landmarks) != 2 || rep.Landmarks[0].Name != "support-1" || math.Abs(rep.Landmarks[1].CentreM-2.0) > 0.003 {
		t.Fatalf("landmarks %+v, want support-1 at 1.0 m and support-2 at 2.0 m", rep.Landmarks)
	}
	want := []struct {
		posM, depth float64
		channel     string
	}{
		// The fixture model's phase follows the same 2x/δ law as the
		// standard it was calibrated on, so a hole like a standard hole
		// is sized near its depth; tolerance: the curve's uncertainty
		// plus 5 %TW for the difference in hole volume.
		{0.5, 80, "400k-diff"},
		{1.5, 40, "400k-diff"},
		{2.0, 60, "mix-400-100"},
	}
	for _, w := range want {
		var got *analysis.Indication
		for i := range ind {
			if ind[i].Channel == w.channel && math.Abs(ind[i].PositionM-w.posM) < 0.01 && ind[i].Class == analysis.ClassFlaw {
				got = &ind[i]
			}
		}
		if got == nil {
			t.Errorf("no flaw-like indication on %s at %.2f m; indications: %+v", w.channel, w.posM, ind)
			continue
		}
		if got.DepthPct == nil || math.Abs(*got.DepthPct-w.depth) > got.UncertaintyPct+5 {
			t.Errorf("%s at %.2f m sized %v %%TW, want %.0f ± %.1f", w.channel, w.posM, got.DepthPct, w.depth, got.UncertaintyPct+5)
		}
		if got.CalibrationHash != cal.Hash || got.Curve == "" || got.Window[1] <= got.Window[0] {
			t.Errorf("traceability fields missing: %+v", got)
		}
	}
	// Supports are never flaw-like on the prime channel.
	for _, x := range ind {
		if x.Channel == "400k-diff" && x.LandmarkKind == analysis.KindSupport && math.Abs(x.OffsetM) < 0.02 && x.Class != analysis.ClassLandmark {
			t.Errorf("support signal classed %s: %+v", x.Class, x)
		}
	}
	// Locations are relative to the nearest landmark.
	for _, x := range ind {
		if math.Abs(x.PositionM-1.5) < 0.01 && !strings.Contains(x.Location, "support-") {
			t.Errorf("location %q does not name a support", x.Location)
		}
	}
	// Indications round-trip through JSON.
	b, err := json.Marshal(ind)
	if err != nil {
		t.Fatal(err)
	}
	var back []analysis.Indication
	if err := json.Unmarshal(b, &back); err != nil || len(back) != len(ind) {
		t.Fatalf("JSON round trip: %v (%d of %d)", err, len(back), len(ind))
	}
}

func TestAnalyzeErrors(t *testing.T) {
	t.Parallel()
	cal, proc, tube := fixture(t)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, _, err := analysis.Analyze(ctx, tube, cal, proc); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled context: %v", err)
	}
	missing := *tube
	missing.Channels = tube.Channels[1:]
	if _, _, err := analysis.Analyze(context.Background(), &missing, cal, proc); err == nil || !strings.Contains(err.Error(), "400k-diff") {
		t.Errorf("missing channel: %v", err)
	}
	other := *proc
	other.Revision = "9"
	if _, err := analysis.NewAnalyzer(cal, &other); err == nil || !strings.Contains(err.Error(), "rev 9") {
		t.Errorf("procedure revision mismatch: %v", err)
	}
}

// TestAlarmRegion: the example procedure's sector 35°–95° from 0.5 V
// catches a deep OD hole read at about 66° (the 80 %TW hole) but not the
// 40 %TW hole read at about 108°.
func TestAlarmRegion(t *testing.T) {
	t.Parallel()
	cal, proc, tube := fixture(t)
	ind, _, err := analysis.Analyze(context.Background(), tube, cal, proc)
	if err != nil {
		t.Fatal(err)
	}
	for _, x := range ind {
		if x.Channel != "400k-diff" || x.Class != analysis.ClassFlaw {
			continue
		}
		in := len(x.Alarms) == 1 && x.Alarms[0] == "deep-od-sector"
		wantIn := x.PhaseDeg >= 35 && x.PhaseDeg <= 95 && x.Vpp >= 0.5
		if in != wantIn {
			t.Errorf("indication at %.2f m, %.1f°, %.2f V: alarms %v, want in sector %v", x.PositionM, x.PhaseDeg, x.Vpp, x.Alarms, wantIn)
		}
	}
}

func TestScoreCounts(t *testing.T) {
	t.Parallel()
	d := func(v float64) *float64 { return &v }
	truth := []analysis.Truth{
		{Component: "A", Kind: "od-pit", AxialPositionM: 1.0, LengthM: 0.002, DepthPct: 60, Origin: "OD", Flaw: true},
		{Component: "A", Kind: "od-pit", AxialPositionM: 2.0, LengthM: 0.002, DepthPct: 45, Origin: "OD", Flaw: true},
		{Component: "A", Kind: "dent", AxialPositionM: 3.0, LengthM: 0.01},
		{Component: "B", Kind: "support-wear", AxialPositionM: 1.05, LengthM: 0.02, DepthPct: 30, Origin: "OD", Flaw: true},
	}
	ind := []analysis.Indication{
		{Component: "A", PositionM: 1.001, Class: analysis.ClassFlaw, Reportable: true, DepthPct: d(64)},
		{Component: "A", PositionM: 3.0, Class: analysis.ClassReview, Reportable: true},                 // at the dent: false call
		{Component: "A", PositionM: 4.0, Class: analysis.ClassFlaw, Reportable: false, DepthPct: d(10)}, // not reportable: not a call
		{Component: "B", PositionM: 1.06, Class: analysis.ClassFlaw, Reportable: true, DepthPct: d(25)},
		{Component: "B", PositionM: 2.05, Class: analysis.ClassFlaw, Reportable: true, DepthPct: d(22)}, // at a support, no flaw
		{Component: "B", PositionM: 2.5, Class: analysis.ClassLandmark, Reportable: true},
	}
	lms := []analysis.Landmark{{Name: "support-2", Kind: analysis.KindSupport, StartM: 2.04, EndM: 2.06, CentreM: 2.05}}
	acc := analysis.Score(ind, truth, analysis.ScoreOptions{Tubes: 2, Landmarks: lms})
	// Hand count: flaws ≥ 40: the 60 and 45 pits, one found; OD 20–100:
	// three, two sized with |64−60| and |25−30|: MAE 4.5; false calls:
	// the dent call and the support call, 2 in 2 tubes = 10 per 10.
	if acc.ToDetect != 2 || acc.Detected != 1 || len(acc.Missed) != 1 || acc.Missed[0].DepthPct != 45 {
		t.Errorf("detection %d/%d missed %+v, want 1/2 missing the 45 %%TW pit", acc.Detected, acc.ToDetect, acc.Missed)
	}
	if acc.ToSize != 3 || acc.Sized != 2 || acc.MAEPct != 4.5 {
		t.Errorf("sizing %d/%d MAE %g, want 2/3 and 4.5", acc.Sized, acc.ToSize, acc.MAEPct)
	}
	if acc.FalseCalls != 2 || acc.FalseCallsPer10 != 10 || acc.SupportCalls != 1 {
		t.Errorf("false calls %d (%g per 10), support %d; want 2, 10, 1", acc.FalseCalls, acc.FalseCallsPer10, acc.SupportCalls)
	}
	if acc.Pass || acc.DetectOK || !acc.SizingOK || acc.FalseOK || acc.SupportOK {
		t.Errorf("targets %+v", acc)
	}
}

// TestCalibratedChannels: the calibrated channels an analyst views show a
// standard-like hole at the phase and amplitude the analysis measured.
func TestCalibratedChannels(t *testing.T) {
	t.Parallel()
	cal, proc, tube := fixture(t)
	a, err := analysis.NewAnalyzer(cal, proc)
	if err != nil {
		t.Fatal(err)
	}
	ind, _, err := a.Analyze(context.Background(), tube)
	if err != nil {
		t.Fatal(err)
	}
	ch, lms, err := a.Calibrated(tube)
	if err != nil {
		t.Fatal(err)
	}
	if len(ch) != len(cal.Channels) || len(lms) != 2 {
		t.Fatalf("%d channels, %d landmarks", len(ch), len(lms))
	}
	for _, x := range ind {
		z := ch[x.Channel][x.Window[0]:x.Window[1]]
		if got := measure.Vpp(z).Vpp; got != x.Vpp {
			t.Errorf("%s at %.3f m: Vpp of the displayed samples %g, indication %g", x.Channel, x.PositionM, got, x.Vpp)
		}
	}
}
