package impedance

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
)

// Planar is an air-cored coil with its axis normal to a layered planar
// conductor: Dodd & Deeds, "Analytical solutions to eddy-current probe-coil
// problems", J. Appl. Phys. 39(6), 2829–2838 (1968), extended to any number
// of layers by the reflection-coefficient recursion of MODEL.md §1.4(c).
type Planar struct {
	Coil Coil
	// LiftoffM is the gap between the bottom of the winding and the
	// conductor surface (z1), in metres, ≥ 0.
	LiftoffM float64
	// Layers are the conductor layers, top first. The last may be a
	// half-space (ThicknessM = +Inf); otherwise air lies below the stack.
	// An empty stack is air: ΔZ = 0.
	Layers []Layer
}

// ErrBadFrequency is returned (wrapped) for a frequency that is not finite
// and positive.
var ErrBadFrequency = errors.New("frequency must be finite and positive")

// Validate reports an impossible coil, lift-off or layer stack.
func (p Planar) Validate() error {
	if err := p.Coil.Validate(); err != nil {
		return err
	}
	if err := validateLiftoff(p.LiftoffM); err != nil {
		return err
	}
	return validateLayers(p.Layers)
}

func validateLiftoff(z float64) error {
	if !(z >= 0) || math.IsInf(z, 0) {
		return fmt.Errorf("lift-off %v m: expected a finite value ≥ 0", z)
	}
	return nil
}

func validateFreq(freqHz float64) error {
	if !(freqHz > 0) || math.IsInf(freqHz, 0) {
		return fmt.Errorf("frequency %v Hz: %w", freqHz, ErrBadFrequency)
	}
	return nil
}

// validateLayers checks each layer: positive thickness (+Inf only for the
// last), finite conductivity ≥ 0 and relative permeability ≥ 1 (0 = 1).
func validateLayers(ls []Layer) error {
	for i, l := range ls {
		switch {
		case math.IsInf(l.ThicknessM, 1) && i != len(ls)-1:
			return fmt.Errorf("layer %d: a half-space (infinite thickness) must be the last layer", i+1)
		case !(l.ThicknessM > 0):
			return fmt.Errorf("layer %d: thickness %v m: expected a positive value or +Inf", i+1, l.ThicknessM)
		case !(l.ConductivitySPerM >= 0) || math.IsInf(l.ConductivitySPerM, 0):
			return fmt.Errorf("layer %d: conductivity %v S/m: expected a finite value ≥ 0", i+1, l.ConductivitySPerM)
		case l.RelPermeability != 0 && (!(l.RelPermeability >= 1) || math.IsInf(l.RelPermeability, 0)):
			return fmt.Errorf("layer %d: relative permeability %v: expected a finite value ≥ 1", i+1, l.RelPermeability)
		}
	}
	return nil
}

// Impedance returns Z0 and ΔZ of the coil at freqHz, to a relative accuracy
// of about 1e-8. For many evaluations with one coil build a PlanarModel
// once instead: it caches everything that depends on the coil only.
func (p Planar) Impedance(freqHz float64) (Result, error) {
	if err := p.Validate(); err != nil {
		return Result{}, err
	}
	m, err := NewPlanarModel(p.Coil, 1e-8)
	if err != nil {
		return Result{}, err
	}
	return m.Impedance(freqHz, p.LiftoffM, p.Layers)
}

// PlanarModel evaluates the Dodd–Deeds planar model for one coil at any
// frequency, lift-off and layer stack. It caches the quadrature nodes, the
// coil integral χ²(α) and L0. It is safe for concurrent use.
//
// The impedance change is (Dodd & Deeds 1968; MODEL.md §1.3–1.4)
//
//	ΔZ = K ∫0^∞ χ²(α)/α⁶ · e^{−2αz1}(1 − e^{−αl})² · φ(α) dα,
//	K  = jωπμ0N²/(l²(r2−r1)²),
//
// with χ the coil integral (quad_coil.go) and φ the layered reflection
// coefficient. The integral is summed over 21-point Gauss–Kronrod panels
// of width π/r2 (one period of the fastest oscillation of χ², cos 2αr2),
// graded geometrically towards α = 0, and stopped where the remainder
// bound falls below the tolerance; the smooth mean of χ² beyond the last
// panel, α(r1+r2)/π (MODEL.md §1.5), is integrated with 12-point
// Gauss–Legendre after the substitution u = 1/α.
type PlanarModel struct {
	coil   Coil
	relTol float64

	alpha  []float64 // nodes, increasing
	gK     []float64 // Kronrod weight × χ²(1−e^{−αl})²/α⁶
	gD     []float64 // (Kronrod − Gauss) weight × the same
	panel  []int     // panel[p] = index of the first node after panel p
	panelA []float64 // α at the end of panel p
	nGrade int       // number of graded panels near α = 0

	oscSum  float64 // Σ c_j/ω_j of the oscillating part of χ²/α (see tailOsc)
	meanCof float64 // (r1+r2)/π: mean of χ²/α at large α
	scale   float64 // πμ0N²/(l²(r2−r1)²) in H/m⁵

	l0H   float64
	l0Err float64
}

// Grading and truncation parameters of the wavenumber quadrature.
const (
	gradeLevels  = 7    // graded panels [0, h/2^7], [h/2^7, h/2^6], …, [h/2, h] (see panelEdges)
	maxPanelsAr2 = 6000 // cap on α_max·r2 (nodes ≈ 6.7 per unit)
)

// NewPlanarModel builds the model for coil c. relTol (e.g. 1e-8) is the
// relative accuracy aimed at for L0 and ΔZ; values outside [1e-13, 1e-2]
// are clamped.
func NewPlanarModel(c Coil, relTol float64) (*PlanarModel, error) {
	if err := c.Validate(); err != nil {
		return nil, err
	}
	if !(relTol >= 1e-13) {
		relTol = 1e-13
	}
	if relTol > 1e-2 {
		relTol = 1e-2
	}
	r1, r2, l := c.InnerRadiusM, c.OuterRadiusM, c.LengthM
	m := &PlanarModel{coil: c, relTol: relTol}
	m.scale = math.Pi * mu0 * c.Turns * c.Turns / (l * l * (r2 - r1) * (r2 - r1))
	m.meanCof = (r1 + r2) / math.Pi
	m.oscSum = oscillationSum(r1, r2)

	// Panels (panelEdges): graded near 0, then of width h = π/r2, out to
	// the α where the L0 remainder bound (the slowest-decaying integrand)
	// is below relTol/10, or the cap. Nodes are added panel by panel with
	// L0 = scale ∫ χ²/α⁶ · 2(αl + expm1(−αl)) dα (MODEL.md §1.3).
	h := math.Pi / r2
	m.nGrade = gradeLevels + 1
	np := int(math.Ceil(float64(maxPanelsAr2)/math.Pi)) + m.nGrade
	f1 := fAccumulator{r: r1}
	f2 := fAccumulator{r: r2}
	var sL, eL float64
	for p := 0; p < np; p++ {
		a, b := panelEdges(p, h)
		cm, hw := 0.5*(a+b), 0.5*(b-a)
		var pk, pd float64
		for i, x := range gk21.x {
			al := cm + hw*x
			chi := f2.next(al) - f1.next(al)
			x2 := chi * chi / pow6(al)
			em := -math.Expm1(-al * l) // 1 − e^{−αl}
			wk, wd := hw*gk21.wK[i], hw*(gk21.wK[i]-gk21.wG[i])
			m.alpha = append(m.alpha, al)
			m.gK = append(m.gK, wk*x2*em*em)
			m.gD = append(m.gD, wd*x2*em*em)
			zf := 2 * (al*l - em)
			pk += wk * x2 * zf
			pd += wd * x2 * zf
		}
		m.panel = append(m.panel, len(m.alpha))
		m.panelA = append(m.panelA, b)
		sL += pk
		eL += math.Abs(pd)
		if p > m.nGrade+2 {
			hA := 2 * (b*l - (-math.Expm1(-b * l))) / pow6(b)
			if b*hA*m.oscSum <= 0.1*relTol*sL {
				break
			}
		}
	}
	A := m.panelA[len(m.panelA)-1]
	tail := 0.0
	forTail(A, func(a, w float64) {
		em := -math.Expm1(-a * l)
		tail += w * m.meanCof * a * 2 * (a*l - em) / pow6(a)
	})
	sL += tail
	hA := 2 * (A*l - (-math.Expm1(-A * l))) / pow6(A)
	eL += A * hA * m.oscSum
	m.l0H = m.scale * sL
	m.l0Err = eL / sL
	return m, nil
}

// oscillationSum returns Σ c_j/ω_j for the oscillating terms of χ²(α)/α at
// large α. From F(x) ≈ 1 − xJ0(x) and xJ0(x) ≈ √(2x/π) cos(x − π/4),
// χ² = (2/π)α[r2 cos²(αr2−π/4) + r1 cos²(αr1−π/4) − 2√(r1r2) cos cos],
// whose oscillating parts have amplitudes r2/π, r1/π, 2√(r1r2)/π at
// frequencies 2r2, 2r1, r2−r1 and r1+r2. ∫_A^∞ α c cos(ωα) h(α) dα is
// bounded by about A h(A) c/ω for a smooth decreasing h.
func oscillationSum(r1, r2 float64) float64 {
	s := 0.5 // r2/π / 2r2 · π
	if r1 > 0 {
		s += 0.5 + 2*math.Sqrt(r1*r2)*(1/(r2-r1)+1/(r1+r2))
	}
	return s / math.Pi
}

// forTail calls f(α, w) for the 12-point Gauss–Legendre rule on u ∈ [0,
// 1/A] after the substitution α = 1/u, dα = du/u², so that Σ w f(α) ≈
// ∫_A^∞ f(α) dα for integrands decaying like a power of α.
func forTail(A float64, f func(a, w float64)) {
	hu := 0.5 / A
	for i, x := range gl12x {
		u := hu * (1 + x)
		f(1/u, hu*gl12w[i]/(u*u))
	}
}

func pow6(a float64) float64 {
	a2 := a * a
	return a2 * a2 * a2
}

// Coil returns the coil the model was built for.
func (m *PlanarModel) Coil() Coil { return m.coil }

// L0H returns the inductance of the coil in air, in henries
// (Dodd & Deeds 1968; MODEL.md §1.3).
func (m *PlanarModel) L0H() float64 { return m.l0H }

// L0ErrorEstimate returns the estimated relative error of L0H.
func (m *PlanarModel) L0ErrorEstimate() float64 { return m.l0Err }

// Impedance returns Z0 = jωL0 and ΔZ for the coil at lift-off liftoffM
// above the layer stack (top first; see Planar.Layers) at freqHz. The
// error estimate is the sum over panels of |Kronrod − Gauss| plus the
// bound of the neglected oscillating tail, relative to |ΔZ|.
func (m *PlanarModel) Impedance(freqHz, liftoffM float64, layers []Layer) (Result, error) {
	if err := validateFreq(freqHz); err != nil {
		return Result{}, err
	}
	if err := validateLiftoff(liftoffM); err != nil {
		return Result{}, err
	}
	if err := validateLayers(layers); err != nil {
		return Result{}, err
	}
	omega := 2 * math.Pi * freqHz
	res := Result{FreqHz: freqHz, L0H: m.l0H, Z0Ohm: complex(0, omega*m.l0H)}
	if len(layers) == 0 {
		return res, nil
	}
	var st stackBuf
	s := st.prepare(layers, omega)
	sum, errSum := m.integrate(liftoffM, func(a float64) complex128 { return s.reflection(a) })
	k := complex(0, omega*m.scale)
	res.DZOhm = k * sum
	if mag := cmplx.Abs(sum); mag > 0 {
		res.ErrorEstimate = errSum / mag
	}
	return res, nil
}

// integrate returns ∫ χ²/α⁶ e^{−2αz1}(1−e^{−αl})² φ(α) dα and its absolute
// error estimate.
func (m *PlanarModel) integrate(z1 float64, phi func(float64) complex128) (complex128, float64) {
	var sum complex128
	var errSum float64
	np := len(m.panel)
	lo := 0
	last := np - 1
	for p := 0; p < np; p++ {
		var pk, pd complex128
		for i := lo; i < m.panel[p]; i++ {
			a := m.alpha[i]
			f := phi(a)
			if z1 > 0 {
				f *= complex(math.Exp(-2*a*z1), 0)
			}
			pk += complex(m.gK[i], 0) * f
			pd += complex(m.gD[i], 0) * f
		}
		lo = m.panel[p]
		sum += pk
		errSum += cmplx.Abs(pd)
		if p > m.nGrade+2 {
			if m.tailOsc(m.panelA[p], z1, phi) <= 0.1*m.relTol*cmplx.Abs(sum) {
				last = p
				break
			}
		}
	}
	A := m.panelA[last]
	l := m.coil.LengthM
	var tail complex128
	forTail(A, func(a, w float64) {
		em := -math.Expm1(-a * l)
		g := m.meanCof * a * em * em / pow6(a)
		if z1 > 0 {
			g *= math.Exp(-2 * a * z1)
		}
		tail += complex(w*g, 0) * phi(a)
	})
	sum += tail
	errSum += m.tailOsc(A, z1, phi)
	return sum, errSum
}

// tailOsc bounds the oscillating remainder beyond A (see oscillationSum).
func (m *PlanarModel) tailOsc(A, z1 float64, phi func(float64) complex128) float64 {
	em := -math.Expm1(-A * m.coil.LengthM)
	return A * math.Exp(-2*A*z1) * em * em / pow6(A) * cmplx.Abs(phi(A)) * m.oscSum
}
