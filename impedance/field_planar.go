package impedance

import (
	"fmt"
	"math"
	"math/cmplx"
)

// CurrentDensity returns the eddy-current density J_φ (A/m² per ampere of
// coil current, same phase reference as the current, time dependence
// e^{+jωt}) at radius radiusM from the coil axis and at each depth of
// depthsM below the top surface of the stack (0 = surface). Depths inside
// a non-conducting layer or below a finite stack give 0.
//
// The vector potential in layer i, at depth s below its top, is the
// transmitted part of the Dodd & Deeds (1968) solution (MODEL.md §1.4
// recursion; derived here by matching A and (1/μ)∂A/∂z at each interface):
//
//	A = μ0N/(2l(r2−r1)) ∫ χ(α)/α³ e^{−αz1}(1−e^{−αl}) J1(αr) B_i [e^{−α_i s} + Γ_{i+1} e^{−α_i(2c_i − s)}] dα,
//	B_1 = (1+φ)/(1+Γ_2E_1),  B_{i+1}(1+Γ_{i+2}E_{i+1}) = B_i e^{−α_i c_i}(1+Γ_{i+1}),
//
// with only decaying exponentials, and J = −jωσ_i A. It panics if depthsM
// is nil.
func (p Planar) CurrentDensity(freqHz float64, depthsM []float64, radiusM float64) ([]complex128, error) {
	if depthsM == nil {
		panic("impedance: CurrentDensity with nil depths")
	}
	if err := p.Validate(); err != nil {
		return nil, err
	}
	if err := validateFreq(freqHz); err != nil {
		return nil, err
	}
	if !(radiusM >= 0) || math.IsInf(radiusM, 0) {
		return nil, fmt.Errorf("radius %v m: expected a finite value ≥ 0", radiusM)
	}
	n := len(p.Layers)
	out := make([]complex128, len(depthsM))
	if n == 0 || radiusM == 0 {
		return out, nil // no conductor, or on the axis where J1(0) = 0
	}
	// Locate each depth: layer index and depth within it.
	type loc struct {
		layer int
		s     float64
	}
	locs := make([]loc, len(depthsM))
	top := 0.0
	for j, d := range depthsM {
		if !(d >= 0) || math.IsInf(d, 0) {
			return nil, fmt.Errorf("depth %v m: expected a finite value ≥ 0", d)
		}
		locs[j] = loc{layer: -1}
		top = 0
		for i, l := range p.Layers {
			if d < top+l.ThicknessM || (math.IsInf(l.ThicknessM, 1)) || (i == n-1 && d == top+l.ThicknessM) {
				if p.Layers[i].ConductivitySPerM > 0 {
					locs[j] = loc{layer: i, s: d - top}
				}
				break
			}
			top += l.ThicknessM
		}
	}
	omega := 2 * math.Pi * freqHz
	var st stackBuf
	stk := st.prepare(p.Layers, omega)
	c := p.Coil
	r1, r2, l, z1 := c.InnerRadiusM, c.OuterRadiusM, c.LengthM, p.LiftoffM
	pref := mu0 * c.Turns / (2 * l * (r2 - r1))
	rmax := math.Max(r2, radiusM)
	h := math.Pi / rmax
	maxA := float64(maxPanelsAr2) / rmax
	f1, f2 := fAccumulator{r: r1}, fAccumulator{r: r2}
	alph := make([]complex128, n)
	gam := make([]complex128, n+1) // gam[i] = Γ at the top of layer i (0-based); gam[n] = bottom
	bamp := make([]complex128, n)
	sums, _ := panelIntegralVec(h, maxA, 1e-12, len(depthsM), func(al float64, dst []complex128) {
		chi := f2.next(al) - f1.next(al)
		src := complex(chi/(al*al*al)*math.Exp(-al*z1)*-math.Expm1(-al*l)*math.J1(al*radiusM), 0)
		stk.transmission(al, alph, gam, bamp)
		for j, lc := range locs {
			if lc.layer < 0 {
				dst[j] = 0
				continue
			}
			k := lc.layer
			u := cmplx.Exp(-alph[k] * complex(lc.s, 0))
			if g := gam[k+1]; g != 0 && !math.IsInf(p.Layers[k].ThicknessM, 1) {
				u += g * cmplx.Exp(-alph[k]*complex(2*p.Layers[k].ThicknessM-lc.s, 0))
			}
			dst[j] = src * bamp[k] * u
		}
	})
	for j, lc := range locs {
		if lc.layer < 0 {
			continue
		}
		sigma := p.Layers[lc.layer].ConductivitySPerM
		out[j] = complex(0, -omega*sigma*pref) * sums[j]
	}
	return out, nil
}

// panelEdges returns panel p of the layout used by panelIntegral: graded
// panels [0, h/2^7], [h/2^7, h/2^6], …, [h/2, h], then width h.
func panelEdges(p int, h float64) (float64, float64) {
	if p == 0 {
		return 0, h / math.Pow(2, gradeLevels)
	}
	if p <= gradeLevels {
		b := h / math.Pow(2, float64(gradeLevels-p))
		return b / 2, b
	}
	a := h * float64(p-gradeLevels)
	return a, a + h
}

// transmission fills, for wavenumber a, the layer wavenumbers α_i, the
// reflection coefficients Γ at the top of each layer (gam[n] is the
// coefficient at the bottom of the last layer, 0 for a half-space), and the
// amplitudes B_i of the downward-decaying wave at the top of each layer per
// unit incident amplitude at the surface (see CurrentDensity).
func (s stack) transmission(a float64, alph, gam, bamp []complex128) {
	a2 := a * a
	n := len(s.ls)
	for i, l := range s.ls {
		alph[i] = layerAlpha(a2, l.k2)
	}
	last := s.ls[n-1]
	gam[n] = 0
	if !math.IsInf(last.thick, 1) {
		gam[n] = interfaceR(a2, alph[n-1], last.mu, last.k2, complex(a, 0), 1, 0)
	}
	for i := n - 1; i >= 0; i-- {
		l := s.ls[i]
		var aA complex128
		var muA, k2A float64
		if i > 0 {
			aA, muA, k2A = alph[i-1], s.ls[i-1].mu, s.ls[i-1].k2
		} else {
			aA, muA, k2A = complex(a, 0), 1, 0
		}
		r := interfaceR(a2, aA, muA, k2A, alph[i], l.mu, l.k2)
		g := gam[i+1]
		if g != 0 && !math.IsInf(l.thick, 1) {
			ge := g * cmplx.Exp(-2*alph[i]*complex(l.thick, 0))
			gam[i] = (r + ge) / (1 + r*ge)
		} else {
			gam[i] = r
		}
	}
	// Amplitudes downwards.
	for i := 0; i < n; i++ {
		l := s.ls[i]
		var e complex128
		if !math.IsInf(l.thick, 1) {
			e = cmplx.Exp(-2 * alph[i] * complex(l.thick, 0))
		}
		den := 1 + gam[i+1]*e
		if i == 0 {
			bamp[0] = (1 + gam[0]) / den
			continue
		}
		p := s.ls[i-1]
		bamp[i] = bamp[i-1] * cmplx.Exp(-alph[i-1]*complex(p.thick, 0)) * (1 + gam[i]) / den
	}
}
