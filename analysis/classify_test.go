package analysis

import (
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"whorl/calibrate"
)

// zoneFixture is a hand-built calibration with one raw channel and one
// mix, both sized with a piecewise-linear phase curve through 40° (100
// %TW), 60° (80), 75° (60), 84° (40) and 91° (20) — the shape of a support
// mix's curve, whose shallow end is compressed — and classification
// numbers like the demo procedure's, with a zone flaw band from the flaw
// band's low edge to the curve's shallow end plus 10°: [8°, 101°].
func zoneFixture(t *testing.T, marginDeg, zoneMinSNR float64) (*Analyzer, *calibrate.ChannelCal, *calibrate.ChannelCal) {
	t.Helper()
	pts := []calibrate.CurvePoint{
		{FlawID: "TWH", PhaseDeg: 40, Vpp: 2.5, DepthPct: 100},
		{FlawID: "FBH-80", PhaseDeg: 60, Vpp: 3, DepthPct: 80},
		{FlawID: "FBH-60", PhaseDeg: 75, Vpp: 2.6, DepthPct: 60},
		{FlawID: "FBH-40", PhaseDeg: 84, Vpp: 2.8, DepthPct: 40},
		{FlawID: "FBH-20x4", PhaseDeg: 91, Vpp: 4, DepthPct: 20},
	}
	cv, err := calibrate.FitCurve(calibrate.CurveSpec{Name: "phase-od", Variable: calibrate.VarPhase, Type: "piecewise-linear", Flaws: []string{"TWH", "FBH-80", "FBH-60", "FBH-40", "FBH-20x4"}}, pts)
	if err != nil {
		t.Fatal(err)
	}
	raw := &calibrate.ChannelCal{Channel: "400k-diff", Mode: "differential", Gain: 1, Curves: []*calibrate.Curve{cv}, SizingCurve: "phase-od"}
	mix := &calibrate.ChannelCal{Channel: "mix", Mode: "differential", Gain: 1, Curves: []*calibrate.Curve{cv}, SizingCurve: "phase-od"}
	cal := &calibrate.Calibration{ID: "CAL-T", Channels: []calibrate.ChannelCal{*raw, *mix}, Mixes: []calibrate.MixRecord{{Name: "mix"}}}
	proc := &calibrate.Procedure{
		ReportingPct: 20,
		Classification: calibrate.ClassRules{
			SupportZoneM: 0.03, FlawPhaseDeg: [2]float64{8, 172}, GeometryBandDeg: 15, GeometryMinVpp: 0.3,
			GeometryMaxCross: 0.3, DepositRatio: 3, MinSNR: 3, NoiseWindowM: 0.05, ResidueMaxVpp: 2,
			ZonePhaseMarginDeg: marginDeg, ZoneMinSNR: zoneMinSNR,
		},
	}
	a := &Analyzer{cal: cal, proc: proc, bufs: map[string][]complex128{}}
	return a, cal.Channel("400k-diff"), cal.Channel("mix")
}

// TestZoneRules classifies hand-built measurements (Vpp, phase, cross
// extent, S/N) by the rules of the package documentation; the expected
// class, rule and depth follow from the rule table and the curve's points
// (linear interpolation between them).
func TestZoneRules(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name                   string
		mix, zoned             bool
		vpp, phase, cross, snr float64
		margin, zoneSNR        float64
		class                  Class
		rule                   string
		depth                  float64 // -1: not sized
		reportable             bool
	}{
		// A bulging trace near the lift-off axis at a support: what the
		// mix leaves of the support plus noise. Without the zone band it
		// went to an analyst as a composite geometry signal.
		{name: "residue near the axis, bulging", mix: true, zoned: true, vpp: 0.6, phase: 170, cross: 0.4, snr: 2, margin: 10, zoneSNR: 2, class: ClassLandmark, rule: RuleResidue, depth: -1, reportable: true},
		{name: "residue near the axis, no zone band", mix: true, zoned: true, vpp: 0.6, phase: 170, cross: 0.4, snr: 2, class: ClassReview, rule: RuleComposite, depth: -1, reportable: true},
		{name: "residue below the axis", mix: true, zoned: true, vpp: 0.9, phase: 340, cross: 0.4, snr: 3.5, margin: 10, zoneSNR: 2, class: ClassLandmark, rule: RuleResidue, depth: -1, reportable: true},
		{name: "out of band above residue_max_vpp", mix: true, zoned: true, vpp: 2.5, phase: 172, cross: 0.1, snr: 9, margin: 10, zoneSNR: 2, class: ClassGeometry, rule: RuleGeometry, depth: -1, reportable: true},
		// An ID flaw at a support reads between the lift-off axis and the
		// through-wall hole, below the OD curve's range but inside the
		// flaw band: never residue; sized at the curve's deep end (a
		// bound, out of range, reportable).
		{name: "ID flaw at a support", mix: true, zoned: true, vpp: 1.5, phase: 20, cross: 0.5, snr: 6, margin: 10, zoneSNR: 2, class: ClassFlaw, rule: RuleFlawPhase, depth: 100, reportable: true},
		// An axial crack beside a support: in the band, S/N between
		// zone_min_snr and min_snr.
		{name: "weak in-band signal at a support", mix: true, zoned: true, vpp: 0.77, phase: 89, cross: 0.4, snr: 2.6, margin: 10, zoneSNR: 2, class: ClassReview, rule: RuleZoneWeak, depth: -1, reportable: true},
		{name: "weak in-band signal, no zone rule", mix: true, zoned: true, vpp: 0.77, phase: 89, cross: 0.4, snr: 2.6, class: ClassNoise, rule: RuleNoise, depth: -1, reportable: true},
		{name: "weak in-band signal in free span", mix: true, zoned: false, vpp: 0.77, phase: 89, cross: 0.4, snr: 2.6, margin: 10, zoneSNR: 2, class: ClassNoise, rule: RuleNoise, depth: -1, reportable: true},
		{name: "in band below zone_min_snr", mix: true, zoned: true, vpp: 0.6, phase: 89, cross: 0.3, snr: 1.5, margin: 10, zoneSNR: 2, class: ClassNoise, rule: RuleNoise, depth: -1, reportable: true},
		{name: "raw channel at a support", mix: false, zoned: true, vpp: 0.77, phase: 89, cross: 0.4, snr: 2.6, margin: 10, zoneSNR: 2, class: ClassLandmark, rule: RuleLandmarkZone, depth: -1, reportable: true},
		// Well above the noise: sized; 70° lies between 60° (80 %TW) and
		// 75° (60 %TW): 80 − 20·10/15.
		{name: "strong in-band signal at a support", mix: true, zoned: true, vpp: 2, phase: 70, cross: 0.5, snr: 7, margin: 10, zoneSNR: 2, class: ClassFlaw, rule: RuleFlawPhase, depth: 80 - 20.0*10/15, reportable: true},
		// Past the curve's shallow end (91°) but inside the band (101°):
		// an analyst decides; without the zone band it is dropped as
		// shallower than the shallowest reference.
		{name: "past the shallow end at a support", mix: true, zoned: true, vpp: 1.26, phase: 95, cross: 0.4, snr: 4.6, margin: 10, zoneSNR: 2, class: ClassReview, rule: RuleZoneShallow, depth: -1, reportable: true},
		{name: "past the shallow end, no zone band", mix: true, zoned: true, vpp: 1.26, phase: 95, cross: 0.4, snr: 4.6, class: ClassFlaw, rule: RuleFlawPhase, depth: 20, reportable: false},
		{name: "past the shallow end in free span", mix: true, zoned: false, vpp: 1.26, phase: 95, cross: 0.4, snr: 4.6, margin: 10, zoneSNR: 2, class: ClassFlaw, rule: RuleFlawPhase, depth: 20, reportable: false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			a, raw, mix := zoneFixture(t, c.margin, c.zoneSNR)
			cc := raw
			if c.mix {
				cc = mix
			}
			ind := Indication{Channel: cc.Channel, Vpp: c.vpp, PhaseDeg: c.phase, MaxRatePhaseDeg: c.phase, CrossVpp: c.cross * c.vpp, SNR: c.snr, Reportable: true}
			a.classify(&ind, cc, c.zoned)
			if ind.Class != c.class || ind.Rule != c.rule || ind.Reportable != c.reportable {
				t.Errorf("%.2f V at %g°, cross %g, S/N %g: class %s rule %s reportable %v, want %s %s %v",
					c.vpp, c.phase, c.cross, c.snr, ind.Class, ind.Rule, ind.Reportable, c.class, c.rule, c.reportable)
			}
			switch {
			case c.depth < 0 && ind.DepthPct != nil:
				t.Errorf("sized %g %%TW, want not sized", *ind.DepthPct)
			case c.depth >= 0 && ind.DepthPct == nil:
				t.Errorf("not sized, want %g %%TW", c.depth)
			case c.depth >= 0 && !scalar.EqualWithinAbsOrRel(*ind.DepthPct, c.depth, 1e-9, 1e-9):
				t.Errorf("sized %g %%TW, want %g (tolerance 1e-9)", *ind.DepthPct, c.depth)
			}
		})
	}
}

// TestZoneFlawBand: the band runs from the lower of the flaw band's low
// edge and the curve's deep end less the margin, to the curve's shallow
// end plus the margin; there is none without a margin, a sizing curve or
// a phase variable.
func TestZoneFlawBand(t *testing.T) {
	t.Parallel()
	a, _, mix := zoneFixture(t, 10, 2)
	cr := a.proc.Classification
	// Curve range [40°, 91°], margin 10°, flaw band from 8°: [8°, 101°].
	if lo, hi, ok := zoneFlawBand(mix, cr); !ok || lo != 8 || hi != 101 {
		t.Errorf("band [%g, %g] ok %v, want [8, 101] true", lo, hi, ok)
	}
	// A flaw band starting above the curve's deep end less the margin:
	// [40 − 10, 91 + 10].
	high := cr
	high.FlawPhaseDeg = [2]float64{35, 172}
	if lo, hi, ok := zoneFlawBand(mix, high); !ok || lo != 30 || hi != 101 {
		t.Errorf("band [%g, %g] ok %v, want [30, 101] true", lo, hi, ok)
	}
	off := cr
	off.ZonePhaseMarginDeg = 0
	if _, _, ok := zoneFlawBand(mix, off); ok {
		t.Error("band without a margin")
	}
	none := *mix
	none.SizingCurve = ""
	if _, _, ok := zoneFlawBand(&none, cr); ok {
		t.Error("band without a sizing curve")
	}
	amp := *mix.Curves[0]
	amp.Variable = calibrate.VarAmplitude
	byAmp := *mix
	byAmp.Curves = []*calibrate.Curve{&amp}
	if _, _, ok := zoneFlawBand(&byAmp, cr); ok {
		t.Error("band on an amplitude curve")
	}
}
