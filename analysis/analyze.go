package analysis

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"slices"
	"sort"

	"whorl/acquire"
	"whorl/analysis/measure"
	"whorl/calibrate"
)

// Analyzer analyses scans with one calibration and procedure. It keeps
// scratch buffers between scans, so it must not be used by two goroutines
// at once; make one per goroutine (NewAnalyzer is cheap).
type Analyzer struct {
	cal  *calibrate.Calibration
	proc *calibrate.Procedure
	// needed lists the calibrated channels and mixes the analysis uses.
	needed []string
	bufs   map[string][]complex128
	raw    map[string][]complex128
	spread []float64
	peaks  []int
	pp     measure.PeakToPeak
	spr    measure.Spreader
	tmp    []float64
	// residue holds each mix's residue templates as complex samples.
	residue map[string]*residueTemplate
}

type residueTemplate struct{ landmark, mix []complex128 }

// NewAnalyzer checks that cal was built under proc and holds everything
// the procedure's detection needs (a set-up for every detection and alarm
// channel, every mix, every sizing curve).
func NewAnalyzer(cal *calibrate.Calibration, proc *calibrate.Procedure) (*Analyzer, error) {
	if cal == nil || proc == nil {
		return nil, errors.New("analysis: a calibration and a procedure are required")
	}
	if err := proc.Validate(); err != nil {
		return nil, err
	}
	if cal.ProcedureID != proc.ID || cal.ProcedureRevision != proc.Revision {
		return nil, fmt.Errorf("calibration %s was built under procedure %s rev %s, not %s rev %s", cal.ID, cal.ProcedureID, cal.ProcedureRevision, proc.ID, proc.Revision)
	}
	a := &Analyzer{cal: cal, proc: proc, bufs: map[string][]complex128{}, raw: map[string][]complex128{}, residue: map[string]*residueTemplate{}}
	for _, m := range cal.Mixes {
		if m.Residue != nil {
			l, x := m.Residue.Complex()
			if len(l) != len(x) || len(l) < 3 {
				return nil, fmt.Errorf("calibration %s mix %s: malformed residue template", cal.ID, m.Name)
			}
			a.residue[m.Name] = &residueTemplate{landmark: l, mix: x}
		}
	}
	need := map[string]bool{}
	add := func(name, what string) error {
		cc := cal.Channel(name)
		if cc == nil {
			return fmt.Errorf("calibration %s has no set-up for %s %s", cal.ID, what, name)
		}
		if proc.Mix(name) != nil && cal.Mix(name) == nil {
			return fmt.Errorf("calibration %s has no trained mix %s", cal.ID, name)
		}
		if cc.SizingCurve != "" && cc.Curve(cc.SizingCurve) == nil {
			return fmt.Errorf("calibration %s channel %s: sizing curve %s missing", cal.ID, name, cc.SizingCurve)
		}
		if !need[name] {
			need[name] = true
			a.needed = append(a.needed, name)
		}
		return nil
	}
	for _, d := range proc.Detection {
		if err := add(d.Channel, "detection channel"); err != nil {
			return nil, err
		}
	}
	for _, al := range proc.Alarms {
		if err := add(al.Channel, "alarm channel"); err != nil {
			return nil, err
		}
	}
	if cal.Channel(proc.Landmarks.Channel) != nil {
		if err := add(proc.Landmarks.Channel, "landmark channel"); err != nil {
			return nil, err
		}
	}
	if !(cal.LandmarkThresholdV > 0) {
		return nil, fmt.Errorf("calibration %s has no landmark threshold", cal.ID)
	}
	return a, nil
}

// Analyze analyses one scan with cal under proc: see Analyzer.Analyze.
func Analyze(ctx context.Context, scan *acquire.Scan, cal *calibrate.Calibration, proc *calibrate.Procedure) ([]Indication, *Report, error) {
	a, err := NewAnalyzer(cal, proc)
	if err != nil {
		return nil, nil, err
	}
	return a.Analyze(ctx, scan)
}

// Analyze detects, measures, sizes and classifies the indications of scan.
// Indications are ordered by position, then channel. The report lists the
// landmarks found, each channel's clean noise window, and class counts. It
// returns an error when the scan lacks a channel the procedure needs, has
// no position axis, or ctx is cancelled.
func (a *Analyzer) Analyze(ctx context.Context, scan *acquire.Scan) ([]Indication, *Report, error) {
	if err := ctx.Err(); err != nil {
		return nil, nil, err
	}
	posM, err := a.load(scan)
	if err != nil {
		return nil, nil, err
	}
	n := scan.Len()
	if n < 3 {
		return nil, nil, fmt.Errorf("scan %q: %d samples, too short to analyse", scan.Meta.Component, n)
	}
	stepM := calibrate.StepM(posM)
	cal, proc := a.cal, a.proc
	rep := &Report{
		Component: scan.Meta.Component, Samples: n, StartM: posM[0], EndM: posM[n-1],
		CalibrationID: cal.ID, CalibrationVersion: cal.Version, CalibrationHash: cal.Hash, CalibrationStatus: cal.Status,
		ProcedureID: proc.ID, ProcedureRevision: proc.Revision, Counts: map[Class]int{},
	}
	if cal.Status != calibrate.StatusApproved {
		rep.Warnings = append(rep.Warnings, fmt.Sprintf("calibration %s version %d is not approved: results are provisional", cal.ID, cal.Version))
	}
	// Landmarks on the raw landmark channel.
	lmRaw := a.raw[proc.Landmarks.Channel]
	if lmRaw == nil {
		return nil, nil, fmt.Errorf("scan %q has no landmark channel %s", scan.Meta.Component, proc.Landmarks.Channel)
	}
	rep.Landmarks = a.landmarks(lmRaw, posM)

	// Calibrated channels and mixes.
	for _, name := range a.needed {
		buf, err := a.calibrated(a.bufs[name], name, lmRaw, rep.Landmarks)
		if err != nil {
			return nil, nil, fmt.Errorf("scan %q: %w", scan.Meta.Component, err)
		}
		a.bufs[name] = buf
	}

	zone := proc.Classification.SupportZoneM
	inZone := func(w [2]int) bool {
		c := (posM[w[0]] + posM[w[1]-1]) / 2
		for _, l := range rep.Landmarks {
			if c >= l.StartM-zone && c <= l.EndM+zone {
				return true
			}
		}
		return false
	}

	var out []Indication
	noise := map[string]float64{}
	for _, det := range proc.Detection {
		if err := ctx.Err(); err != nil {
			return nil, nil, err
		}
		cc := cal.Channel(det.Channel)
		z := a.bufs[det.Channel]
		abs := cc.Mode == "absolute"
		w := min(calibrate.WindowSamples(det.WindowM, stepM), n)
		nw, ok := noise[det.Channel]
		if !ok {
			win := a.noiseWindow(z, posM, calibrate.WindowSamples(proc.Classification.NoiseWindowM, stepM), inZone)
			nw = a.pp.Measure(z[win[0]:win[1]]).Vpp
			noise[det.Channel] = nw
			rep.Noise = append(rep.Noise, NoiseWindow{Channel: det.Channel, Window: win, Vpp: nw})
		}
		thr := det.ThresholdVpp
		for _, al := range proc.Alarms {
			if al.Channel == det.Channel {
				thr = math.Min(thr, alarmFloor(al))
			}
		}
		a.spread = a.spr.Spread(a.spread, z, w)
		a.peaks = measure.Peaks(a.peaks[:0], a.spread, thr, w)
		for _, c := range a.peaks {
			lo := max(0, c-w/2)
			hi := min(n, lo+w)
			win := [2]int{lo, hi}
			zoned := inZone(win)
			switch det.Zone {
			case calibrate.ZoneLandmarks:
				if !zoned {
					continue
				}
			case calibrate.ZoneFreeSpan:
				if zoned {
					continue
				}
			}
			vpp, ph, mr, chord := calibrate.MeasureWindow(&a.pp, z[lo:hi], abs, lobeRad(proc))
			var alarms []string
			for _, al := range proc.Alarms {
				if al.Channel == det.Channel && inAlarm(al, vpp, ph) {
					alarms = append(alarms, al.Name)
				}
			}
			if vpp < det.ThresholdVpp && len(alarms) == 0 {
				continue
			}
			ind := Indication{
				Component: scan.Meta.Component, Channel: det.Channel, Window: win,
				StartM: posM[lo], EndM: posM[hi-1], PositionM: (posM[lo] + posM[hi-1]) / 2,
				Vpp: vpp, PhaseDeg: ph, MaxRatePhaseDeg: mr, Alarms: alarms,
				CrossVpp:      measure.CrossExtent(z[lo:hi], chord.PhaseRad),
				CalibrationID: cal.ID, CalibrationVersion: cal.Version, CalibrationHash: cal.Hash,
				Reportable: true,
			}
			if nw > 0 {
				ind.SNR = vpp / nw
			} else {
				ind.SNR = math.Inf(1)
			}
			locate(&ind, rep.Landmarks)
			a.classify(&ind, cc, zoned)
			out = append(out, ind)
			rep.Counts[ind.Class]++
		}
	}
	sort.SliceStable(out, func(i, j int) bool {
		if out[i].PositionM != out[j].PositionM {
			return out[i].PositionM < out[j].PositionM
		}
		return out[i].Channel < out[j].Channel
	})
	for i := range out {
		if math.IsInf(out[i].SNR, 0) {
			out[i].SNR = math.MaxFloat64 // JSON has no infinity
		}
	}
	return out, rep, nil
}

// calibrated returns in dst (reused when it has room) the calibrated
// samples of a set-up channel or mix of the raw channels in a.raw: the mix
// output with its support residue compensated, then Gain·e^{j·rotation}.
func (a *Analyzer) calibrated(dst []complex128, name string, lmRaw []complex128, lms []Landmark) ([]complex128, error) {
	cc := a.cal.Channel(name)
	if cc == nil {
		return nil, fmt.Errorf("calibration %s has no set-up for %s", a.cal.ID, name)
	}
	n := len(lmRaw)
	if cap(dst) < n {
		dst = make([]complex128, n)
	}
	dst = dst[:n]
	if mx := a.cal.Mix(name); mx != nil {
		if _, err := mx.Apply(dst, a.raw); err != nil {
			return nil, err
		}
		if t := a.residue[name]; t != nil {
			compensate(dst, lmRaw, t, lms)
		}
	} else {
		src := a.raw[name]
		if src == nil {
			return nil, fmt.Errorf("no channel %s", name)
		}
		copy(dst, src)
	}
	f := cc.Factor()
	for i := range dst {
		dst[i] *= f
	}
	return dst, nil
}

// Calibrated returns every set-up channel and mix of the calibration as
// calibrated samples (new slices, by name), with the landmarks found, for
// display (impedance plane, strip charts) and for measurements an analyst
// takes by hand with package measure.
func (a *Analyzer) Calibrated(scan *acquire.Scan) (map[string][]complex128, []Landmark, error) {
	posM, err := a.load(scan)
	if err != nil {
		return nil, nil, err
	}
	lmRaw := a.raw[a.proc.Landmarks.Channel]
	lms := a.landmarks(lmRaw, posM)
	out := make(map[string][]complex128, len(a.cal.Channels))
	for _, c := range a.cal.Channels {
		z, err := a.calibrated(nil, c.Channel, lmRaw, lms)
		if err != nil {
			return nil, nil, fmt.Errorf("scan %q: %w", scan.Meta.Component, err)
		}
		out[c.Channel] = z
	}
	return out, lms, nil
}

// load validates scan, checks it has the channels the procedure needs,
// points a.raw at its channels and returns its positions.
func (a *Analyzer) load(scan *acquire.Scan) ([]float64, error) {
	if err := scan.Validate(); err != nil {
		return nil, err
	}
	if err := calibrate.CheckScanChannels(a.proc, scan); err != nil {
		return nil, err
	}
	posM, err := calibrate.ScanPositions(scan)
	if err != nil {
		return nil, err
	}
	clear(a.raw)
	for _, c := range scan.Channels {
		a.raw[c.Name] = c.Samples
	}
	return posM, nil
}

func lobeRad(p *calibrate.Procedure) float64 {
	if p.Lobe == calibrate.LobeEarlier {
		return math.Pi
	}
	return 0
}

// alarmFloor returns the smallest Vpp that can fall in an alarm region.
func alarmFloor(al calibrate.AlarmRegion) float64 {
	if al.Kind == calibrate.AlarmSector {
		return al.MinVpp
	}
	// Distance from the origin to the box.
	dx := math.Max(0, math.Max(al.XMinV, -al.XMaxV))
	dy := math.Max(0, math.Max(al.YMinV, -al.YMaxV))
	return math.Hypot(dx, dy)
}

// inAlarm tests the chord vector (vpp at phaseDeg, tail at the origin)
// against an alarm region.
func inAlarm(al calibrate.AlarmRegion, vpp, phaseDeg float64) bool {
	switch al.Kind {
	case calibrate.AlarmSector:
		if vpp < al.MinVpp || (al.MaxVpp > 0 && vpp > al.MaxVpp) {
			return false
		}
		span := calibrate.WrapDeg(al.MaxPhaseDeg - al.MinPhaseDeg)
		if span == 0 && al.MaxPhaseDeg != al.MinPhaseDeg {
			span = 360
		}
		return calibrate.WrapDeg(phaseDeg-al.MinPhaseDeg) <= span
	case calibrate.AlarmBox:
		v := cmplx.Rect(vpp, phaseDeg*math.Pi/180)
		return real(v) >= al.XMinV && real(v) <= al.XMaxV && imag(v) >= al.YMinV && imag(v) <= al.YMaxV
	}
	return false
}

// landmarks finds the stretches where the raw landmark channel departs
// from its baseline (the median of X and of Y) by at least the
// calibration's landmark threshold; stretches closer than MinSpacingM are
// merged; a stretch longer than ExtendedM or touching either end of the
// scan is a tubesheet, any other a support. Supports and tubesheets are
// numbered separately in scan order: "support-1", …, "tubesheet-1", ….
func (a *Analyzer) landmarks(z []complex128, posM []float64) []Landmark {
	n := len(z)
	rule := a.proc.Landmarks
	a.tmp = slices.Grow(a.tmp[:0], n)[:n]
	for i, v := range z {
		a.tmp[i] = real(v)
	}
	slices.Sort(a.tmp)
	bx := a.tmp[n/2]
	for i, v := range z {
		a.tmp[i] = imag(v)
	}
	slices.Sort(a.tmp)
	base := complex(bx, a.tmp[n/2])
	thr2 := a.cal.LandmarkThresholdV * a.cal.LandmarkThresholdV
	var runs [][2]int
	for i := 0; i < n; {
		d := z[i] - base
		if real(d)*real(d)+imag(d)*imag(d) < thr2 {
			i++
			continue
		}
		j := i
		for j < n {
			d := z[j] - base
			if real(d)*real(d)+imag(d)*imag(d) < thr2 {
				break
			}
			j++
		}
		if k := len(runs) - 1; k >= 0 && math.Abs(posM[i]-posM[runs[k][1]-1]) < rule.MinSpacingM {
			runs[k][1] = j
		} else {
			runs = append(runs, [2]int{i, j})
		}
		i = j
	}
	var out []Landmark
	ns, nt := 0, 0
	for _, r := range runs {
		l := Landmark{StartM: posM[r[0]], EndM: posM[r[1]-1], Window: r}
		l.CentreM = (l.StartM + l.EndM) / 2
		l.Ref = RefCentre
		if l.EndM-l.StartM > rule.ExtendedM || r[0] == 0 || r[1] == n {
			nt++
			l.Kind, l.Name = KindTubesheet, fmt.Sprintf("tubesheet-%d", nt)
			switch {
			case r[0] == 0 && r[1] < n:
				l.Ref = RefEnd
			case r[1] == n && r[0] > 0:
				l.Ref = RefStart
			}
		} else {
			ns++
			l.Kind, l.Name = KindSupport, fmt.Sprintf("support-%d", ns)
		}
		out = append(out, l)
	}
	return out
}

// locate fills the landmark-relative location of ind: the offset from the
// reference point (Landmark.RefM) of the nearest landmark.
func locate(ind *Indication, lms []Landmark) {
	best := -1
	bestD := math.Inf(1)
	for i := range lms {
		if d := math.Abs(ind.PositionM - lms[i].RefM()); d < bestD {
			best, bestD = i, d
		}
	}
	if best < 0 {
		ind.OffsetM = ind.PositionM
		ind.Location = fmt.Sprintf("%.3f m from the start of the scan", ind.PositionM)
		return
	}
	l := &lms[best]
	ind.Landmark, ind.LandmarkKind, ind.LandmarkRef = l.Name, l.Kind, l.Ref
	ind.LandmarkM = l.RefM()
	ind.OffsetM = ind.PositionM - ind.LandmarkM
	switch l.Ref {
	case RefCentre:
		ind.Location = fmt.Sprintf("%+.3f m from %s", ind.OffsetM, l.Name)
	default:
		ind.Location = fmt.Sprintf("%+.3f m from the %s face of %s", ind.OffsetM, l.Ref, l.Name)
	}
}

// noiseWindow returns a clean window of wn samples: among windows laid
// end to end outside landmark zones, the one whose spread is the median
// (so that neither a signal nor an unusually quiet stretch sets the
// noise). When every window is in a landmark zone, the whole scan's
// median window is used.
func (a *Analyzer) noiseWindow(z []complex128, posM []float64, wn int, inZone func([2]int) bool) [2]int {
	n := len(z)
	wn = min(wn, n)
	type cand struct {
		w  [2]int
		sp float64
	}
	var cs, all []cand
	for lo := 0; lo+wn <= n; lo += wn {
		w := [2]int{lo, lo + wn}
		c := cand{w, boxDiag(z[lo : lo+wn])}
		all = append(all, c)
		if !inZone(w) {
			cs = append(cs, c)
		}
	}
	if len(cs) == 0 {
		cs = all
	}
	sort.Slice(cs, func(i, j int) bool { return cs[i].sp < cs[j].sp || (cs[i].sp == cs[j].sp && cs[i].w[0] < cs[j].w[0]) })
	return cs[len(cs)/2].w
}

func boxDiag(z []complex128) float64 {
	x0, x1, y0, y1 := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	for _, v := range z {
		x0, x1 = math.Min(x0, real(v)), math.Max(x1, real(v))
		y0, y1 = math.Min(y0, imag(v)), math.Max(y1, imag(v))
	}
	return math.Hypot(x1-x0, y1-y0)
}

// classify applies the rules of the package documentation in order and
// sizes flaw-like indications.
func (a *Analyzer) classify(ind *Indication, cc *calibrate.ChannelCal, zoned bool) {
	cr := a.proc.Classification
	isMix := a.cal.Mix(ind.Channel) != nil
	ind.LandmarkRatio = a.depositRatio(ind)
	// Angles of the chord and of the steepest step from the channel's
	// lift-off axis, 0–90°.
	axis := func(ph float64) float64 {
		h := math.Mod(math.Abs(ph-cc.LiftoffDeg), 180)
		return math.Min(h, 180-h)
	}
	h, hr := axis(ind.PhaseDeg), axis(ind.MaxRatePhaseDeg)
	// The steepest step is trusted only well above the noise (S/N at
	// least three times the noise limit); below that it is noise itself.
	if ind.SNR < 3*cr.MinSNR {
		hr = 0
	}
	inBand := ind.PhaseDeg >= cr.FlawPhaseDeg[0] && ind.PhaseDeg <= cr.FlawPhaseDeg[1]
	straight := ind.CrossVpp <= cr.GeometryMaxCross*ind.Vpp
	zoneBand, inZoneBand := false, false
	if lo, hi, ok := zoneFlawBand(cc, cr); ok && zoned && isMix {
		zoneBand = true
		inZoneBand = calibrate.WrapDeg(ind.PhaseDeg-lo) <= hi-lo
	}
	switch {
	case zoned && !isMix:
		ind.Class, ind.Rule = ClassLandmark, RuleLandmarkZone
	case zoned && isMix && ind.Vpp <= cr.ResidueMaxVpp && ((!inBand && straight) || (zoneBand && !inZoneBand)):
		ind.Class, ind.Rule = ClassLandmark, RuleResidue
	case h <= cr.GeometryBandDeg && hr <= cr.GeometryBandDeg && ind.Vpp >= cr.GeometryMinVpp && straight:
		ind.Class, ind.Rule = ClassGeometry, RuleGeometry
	case h <= cr.GeometryBandDeg && ind.Vpp >= cr.GeometryMinVpp:
		ind.Class, ind.Rule = ClassReview, RuleComposite
	case !zoned && ind.LandmarkRatio >= cr.DepositRatio:
		ind.Class, ind.Rule = ClassDeposit, RuleDeposit
	case inZoneBand && cr.ZoneMinSNR > 0 && ind.SNR >= cr.ZoneMinSNR && ind.SNR < cr.MinSNR:
		ind.Class, ind.Rule = ClassReview, RuleZoneWeak
	case ind.SNR < cr.MinSNR:
		ind.Class, ind.Rule = ClassNoise, RuleNoise
	case inBand:
		ind.Class, ind.Rule = ClassFlaw, RuleFlawPhase
	default:
		ind.Class, ind.Rule = ClassReview, RuleUnresolved
	}
	if ind.Class != ClassFlaw || cc.SizingCurve == "" {
		return
	}
	cv := cc.Curve(cc.SizingCurve)
	d, err := cv.Depth(ind.PhaseDeg, ind.Vpp)
	ind.DepthPct = &d
	ind.UncertaintyPct = cv.UncertaintyPct
	ind.Curve = cc.Channel + "/" + cv.Name
	if errors.Is(err, calibrate.ErrOutOfRange) {
		ind.OutOfRange = true
		// Shallower than the shallowest reference: the depth is only
		// known to be below the curve's range, so the indication is
		// reported only if the procedure asks for it.
		if d <= curveMinDepth(cv) && !a.proc.ReportBelowRange {
			ind.Reportable = false
			if inZoneBand {
				// At a landmark the mix's shallow end is a few degrees
				// wide and the residue pulls the phase: "shallower than
				// the shallowest reference" is not established there.
				ind.Class, ind.Rule = ClassReview, RuleZoneShallow
				ind.DepthPct, ind.UncertaintyPct, ind.Curve = nil, 0, ""
				ind.Reportable = true
			}
		}
		return
	}
	if d < a.proc.ReportingPct {
		ind.Reportable = false
	}
}

// zoneFlawBand returns the zone flaw band of a channel: from the lower
// edge of the flaw phase band (ID-origin flaws read between the lift-off
// axis and the through-wall hole, below the OD curve) or the sizing
// curve's deep end XMin less the margin, whichever is lower, to the curve's
// shallow end XMax plus the margin ZonePhaseMarginDeg. ok is false when
// the margin is zero (no zone band) or the channel has no sizing curve on
// phase.
func zoneFlawBand(cc *calibrate.ChannelCal, cr calibrate.ClassRules) (lo, hi float64, ok bool) {
	m := cr.ZonePhaseMarginDeg
	if m <= 0 || cc.SizingCurve == "" {
		return 0, 0, false
	}
	cv := cc.Curve(cc.SizingCurve)
	if cv == nil || cv.Variable == calibrate.VarAmplitude || !(cv.XMax > cv.XMin) {
		return 0, 0, false
	}
	return math.Min(cr.FlawPhaseDeg[0], cv.XMin-m), cv.XMax + m, true
}

// depositRatio returns the landmark channel's calibrated Vpp in the
// indication's window over the indication's Vpp (0 when the landmark
// channel has no set-up).
func (a *Analyzer) depositRatio(ind *Indication) float64 {
	lz := a.bufs[a.proc.Landmarks.Channel]
	if lz == nil || ind.Vpp <= 0 {
		return 0
	}
	return a.pp.Measure(lz[ind.Window[0]:ind.Window[1]]).Vpp / ind.Vpp
}

// curveMinDepth returns the smallest depth among a curve's points.
func curveMinDepth(cv *calibrate.Curve) float64 {
	m := math.Inf(1)
	for _, p := range cv.Points {
		m = math.Min(m, p.DepthPct)
	}
	return m
}

// compensate subtracts from a raw mix output the residue expected at each
// support: the calibration's residue template (what the mix left of the
// support ring on the standard) scaled by the complex factor α that best
// fits the ring's landmark-channel signal to the support's own, by least
// squares, α = Σ conj(T)·L / Σ|T|², at the shift (within a quarter of the
// template length of the landmark's centre) that leaves the least
// landmark-channel residual. The factor comes from the landmark channel
// alone, where a support's signal dwarfs any flaw, so a flaw under the
// support does not change how much is subtracted.
func compensate(mix, lm []complex128, r *residueTemplate, lms []Landmark) {
	m := len(r.landmark)
	var tt float64
	for _, v := range r.landmark {
		tt += real(v)*real(v) + imag(v)*imag(v)
	}
	if tt == 0 {
		return
	}
	n := len(mix)
	h, k := m/2, m/4
	for _, l := range lms {
		if l.Kind != KindSupport {
			continue
		}
		c0 := (l.Window[0] + l.Window[1]) / 2
		best, bestLo := math.Inf(1), -1
		var bestA complex128
		for s := -k; s <= k; s++ {
			lo := c0 + s - h
			if lo < 0 || lo+m > n {
				continue
			}
			seg := lm[lo : lo+m]
			base := (seg[0] + seg[m-1]) / 2
			var num complex128
			for i, v := range seg {
				num += cmplx.Conj(r.landmark[i]) * (v - base)
			}
			alpha := num / complex(tt, 0)
			var res float64
			for i, v := range seg {
				d := v - base - alpha*r.landmark[i]
				res += real(d)*real(d) + imag(d)*imag(d)
			}
			if res < best {
				best, bestLo, bestA = res, lo, alpha
			}
		}
		if bestLo < 0 {
			continue
		}
		for i, v := range r.mix {
			mix[bestLo+i] -= bestA * v
		}
	}
}
