package impedance

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"sort"
)

// PlanarForward computes the impedance of one probe coil at a lift-off
// above a planar stack of layers (top layer first). *PlanarModel satisfies
// it. Implementations must be safe for concurrent use.
type PlanarForward interface {
	Impedance(freqHz, liftoffM float64, layers []Layer) (Result, error)
}

// Specimen is a uniform conducting plate or half-space under the probe.
type Specimen struct {
	// ConductivitySPerM is σ in S/m; 0 means no conductor (the probe in air).
	ConductivitySPerM float64 `json:"conductivity_s_per_m"`
	// RelPermeability is μr; 0 means 1.
	RelPermeability float64 `json:"rel_permeability,omitempty"`
	// ThicknessM is the plate thickness in m; 0 or +Inf means a half-space.
	ThicknessM float64 `json:"thickness_m,omitempty"`
}

func (s Specimen) validate() error {
	switch {
	case !(s.ConductivitySPerM >= 0) || math.IsInf(s.ConductivitySPerM, 0):
		return fmt.Errorf("conductivity %v S/m: expected a finite value ≥ 0", s.ConductivitySPerM)
	case s.RelPermeability != 0 && (!(s.RelPermeability >= 1) || math.IsInf(s.RelPermeability, 0)):
		return fmt.Errorf("relative permeability %v: expected a finite value ≥ 1", s.RelPermeability)
	case !(s.ThicknessM >= 0):
		return fmt.Errorf("thickness %v m: expected a value > 0 or inf", s.ThicknessM)
	}
	return nil
}

// NormalizedImpedance returns the normalised impedance ΔR/X0 + jX/X0 of a
// probe whose coil dimensions are scaled by coilScale, at lift-off
// liftoffM above the specimen. The scale uses the similarity of the
// Dodd–Deeds solution (Dodd & Deeds, J. Appl. Phys. 39, 2829 (1968)): the
// normalised impedance depends only on ωμ0μrσr̄² and the lengths divided by
// the mean coil radius r̄, so scaling the coil by s equals dividing all other
// lengths by s and multiplying σ by s². Air (σ = 0) is exactly 0 + 1j.
func NormalizedImpedance(m PlanarForward, freqHz, liftoffM, coilScale float64, sp Specimen) (complex128, error) {
	if sp.ConductivitySPerM == 0 {
		return 1i, nil
	}
	t := sp.ThicknessM
	if t == 0 {
		t = math.Inf(1)
	}
	mur := sp.RelPermeability
	if mur == 0 {
		mur = 1
	}
	layers := []Layer{{ThicknessM: t / coilScale, ConductivitySPerM: sp.ConductivitySPerM * coilScale * coilScale, RelPermeability: mur}}
	r, err := m.Impedance(freqHz, liftoffM/coilScale, layers)
	if err != nil {
		return 0, err
	}
	zn := r.Normalized()
	if !isFinite(real(zn)) || !isFinite(imag(zn)) {
		return 0, fmt.Errorf("model gave a non-finite impedance at %g Hz, lift-off %g m, %g S/m", freqHz, liftoffM, sp.ConductivitySPerM)
	}
	return zn, nil
}

// CalPoint is one instrument reading on a reference condition of known
// value: a conductivity block, bare or under a shim, or the probe in air.
type CalPoint struct {
	Block  string  // reference block identifier ("" for air)
	Shim   string  // shim identifier ("" for bare)
	FreqHz float64 // excitation frequency
	// ReadingV is the instrument reading X + jY in volts.
	ReadingV complex128
	// Specimen is the certified block (σ = 0 for air).
	Specimen Specimen
	// UConductivitySPerM is the standard uncertainty of the certified σ.
	UConductivitySPerM float64
	// ExtraLiftoffM is the certified shim thickness (0 on the bare block)
	// and UExtraLiftoffM its standard uncertainty.
	ExtraLiftoffM  float64
	UExtraLiftoffM float64
}

// Channel is the instrument transform of one frequency: a reading is
// V = Gain·Zn + Offset, with Zn the normalised impedance. Gain holds the
// instrument gain (V per unit Zn) and the phase rotation.
type Channel struct {
	FreqHz float64
	Gain   complex128
	Offset complex128
}

// CalibrationOptions control Calibrate.
type CalibrationOptions struct {
	// Coil is the probe coil, recorded with the calibration.
	Coil Coil
	// LiftoffM is the effective lift-off of the coil above a bare surface
	// (the distance from the winding to the probe face plus wear): fixed,
	// or the starting value when FitLiftoff is set.
	LiftoffM float64
	// FitLiftoff fits the effective lift-off; it needs readings at two or
	// more lift-offs (shims) or enough blocks to fix the curve's shape.
	FitLiftoff bool
	// FitCoilScale fits a common scale factor of the coil dimensions, to
	// absorb the difference between the nominal and the effective coil.
	FitCoilScale bool
	// ReadingNoiseV, if positive, is the standard deviation of each reading
	// component in volts; otherwise it is estimated from the residuals.
	ReadingNoiseV float64
}

// CalResidual is the fit at one calibration reading.
type CalResidual struct {
	Block, Shim       string
	FreqHz            float64
	ConductivitySPerM float64
	ExtraLiftoffM     float64
	ReadingV          complex128
	ModelV            complex128 // Gain·Zn + Offset at the fitted parameters
	Zn                complex128 // model normalised impedance
}

// ResidualV returns ReadingV − ModelV.
func (r CalResidual) ResidualV() complex128 { return r.ReadingV - r.ModelV }

// Calibration is a fitted instrument transform for one probe: a channel per
// frequency, the effective lift-off and coil scale, their covariance, and
// the residuals on the reference readings.
type Calibration struct {
	Coil         Coil      `json:"coil"`
	Channels     []Channel `json:"channels"`
	LiftoffM     float64   `json:"liftoff_m"`
	CoilScale    float64   `json:"coil_scale"`
	FitLiftoff   bool      `json:"fit_liftoff"`
	FitCoilScale bool      `json:"fit_coil_scale"`
	// Params names the fitted parameters in the order of Covariance:
	// "re_gain@F", "im_gain@F", "re_offset@F", "im_offset@F" per channel,
	// then "liftoff_m" and "ln_coil_scale" when fitted.
	Params []string `json:"params"`
	// Covariance is the len(Params)² covariance of the fitted parameters,
	// row-major: the reading noise term s²(JᵀJ)⁻¹ plus the certificate
	// uncertainties of the blocks and shims propagated through the fit.
	Covariance []float64 `json:"covariance"`
	// NoiseV is the standard deviation of a reading component in volts,
	// from the residuals (NoiseEstimated) or as given.
	NoiseV         float64 `json:"noise_v"`
	NoiseEstimated bool    `json:"noise_estimated"`
	// Dof is the number of residual degrees of freedom (readings·2 − parameters).
	Dof       int           `json:"dof"`
	Residuals []CalResidual `json:"residuals"`
	// ConductivityRangeSPerM and ExtraLiftoffRangeM span the references.
	ConductivityRangeSPerM [2]float64 `json:"conductivity_range_s_per_m"`
	ExtraLiftoffRangeM     [2]float64 `json:"extra_liftoff_range_m"`
	Iterations             int        `json:"iterations"`
}

// Channel returns the channel at freqHz (within 1e-9 relative) and whether
// it exists.
func (c *Calibration) Channel(freqHz float64) (Channel, int, bool) {
	for i, ch := range c.Channels {
		if math.Abs(ch.FreqHz-freqHz) <= 1e-9*math.Abs(ch.FreqHz) {
			return ch, i, true
		}
	}
	return Channel{}, -1, false
}

// ErrTooFewReadings is returned when the readings cannot fix the
// parameters asked for.
var ErrTooFewReadings = errors.New("too few distinct reference readings for the parameters to fit")

// Calibrate fits the instrument transform V = g·Zn + c of every frequency,
// and optionally the effective lift-off and the coil scale, to readings on
// references of known conductivity and shim thickness, by nonlinear least
// squares on the real and imaginary parts of V − (g·Zn + c): the transform
// is solved by linear least squares at every trial of the lift-off and
// coil scale, which Levenberg–Marquardt fits (variable projection; see
// lmProblem.solve). An air reading (σ = 0, Zn = 1j) fixes c + j·g whatever
// the lift-off and is worth including. The parameter
// covariance is s²(JᵀJ)⁻¹ with s² = ‖r‖²/(2N − p) (or the given reading
// noise), plus, for each block and shim with a certificate uncertainty u,
// u²·(∂p/∂q)(∂p/∂q)ᵀ with ∂p/∂q = −(JᵀJ)⁻¹Jᵀ ∂r/∂q, the linearised change
// of the fitted parameters with the certified value q.
func Calibrate(m PlanarForward, pts []CalPoint, opt CalibrationOptions) (*Calibration, error) {
	if err := opt.Coil.Validate(); err != nil {
		return nil, err
	}
	if !(opt.LiftoffM > 0) || math.IsInf(opt.LiftoffM, 0) {
		return nil, fmt.Errorf("lift-off %v m: expected a finite positive effective lift-off", opt.LiftoffM)
	}
	if len(pts) == 0 {
		return nil, ErrTooFewReadings
	}
	var freqs []float64
	for i, p := range pts {
		if !(p.FreqHz > 0) || math.IsInf(p.FreqHz, 0) {
			return nil, fmt.Errorf("reading %d (block %q): frequency %v Hz: expected a finite positive value", i+1, p.Block, p.FreqHz)
		}
		if !isFinite(real(p.ReadingV)) || !isFinite(imag(p.ReadingV)) {
			return nil, fmt.Errorf("reading %d (block %q): reading %v V is not finite", i+1, p.Block, p.ReadingV)
		}
		if err := p.Specimen.validate(); err != nil {
			return nil, fmt.Errorf("reading %d (block %q): %w", i+1, p.Block, err)
		}
		if !(p.ExtraLiftoffM >= 0) || math.IsInf(p.ExtraLiftoffM, 0) {
			return nil, fmt.Errorf("reading %d (shim %q): shim thickness %v m: expected a finite value ≥ 0", i+1, p.Shim, p.ExtraLiftoffM)
		}
		if !(p.UConductivitySPerM >= 0) || !(p.UExtraLiftoffM >= 0) {
			return nil, fmt.Errorf("reading %d (block %q): uncertainties must be ≥ 0", i+1, p.Block)
		}
		found := false
		for _, f := range freqs {
			if math.Abs(f-p.FreqHz) <= 1e-9*f {
				found = true
			}
		}
		if !found {
			freqs = append(freqs, p.FreqHz)
		}
	}
	sort.Float64s(freqs)
	cal := &Calibration{Coil: opt.Coil, LiftoffM: opt.LiftoffM, CoilScale: 1, FitLiftoff: opt.FitLiftoff, FitCoilScale: opt.FitCoilScale}
	nch := len(freqs)
	chOf := make([]int, len(pts))
	count := make([]map[[2]float64]bool, nch)
	for i := range count {
		count[i] = map[[2]float64]bool{}
	}
	for i, p := range pts {
		for k, f := range freqs {
			if math.Abs(f-p.FreqHz) <= 1e-9*f {
				chOf[i] = k
			}
		}
		count[chOf[i]][[2]float64{p.Specimen.ConductivitySPerM, p.ExtraLiftoffM}] = true
	}
	for k, c := range count {
		if len(c) < 2 {
			return nil, fmt.Errorf("%w: %g Hz has readings on %d distinct reference condition(s), need at least 2", ErrTooFewReadings, freqs[k], len(c))
		}
	}
	np := 4 * nch
	iH, iS := -1, -1
	if opt.FitLiftoff {
		iH = np
		np++
	}
	if opt.FitCoilScale {
		iS = np
		np++
	}
	mres := 2 * len(pts)
	if mres < np {
		return nil, fmt.Errorf("%w: %d readings give %d equations for %d parameters", ErrTooFewReadings, len(pts), mres, np)
	}

	// zn caches the model at the last (lift-off, scale) pair: the
	// transform parameters do not change it.
	zn := make([]complex128, len(pts))
	lastH, lastS := math.NaN(), math.NaN()
	eval := func(h, s float64) error {
		if h == lastH && s == lastS {
			return nil
		}
		if !(h > 0) || !(s > 0) {
			return fmt.Errorf("lift-off %g m and coil scale %g: expected positive values", h, s)
		}
		for i, p := range pts {
			z, err := NormalizedImpedance(m, p.FreqHz, h+p.ExtraLiftoffM, s, p.Specimen)
			if err != nil {
				lastH = math.NaN()
				return err
			}
			zn[i] = z
		}
		lastH, lastS = h, s
		return nil
	}
	unpack := func(p []float64) (h, s float64) {
		h, s = opt.LiftoffM, 1
		if iH >= 0 {
			h = p[iH]
		}
		if iS >= 0 {
			s = math.Exp(p[iS])
		}
		return h, s
	}
	residual := func(dst, p []float64) error {
		h, s := unpack(p)
		if err := eval(h, s); err != nil {
			return err
		}
		for i, pt := range pts {
			k := chOf[i]
			g := complex(p[4*k], p[4*k+1])
			c := complex(p[4*k+2], p[4*k+3])
			d := g*zn[i] + c - pt.ReadingV
			dst[2*i] = real(d)
			dst[2*i+1] = imag(d)
		}
		return nil
	}

	// linear fills the transform of every channel into p by complex linear
	// least squares V = g·Zn + c at the cached model values.
	linear := func(p []float64) error {
		for k := range freqs {
			var sz, sv complex128
			var n float64
			for i := range pts {
				if chOf[i] == k {
					sz += zn[i]
					sv += pts[i].ReadingV
					n++
				}
			}
			mz, mv := sz/complex(n, 0), sv/complex(n, 0)
			var num complex128
			var den float64
			for i := range pts {
				if chOf[i] == k {
					dz := zn[i] - mz
					num += (pts[i].ReadingV - mv) * complex(real(dz), -imag(dz))
					den += real(dz)*real(dz) + imag(dz)*imag(dz)
				}
			}
			if den == 0 {
				return fmt.Errorf("%w: the references at %g Hz give the same model impedance", ErrTooFewReadings, freqs[k])
			}
			g := num / complex(den, 0)
			c := mv - g*mz
			p[4*k], p[4*k+1], p[4*k+2], p[4*k+3] = real(g), imag(g), real(c), imag(c)
		}
		return nil
	}
	p := make([]float64, np)
	if iH >= 0 {
		p[iH] = opt.LiftoffM
	}
	if err := eval(opt.LiftoffM, 1); err != nil {
		return nil, err
	}
	if err := linear(p); err != nil {
		return nil, err
	}
	step := make([]float64, np)
	rbar := (opt.Coil.InnerRadiusM + opt.Coil.OuterRadiusM) / 2
	for k := range freqs {
		gs := 1e-6 * math.Max(math.Hypot(p[4*k], p[4*k+1]), 1e-9)
		for j := 0; j < 4; j++ {
			step[4*k+j] = gs
		}
	}
	// Central differences with steps of 1e-4 (relative to the coil size):
	// truncation error ~1e-8, and the model's own error (relative 1e-8 or
	// better) enters as ~1e-4 of the derivative.
	if iH >= 0 {
		step[iH] = 1e-4 * rbar
	}
	if iS >= 0 {
		step[iS] = 1e-4
	}
	// The transform enters linearly, so the fit runs on the lift-off and
	// coil scale alone with the transform solved for at every step
	// (variable projection: G. H. Golub and V. Pereyra, SIAM J. Numer.
	// Anal. 10, 413–432 (1973)); the lift-off and the coil scale are nearly
	// interchangeable with the gain, and a joint fit crawls along that
	// valley.
	iter := 0
	nNL := np - 4*nch
	if nNL > 0 {
		full := make([]float64, np)
		projected := func(dst, q []float64) error {
			copy(full[4*nch:], q)
			h, s := unpack(full)
			if err := eval(h, s); err != nil {
				return err
			}
			if err := linear(full); err != nil {
				return err
			}
			return residual(dst, full)
		}
		q0 := append([]float64(nil), p[4*nch:]...)
		prob := &lmProblem{m: mres, residual: projected, step: step[4*nch:], maxIter: 200, tol: 1e-12, central: true}
		res, err := prob.solve(q0)
		if err != nil {
			return nil, fmt.Errorf("calibration fit: %w", err)
		}
		copy(p[4*nch:], res.p)
		iter = res.iter
		h, s := unpack(p)
		if err := eval(h, s); err != nil {
			return nil, err
		}
		if err := linear(p); err != nil {
			return nil, err
		}
	}
	// The Jacobian of all parameters at the solution, for the covariance.
	r := make([]float64, mres)
	if err := residual(r, p); err != nil {
		return nil, err
	}
	full := &lmProblem{m: mres, residual: residual, step: step, central: true}
	res := lmResult{p: p, r: r, jac: make([]float64, mres*np), cost: sumSq(r), iter: iter}
	if err := full.jacobian(res.jac, p, r, make([]float64, 2*mres)); err != nil {
		return nil, err
	}
	cal.Iterations = res.iter
	h, s := unpack(p)
	cal.LiftoffM, cal.CoilScale = h, s
	if err := eval(h, s); err != nil {
		return nil, err
	}
	for k, f := range freqs {
		cal.Channels = append(cal.Channels, Channel{FreqHz: f, Gain: complex(p[4*k], p[4*k+1]), Offset: complex(p[4*k+2], p[4*k+3])})
		cal.Params = append(cal.Params, fmt.Sprintf("re_gain@%g", f), fmt.Sprintf("im_gain@%g", f), fmt.Sprintf("re_offset@%g", f), fmt.Sprintf("im_offset@%g", f))
	}
	if iH >= 0 {
		cal.Params = append(cal.Params, "liftoff_m")
	}
	if iS >= 0 {
		cal.Params = append(cal.Params, "ln_coil_scale")
	}
	cal.Dof = mres - np
	switch {
	case opt.ReadingNoiseV > 0:
		cal.NoiseV = opt.ReadingNoiseV
	case cal.Dof > 0:
		cal.NoiseV = math.Sqrt(res.cost / float64(cal.Dof))
		cal.NoiseEstimated = true
	}
	cmin, cmax := math.Inf(1), math.Inf(-1)
	lmin, lmax := math.Inf(1), math.Inf(-1)
	for i, pt := range pts {
		ch := cal.Channels[chOf[i]]
		cal.Residuals = append(cal.Residuals, CalResidual{
			Block: pt.Block, Shim: pt.Shim, FreqHz: pt.FreqHz,
			ConductivitySPerM: pt.Specimen.ConductivitySPerM, ExtraLiftoffM: pt.ExtraLiftoffM,
			ReadingV: pt.ReadingV, ModelV: ch.Gain*zn[i] + ch.Offset, Zn: zn[i],
		})
		if pt.Specimen.ConductivitySPerM > 0 {
			cmin = math.Min(cmin, pt.Specimen.ConductivitySPerM)
			cmax = math.Max(cmax, pt.Specimen.ConductivitySPerM)
			lmin = math.Min(lmin, pt.ExtraLiftoffM)
			lmax = math.Max(lmax, pt.ExtraLiftoffM)
		}
	}
	if cmin > cmax {
		return nil, fmt.Errorf("%w: no reading on a conducting reference", ErrTooFewReadings)
	}
	cal.ConductivityRangeSPerM = [2]float64{cmin, cmax}
	cal.ExtraLiftoffRangeM = [2]float64{lmin, lmax}

	// Covariance.
	a := make([]float64, np*np)
	gv := make([]float64, np)
	normalEquations(a, gv, res.jac, res.r, mres, np)
	ainv, err := invertSPD(a, np)
	if err != nil {
		return nil, fmt.Errorf("calibration fit: %w", err)
	}
	cov := make([]float64, np*np)
	s2 := cal.NoiseV * cal.NoiseV
	for i := range cov {
		cov[i] = s2 * ainv[i]
	}
	// Certificate uncertainties, grouped by block and by shim.
	type group struct {
		u   float64
		idx []int
	}
	blocks := map[string]*group{}
	shims := map[string]*group{}
	var order []string
	for i, pt := range pts {
		if pt.UConductivitySPerM > 0 {
			key := "b:" + pt.Block + fmt.Sprint(pt.Specimen.ConductivitySPerM)
			if blocks[key] == nil {
				blocks[key] = &group{u: pt.UConductivitySPerM}
				order = append(order, key)
			}
			blocks[key].idx = append(blocks[key].idx, i)
		}
		if pt.UExtraLiftoffM > 0 {
			key := "s:" + pt.Shim + fmt.Sprint(pt.ExtraLiftoffM)
			if shims[key] == nil {
				shims[key] = &group{u: pt.UExtraLiftoffM}
				order = append(order, key)
			}
			shims[key].idx = append(shims[key].idx, i)
		}
	}
	b := make([]float64, mres)
	jtb := make([]float64, np)
	dp := make([]float64, np)
	for _, key := range order {
		gr, isBlock := blocks[key]
		if !isBlock {
			gr = shims[key]
		}
		for i := range b {
			b[i] = 0
		}
		for _, i := range gr.idx {
			pt := pts[i]
			ch := cal.Channels[chOf[i]]
			var z1 complex128
			var dq float64
			if isBlock {
				dq = 1e-6 * pt.Specimen.ConductivitySPerM
				sp := pt.Specimen
				sp.ConductivitySPerM += dq
				z1, err = NormalizedImpedance(m, pt.FreqHz, h+pt.ExtraLiftoffM, s, sp)
			} else {
				dq = 1e-5 * rbar
				z1, err = NormalizedImpedance(m, pt.FreqHz, h+pt.ExtraLiftoffM+dq, s, pt.Specimen)
			}
			if err != nil {
				return nil, err
			}
			d := ch.Gain * (z1 - zn[i]) / complex(dq, 0)
			b[2*i], b[2*i+1] = real(d), imag(d)
		}
		for j := 0; j < np; j++ {
			jtb[j] = 0
			for i := 0; i < mres; i++ {
				jtb[j] += res.jac[i*np+j] * b[i]
			}
		}
		for i := 0; i < np; i++ {
			dp[i] = 0
			for j := 0; j < np; j++ {
				dp[i] -= ainv[i*np+j] * jtb[j]
			}
		}
		u2 := gr.u * gr.u
		for i := 0; i < np; i++ {
			for j := 0; j < np; j++ {
				cov[i*np+j] += u2 * dp[i] * dp[j]
			}
		}
	}
	cal.Covariance = cov
	return cal, nil
}

// complexJSON is the JSON form of a complex number.
type complexJSON struct {
	Re float64 `json:"re"`
	Im float64 `json:"im"`
}

func toJSON(z complex128) complexJSON     { return complexJSON{real(z), imag(z)} }
func (c complexJSON) complex() complex128 { return complex(c.Re, c.Im) }

type channelJSON struct {
	FreqHz  float64     `json:"freq_hz"`
	GainV   complexJSON `json:"gain_v"`
	OffsetV complexJSON `json:"offset_v"`
}

// MarshalJSON writes the channel as {"freq_hz", "gain_v": {"re","im"},
// "offset_v": {"re","im"}}.
func (ch Channel) MarshalJSON() ([]byte, error) {
	return json.Marshal(channelJSON{ch.FreqHz, toJSON(ch.Gain), toJSON(ch.Offset)})
}

// UnmarshalJSON reads the form written by MarshalJSON.
func (ch *Channel) UnmarshalJSON(b []byte) error {
	var c channelJSON
	if err := json.Unmarshal(b, &c); err != nil {
		return err
	}
	*ch = Channel{FreqHz: c.FreqHz, Gain: c.GainV.complex(), Offset: c.OffsetV.complex()}
	return nil
}

type calResidualJSON struct {
	Block             string      `json:"block,omitempty"`
	Shim              string      `json:"shim,omitempty"`
	FreqHz            float64     `json:"freq_hz"`
	ConductivitySPerM float64     `json:"conductivity_s_per_m"`
	ExtraLiftoffM     float64     `json:"extra_liftoff_m"`
	ReadingV          complexJSON `json:"reading_v"`
	ModelV            complexJSON `json:"model_v"`
	Zn                complexJSON `json:"normalized"`
	ResidualV         complexJSON `json:"residual_v"`
}

// MarshalJSON writes the residual with complex values as {"re","im"}.
func (r CalResidual) MarshalJSON() ([]byte, error) {
	return json.Marshal(calResidualJSON{r.Block, r.Shim, r.FreqHz, r.ConductivitySPerM, r.ExtraLiftoffM,
		toJSON(r.ReadingV), toJSON(r.ModelV), toJSON(r.Zn), toJSON(r.ResidualV())})
}

// UnmarshalJSON reads the form written by MarshalJSON.
func (r *CalResidual) UnmarshalJSON(b []byte) error {
	var c calResidualJSON
	if err := json.Unmarshal(b, &c); err != nil {
		return err
	}
	*r = CalResidual{Block: c.Block, Shim: c.Shim, FreqHz: c.FreqHz, ConductivitySPerM: c.ConductivitySPerM,
		ExtraLiftoffM: c.ExtraLiftoffM, ReadingV: c.ReadingV.complex(), ModelV: c.ModelV.complex(), Zn: c.Zn.complex()}
	return nil
}
