package source

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"
	"sync"

	"whorl/gui/viewmodel"
	"whorl/impedance"
)

// CoilModel evaluates the planar Dodd–Deeds model of package impedance for
// the model explorer. Models are built once per coil and reused.
type CoilModel struct {
	// RelTol is the relative accuracy asked of each evaluation.
	RelTol float64
	mu     sync.Mutex
	models map[impedance.Coil]*impedance.PlanarModel
}

// NewCoilModel returns a model evaluator with a relative accuracy of 1e-6
// (ample for drawing).
func NewCoilModel() *CoilModel {
	return &CoilModel{RelTol: 1e-6, models: map[impedance.Coil]*impedance.PlanarModel{}}
}

func (c *CoilModel) model(coil impedance.Coil) (*impedance.PlanarModel, error) {
	c.mu.Lock()
	defer c.mu.Unlock()
	if m, ok := c.models[coil]; ok {
		return m, nil
	}
	m, err := impedance.NewPlanarModel(coil, c.RelTol)
	if err != nil {
		return nil, err
	}
	c.models[coil] = m
	return m, nil
}

func layers(p viewmodel.ModelParams, sigma, thickness float64) []impedance.Layer {
	return []impedance.Layer{{ThicknessM: thickness, ConductivitySPerM: sigma, RelPermeability: p.MuR}}
}

// logSpace returns n values from a to b evenly spaced in log.
func logSpace(a, b float64, n int) []float64 {
	out := make([]float64, n)
	for i := range out {
		out[i] = a * math.Pow(b/a, float64(i)/float64(n-1))
	}
	return out
}

func linSpace(a, b float64, n int) []float64 {
	out := make([]float64, n)
	for i := range out {
		out[i] = a + (b-a)*float64(i)/float64(n-1)
	}
	return out
}

// Families returns, around the operating point p: the conductivity curve
// at p's lift-off (which is also the frequency locus, since the
// normalised impedance of a non-magnetic half-space depends on ωσ only),
// lift-off lines at σ/2, σ and 2σ, and the thickness curve.
func (c *CoilModel) Families(ctx context.Context, p viewmodel.ModelParams) (viewmodel.Families, error) {
	m, err := c.model(p.Coil)
	if err != nil {
		return viewmodel.Families{}, err
	}
	type curve struct {
		name   string
		labels []string
		pts    []impedance.PlanarPoint
	}
	var curves []curve
	sig := logSpace(0.2e6, 100e6, 28)
	cv := curve{name: fmt.Sprintf("conductivity 0.2–100 MS/m at %.2f mm", p.LiftoffM*1000)}
	for _, s := range sig {
		cv.pts = append(cv.pts, impedance.PlanarPoint{FreqHz: p.FreqHz, LiftoffM: p.LiftoffM, Layers: layers(p, s, p.ThicknessM)})
		cv.labels = append(cv.labels, fmt.Sprintf("%.3g MS/m", s/1e6))
	}
	curves = append(curves, cv)
	for _, f := range []float64{0.5, 1, 2} {
		lc := curve{name: fmt.Sprintf("lift-off 0–2 mm at %.3g MS/m", f*p.SigmaSPerM/1e6)}
		for _, lo := range linSpace(0, 2e-3, 9) {
			lc.pts = append(lc.pts, impedance.PlanarPoint{FreqHz: p.FreqHz, LiftoffM: lo, Layers: layers(p, f*p.SigmaSPerM, p.ThicknessM)})
			lc.labels = append(lc.labels, fmt.Sprintf("%.2f mm", lo*1000))
		}
		curves = append(curves, lc)
	}
	delta := impedance.SkinDepthM(p.FreqHz, p.SigmaSPerM, max(p.MuR, 1))
	tc := curve{name: fmt.Sprintf("thickness 0.02–%.2g mm", 4*delta*1000)}
	for _, t := range logSpace(0.02e-3, max(4*delta, 0.1e-3), 16) {
		tc.pts = append(tc.pts, impedance.PlanarPoint{FreqHz: p.FreqHz, LiftoffM: p.LiftoffM, Layers: layers(p, p.SigmaSPerM, t)})
		tc.labels = append(tc.labels, fmt.Sprintf("%.3g mm", t*1000))
	}
	curves = append(curves, tc)
	var all []impedance.PlanarPoint
	for _, cv := range curves {
		all = append(all, cv.pts...)
	}
	all = append(all, impedance.PlanarPoint{FreqHz: p.FreqHz, LiftoffM: p.LiftoffM, Layers: layers(p, p.SigmaSPerM, p.ThicknessM)})
	res, err := impedance.SweepPlanar(ctx, m, all, 0)
	if err != nil {
		return viewmodel.Families{}, err
	}
	var fam viewmodel.Families
	k := 0
	for _, cv := range curves {
		mc := viewmodel.ModelCurve{Name: cv.name, Labels: cv.labels}
		for range cv.pts {
			mc.Points = append(mc.Points, res[k].Normalized())
			k++
		}
		fam.Curves = append(fam.Curves, mc)
	}
	fam.Operating = res[k].Normalized()
	return fam, nil
}

// DepthProfile returns the induced current density under the coil's mean
// radius from the surface to the back wall or five standard depths,
// relative to its surface value.
func (c *CoilModel) DepthProfile(ctx context.Context, p viewmodel.ModelParams) (viewmodel.DepthProfile, error) {
	delta := impedance.SkinDepthM(p.FreqHz, p.SigmaSPerM, max(p.MuR, 1))
	maxZ := 5 * delta
	if p.ThicknessM < maxZ {
		maxZ = p.ThicknessM
	}
	depths := linSpace(0, maxZ, 121)
	// Stay just inside a finite plate at its back wall.
	if !math.IsInf(p.ThicknessM, 1) {
		depths[len(depths)-1] = maxZ * (1 - 1e-9)
	}
	pl := impedance.Planar{Coil: p.Coil, LiftoffM: p.LiftoffM, Layers: layers(p, p.SigmaSPerM, p.ThicknessM)}
	r := (p.Coil.InnerRadiusM + p.Coil.OuterRadiusM) / 2
	j, err := pl.CurrentDensity(p.FreqHz, depths, r)
	if err != nil {
		return viewmodel.DepthProfile{}, err
	}
	if err := ctx.Err(); err != nil {
		return viewmodel.DepthProfile{}, err
	}
	out := viewmodel.DepthProfile{DepthM: depths, MagRel: make([]float64, len(j)), PhaseRad: make([]float64, len(j))}
	j0 := j[0]
	if cmplx.Abs(j0) == 0 {
		return out, fmt.Errorf("no induced current at the surface (σ = %g S/m)", p.SigmaSPerM)
	}
	prev := 0.0
	for i, v := range j {
		out.MagRel[i] = cmplx.Abs(v) / cmplx.Abs(j0)
		a := cmplx.Phase(v / j0)
		// Unwrap against the previous depth.
		for a-prev > math.Pi {
			a -= 2 * math.Pi
		}
		for a-prev < -math.Pi {
			a += 2 * math.Pi
		}
		out.PhaseRad[i], prev = a, a
	}
	return out, nil
}

// Advice returns the standard depth of penetration at p's frequency, f90
// for p's thickness and the advisor's recommended set and warnings.
func (c *CoilModel) Advice(p viewmodel.ModelParams) (viewmodel.Advice, error) {
	in := impedance.AdviceInput{ConductivitySPerM: p.SigmaSPerM, RelPermeability: p.MuR, CandidateHz: p.FreqHz}
	if !math.IsInf(p.ThicknessM, 1) {
		in.WallM = p.ThicknessM
	}
	a, err := impedance.Advise(in)
	if err != nil {
		return viewmodel.Advice{}, err
	}
	out := viewmodel.Advice{SkinDepthM: impedance.SkinDepthM(p.FreqHz, p.SigmaSPerM, max(p.MuR, 1)), F90Hz: math.NaN()}
	if a.F90Hz > 0 {
		out.F90Hz = a.F90Hz
	}
	if a.MinFreq3DeltaHz > 0 {
		out.Notes = append(out.Notes, fmt.Sprintf("thickness ≥ 3δ (conductivity reading) below %.3g kHz", a.MinFreq3DeltaHz/1e3))
	}
	for _, r := range a.Set {
		out.Notes = append(out.Notes, fmt.Sprintf("%s: %.3g kHz (δ = %.3f mm)", r.Role, r.FreqHz/1e3, r.SkinDepthM*1000))
	}
	out.Notes = append(out.Notes, a.Warnings...)
	return out, nil
}
