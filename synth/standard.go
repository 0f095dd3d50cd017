package synth

import (
	"fmt"
	"math"
	"math/rand/v2"
	"time"

	"whorl/acquire"
	"whorl/calibrate"
	"whorl/units"
)

// Standard layout (FIELD.md §1.2, the older ASME Section V Article 8
// Appendix I layout that most phase–depth curves were built on, [Sec: S5]):
// one through-wall hole, single OD flat-bottom holes of 80, 60 and 40 %TW,
// four 20 %TW OD flat-bottom holes 90° apart in one plane, a 360° OD
// groove of 20 %TW 1/8 in wide, a 360° ID groove of 10 %TW 1/16 in wide,
// and a ring of support-plate material. Flaws are 75 mm apart from 100 mm
// after the reference end; the ring sits 100 mm after the ID groove.
const (
	stdFirstM   = 0.100
	stdPitchM   = 0.075
	stdLengthM  = 0.800
	stdRingGapM = 0.100
)

// stdLayout is the as-built standard and its flaws as signal features.
type stdLayout struct {
	std   calibrate.Standard
	flaws []feature // index-aligned with std.Flaws
	fbh20 int       // index of the 4×20 %TW set (the normalisation reference)
}

// buildStandard makes the calibration standard for the configured tube:
// flaw sizes from FIELD.md §1.2 (hole diameters by tube OD), as-built
// depths within the Code's machining tolerance of about ±20 % of nominal
// or ±0.08 mm, whichever is smaller (FIELD.md §1.2, from memory).
func (g *Generator) buildStandard() stdLayout {
	c := g.cfg
	r := rand.New(rand.NewPCG(c.Seed^saltStandard, 0))
	in := units.MetresPerInch
	od, t := c.Tube.OuterDiameterM, c.Tube.WallM
	twh := 0.052 * in
	if od > 0.75*in+1e-9 {
		twh = 0.067 * in
	}
	type spec struct {
		id     string
		typ    calibrate.FlawType
		origin calibrate.Origin
		depth  float64
		diaM   float64
		widthM float64
		angles []float64
		count  int
	}
	specs := []spec{
		{"TWH", calibrate.ThroughHole, "", 100, twh, 0, []float64{0}, 1},
		{"FBH-80", calibrate.FlatBottomHole, calibrate.OD, 80, 5.0 / 64 * in, 0, []float64{90}, 1},
		{"FBH-60", calibrate.FlatBottomHole, calibrate.OD, 60, 7.0 / 64 * in, 0, []float64{180}, 1},
		{"FBH-40", calibrate.FlatBottomHole, calibrate.OD, 40, 3.0 / 16 * in, 0, []float64{270}, 1},
		{"FBH-20x4", calibrate.FlatBottomHole, calibrate.OD, 20, 3.0 / 16 * in, 0, []float64{0, 90, 180, 270}, 4},
		{"GROOVE-OD-20", calibrate.Groove, calibrate.OD, 20, 0, 1.0 / 8 * in, nil, 0},
		{"GROOVE-ID-10", calibrate.Groove, calibrate.ID, 10, 0, 1.0 / 16 * in, nil, 0},
	}
	l := stdLayout{std: calibrate.Standard{
		Serial:          fmt.Sprintf("TBS-%04.0f-%04d", od*1e5, 1000+r.IntN(9000)),
		Material:        c.Tube.Alloy,
		Heat:            fmt.Sprintf("H%06d", r.IntN(1000000)),
		OuterDiameterM:  od,
		WallM:           t,
		LengthM:         stdLengthM,
		CertificateID:   fmt.Sprintf("TBC-2026-%04d", r.IntN(10000)),
		CertificateDate: "2026-03-18",
		CodeEdition:     "ASME BPVC Section V, Article 8 (reference-standard layout of the pre-2007 Appendix I with 80/60/40 % FBHs)",
	}}
	for i, s := range specs {
		z0 := stdFirstM + float64(i)*stdPitchM
		asBuilt := s.depth
		if s.depth < 100 {
			tolPct := math.Min(0.2*s.depth, 0.08e-3/t*100)
			asBuilt = math.Round((s.depth+tolPct*(r.Float64()-0.5))*10) / 10
		}
		fl := calibrate.Flaw{ID: s.id, Type: s.typ, Origin: s.origin, NominalDepthPct: s.depth,
			AsBuiltDepthPct: asBuilt, DiameterM: s.diaM, WidthM: s.widthM, AxialPositionM: z0, AnglesDeg: s.angles}
		d := asBuilt / 100 * t
		f := feature{kind: wallLoss}
		switch {
		case s.typ == calibrate.Groove:
			f.z1, f.z2 = z0-s.widthM/2, z0+s.widthM/2
			if s.origin == calibrate.ID {
				f.x1, f.x2 = 0, d
				f.widthM = math.Pi * (od - 2*t + d) // circumference at mid-depth
			} else {
				f.x1, f.x2 = t-d, t
				f.widthM = math.Pi * (od - d)
			}
		default: // holes: width is the summed diameters, length one diameter
			f.z1, f.z2 = z0-s.diaM/2, z0+s.diaM/2
			f.x1, f.x2 = t-d, t
			f.widthM = float64(s.count) * s.diaM
		}
		if s.id == "FBH-20x4" {
			l.fbh20 = i
		}
		l.std.Flaws = append(l.std.Flaws, fl)
		l.flaws = append(l.flaws, f)
	}
	ring := stdFirstM + float64(len(specs)-1)*stdPitchM + stdRingGapM
	l.std.Flaws = append(l.std.Flaws, calibrate.Flaw{ID: "SUPPORT-RING", Type: calibrate.SupportRing,
		AxialPositionM: ring, ThicknessM: c.SupportThicknessM})
	l.flaws = append(l.flaws, feature{kind: external, z1: ring - c.SupportThicknessM/2, z2: ring + c.SupportThicknessM/2, ampV: supportV})
	return l
}

// Typical amplitudes at the prime frequency in normalised volts (4 V for
// the 4×20 %TW holes on the differential channel). Demo choices.
const (
	supportV   = 6.0  // support plate, middle of the plate, absolute channel
	tubesheetV = 14.0 // tubesheet
	tubeEndV   = 25.0 // the open end of the tube
	expansionV = 2.5  // expansion (roll) transition, lift-off-like step
)

// Standard returns the calibration standard: its identity (invented
// serial and certificate), the tube it is cut from, and each flaw as built,
// with axial positions from the standard's reference end (where its pull
// starts). The support ring's axial position is its centre.
func (g *Generator) Standard() calibrate.Standard {
	s := g.std.std
	s.Flaws = make([]calibrate.Flaw, len(g.std.std.Flaws))
	for i, f := range g.std.std.Flaws {
		f.AnglesDeg = append([]float64(nil), f.AnglesDeg...)
		s.Flaws[i] = f
	}
	return s
}

// CalibrationScan returns the standard scanned at the opening (closing
// false) or closing of calibration group gi. The recorded positions carry
// an encoder scale error of up to ±2 % and the speed varies along the
// pull, so flaw positions in the scan differ from the nominal layout. The
// closing scan of Config.DriftedGroup carries the configured phase and gain
// drift.
func (g *Generator) CalibrationScan(gi int, closing bool) (*acquire.Scan, error) {
	if gi < 0 || gi >= g.cfg.Groups {
		return nil, fmt.Errorf("calibration group %d: expected 0 to %d", gi, g.cfg.Groups-1)
	}
	idx := uint64(2 * gi)
	if closing {
		idx++
	}
	r := rand.New(rand.NewPCG(g.cfg.Seed^saltCalScan, idx))
	p := g.newPull(r, stdLengthM, 0.02, 0.001)
	feats := append([]feature(nil), g.std.flaws...)
	feats = append(feats,
		feature{kind: liftoff, z1: -1, z2: 0, ampV: tubeEndV},
		feature{kind: liftoff, z1: stdLengthM, z2: stdLengthM + 1, ampV: tubeEndV})
	set := g.open[gi]
	if closing {
		set = g.close[gi]
	}
	lv := noiseLevels{whiteV: g.cfg.NoiseV, pinkV: g.cfg.NoiseV / 2, driftV: 0.1, wobbleV: 0.05}
	chans := g.render(p, feats, r, lv, set)
	which := "open"
	if closing {
		which = "close"
	}
	meta := g.meta(g.std.std.Serial, g.calStart(gi, closing), gi)
	meta.Extra = map[string]string{"scan-kind": "calibration", "calibration": which, "standard": g.std.std.Serial}
	return g.scan(meta, p, chans), nil
}

// meta fills the metadata common to every scan.
func (g *Generator) meta(component string, start time.Time, gi int) acquire.Meta {
	return acquire.Meta{
		Component:     component,
		ProbeID:       g.cfg.ProbeID,
		ProbeType:     "bobbin",
		ProbeSpeedMPS: g.cfg.ProbeSpeedMPS,
		Direction:     "pull",
		Start:         start,
		CalGroup:      GroupName(gi),
		Procedure:     g.cfg.Procedure,
	}
}

// scan assembles a scan from a pull and its channels.
func (g *Generator) scan(meta acquire.Meta, p *pull, chans []acquire.Channel) *acquire.Scan {
	return &acquire.Scan{
		Meta:         meta,
		SampleRateHz: g.cfg.SamplesPerM * g.cfg.ProbeSpeedMPS,
		AxialStepM:   p.stepM,
		TimeS:        p.timeS,
		PositionM:    p.zRec,
		Channels:     chans,
	}
}
