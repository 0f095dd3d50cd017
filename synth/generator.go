package synth

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"sort"
	"strconv"
	"sync"
	"time"

	"whorl/acquire"
	"whorl/impedance"
)

// Version identifies the signal model; it is written into every manifest
// and changes whenever the same Config would give different data.
const Version = "whorl-synth 1"

// Stream salts: each random stream is rand.NewPCG(seed^salt, index), so
// tubes, groups, the standard and raw recordings draw independent numbers
// and any one can be made without the others.
const (
	saltTubeLayout uint64 = 0 // conditions of tube i: PCG(seed, i)
	saltTubeNoise  uint64 = 0x6e6f697365000000
	saltInstrument uint64 = 0x696e737472000000
	saltStandard   uint64 = 0x7374640000000000
	saltCalScan    uint64 = 0x63616c0000000000
	saltRaw        uint64 = 0x7261770000000000
)

// Landmark is a fixed geometric feature of every tube: a tube end, a
// tubesheet, an expansion transition or a support plate.
type Landmark struct {
	// Name is "end-B", "tubesheet-B", "expansion-B", "support-1" … in
	// increasing position, "expansion-A", "tubesheet-A", "end-A".
	Name string `json:"name"`
	// Kind is "tube-end", "tubesheet", "expansion-transition" or "support".
	Kind string `json:"kind"`
	// StartM and EndM bound the feature along the tube (equal for a
	// tube end or a transition); CentreM is their mean.
	StartM  float64 `json:"start_m"`
	EndM    float64 `json:"end_m"`
	CentreM float64 `json:"centre_m"`
	// Support is the index into Config.SupportsM, or −1.
	Support int `json:"support"`
}

// setting is one channel's instrument state: the gain and rotation the
// instrument applies before any calibration, and its null offset.
type setting struct {
	gain   float64
	rotRad float64
	offset complex128
}

// Generator makes the demo inspection described by a Config. It is safe
// for concurrent use: every method derives its own random streams.
type Generator struct {
	cfg      Config
	deltaM   []float64 // standard depth of penetration per frequency
	norm     []float64 // normalisation per frequency, V per m² of model response
	extUnit  []complex128
	magUnit  []complex128
	sigmaM   float64 // coil sensitivity standard deviation
	tubeName []string
	rowCol   [][2]int
	groupAt  []time.Time // opening calibration time of each group
	tubeDur  time.Duration
	calDur   time.Duration
	base     []setting   // base instrument state per channel
	open     [][]setting // per group, per channel
	close    [][]setting
	std      stdLayout
	rawOnce  sync.Once
	rawPlan  []rawPlan
}

// New validates cfg and prepares a generator. The error names the first
// bad field.
func New(cfg Config) (*Generator, error) {
	if err := cfg.Validate(); err != nil {
		return nil, err
	}
	cfg.FreqsHz = append([]float64(nil), cfg.FreqsHz...)
	cfg.SupportsM = append([]float64(nil), cfg.SupportsM...)
	g := &Generator{cfg: cfg, sigmaM: sigmaFromFWHM(cfg.CoilLengthM)}
	nf := len(cfg.FreqsHz)
	g.deltaM = make([]float64, nf)
	for i, f := range cfg.FreqsHz {
		g.deltaM[i] = impedance.SkinDepthM(f, cfg.Tube.ConductivitySPerM, cfg.Tube.RelPermeability)
	}
	g.layoutTubes()
	g.std = g.buildStandard()
	g.normalise()
	g.externalUnits()
	g.schedule()
	g.instrument()
	return g, nil
}

// Config returns a copy of the generator's configuration.
func (g *Generator) Config() Config {
	c := g.cfg
	c.FreqsHz = append([]float64(nil), c.FreqsHz...)
	c.SupportsM = append([]float64(nil), c.SupportsM...)
	return c
}

// SkinDepthsM returns the standard depth of penetration in the tube wall at
// each frequency of the configuration, in metres.
func (g *Generator) SkinDepthsM() []float64 { return append([]float64(nil), g.deltaM...) }

// ChannelName returns the name of a channel: the frequency in kHz with a
// "k" suffix, a hyphen and "diff" or "abs", for example "400k-diff".
func ChannelName(freqHz float64, mode acquire.CoilMode) string {
	m := "abs"
	if mode == acquire.Differential {
		m = "diff"
	}
	return strconv.FormatFloat(freqHz/1000, 'f', -1, 64) + "k-" + m
}

// Channels returns the channels of every scan, in file order: for each
// frequency of Config.FreqsHz in turn, its differential then its absolute
// channel. Samples are nil.
func (g *Generator) Channels() []acquire.Channel {
	out := make([]acquire.Channel, 0, 2*len(g.cfg.FreqsHz))
	for _, f := range g.cfg.FreqsHz {
		out = append(out,
			acquire.Channel{Name: ChannelName(f, acquire.Differential), FreqHz: f, Mode: acquire.Differential},
			acquire.Channel{Name: ChannelName(f, acquire.Absolute), FreqHz: f, Mode: acquire.Absolute})
	}
	return out
}

// Tubes returns the number of tubes.
func (g *Generator) Tubes() int { return g.cfg.Tubes }

// TubeID returns the identifier of tube i, "R07C012" style (row, column in
// the tubesheet, rows from the top). It panics if i is out of range.
func (g *Generator) TubeID(i int) string {
	if i < 0 || i >= len(g.tubeName) {
		panic("synth: tube index out of range")
	}
	return g.tubeName[i]
}

// RowColumn returns the tubesheet row and column of tube i (from 1). It
// panics if i is out of range.
func (g *Generator) RowColumn(i int) (row, col int) {
	rc := g.rowCol[i]
	return rc[0], rc[1]
}

// layoutTubes places the tubes on a square pitch inside a circle: the
// Tubes grid points nearest the bundle centre, numbered by row then column.
func (g *Generator) layoutTubes() {
	n := g.cfg.Tubes
	side := int(math.Ceil(math.Sqrt(4*float64(n)/math.Pi))) + 2
	c := float64(side+1) / 2
	type pt struct {
		r, c int
		d2   float64
	}
	pts := make([]pt, 0, side*side)
	for r := 1; r <= side; r++ {
		for col := 1; col <= side; col++ {
			dr, dc := float64(r)-c, float64(col)-c
			pts = append(pts, pt{r, col, dr*dr + dc*dc})
		}
	}
	sort.Slice(pts, func(i, j int) bool {
		if pts[i].d2 != pts[j].d2 {
			return pts[i].d2 < pts[j].d2
		}
		if pts[i].r != pts[j].r {
			return pts[i].r < pts[j].r
		}
		return pts[i].c < pts[j].c
	})
	pts = pts[:n]
	minR, minC := side, side
	for _, p := range pts {
		minR, minC = min(minR, p.r), min(minC, p.c)
	}
	for i := range pts { // number rows and columns from 1
		pts[i].r -= minR - 1
		pts[i].c -= minC - 1
	}
	sort.Slice(pts, func(i, j int) bool {
		if pts[i].r != pts[j].r {
			return pts[i].r < pts[j].r
		}
		return pts[i].c < pts[j].c
	})
	rw, cw := 2, 3
	if side >= 100 {
		rw = len(strconv.Itoa(side))
	}
	if side >= 1000 {
		cw = len(strconv.Itoa(side))
	}
	g.tubeName = make([]string, n)
	g.rowCol = make([][2]int, n)
	for i, p := range pts {
		g.tubeName[i] = fmt.Sprintf("R%0*dC%0*d", rw, p.r, cw, p.c)
		g.rowCol[i] = [2]int{p.r, p.c}
	}
}

// Group returns the calibration group of tube i: the tubes are split into
// Config.Groups consecutive runs of nearly equal size. It panics if i is
// out of range.
func (g *Generator) Group(i int) int {
	if i < 0 || i >= g.cfg.Tubes {
		panic("synth: tube index out of range")
	}
	return i * g.cfg.Groups / g.cfg.Tubes
}

// GroupTubes returns the first tube index of group gi and the number of
// tubes in it. It panics if gi is out of range.
func (g *Generator) GroupTubes(gi int) (first, n int) {
	if gi < 0 || gi >= g.cfg.Groups {
		panic("synth: group index out of range")
	}
	first = g.groupFirst(gi)
	return first, g.groupFirst(gi+1) - first
}

func (g *Generator) groupFirst(gi int) int {
	return (gi*g.cfg.Tubes + g.cfg.Groups - 1) / g.cfg.Groups
}

// GroupName returns the name of calibration group gi, "CG01" for gi = 0.
func GroupName(gi int) string { return fmt.Sprintf("CG%02d", gi+1) }

// schedule sets the start time of each group: an opening calibration, the
// tubes one after another, a closing calibration.
func (g *Generator) schedule() {
	pull := g.cfg.LengthM / g.cfg.ProbeSpeedMPS
	g.tubeDur = time.Duration((pull + 45) * float64(time.Second)).Round(time.Second)
	g.calDur = 4 * time.Minute
	g.groupAt = make([]time.Time, g.cfg.Groups+1)
	t := g.cfg.Start
	for gi := 0; gi <= g.cfg.Groups; gi++ {
		g.groupAt[gi] = t
		if gi < g.cfg.Groups {
			_, n := g.GroupTubes(gi)
			t = t.Add(2*g.calDur + time.Duration(n)*g.tubeDur + 10*time.Minute)
		}
	}
}

func (g *Generator) tubeStart(i int) time.Time {
	gi := g.Group(i)
	first, _ := g.GroupTubes(gi)
	return g.groupAt[gi].Add(g.calDur + time.Duration(i-first)*g.tubeDur)
}

func (g *Generator) calStart(gi int, closing bool) time.Time {
	t := g.groupAt[gi]
	if closing {
		_, n := g.GroupTubes(gi)
		t = t.Add(g.calDur + time.Duration(n)*g.tubeDur)
	}
	return t
}

// instrument draws the instrument's raw gain and rotation per channel,
// a small re-setup change per group, small in-tolerance drift across each
// group, and DriftDeg/DriftGain on the drifted group's closing.
func (g *Generator) instrument() {
	nc := 2 * len(g.cfg.FreqsHz)
	r := rand.New(rand.NewPCG(g.cfg.Seed^saltInstrument, 0))
	g.base = make([]setting, nc)
	for c := range g.base {
		g.base[c] = setting{
			gain:   math.Exp(r.Float64()*math.Log(6)) / 2.5, // 0.4 to 2.4, log-uniform
			rotRad: r.Float64() * 2 * math.Pi,
		}
	}
	deg := math.Pi / 180
	g.open = make([][]setting, g.cfg.Groups)
	g.close = make([][]setting, g.cfg.Groups)
	for gi := range g.open {
		r := rand.New(rand.NewPCG(g.cfg.Seed^saltInstrument, uint64(gi)+1))
		g.open[gi] = make([]setting, nc)
		g.close[gi] = make([]setting, nc)
		for c := range nc {
			o := g.base[c]
			o.gain *= 1 + 0.04*(r.Float64()-0.5)
			o.rotRad += 3 * deg * (r.Float64() - 0.5)
			o.offset = complex(0.4*(r.Float64()-0.5), 0.4*(r.Float64()-0.5))
			cl := o
			cl.gain *= 1 + 0.02*(r.Float64()-0.5)
			cl.rotRad += 2 * deg * (r.Float64() - 0.5)
			if gi == g.cfg.DriftedGroup {
				cl.gain *= g.cfg.DriftGain
				cl.rotRad += g.cfg.DriftDeg * deg
			}
			g.open[gi][c] = o
			g.close[gi][c] = cl
		}
	}
}

// settingAt returns the instrument state of channel c in group gi at
// fraction tau of the way from its opening (0) to its closing (1)
// calibration.
func (g *Generator) settingAt(gi, c int, tau float64) setting {
	o, cl := g.open[gi][c], g.close[gi][c]
	return setting{
		gain:   o.gain + tau*(cl.gain-o.gain),
		rotRad: o.rotRad + tau*(cl.rotRad-o.rotRad),
		offset: o.offset + complex(tau, 0)*(cl.offset-o.offset),
	}
}

// InstrumentState returns the gain and rotation (radians, counter-clockwise)
// the instrument applied to channel c (index into Channels) at the opening
// or closing calibration of group gi: recorded = gain·e^{j·rot}·signal +
// offset, with signal in normalised volts. Calibration should recover
// 1/gain and −rot up to the procedure's own reference angle. It panics if
// gi or c is out of range.
func (g *Generator) InstrumentState(gi, c int, closing bool) (gain, rotRad float64) {
	s := g.open[gi][c]
	if closing {
		s = g.close[gi][c]
	}
	return s.gain, s.rotRad
}

// normalise sets each frequency's normalisation so that the 4×20 %TW
// flat-bottom-hole set of the standard reads 4 V peak-to-peak on the
// differential channel (FIELD.md §1.3, EPRI-based practice), before the
// instrument's own gain.
func (g *Generator) normalise() {
	norm := make([]float64, len(g.cfg.FreqsHz))
	f := g.std.flaws[g.std.fbh20]
	pp := diffShapePP(f.z1, f.z2, g.sigmaM, g.cfg.CoilSpacingM)
	for fi := range g.cfg.FreqsHz {
		norm[fi] = 4 / (cmplx.Abs(f.modelResponse(g, fi)) * pp)
	}
	g.norm = norm
}

// diffShapePP returns max − min of the differential shape of a feature on
// a fine grid (0.5 % of σ).
func diffShapePP(z1, z2, sigma, spacing float64) float64 {
	lo, hi := z1-spacing-6*sigma, z2+spacing+6*sigma
	step := sigma / 200
	mn, mx := math.Inf(1), math.Inf(-1)
	for z := lo; z <= hi; z += step {
		d := DifferentialShape(z, z1, z2, sigma, spacing)
		mn, mx = math.Min(mn, d), math.Max(mx, d)
	}
	return mx - mn
}

// Landmarks returns the fixed features of every tube in increasing
// position.
func (g *Generator) Landmarks() []Landmark {
	c := g.cfg
	L, ts := c.LengthM, c.TubesheetM
	out := []Landmark{
		{Name: "end-B", Kind: "tube-end", Support: -1},
		{Name: "tubesheet-B", Kind: "tubesheet", StartM: 0, EndM: ts, Support: -1},
		{Name: "expansion-B", Kind: "expansion-transition", StartM: ts - c.ExpansionGapM, EndM: ts - c.ExpansionGapM, Support: -1},
	}
	for i, z := range c.SupportsM {
		out = append(out, Landmark{Name: fmt.Sprintf("support-%d", i+1), Kind: "support",
			StartM: z - c.SupportThicknessM/2, EndM: z + c.SupportThicknessM/2, Support: i})
	}
	out = append(out,
		Landmark{Name: "expansion-A", Kind: "expansion-transition", StartM: L - ts + c.ExpansionGapM, EndM: L - ts + c.ExpansionGapM, Support: -1},
		Landmark{Name: "tubesheet-A", Kind: "tubesheet", StartM: L - ts, EndM: L, Support: -1},
		Landmark{Name: "end-A", Kind: "tube-end", StartM: L, EndM: L, Support: -1})
	for i := range out {
		out[i].CentreM = (out[i].StartM + out[i].EndM) / 2
	}
	return out
}
