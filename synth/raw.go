package synth

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"

	"whorl/acquire"
)

// Raw recordings: short sections pulled at a constant speed and sampled by
// a 16-bit-class ADC, quantised to 10 µV. The coil voltage of tone f is
// Re{P_f(t)·e^{j(ω(t−t0)+φ_f)}} with P_f = rawGainV·(the tube channel's
// signal in normalised volts, conjugated as in a scan) + a bridge
// imbalance, and φ_f the phase of the excitation reference; when the
// reference is recorded it is cos(ω(t−t0)+φ_f) summed over the tones (or
// the active tone, multiplexed). Demodulated against the reference (the
// dsp package's convention) the record gives P_f.
const (
	rawGainV     = 0.02 // coil volts per normalised volt
	rawQuantumV  = 1e-5 // ADC resolution
	rawNoiseV    = 2e-4 // rms ADC and preamplifier noise
	rawSectionM  = 0.06 // length of a simultaneous-tone section
	rawSpeedMPS  = 1.0  // pull speed of a simultaneous-tone section
	rawMuxSpeed  = 0.5  // pull speed of a multiplexed section
	rawMuxCycles = 5    // excitation cycles of the lowest tone per slot
	rawMinSlotS  = 250e-6
)

// RawCount returns the number of raw recordings, Config.Raw.
func (g *Generator) RawCount() int { return g.cfg.Raw }

// rawPlan says what raw recording i shows.
type rawPlan struct {
	tube      int // −1 for the calibration standard
	centreM   float64
	coil      string
	mode      acquire.CoilMode
	reference bool
	mux       bool
}

// rawPlans lays out the raw recordings, cycling through: (0) the
// differential coil over the first OD pit or wear scar of the bundle,
// simultaneous tones, reference recorded; (1) the absolute coil over the
// same section, no reference; (2) the differential coil over the
// standard's through-wall hole, time-multiplexed, reference recorded; (3)
// the differential coil over the first support of tube 0, no reference.
func (g *Generator) rawPlans() []rawPlan {
	g.rawOnce.Do(func() { g.rawPlan = g.layoutRaw() })
	return g.rawPlan
}

func (g *Generator) layoutRaw() []rawPlan {
	ft, fz := 0, g.cfg.SupportsM[0]
	found := false
	for i := 0; i < g.cfg.Tubes && !found; i++ {
		for _, t := range g.plan(i).truth {
			if t.Kind == KindODPit || t.Kind == KindSupportWear {
				ft, fz, found = i, t.AxialPositionM, true
				break
			}
		}
	}
	base := []rawPlan{
		{tube: ft, centreM: fz, coil: "diff", mode: acquire.Differential, reference: true},
		{tube: ft, centreM: fz, coil: "abs", mode: acquire.Absolute},
		{tube: -1, centreM: g.std.std.Flaws[0].AxialPositionM, coil: "diff", mode: acquire.Differential, reference: true, mux: true},
		{tube: 0, centreM: g.cfg.SupportsM[0], coil: "diff", mode: acquire.Differential},
	}
	out := make([]rawPlan, g.cfg.Raw)
	for i := range out {
		out[i] = base[i%len(base)]
	}
	return out
}

// RawName returns the file stem of raw recording i, for example
// "03-TBS-1905-2422-diff-mux". It panics if i is out of range.
func (g *Generator) RawName(i int) string {
	if i < 0 || i >= g.cfg.Raw {
		panic("synth: raw recording index out of range")
	}
	p := g.rawPlans()[i]
	name := g.std.std.Serial
	if p.tube >= 0 {
		name = g.tubeName[p.tube]
	}
	kind := "tones"
	if p.mux {
		kind = "mux"
	}
	return fmt.Sprintf("%02d-%s-%s-%s", i+1, name, p.coil, kind)
}

// Raw returns raw coil-voltage recording i (0 ≤ i < RawCount) and the
// conditions of the tube inside its section. The recordings cover a few
// centimetres each (a few MB as CSV).
func (g *Generator) Raw(i int) (*acquire.RawRecord, []Truth, error) {
	if i < 0 || i >= g.cfg.Raw {
		return nil, nil, fmt.Errorf("raw recording %d: expected 0 to %d", i, g.cfg.Raw-1)
	}
	rec, truth, _ := g.raw(i)
	return rec, truth, nil
}

// rawPhasors is the coil signal behind a raw recording: the phasor of
// each tone on a fine axial grid, which is what demodulation of the
// recording against its reference should give.
type rawPhasors struct {
	fine  *pull
	ch    []acquire.Channel // the recorded coil's channels, one per frequency, imbalance included
	z0    float64
	speed float64
}

func (g *Generator) raw(i int) (*acquire.RawRecord, []Truth, *rawPhasors) {
	p := g.rawPlans()[i]
	r := rand.New(rand.NewPCG(g.cfg.Seed^saltRaw, uint64(i)))
	fs := g.cfg.RawSampleRateHz
	freqs := g.cfg.FreqsHz
	nf := len(freqs)
	speed, length := rawSpeedMPS, rawSectionM
	slot := 0.0
	if p.mux {
		slot = math.Max(rawMinSlotS, rawMuxCycles/freqs[nf-1])
		slot = math.Round(slot*fs) / fs // a whole number of samples
		// At most 0.5 mm of travel per cycle of all tones, and at most
		// 100,000 samples.
		speed = math.Min(rawMuxSpeed, 0.5e-3/(float64(nf)*slot))
		length = math.Min(0.05, 1e5/fs*speed)
	}
	z0 := p.centreM - length/2
	// Render the section on a fine axial grid with the scan model, then
	// follow it in time.
	var feats []feature
	var truth []Truth
	gi := 0
	var meta acquire.Meta
	if p.tube >= 0 {
		pl := g.plan(p.tube)
		feats = pl.feats
		for _, t := range pl.truth {
			if math.Abs(t.AxialPositionM-p.centreM) < length/2+t.LengthM/2 {
				truth = append(truth, t)
			}
		}
		gi = g.Group(p.tube)
		meta = g.meta(g.tubeName[p.tube], g.tubeStart(p.tube), gi)
	} else {
		feats = g.std.flaws
		meta = g.meta(g.std.std.Serial, g.calStart(0, false), 0)
	}
	step := 5e-5
	n := int(length/step) + 2
	fine := &pull{n: n, stepM: step, zRec: make([]float64, n), zTrue: make([]float64, n), timeS: make([]float64, n)}
	for k := range n {
		fine.zRec[k] = z0 + float64(k)*step
		fine.zTrue[k] = fine.zRec[k]
	}
	set := make([]setting, 2*nf)
	for c := range set {
		set[c] = setting{gain: rawGainV, rotRad: 0}
	}
	lv := noiseLevels{whiteV: 0, pinkV: g.cfg.NoiseV / 4, driftV: 0, wobbleV: 0.05}
	chans := g.render(fine, feats, r, lv, set)
	ch := 0
	if p.mode == acquire.Absolute {
		ch = 1
	}
	imb := make([]complex128, nf)
	refPh := make([]float64, nf)
	for fi := range nf {
		imb[fi] = cmplx.Rect(0.01+0.04*r.Float64(), 2*math.Pi*r.Float64())
		if p.reference {
			refPh[fi] = 2 * math.Pi * r.Float64()
		}
	}
	ns := int(math.Floor(length / speed * fs))
	rec := &acquire.RawRecord{Meta: meta, Coil: p.coil, Mode: p.mode, SampleRateHz: fs,
		ExcitationHz: append([]float64(nil), freqs...), SlotS: slot, VoltageV: make([]float64, ns)}
	rec.Meta.ProbeSpeedMPS = speed
	rec.Meta.Extra = map[string]string{"scan-kind": "raw", "section-start-m": fmt.Sprint(z0)}
	if p.reference {
		rec.ReferenceV = make([]float64, ns)
	}
	if p.reference || p.mux {
		rec.PositionM = make([]float64, ns)
	}
	q := func(v float64) float64 { return math.Round(v/rawQuantumV) * rawQuantumV }
	for k := range ns {
		t := float64(k) / fs
		x := speed * t / step // fine-grid index
		j := min(int(x), n-2)
		fr := x - float64(j)
		var v, ref float64
		for fi, f := range freqs {
			if p.mux && int(t/slot)%nf != fi {
				continue
			}
			c := chans[2*fi+ch].Samples
			ph := c[j]*complex(1-fr, 0) + c[j+1]*complex(fr, 0) + imb[fi]
			arg := 2*math.Pi*f*t + refPh[fi]
			v += real(ph)*math.Cos(arg) - imag(ph)*math.Sin(arg)
			ref += math.Cos(arg)
		}
		rec.VoltageV[k] = q(v + rawNoiseV*r.NormFloat64())
		if rec.ReferenceV != nil {
			rec.ReferenceV[k] = q(ref)
		}
		if rec.PositionM != nil {
			rec.PositionM[k] = math.Round((z0+speed*t)*1e7) / 1e7
		}
	}
	ph := &rawPhasors{fine: fine, z0: z0, speed: speed}
	for fi := range nf {
		c := chans[2*fi+ch]
		c.Samples = append([]complex128(nil), c.Samples...)
		for k := range c.Samples {
			c.Samples[k] += imb[fi]
		}
		ph.ch = append(ph.ch, c)
	}
	return rec, truth, ph
}
