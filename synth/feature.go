package synth

import (
	"math"
	"math/cmplx"
)

// featureKind says how a feature responds across frequency.
type featureKind int

const (
	// wallLoss is missing wall metal from depth x1 to x2 (from the inside
	// surface) over a circumferential width: LayerResponse × width.
	wallLoss featureKind = iota
	// liftoff is a change of the coil-to-wall gap (dent, ding, expansion,
	// tube end, wobble): the same normalised amplitude at every frequency,
	// in the direction of a surface element (model phase 0).
	liftoff
	// external is conducting, magnetic material outside the tube (support
	// plate, tubesheet), seen through the wall.
	external
	// magnetic is a magnetic deposit on the outside of the tube, seen
	// through the wall, mostly at low frequency.
	magnetic
)

// feature is one signal source along a tube.
type feature struct {
	kind   featureKind
	z1, z2 float64 // true axial extent, metres
	// wallLoss: depth range from the inside surface and circumferential
	// width, metres.
	x1, x2, widthM float64
	// liftoff, external, magnetic: amplitude in normalised volts at the
	// prime frequency deep inside a long feature (absolute channel); a
	// negative value reverses the signal.
	ampV float64
}

// modelResponse returns the feature's complex response at frequency index
// fi in normalised volts per unit of axial shape, in the model's lag
// convention (time dependence e^{+jωt}; a lag is a negative phase).
func (f *feature) modelResponse(g *Generator, fi int) complex128 {
	switch f.kind {
	case wallLoss:
		r := complex(f.widthM, 0) * LayerResponse(f.x1, f.x2, g.deltaM[fi])
		if g.norm != nil {
			r *= complex(g.norm[fi], 0)
		}
		return r
	case liftoff:
		return complex(f.ampV, 0)
	case external:
		return complex(f.ampV, 0) * g.extUnit[fi]
	case magnetic:
		return complex(f.ampV, 0) * g.magUnit[fi]
	}
	panic("synth: unknown feature kind")
}

// sigma returns the axial blur of the feature at frequency index fi:
// the coil's for features in or at the wall, widened by half a skin depth
// for material outside the tube, whose field spreads further at low
// frequency (this difference between frequencies is what a support mix
// cannot remove and leaves as residue).
func (f *feature) sigma(g *Generator, fi int) float64 {
	switch f.kind {
	case external, magnetic:
		return math.Hypot(g.sigmaM, extSpread*g.deltaM[fi])
	}
	return g.sigmaM
}

// extSpread is the fraction of the skin depth by which outside material
// widens the coil's axial response (demo model choice, tuned so that a
// two-frequency support mix leaves 5–15 % residue, FIELD.md §8).
const extSpread = 0.9

// Support model: outside material's own response S(f) is a magnetic part
// (dominant at low frequency) plus an eddy-current part (dominant at high
// frequency, opposite in sign to wall loss), with crossover at the
// geometric mean of the frequency set; it reaches the coil through the
// wall as e^{−κt} (the round trip of ElementResponse at x = t). Demo model
// choice, not a published law.
const (
	magneticShare = 0.6
	magneticPhase = -math.Pi / 2
)

// externalUnits prepares the per-frequency response of outside material,
// scaled so that its magnitude at the prime frequency is 1 normalised volt
// per volt of ampV.
func (g *Generator) externalUnits() {
	nf := len(g.cfg.FreqsHz)
	fc := math.Sqrt(g.cfg.FreqsHz[0] * g.cfg.FreqsHz[nf-1])
	t := g.cfg.Tube.WallM
	g.extUnit = make([]complex128, nf)
	g.magUnit = make([]complex128, nf)
	for fi, f := range g.cfg.FreqsHz {
		through := cmplx.Exp(-kappa(g.deltaM[fi])*complex(t, 0)) * complex(g.norm[fi], 0)
		mag := complex(fc/(f+fc), 0) * cmplx.Rect(1, magneticPhase)
		eddy := complex(-f/(f+fc), 0)
		g.extUnit[fi] = (complex(magneticShare, 0)*mag + complex(1-magneticShare, 0)*eddy) * through
		g.magUnit[fi] = mag * through
	}
	e0, m0 := cmplx.Abs(g.extUnit[0]), cmplx.Abs(g.magUnit[0])
	for fi := range g.extUnit {
		g.extUnit[fi] /= complex(e0, 0)
		g.magUnit[fi] /= complex(m0, 0)
	}
}
