package calibrate

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"
	"strings"
	"time"

	"whorl/acquire"
	"whorl/analysis/measure"
)

// BuildOptions identify who builds a calibration and when.
type BuildOptions struct {
	// ID is the calibration's identifier; empty derives one from the
	// standard serial, the scan's calibration group and the build time.
	ID string
	// Builder is the person building the calibration.
	Builder string
	// At is the build time.
	At time.Time
	// Opening, when set, is the opening calibration of the group this
	// (closing) calibration checks: its trained mixes are applied as they
	// are instead of being trained again, so that the closing check
	// compares like with like.
	Opening *Calibration
}

// ScanPositions returns the axial position of every sample of s in
// metres: PositionM, or TimeS × the nominal probe speed. It is an error when
// neither is available or the positions are not finite.
func ScanPositions(s *acquire.Scan) ([]float64, error) {
	if s.PositionM != nil {
		for i, p := range s.PositionM {
			if !finite(p) {
				return nil, fmt.Errorf("scan %q: position of sample %d is %v", s.Meta.Component, i, p)
			}
		}
		return s.PositionM, nil
	}
	if s.TimeS != nil && s.Meta.ProbeSpeedMPS > 0 {
		p := make([]float64, len(s.TimeS))
		for i, t := range s.TimeS {
			p[i] = t * s.Meta.ProbeSpeedMPS
			if !finite(p[i]) {
				return nil, fmt.Errorf("scan %q: time of sample %d is %v", s.Meta.Component, i, t)
			}
		}
		return p, nil
	}
	return nil, fmt.Errorf("scan %q: no position axis and no probe speed to derive one", s.Meta.Component)
}

// StepM returns the median absolute spacing of positions (metres per sample).
func StepM(posM []float64) float64 {
	if len(posM) < 2 {
		return 0
	}
	d := make([]float64, len(posM)-1)
	for i := range d {
		d[i] = math.Abs(posM[i+1] - posM[i])
	}
	slices.Sort(d)
	return d[len(d)/2]
}

// WindowSamples converts a window length in metres to a sample count
// (at least 3) for a sample spacing of stepM.
func WindowSamples(windowM, stepM float64) int {
	if !(stepM > 0) {
		return 3
	}
	return max(3, int(math.Round(windowM/stepM)))
}

// WrapDeg reduces an angle in degrees to [0, 360).
func WrapDeg(a float64) float64 { return measure.WrapRad(a*math.Pi/180) * 180 / math.Pi }

// wrapSigned reduces an angle in degrees to (−180, 180].
func wrapSigned(a float64) float64 {
	a = math.Remainder(a, 360)
	if a == -180 {
		a = 180
	}
	return a
}

// MeasureWindow measures the window z: the peak-to-peak chord (oriented by
// the lobe convention; for an absolute coil from the endpoint nearer the
// window's baseline, the mean of its first and last samples, to the
// farther one) and the maximum-rate phase, both in degrees in [0, 360).
func MeasureWindow(p *measure.PeakToPeak, z []complex128, absolute bool, lobeRad float64) (vpp, phaseDeg, maxRateDeg float64, chord measure.Chord) {
	chord = p.Measure(z)
	ph := chord.PhaseRad
	if absolute {
		base := (z[0] + z[len(z)-1]) / 2
		if sqAbs(z[chord.I]-base) > sqAbs(z[chord.J]-base) {
			ph += math.Pi
		}
	} else {
		ph += lobeRad
	}
	mr := 0.0
	if len(z) >= 2 {
		r := measure.MaxRate(z)
		mr = r.PhaseRad
		if !absolute {
			mr += lobeRad
		}
	}
	return chord.Vpp, measure.WrapRad(ph) * 180 / math.Pi, measure.WrapRad(mr) * 180 / math.Pi, chord
}

func sqAbs(z complex128) float64 { return real(z)*real(z) + imag(z)*imag(z) }

// Build calibrates on scan, a scan of the reference standard std, under
// proc: it locates every standard flaw, trains the procedure's mixes,
// sets the rotation and gain of every set-up channel, measures the flaws
// and fits the curves. Problems that leave a usable calibration (a flaw
// not found that no set-up or curve needs, a curve that is not monotone)
// are listed in Warnings; problems that do not (a reference flaw or a
// channel missing) are errors.
func Build(std *Standard, proc *Procedure, scan *acquire.Scan, opt BuildOptions) (*Calibration, error) {
	if err := std.Validate(); err != nil {
		return nil, err
	}
	if err := proc.Validate(); err != nil {
		return nil, err
	}
	if err := proc.CheckStandard(std); err != nil {
		return nil, err
	}
	if err := scan.Validate(); err != nil {
		return nil, err
	}
	if err := CheckScanChannels(proc, scan); err != nil {
		return nil, err
	}
	posM, err := ScanPositions(scan)
	if err != nil {
		return nil, err
	}
	at := opt.At
	if at.IsZero() {
		at = time.Now()
	}
	cal := &Calibration{
		ID:                opt.ID,
		Version:           1,
		Status:            StatusDraft,
		Builder:           opt.Builder,
		BuiltAt:           at.UTC().Format(time.RFC3339),
		StandardSerial:    std.Serial,
		ProcedureID:       proc.ID,
		ProcedureRevision: proc.Revision,
		CodeEdition:       proc.CodeEdition,
		ScanComponent:     scan.Meta.Component,
		ProbeID:           scan.Meta.ProbeID,
		Group:             scan.Meta.CalGroup,
		Lobe:              proc.Lobe,
	}
	if cal.Lobe == "" {
		cal.Lobe = LobeLater
	}
	if cal.ID == "" {
		grp := ""
		if scan.Meta.CalGroup != "" {
			grp = scan.Meta.CalGroup + "-"
		}
		cal.ID = fmt.Sprintf("CAL-%s-%s%s", std.Serial, grp, at.UTC().Format("20060102T150405Z"))
	}
	if !scan.Meta.Start.IsZero() {
		cal.ScanStart = scan.Meta.Start.UTC().Format(time.RFC3339Nano)
	}
	for _, f := range std.Flaws {
		cal.AsBuilt = append(cal.AsBuilt, AsBuiltDepth{FlawID: f.ID, DepthPct: f.AsBuiltDepthPct})
	}

	// 1. Locate the flaws on the locate channel.
	stepM := StepM(posM)
	w := WindowSamples(proc.Locate.WindowM, stepM)
	loc := scan.Channel(proc.Locate.Channel)
	cal.Located, cal.Extra, cal.Warnings = locateFlaws(std, proc.Locate, loc.Samples, posM, w)
	found := map[string]*LocatedFlaw{}
	for i := range cal.Located {
		if cal.Located[i].Found {
			found[cal.Located[i].FlawID] = &cal.Located[i]
		}
	}

	// 2. Train the mixes.
	samples := map[string][]complex128{}
	modes := map[string]bool{} // true: absolute
	for _, c := range scan.Channels {
		samples[c.Name] = c.Samples
		modes[c.Name] = c.Mode == acquire.Absolute
	}
	if opt.Opening != nil {
		cal.OpeningID = opt.Opening.ID
	}
	for _, m := range proc.Mixes {
		var rec *MixRecord
		var out []complex128
		var err error
		if opt.Opening != nil {
			if rec = opt.Opening.Mix(m.Name); rec == nil {
				return nil, fmt.Errorf("opening calibration %s has no mix %s", opt.Opening.ID, m.Name)
			}
			out, err = rec.Apply(nil, samples)
		} else {
			rec, out, err = trainMix(m, samples, found, len(posM), stepM)
		}
		if err != nil {
			return nil, err
		}
		if m.ResidueWindowM > 0 && opt.Opening == nil {
			lz := samples[proc.Landmarks.Channel]
			res, err := residueTemplate(m, found[m.TrainingFlaws[0]], out, lz, stepM)
			if err != nil {
				return nil, err
			}
			rec.Residue = res
		}
		cal.Mixes = append(cal.Mixes, *rec)
		samples[m.Name] = out
		modes[m.Name] = modes[m.Primary]
	}

	// 3. Set up each channel and mix; measure; fit curves.
	var pp measure.PeakToPeak
	lobe := proc.lobeOffsetRad()
	for _, su := range proc.Setups {
		z := samples[su.Channel]
		abs := modes[su.Channel]
		cc := ChannelCal{Channel: su.Channel, Mode: "differential", RotationRef: su.Rotation, NormRef: su.Normalisation, SizingCurve: su.SizingCurve}
		if abs {
			cc.Mode = "absolute"
		}
		need := []string{su.Rotation.Reference, su.Normalisation.Reference}
		for _, c := range su.Curves {
			need = append(need, c.Flaws...)
		}
		for _, id := range dedupe(need) {
			lf := found[id]
			if lf == nil {
				continue
			}
			win := z[lf.Window[0]:lf.Window[1]]
			vpp, ph, mr, _ := MeasureWindow(&pp, win, abs, lobe)
			cc.Measurements = append(cc.Measurements, FlawMeasurement{FlawID: id, RawVpp: vpp, RawPhaseDeg: ph, MaxRatePhaseDeg: mr, Window: lf.Window})
		}
		rot := cc.Measurement(su.Rotation.Reference)
		if rot == nil {
			return nil, fmt.Errorf("channel %s: rotation reference %s was not found on the standard scan", su.Channel, su.Rotation.Reference)
		}
		nrm := cc.Measurement(su.Normalisation.Reference)
		if nrm == nil {
			return nil, fmt.Errorf("channel %s: normalisation reference %s was not found on the standard scan", su.Channel, su.Normalisation.Reference)
		}
		if !(nrm.RawVpp > 0) {
			return nil, fmt.Errorf("channel %s: normalisation reference %s has no signal (Vpp 0)", su.Channel, su.Normalisation.Reference)
		}
		cc.RotationDeg = wrapSigned(su.Rotation.AngleDeg - rot.RawPhaseDeg)
		cc.Gain = su.Normalisation.Vpp / nrm.RawVpp
		for i := range cc.Measurements {
			m := &cc.Measurements[i]
			m.Vpp = m.RawVpp * cc.Gain
			m.PhaseDeg = WrapDeg(m.RawPhaseDeg + cc.RotationDeg)
			m.MaxRatePhaseDeg = WrapDeg(m.MaxRatePhaseDeg + cc.RotationDeg)
		}
		// Set-up check: re-measure the references on calibrated samples.
		f := cc.Factor()
		buf := make([]complex128, 0, w)
		for _, r := range []struct {
			m   *FlawMeasurement
			ph  bool
			vpp bool
		}{{rot, true, false}, {nrm, false, true}} {
			buf = buf[:0]
			for _, v := range z[r.m.Window[0]:r.m.Window[1]] {
				buf = append(buf, f*v)
			}
			vpp, ph, _, _ := MeasureWindow(&pp, buf, abs, lobe)
			if r.ph {
				cc.RefPhaseDeg = ph
			}
			if r.vpp {
				cc.RefVpp = vpp
			}
		}
		if lo := su.Liftoff; lo != nil {
			var win [2]int
			switch lo.Reference {
			case LiftoffScanStart:
				win = [2]int{0, min(len(z), WindowSamples(lo.WindowM, stepM))}
			case LiftoffScanEnd:
				win = [2]int{max(0, len(z)-WindowSamples(lo.WindowM, stepM)), len(z)}
			default:
				lf := found[lo.Reference]
				if lf == nil {
					return nil, fmt.Errorf("channel %s: lift-off reference %s was not found on the standard scan", su.Channel, lo.Reference)
				}
				h := WindowSamples(lo.WindowM, stepM) / 2
				win = [2]int{max(0, lf.Sample-h), min(len(z), lf.Sample+h)}
			}
			buf = buf[:0]
			for _, v := range z[win[0]:win[1]] {
				buf = append(buf, f*v)
			}
			ch := pp.Measure(buf)
			if !(ch.Vpp > 0) {
				return nil, fmt.Errorf("channel %s: no lift-off signal at %s", su.Channel, lo.Reference)
			}
			cc.LiftoffDeg = math.Mod(ch.PhaseRad*180/math.Pi, 180)
			cc.LiftoffWindow = win
		}
		for _, spec := range su.Curves {
			cv, warn, err := fitFromMeasurements(spec, &cc, std)
			if err != nil {
				return nil, fmt.Errorf("channel %s: %w", su.Channel, err)
			}
			cal.Warnings = append(cal.Warnings, warn...)
			if cv != nil {
				for _, wn := range cv.Warnings {
					cal.Warnings = append(cal.Warnings, fmt.Sprintf("channel %s: %s", su.Channel, wn))
				}
				cc.Curves = append(cc.Curves, cv)
			}
		}
		if su.SizingCurve != "" && cc.Curve(su.SizingCurve) == nil {
			return nil, fmt.Errorf("channel %s: sizing curve %s could not be fitted", su.Channel, su.SizingCurve)
		}
		cal.Channels = append(cal.Channels, cc)
	}

	// 4. Landmark scale from the reference on the landmark channel.
	lm := proc.Landmarks
	cal.LandmarkChannel = lm.Channel
	ref := found[lm.Reference]
	if ref == nil {
		return nil, fmt.Errorf("landmark reference %s was not found on the standard scan", lm.Reference)
	}
	lz := samples[lm.Channel]
	lw := WindowSamples(lm.WindowM, stepM)
	c := (ref.Window[0] + ref.Window[1]) / 2
	a, b := max(0, c-lw/2), min(len(lz), c-lw/2+lw)
	cal.LandmarkThresholdV = lm.Fraction * pp.Measure(lz[a:b]).Vpp
	if !(cal.LandmarkThresholdV > 0) {
		return nil, fmt.Errorf("landmark reference %s has no signal on channel %s", lm.Reference, lm.Channel)
	}
	if err := cal.Seal(); err != nil {
		return nil, err
	}
	return cal, nil
}

func dedupe(s []string) []string {
	seen := map[string]bool{}
	var out []string
	for _, v := range s {
		if !seen[v] {
			seen[v] = true
			out = append(out, v)
		}
	}
	return out
}

// CheckScanChannels reports a procedure channel missing from the scan or
// recorded with another frequency or mode.
func CheckScanChannels(proc *Procedure, scan *acquire.Scan) error {
	for _, c := range proc.Channels {
		sc := scan.Channel(c.Name)
		if sc == nil {
			var have []string
			for _, x := range scan.Channels {
				have = append(have, x.Name)
			}
			return fmt.Errorf("scan %q has no channel %q required by procedure %s (channels: %s)", scan.Meta.Component, c.Name, proc.ID, strings.Join(have, ", "))
		}
		if math.Abs(sc.FreqHz-c.FreqHz) > 1e-6*c.FreqHz {
			return fmt.Errorf("scan %q channel %q is at %g Hz, procedure %s expects %g Hz", scan.Meta.Component, c.Name, sc.FreqHz, proc.ID, c.FreqHz)
		}
		if !strings.EqualFold(sc.Mode.String(), c.Mode) {
			return fmt.Errorf("scan %q channel %q is %s, procedure %s expects %s", scan.Meta.Component, c.Name, sc.Mode, proc.ID, c.Mode)
		}
	}
	return nil
}

// fitFromMeasurements fits one curve from the calibrated measurements of
// cc. A flaw that was not located is left out with a warning; the fit
// fails when too few remain.
func fitFromMeasurements(spec CurveSpec, cc *ChannelCal, std *Standard) (*Curve, []string, error) {
	var pts []CurvePoint
	var warn, missing []string
	for _, id := range spec.Flaws {
		m := cc.Measurement(id)
		if m == nil {
			missing = append(missing, id)
			continue
		}
		pts = append(pts, CurvePoint{FlawID: id, PhaseDeg: m.PhaseDeg, Vpp: m.Vpp, DepthPct: std.Flaw(id).AsBuiltDepthPct})
	}
	sub := spec
	if len(missing) > 0 {
		warn = append(warn, fmt.Sprintf("channel %s: curve %s fitted without %s (not found on the standard scan)", cc.Channel, spec.Name, strings.Join(missing, ", ")))
		sub.Flaws = nil
		for _, p := range pts {
			sub.Flaws = append(sub.Flaws, p.FlawID)
		}
		if err := sub.check(); err != nil {
			return nil, warn, fmt.Errorf("curve %s: %v after leaving out the flaws not found (%s)", spec.Name, err, strings.Join(missing, ", "))
		}
	}
	cv, err := FitCurve(sub, pts)
	if err != nil {
		return nil, warn, err
	}
	return cv, warn, nil
}

// candidate is a signal found on the locate channel.
type candidate struct {
	sample int
	posM   float64
	spread float64
}

// locateFlaws finds the signal of every standard flaw on z. Signals are
// the local maxima of the sliding-window spread (measure.Spread) above
// rule.MinFraction of its maximum, at least one window apart. They are
// matched to the flaws' expected positions by the affine map
// position = offset + scale·expected (|scale| from 0.5 to 2 allows for
// speed variation and either direction of travel) that explains the most
// flaws within rule.ToleranceM (ties: least squared error), found by trying
// every pairing of two signals with two flaws (exhaustive RANSAC-style
// consensus; M. A. Fischler & R. C. Bolles, Commun. ACM 24(6), 1981,
// 381–395), refined by least squares on its inliers.
func locateFlaws(std *Standard, rule LocateRule, z []complex128, posM []float64, w int) ([]LocatedFlaw, []ExtraSignal, []string) {
	n := len(z)
	sp := measure.Spread(nil, z, w)
	peak := 0.0
	for _, v := range sp {
		peak = math.Max(peak, v)
	}
	thr := rule.MinFraction * peak
	var cands []candidate
	if peak > 0 {
		for _, c := range measure.Peaks(nil, sp, thr, w) {
			cands = append(cands, candidate{sample: c, posM: posM[c], spread: sp[c]})
		}
	}
	flaws := std.Flaws
	exp := make([]float64, len(flaws))
	for j, f := range flaws {
		exp[j] = f.AxialPositionM
	}
	tol := rule.ToleranceM
	assign := func(off, s float64) ([]int, int, float64) {
		match := make([]int, len(flaws))
		used := make([]bool, len(cands))
		type pair struct {
			j, i int
			d    float64
		}
		var pairs []pair
		for j := range flaws {
			want := off + s*exp[j]
			for i, c := range cands {
				if d := math.Abs(c.posM - want); d <= tol {
					pairs = append(pairs, pair{j, i, d})
				}
			}
		}
		sort.Slice(pairs, func(a, b int) bool { return pairs[a].d < pairs[b].d })
		for j := range match {
			match[j] = -1
		}
		count, sse := 0, 0.0
		for _, p := range pairs {
			if match[p.j] >= 0 || used[p.i] {
				continue
			}
			match[p.j], used[p.i] = p.i, true
			count++
			sse += p.d * p.d
		}
		return match, count, sse
	}
	bestCount, bestSSE := -1, math.Inf(1)
	var bestOff, bestS float64 = 0, 1
	try := func(off, s float64) {
		if !finite(off) || !finite(s) {
			return
		}
		_, c, e := assign(off, s)
		if c > bestCount || (c == bestCount && e < bestSSE) {
			bestCount, bestSSE, bestOff, bestS = c, e, off, s
		}
	}
	for i1 := range cands {
		for j1 := range flaws {
			try(cands[i1].posM-exp[j1], 1)
			try(cands[i1].posM+exp[j1], -1)
			for i2 := i1 + 1; i2 < len(cands); i2++ {
				for j2 := range flaws {
					if j2 == j1 || exp[j2] == exp[j1] {
						continue
					}
					s := (cands[i2].posM - cands[i1].posM) / (exp[j2] - exp[j1])
					if a := math.Abs(s); a < 0.5 || a > 2 {
						continue
					}
					try(cands[i1].posM-s*exp[j1], s)
				}
			}
		}
	}
	match, _, _ := assign(bestOff, bestS)
	// Refine by least squares on the inliers, keep it if no worse.
	var sx, sy, sxx, sxy, m float64
	for j, i := range match {
		if i >= 0 {
			x, y := exp[j], cands[i].posM
			sx, sy, sxx, sxy, m = sx+x, sy+y, sxx+x*x, sxy+x*y, m+1
		}
	}
	if den := m*sxx - sx*sx; m >= 2 && den > 0 {
		s := (m*sxy - sx*sy) / den
		off := (sy - s*sx) / m
		if m2, c2, _ := assign(off, s); c2 >= int(m) {
			match, bestOff, bestS = m2, off, s
		}
	}
	var out []LocatedFlaw
	var warn []string
	used := make([]bool, len(cands))
	for j, f := range flaws {
		lf := LocatedFlaw{FlawID: f.ID, ExpectedM: f.AxialPositionM}
		if i := match[j]; i >= 0 {
			used[i] = true
			c := cands[i]
			lf.Found, lf.PositionM, lf.Sample = true, c.posM, c.sample
			a := max(0, c.sample-w/2)
			b := min(n, a+w)
			lf.Window = [2]int{a, b}
		} else {
			lf.Note = fmt.Sprintf("no signal above %.3g of the largest within ±%g m of %.4f m on the scan (expected %.4f m on the standard; fitted offset %.4f m, scale %.4f)",
				rule.MinFraction, tol, bestOff+bestS*f.AxialPositionM, f.AxialPositionM, bestOff, bestS)
			warn = append(warn, fmt.Sprintf("flaw %s not found: %s", f.ID, lf.Note))
		}
		out = append(out, lf)
	}
	var extra []ExtraSignal
	for i, c := range cands {
		if !used[i] {
			a := max(0, c.sample-w/2)
			b := min(n, a+w)
			extra = append(extra, ExtraSignal{PositionM: c.posM, Sample: c.sample, Vpp: measure.Vpp(z[a:b]).Vpp})
		}
	}
	if len(extra) > 0 {
		warn = append(warn, fmt.Sprintf("%d signal(s) on the standard scan match no flaw", len(extra)))
	}
	return out, extra, warn
}

// errNoMix is returned for a mix whose inputs are missing.
var errNoMix = errors.New("mix input missing")
