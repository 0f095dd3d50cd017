package impedance

import (
	"errors"
	"fmt"
	"math"
	"strings"
)

// Unknown is a set of specimen quantities an inversion solves for.
type Unknown uint8

// Quantities an inversion can solve for; combine them with |.
const (
	SolveConductivity Unknown = 1 << iota // σ of the specimen
	SolveLiftoff                          // extra lift-off (coating) above the calibration lift-off
	SolveThickness                        // plate or wall thickness
)

// Count returns the number of quantities in the set.
func (u Unknown) Count() int {
	n := 0
	for b := Unknown(1); b <= SolveThickness; b <<= 1 {
		if u&b != 0 {
			n++
		}
	}
	return n
}

// String lists the quantities, for example "conductivity+liftoff".
func (u Unknown) String() string {
	var s []string
	if u&SolveConductivity != 0 {
		s = append(s, "conductivity")
	}
	if u&SolveLiftoff != 0 {
		s = append(s, "liftoff")
	}
	if u&SolveThickness != 0 {
		s = append(s, "thickness")
	}
	return strings.Join(s, "+")
}

// Reading is one instrument reading X + jY in volts at a frequency.
type Reading struct {
	FreqHz float64
	V      complex128
}

// InvertOptions choose what Invert solves for, and give the fixed values
// and starting values of the other quantities.
type InvertOptions struct {
	// Solve is the set of unknowns; zero means
	// SolveConductivity|SolveLiftoff.
	Solve Unknown
	// Specimen holds the fixed (or starting) conductivity, permeability and
	// thickness. A zero conductivity being solved for starts from the
	// nearest reference.
	Specimen Specimen
	// ExtraLiftoffM is the fixed (or starting) lift-off above the
	// calibration lift-off, for example a known coating.
	ExtraLiftoffM float64
}

// Inversion is the specimen found from a reading, with standard (1σ)
// uncertainties. Quantities not solved for hold their fixed values and a
// zero uncertainty.
type Inversion struct {
	Solve              Unknown `json:"-"`
	ConductivitySPerM  float64 `json:"conductivity_s_per_m"`
	UConductivitySPerM float64 `json:"u_conductivity_s_per_m"`
	ExtraLiftoffM      float64 `json:"liftoff_m"`
	UExtraLiftoffM     float64 `json:"u_liftoff_m"`
	ThicknessM         float64 `json:"thickness_m"`
	UThicknessM        float64 `json:"u_thickness_m"`
	// MisfitV is the root-mean-square residual of the reading components
	// in volts; compare it with the calibration's NoiseV when there are
	// more readings than unknowns.
	MisfitV    float64 `json:"misfit_v"`
	Iterations int     `json:"iterations"`
	// Correlation is the correlation coefficient between the first two
	// unknowns (0 with one unknown).
	Correlation float64 `json:"correlation"`
}

// Invert finds the specimen quantities opt.Solve that reproduce the
// readings through the calibration: it minimises Σ|V − (g·Zn(q) + c)|²
// over the unknowns q (natural logarithms of conductivity and thickness,
// and the extra lift-off) by Levenberg–Marquardt (see lmProblem.solve).
// Each reading must be at a calibrated frequency; with several
// frequencies the inversion is a multi-frequency least-squares fit.
//
// Uncertainty (first-order propagation, JCGM 100:2008 §5.1 method applied
// to the least-squares estimate): with J the Jacobian of the modelled
// readings with respect to the unknowns and Jp that with respect to the
// calibration parameters p of covariance Cp,
//
//	Cov(q) = s²(JᵀJ)⁻¹ + A Cp Aᵀ,   A = −(JᵀJ)⁻¹JᵀJp,
//
// where s is the calibration's reading noise NoiseV: the first term is the
// noise of this reading, the second the uncertainty of the calibration
// (including the certificate uncertainties it carries). Model error is
// not included.
func (c *Calibration) Invert(m PlanarForward, readings []Reading, opt InvertOptions) (Inversion, error) {
	solve := opt.Solve
	if solve == 0 {
		solve = SolveConductivity | SolveLiftoff
	}
	n := solve.Count()
	if len(readings) == 0 {
		return Inversion{}, fmt.Errorf("no readings to invert")
	}
	if 2*len(readings) < n {
		return Inversion{}, fmt.Errorf("%w: %d reading(s) for %d unknowns (%v)", ErrTooFewReadings, len(readings), n, solve)
	}
	if err := opt.Specimen.validate(); err != nil {
		return Inversion{}, err
	}
	if !isFinite(opt.ExtraLiftoffM) {
		return Inversion{}, fmt.Errorf("lift-off %v m: expected a finite value", opt.ExtraLiftoffM)
	}
	chIdx := make([]int, len(readings))
	for i, r := range readings {
		if !isFinite(real(r.V)) || !isFinite(imag(r.V)) {
			return Inversion{}, fmt.Errorf("reading %d at %g Hz: %v V is not finite", i+1, r.FreqHz, r.V)
		}
		_, k, ok := c.Channel(r.FreqHz)
		if !ok {
			return Inversion{}, fmt.Errorf("reading %d: %g Hz is not a calibrated frequency (calibrated: %s)", i+1, r.FreqHz, c.freqList())
		}
		chIdx[i] = k
	}
	sp := opt.Specimen
	if sp.ThicknessM == 0 {
		sp.ThicknessM = math.Inf(1)
	}
	if solve&SolveThickness != 0 && math.IsInf(sp.ThicknessM, 0) {
		return Inversion{}, fmt.Errorf("solving for thickness needs a finite starting thickness")
	}
	if solve&SolveConductivity == 0 && !(sp.ConductivitySPerM > 0) {
		return Inversion{}, fmt.Errorf("a fixed conductivity must be positive")
	}
	liftStart := opt.ExtraLiftoffM
	// A second start (the nearest reference itself) is tried when the
	// first fails.
	var retry []float64
	if solve&SolveConductivity != 0 && !(sp.ConductivitySPerM > 0) {
		s0, l0, sN, lN := c.startFromReferences(readings[0])
		sp.ConductivitySPerM = s0
		if solve&SolveLiftoff != 0 && liftStart == 0 && solve&SolveThickness == 0 {
			liftStart = l0
			if s0 != sN || l0 != lN {
				retry = []float64{sN, lN}
			}
		}
	}
	// Parameter layout: [ln σ] [ℓ] [ln t].
	iC, iL, iT := -1, -1, -1
	x0 := make([]float64, 0, 3)
	step := make([]float64, 0, 3)
	rbar := (c.Coil.InnerRadiusM + c.Coil.OuterRadiusM) / 2 * c.CoilScale
	if solve&SolveConductivity != 0 {
		iC = len(x0)
		x0 = append(x0, math.Log(sp.ConductivitySPerM))
		step = append(step, 1e-6)
	}
	if solve&SolveLiftoff != 0 {
		iL = len(x0)
		x0 = append(x0, liftStart)
		step = append(step, 1e-5*rbar)
	}
	if solve&SolveThickness != 0 {
		iT = len(x0)
		x0 = append(x0, math.Log(sp.ThicknessM))
		step = append(step, 1e-6)
	}
	specimenAt := func(x []float64) (Specimen, float64) {
		s, l := sp, opt.ExtraLiftoffM
		if iC >= 0 {
			s.ConductivitySPerM = math.Exp(x[iC])
		}
		if iL >= 0 {
			l = x[iL]
		}
		if iT >= 0 {
			s.ThicknessM = math.Exp(x[iT])
		}
		return s, l
	}
	zn := make([]complex128, len(readings))
	residual := func(dst, x []float64) error {
		s, l := specimenAt(x)
		h := c.LiftoffM + l
		if !(h > 0) {
			return fmt.Errorf("probe would be below the surface")
		}
		for i, r := range readings {
			ch := c.Channels[chIdx[i]]
			z, err := NormalizedImpedance(m, r.FreqHz, h, c.CoilScale, s)
			if err != nil {
				return err
			}
			zn[i] = z
			d := ch.Gain*z + ch.Offset - r.V
			dst[2*i], dst[2*i+1] = real(d), imag(d)
		}
		return nil
	}
	mres := 2 * len(readings)
	prob := &lmProblem{m: mres, residual: residual, step: step, maxIter: 100, tol: 1e-14}
	res, err := prob.solve(x0)
	if err != nil && retry != nil {
		x0[iC], x0[iL] = math.Log(retry[0]), retry[1]
		res, err = prob.solve(x0)
	}
	if err != nil {
		return Inversion{}, explainSingular(fmt.Errorf("inversion: %w", err), solve)
	}
	s, l := specimenAt(res.p)
	inv := Inversion{
		Solve: solve, ConductivitySPerM: s.ConductivitySPerM, ExtraLiftoffM: l, ThicknessM: s.ThicknessM,
		MisfitV: math.Sqrt(res.cost / float64(mres)), Iterations: res.iter,
	}
	// The model values at the solution, from its residuals:
	// Zn = (r + V − c)/g, without another model evaluation.
	for i, r := range readings {
		ch := c.Channels[chIdx[i]]
		zn[i] = (complex(res.r[2*i], res.r[2*i+1]) + r.V - ch.Offset) / ch.Gain
	}
	cov, err := c.inversionCovariance(m, readings, chIdx, zn, res.jac, n, iL, s, l)
	if err != nil {
		return Inversion{}, explainSingular(err, solve)
	}
	if iC >= 0 {
		inv.UConductivitySPerM = inv.ConductivitySPerM * math.Sqrt(cov[iC*n+iC])
	}
	if iL >= 0 {
		inv.UExtraLiftoffM = math.Sqrt(cov[iL*n+iL])
	}
	if iT >= 0 {
		inv.UThicknessM = inv.ThicknessM * math.Sqrt(cov[iT*n+iT])
	}
	if n >= 2 && cov[0] > 0 && cov[n+1] > 0 {
		inv.Correlation = cov[1] / math.Sqrt(cov[0]*cov[n+1])
	}
	return inv, nil
}

// inversionCovariance returns the n × n covariance of the unknowns (see
// Invert) from the Jacobian jac (2R × n) at the solution.
func (c *Calibration) inversionCovariance(m PlanarForward, readings []Reading, chIdx []int, zn []complex128, jac []float64, n, iL int, s Specimen, l float64) ([]float64, error) {
	mres := 2 * len(readings)
	a := make([]float64, n*n)
	g := make([]float64, n)
	zero := make([]float64, mres)
	normalEquations(a, g, jac, zero, mres, n)
	ainv, err := invertSPD(a, n)
	if err != nil {
		return nil, fmt.Errorf("inversion: %w", err)
	}
	cov := make([]float64, n*n)
	s2 := c.NoiseV * c.NoiseV
	for i := range cov {
		cov[i] = s2 * ainv[i]
	}
	np := len(c.Params)
	if np == 0 || len(c.Covariance) != np*np {
		return cov, nil
	}
	// Jp: derivatives of the modelled readings with respect to the
	// calibration parameters.
	jp := make([]float64, mres*np)
	h := c.LiftoffM + l
	rbar := (c.Coil.InnerRadiusM + c.Coil.OuterRadiusM) / 2 * c.CoilScale
	for i, r := range readings {
		k := chIdx[i]
		z := zn[i]
		set := func(col int, d complex128) {
			jp[(2*i)*np+col] = real(d)
			jp[(2*i+1)*np+col] = imag(d)
		}
		set(4*k, z)
		set(4*k+1, 1i*z)
		set(4*k+2, 1)
		set(4*k+3, 1i)
		col := 4 * len(c.Channels)
		gain := c.Channels[k].Gain
		if c.FitLiftoff {
			var d complex128
			if iL >= 0 {
				d = complex(jac[(2*i)*n+iL], jac[(2*i+1)*n+iL])
			} else {
				dh := 1e-5 * rbar
				z1, err := NormalizedImpedance(m, r.FreqHz, h+dh, c.CoilScale, s)
				if err != nil {
					return nil, err
				}
				d = gain * (z1 - z) / complex(dh, 0)
			}
			set(col, d)
			col++
		}
		if c.FitCoilScale {
			const ds = 1e-5
			z1, err := NormalizedImpedance(m, r.FreqHz, h, c.CoilScale*math.Exp(ds), s)
			if err != nil {
				return nil, err
			}
			set(col, gain*(z1-z)/ds)
		}
	}
	// A = −(JᵀJ)⁻¹ Jᵀ Jp  (n × np).
	jtjp := make([]float64, n*np)
	for i := 0; i < n; i++ {
		for j := 0; j < np; j++ {
			sum := 0.0
			for r := 0; r < mres; r++ {
				sum += jac[r*n+i] * jp[r*np+j]
			}
			jtjp[i*np+j] = sum
		}
	}
	am := make([]float64, n*np)
	for i := 0; i < n; i++ {
		for j := 0; j < np; j++ {
			sum := 0.0
			for k := 0; k < n; k++ {
				sum -= ainv[i*n+k] * jtjp[k*np+j]
			}
			am[i*np+j] = sum
		}
	}
	// cov += A Cp Aᵀ.
	acp := make([]float64, n*np)
	for i := 0; i < n; i++ {
		for j := 0; j < np; j++ {
			sum := 0.0
			for k := 0; k < np; k++ {
				sum += am[i*np+k] * c.Covariance[k*np+j]
			}
			acp[i*np+j] = sum
		}
	}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			sum := 0.0
			for k := 0; k < np; k++ {
				sum += acp[i*np+k] * am[j*np+k]
			}
			cov[i*n+j] += sum
		}
	}
	return cov, nil
}

// startFromReferences returns starting values of conductivity and extra
// lift-off for a reading, from the calibration references at its frequency
// and without model evaluations: the nearest reference, moved by one
// Newton step on the impedance plane whose derivatives are the differences
// to the nearest references of another conductivity at the same lift-off
// and of another lift-off at the same conductivity. The step is skipped
// when those neighbours are missing or it leaves the span of the
// references.
func (c *Calibration) startFromReferences(r Reading) (sigma, liftoff, sigmaNear, liftoffNear float64) {
	refs := c.Residuals
	use := func(ref *CalResidual) bool {
		return ref.ConductivitySPerM > 0 && math.Abs(ref.FreqHz-r.FreqHz) <= 1e-9*r.FreqHz
	}
	best := -1
	for i := range refs {
		if use(&refs[i]) && (best < 0 || cmplxAbs(refs[i].ModelV-r.V) < cmplxAbs(refs[best].ModelV-r.V)) {
			best = i
		}
	}
	if best < 0 {
		s := math.Sqrt(c.ConductivityRangeSPerM[0] * c.ConductivityRangeSPerM[1])
		return s, 0, s, 0
	}
	r0 := &refs[best]
	sigma, liftoff = r0.ConductivitySPerM, r0.ExtraLiftoffM
	sigmaNear, liftoffNear = sigma, liftoff
	n1, n2 := -1, -1
	for i := range refs {
		ref := &refs[i]
		if !use(ref) {
			continue
		}
		switch {
		case ref.ExtraLiftoffM == r0.ExtraLiftoffM && ref.ConductivitySPerM != r0.ConductivitySPerM:
			if n1 < 0 || cmplxAbs(ref.ModelV-r0.ModelV) < cmplxAbs(refs[n1].ModelV-r0.ModelV) {
				n1 = i
			}
		case ref.ConductivitySPerM == r0.ConductivitySPerM && ref.ExtraLiftoffM != r0.ExtraLiftoffM:
			if n2 < 0 || cmplxAbs(ref.ModelV-r0.ModelV) < cmplxAbs(refs[n2].ModelV-r0.ModelV) {
				n2 = i
			}
		}
	}
	if n1 < 0 || n2 < 0 {
		return sigma, liftoff, sigmaNear, liftoffNear
	}
	// Columns: dV/d(ln σ) and dV/dℓ by differences; solve the 2×2 real
	// system a·x = V − V0.
	ds := math.Log(refs[n1].ConductivitySPerM / sigma)
	dl := refs[n2].ExtraLiftoffM - liftoff
	a := (refs[n1].ModelV - r0.ModelV) / complex(ds, 0)
	b := (refs[n2].ModelV - r0.ModelV) / complex(dl, 0)
	d := r.V - r0.ModelV
	det := real(a)*imag(b) - imag(a)*real(b)
	if det == 0 {
		return sigma, liftoff, sigmaNear, liftoffNear
	}
	x := (real(d)*imag(b) - imag(d)*real(b)) / det
	y := (real(a)*imag(d) - imag(a)*real(d)) / det
	s1, l1 := sigma*math.Exp(x), liftoff+y
	lo, hi := c.ConductivityRangeSPerM[0], c.ConductivityRangeSPerM[1]
	llo, lhi := c.ExtraLiftoffRangeM[0], c.ExtraLiftoffRangeM[1]
	if s1 < lo/2 || s1 > 2*hi || l1 < llo-(lhi-llo) || l1 < -c.LiftoffM/2 || l1 > 2*lhi+1e-4 || math.IsNaN(s1+l1) {
		return sigma, liftoff, sigmaNear, liftoffNear
	}
	return s1, l1, sigmaNear, liftoffNear
}

func (c *Calibration) freqList() string {
	var s []string
	for _, ch := range c.Channels {
		s = append(s, fmt.Sprintf("%g Hz", ch.FreqHz))
	}
	return strings.Join(s, ", ")
}

func cmplxAbs(z complex128) float64 { return math.Hypot(real(z), imag(z)) }

// explainSingular adds the likely reason to a singular inversion that
// solves for thickness.
func explainSingular(err error, solve Unknown) error {
	if errors.Is(err, errSingular) && solve&SolveThickness != 0 {
		return fmt.Errorf("%w: the thickness cannot be resolved (a plate more than about three standard depths thick at the lowest frequency looks like a half-space)", err)
	}
	return err
}
