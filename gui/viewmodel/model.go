package viewmodel

import (
	"context"
	"fmt"

	"whorl/impedance"
)

// ModelParams are the coil and conductor of the model explorer: a coil at
// a lift-off above one conducting layer (a plate of ThicknessM, or a
// half-space when ThicknessM is +Inf).
type ModelParams struct {
	Coil       impedance.Coil
	LiftoffM   float64
	ThicknessM float64
	SigmaSPerM float64
	MuR        float64
	FreqHz     float64
}

// ModelCurve is one impedance-plane curve: normalised impedance
// ΔR/X0 + j(X0+ΔX)/X0 along a swept parameter.
type ModelCurve struct {
	// Name says what is swept and what is fixed, e.g. "conductivity, lift-off 0.5 mm".
	Name string
	// Points are normalised impedances, one per Labels entry.
	Points []complex128
	Labels []string
}

// Families is the set of impedance-plane curves around an operating point.
type Families struct {
	Curves []ModelCurve
	// Operating is the normalised impedance at the current parameters.
	Operating complex128
}

// DepthProfile is the induced current density below the coil's mean
// radius versus depth in the conductor, relative to its value at the
// surface.
type DepthProfile struct {
	DepthM []float64
	// MagRel is |J(z)|/|J(0)|.
	MagRel []float64
	// PhaseRad is arg J(z) − arg J(0), unwrapped (lagging is negative).
	PhaseRad []float64
}

// Advice is the model's frequency advice for the current parameters.
type Advice struct {
	SkinDepthM float64
	// F90Hz is the frequency at which the phase lag across the thickness
	// reaches 90° (NaN for a half-space).
	F90Hz float64
	Notes []string
}

// Model evaluates the coil model for the explorer. It is implemented over
// package impedance; methods may be called from any goroutine and return
// early with ctx.Err() when cancelled.
type Model interface {
	Families(ctx context.Context, p ModelParams) (Families, error)
	DepthProfile(ctx context.Context, p ModelParams) (DepthProfile, error)
	Advice(p ModelParams) (Advice, error)
}

// Explorer is the model explorer's state. Every parameter change cancels
// the evaluation still running and starts a new one.
type Explorer struct {
	worker
	model Model
	// OnChange is called on the UI thread after new results arrived.
	OnChange func()

	params   ModelParams
	fam      Families
	prof     DepthProfile
	adv      Advice
	err      error
	busy     bool
	gen      int
	stop     context.CancelFunc
	evaluate int // number of evaluations started, for tests
}

// NewExplorer returns the explorer with starting parameters p.
func NewExplorer(m Model, p ModelParams, post func(func())) *Explorer {
	return &Explorer{worker: worker{post: post}, model: m, params: p}
}

// Params returns the current parameters.
func (e *Explorer) Params() ModelParams { return e.params }

// Set replaces the parameters and re-evaluates the model.
func (e *Explorer) Set(p ModelParams) {
	e.params = p
	e.Evaluate()
}

// Evaluate starts an evaluation at the current parameters, cancelling the
// one still running.
func (e *Explorer) Evaluate() {
	if e.stop != nil {
		e.stop()
	}
	ctx, stop := context.WithCancel(context.Background())
	e.stop = stop
	e.gen++
	e.evaluate++
	gen, p := e.gen, e.params
	e.busy = true
	var fam Families
	var prof DepthProfile
	var adv Advice
	var err error
	e.goAndPost(func() {
		if fam, err = e.model.Families(ctx, p); err != nil {
			return
		}
		if prof, err = e.model.DepthProfile(ctx, p); err != nil {
			return
		}
		adv, err = e.model.Advice(p)
	}, func() {
		if gen != e.gen {
			return // superseded by a newer evaluation
		}
		e.busy = false
		if err != nil {
			e.err = fmt.Errorf("model at f=%g Hz, σ=%g S/m, lift-off=%g m: %w", p.FreqHz, p.SigmaSPerM, p.LiftoffM, err)
		} else {
			e.err = nil
			e.fam, e.prof, e.adv = fam, prof, adv
		}
		if e.OnChange != nil {
			e.OnChange()
		}
	})
}

// Results is the latest completed evaluation of the explorer.
type Results struct {
	Families Families
	Profile  DepthProfile
	Advice   Advice
	// Err is the error of the latest evaluation (the results above are
	// then those of the one before).
	Err error
	// Busy reports that an evaluation is still running.
	Busy bool
}

// Results returns the latest completed evaluation.
func (e *Explorer) Results() Results {
	return Results{Families: e.fam, Profile: e.prof, Advice: e.adv, Err: e.err, Busy: e.busy}
}

// Close cancels a running evaluation and waits for it.
func (e *Explorer) Close() {
	if e.stop != nil {
		e.stop()
	}
	e.Wait()
}
