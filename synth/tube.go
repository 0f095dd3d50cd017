package synth

import (
	"fmt"
	"math"
	"math/rand/v2"

	"whorl/acquire"
	"whorl/calibrate"
)

// Condition kinds written in Truth.Kind. The first four are wall loss
// (Truth.IsFlaw); the rest are non-relevant signals an analyst must tell
// apart.
const (
	KindODPit       = "od-pit"       // volumetric OD pit, 20–80 %TW
	KindSupportWear = "support-wear" // tapered OD wear scar at a support, 10–50 %TW
	KindIDCrack     = "id-crack"     // axial ID crack at an expansion transition
	KindODCrack     = "od-crack"     // axial OD crack at a support edge
	KindDent        = "dent"         // dent at a support (lift-off-like, all frequencies)
	KindDing        = "ding"         // small dent in the free span
	KindDeposit     = "deposit"      // magnetic deposit on the OD, mostly low frequency
	KindBurnish     = "burnish"      // manufacturing burnish mark on the ID
)

// Truth is one condition placed in a tube by the generator: the ground
// truth an analysis is scored against, kept apart from the scans.
type Truth struct {
	// Component is the tube identifier.
	Component string
	// Kind is one of the Kind… constants.
	Kind string
	// AxialPositionM is the centre of the condition along the tube (true
	// position, metres from end-B).
	AxialPositionM float64
	// LengthM is its axial extent.
	LengthM float64
	// DepthPct is the maximum depth in %TW for wall loss, 0 otherwise.
	DepthPct float64
	// Origin is OD or ID for wall loss, empty otherwise.
	Origin calibrate.Origin
	// Support is the index into Config.SupportsM of the support it is at,
	// or −1.
	Support int
}

// IsFlaw reports whether t is wall loss (pit, wear or crack) rather than a
// non-relevant signal.
func (t Truth) IsFlaw() bool {
	switch t.Kind {
	case KindODPit, KindSupportWear, KindIDCrack, KindODCrack:
		return true
	}
	return false
}

// Per-tube probabilities of each condition at FlawRate 1 (demo choices;
// wear at supports is the main in-service degradation of Alloy 690 tubing,
// FIELD.md §8 [S: NUREG-1841], so it is the most common here).
const (
	probWear    = 0.10
	probPit     = 0.06
	probIDCrack = 0.025
	probODCrack = 0.025
	probDent    = 0.05
	probDing    = 0.04
	probDeposit = 0.06
	probBurnish = 0.05
	probCluster = 0.012 // a tube with several pits and a wear scar
	// Effective circumferential widths of axial cracks: a bobbin coil's
	// circumferential eddy currents are interrupted over the crack's depth,
	// so a tight crack reads like a narrow volumetric flaw. Demo choices
	// giving small ID-crack signals (about 1–3 V at the prime) and OD-crack
	// signals comparable with the 40 % hole.
	idCrackWidthM = 0.5e-3
	odCrackWidthM = 1.2e-3
)

// interval is an occupied stretch of tube.
type interval struct{ lo, hi float64 }

// tubePlan is the layout of one tube: its signal features and the truth.
type tubePlan struct {
	feats []feature
	truth []Truth
}

// plan draws the conditions of tube i from its own stream PCG(seed, i), so
// it depends on nothing but the seed, the configuration and i.
func (g *Generator) plan(i int) tubePlan {
	c := g.cfg
	r := rand.New(rand.NewPCG(c.Seed^saltTubeLayout, uint64(i)))
	id := g.tubeName[i]
	L, ts, t := c.LengthM, c.TubesheetM, c.Tube.WallM
	var pl tubePlan
	// Fixed geometry, with a per-tube spread of the support signal (the
	// tube's place in its support hole) and of the expansion.
	pl.feats = append(pl.feats,
		feature{kind: liftoff, z1: -1, z2: 0, ampV: tubeEndV},
		feature{kind: liftoff, z1: L, z2: L + 1, ampV: tubeEndV},
		feature{kind: external, z1: 0, z2: ts, ampV: tubesheetV * (0.9 + 0.2*r.Float64())},
		feature{kind: external, z1: L - ts, z2: L, ampV: tubesheetV * (0.9 + 0.2*r.Float64())},
		feature{kind: liftoff, z1: 0, z2: ts - c.ExpansionGapM, ampV: expansionV * (0.8 + 0.4*r.Float64())},
		feature{kind: liftoff, z1: L - ts + c.ExpansionGapM, z2: L, ampV: expansionV * (0.8 + 0.4*r.Float64())},
	)
	half := c.SupportThicknessM / 2
	busy := []interval{{-1, ts + 0.03}, {L - ts - 0.03, L + 1}}
	for _, z := range c.SupportsM {
		off := 0.001 * (r.Float64() - 0.5)
		pl.feats = append(pl.feats, feature{kind: external, z1: z - half + off, z2: z + half + off, ampV: supportV * (0.8 + 0.4*r.Float64())})
		busy = append(busy, interval{z - half - 0.04, z + half + 0.04})
	}
	rate := c.FlawRate
	chance := func(p float64) bool { return r.Float64() < p*rate }
	add := func(f feature, tr Truth) {
		tr.Component = id
		pl.feats = append(pl.feats, f)
		pl.truth = append(pl.truth, tr)
	}
	// freeSpot returns the centre of a free stretch of length l in [lo, hi]
	// clear of everything placed so far by 40 mm, or false.
	freeSpot := func(l, lo, hi float64) (float64, bool) {
		for range 40 {
			z := lo + l/2 + r.Float64()*(hi-lo-l)
			ok := true
			for _, b := range busy {
				if z+l/2+0.04 > b.lo && z-l/2-0.04 < b.hi {
					ok = false
					break
				}
			}
			if ok {
				busy = append(busy, interval{z - l/2, z + l/2})
				return z, true
			}
		}
		return 0, false
	}
	uni := func(a, b float64) float64 { return a + (b-a)*r.Float64() }
	wear := func(s int) {
		d := math.Round(uni(10, 50))
		l := c.SupportThicknessM + uni(0, 0.006)
		z0 := c.SupportsM[s] + uni(-0.003, 0.003)
		w := uni(4e-3, 8e-3)
		// Tapered: five slices with depth d·√(1−u²), u the slice centre
		// in −1 … 1 across the scar.
		for j := range 5 {
			u := (float64(j)+0.5)/5*2 - 1
			dj := d / 100 * t * math.Sqrt(1-u*u)
			z1 := z0 - l/2 + float64(j)*l/5
			pl.feats = append(pl.feats, feature{kind: wallLoss, z1: z1, z2: z1 + l/5, x1: t - dj, x2: t, widthM: w})
		}
		pl.truth = append(pl.truth, Truth{Component: id, Kind: KindSupportWear, AxialPositionM: z0, LengthM: l, DepthPct: d, Origin: calibrate.OD, Support: s})
	}
	pit := func(z0 float64) {
		d := math.Round(uni(20, 80))
		dia := uni(1.5e-3, 3.5e-3)
		add(feature{kind: wallLoss, z1: z0 - dia/2, z2: z0 + dia/2, x1: t * (1 - d/100), x2: t, widthM: dia},
			Truth{Kind: KindODPit, AxialPositionM: z0, LengthM: dia, DepthPct: d, Origin: calibrate.OD, Support: -1})
	}
	ns := len(c.SupportsM)
	if chance(probWear) {
		s := r.IntN(ns)
		wear(s)
		if r.Float64() < 0.3 && ns > 1 {
			wear((s + 1 + r.IntN(ns-1)) % ns)
		}
	}
	if chance(probPit) {
		n := 1
		if u := r.Float64(); u > 0.9 {
			n = 3
		} else if u > 0.7 {
			n = 2
		}
		for range n {
			lo, hi := ts, L-ts
			if r.Float64() < 0.6 { // sludge zone above tubesheet B
				lo, hi = ts+0.05, ts+0.4
			}
			if z, ok := freeSpot(0.004, lo, hi); ok {
				pit(z)
			}
		}
	}
	if chance(probIDCrack) {
		zt := ts - c.ExpansionGapM
		if r.Float64() < 0.3 {
			zt = L - ts + c.ExpansionGapM
		}
		z0 := zt + uni(-0.002, 0.002)
		l := uni(3e-3, 8e-3)
		d := math.Round(uni(30, 70))
		add(feature{kind: wallLoss, z1: z0 - l/2, z2: z0 + l/2, x1: 0, x2: t * d / 100, widthM: idCrackWidthM},
			Truth{Kind: KindIDCrack, AxialPositionM: z0, LengthM: l, DepthPct: d, Origin: calibrate.ID, Support: -1})
	}
	if chance(probODCrack) {
		s := r.IntN(ns)
		side := 1.0
		if r.Float64() < 0.5 {
			side = -1
		}
		l := uni(4e-3, 10e-3)
		z0 := c.SupportsM[s] + side*(half+uni(0.001, 0.004)+l/2)
		d := math.Round(uni(40, 80))
		add(feature{kind: wallLoss, z1: z0 - l/2, z2: z0 + l/2, x1: t * (1 - d/100), x2: t, widthM: odCrackWidthM},
			Truth{Kind: KindODCrack, AxialPositionM: z0, LengthM: l, DepthPct: d, Origin: calibrate.OD, Support: s})
	}
	if chance(probDent) {
		s := r.IntN(ns)
		l := uni(8e-3, 15e-3)
		z0 := c.SupportsM[s] + uni(-0.004, 0.004)
		add(feature{kind: liftoff, z1: z0 - l/2, z2: z0 + l/2, ampV: -uni(2, 8)},
			Truth{Kind: KindDent, AxialPositionM: z0, LengthM: l, Support: s})
	}
	if chance(probDing) {
		l := uni(3e-3, 6e-3)
		if z, ok := freeSpot(l, ts, L-ts); ok {
			add(feature{kind: liftoff, z1: z - l/2, z2: z + l/2, ampV: -uni(0.8, 3)},
				Truth{Kind: KindDing, AxialPositionM: z, LengthM: l, Support: -1})
		}
	}
	if chance(probDeposit) {
		l := uni(0.03, 0.3)
		lo, hi := ts, L-ts
		if r.Float64() < 0.5 {
			lo, hi = ts, ts+l+0.1
		}
		if z, ok := freeSpot(l, lo, hi); ok {
			add(feature{kind: magnetic, z1: z - l/2, z2: z + l/2, ampV: uni(0.3, 1.0)},
				Truth{Kind: KindDeposit, AxialPositionM: z, LengthM: l, Support: -1})
		}
	}
	if chance(probBurnish) {
		l := uni(0.01, 0.04)
		if z, ok := freeSpot(l, ts, L-ts); ok {
			add(feature{kind: wallLoss, z1: z - l/2, z2: z + l/2, x1: 0, x2: 0.05 * t, widthM: uni(1e-3, 3e-3)},
				Truth{Kind: KindBurnish, AxialPositionM: z, LengthM: l, Support: -1})
		}
	}
	if chance(probCluster) {
		for range 3 + r.IntN(3) {
			if z, ok := freeSpot(0.004, ts, L-ts); ok {
				pit(z)
			}
		}
		wear(r.IntN(ns))
	}
	return pl
}

// TubeTruth returns the conditions of tube i without generating its scan.
func (g *Generator) TubeTruth(i int) ([]Truth, error) {
	if i < 0 || i >= g.cfg.Tubes {
		return nil, fmt.Errorf("tube %d: expected 0 to %d", i, g.cfg.Tubes-1)
	}
	return g.plan(i).truth, nil
}

// Tube returns the scan of tube i and its ground truth. The result depends
// only on the Config and i (each tube draws from its own random streams),
// so tubes may be generated in any order and concurrently.
func (g *Generator) Tube(i int) (*acquire.Scan, []Truth, error) {
	if i < 0 || i >= g.cfg.Tubes {
		return nil, nil, fmt.Errorf("tube %d: expected 0 to %d", i, g.cfg.Tubes-1)
	}
	pl := g.plan(i)
	r := rand.New(rand.NewPCG(g.cfg.Seed^saltTubeNoise, uint64(i)))
	p := g.newPull(r, g.cfg.LengthM, 0.001, 0.002)
	gi := g.Group(i)
	first, n := g.GroupTubes(gi)
	tau := (float64(i-first) + 0.5) / float64(n)
	set := make([]setting, 2*len(g.cfg.FreqsHz))
	for c := range set {
		set[c] = g.settingAt(gi, c, tau)
	}
	lv := noiseLevels{whiteV: g.cfg.NoiseV, pinkV: g.cfg.NoiseV / 2, driftV: 0.3, wobbleV: 0.15}
	chans := g.render(p, pl.feats, r, lv, set)
	meta := g.meta(g.tubeName[i], g.tubeStart(i), gi)
	row, col := g.RowColumn(i)
	meta.Extra = map[string]string{"scan-kind": "tube", "row": fmt.Sprint(row), "column": fmt.Sprint(col), "plant": g.cfg.Plant, "exchanger": g.cfg.Component}
	return g.scan(meta, p, chans), pl.truth, nil
}
