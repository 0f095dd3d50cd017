package vmtest

import (
	"context"
	"math"

	"whorl/gui/viewmodel"
)

// Model is a stand-in for the coil model with fixed, smooth curves, for
// testing the explorer's view without the model's cost. Its numbers are
// not physics and must not be used as such.
type Model struct{}

// Families implements viewmodel.Model.
func (Model) Families(ctx context.Context, p viewmodel.ModelParams) (viewmodel.Families, error) {
	var c viewmodel.ModelCurve
	c.Name = "test curve"
	for k := range 20 {
		a := float64(k) / 19 * math.Pi / 2
		c.Points = append(c.Points, complex(0.2*math.Sin(2*a), 1-0.6*math.Sin(a)))
		c.Labels = append(c.Labels, "")
	}
	return viewmodel.Families{Curves: []viewmodel.ModelCurve{c}, Operating: c.Points[10]}, ctx.Err()
}

// DepthProfile implements viewmodel.Model.
func (Model) DepthProfile(ctx context.Context, p viewmodel.ModelParams) (viewmodel.DepthProfile, error) {
	var d viewmodel.DepthProfile
	for k := range 50 {
		z := float64(k) * 0.0001
		d.DepthM = append(d.DepthM, z)
		d.MagRel = append(d.MagRel, math.Exp(-z/0.001))
		d.PhaseRad = append(d.PhaseRad, -z/0.001)
	}
	return d, ctx.Err()
}

// Advice implements viewmodel.Model.
func (Model) Advice(p viewmodel.ModelParams) (viewmodel.Advice, error) {
	return viewmodel.Advice{SkinDepthM: 0.001, F90Hz: math.NaN()}, nil
}
