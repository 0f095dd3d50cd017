package impedance

import "math"

// This file holds the radial coil integral of the planar model:
//
//	χ(α) = ∫_{αr1}^{αr2} x J1(x) dx = F(αr2) − F(αr1),
//	F(x) = ∫0^x J0(t) dt − x J0(x)
//
// (MODEL.md §1.2: d/dx(−xJ0) = xJ1 − J0).

// asymptoticJ0Min is the argument above which ∫0^x J0 is taken from the
// Struve asymptotic expansion; below it, Gauss–Legendre panels are used.
// At x = 40 the smallest term of the expansion is below 1e-17 relative.
const asymptoticJ0Min = 40

// IntegralJ0 returns ∫0^x J0(t) dt for x ≥ 0 (it is odd in x, and negative
// x is accepted).
//
// For x ≤ 40 it sums 10-point Gauss–Legendre panels of width at most 1
// (J0 is entire; each panel is exact to rounding). Above, it uses
// Abramowitz & Stegun 11.1.7, ∫0^x J0 = x J0 + (πx/2)[J1 H0 − J0 H1], with
// the Struve functions written as H_ν = Y_ν + 𝐊_ν (DLMF 11.2.5), the
// Wronskian J1 Y0 − J0 Y1 = 2/(πx) (DLMF 10.5.2), and the asymptotic
// expansion of 𝐊_ν (DLMF 11.6.1), which gives
//
//	∫0^x J0 = 1 + x J0(x) + (πx/2)[J1(x) 𝐊0(x) − J0(x) 𝐊1(x)].
//
// Since 𝐊1 = 2/π + O(x⁻²), the x J0 terms cancel; they are removed
// analytically (𝐊1 − 2/π is summed without its leading term) so that the
// absolute error stays near 1e-16 for large x.
func IntegralJ0(x float64) float64 {
	if x < 0 {
		return -IntegralJ0(-x)
	}
	if x <= asymptoticJ0Min {
		return integralJ0Panels(0, x)
	}
	return 1 + math.Pi*x/2*(math.J1(x)*struveK(0, x, false)-math.J0(x)*struveK(1, x, true))
}

// coilF returns F(x) = ∫0^x J0 − x J0(x) (MODEL.md §1.2) for x ≥ 0.
func coilF(x float64) float64 {
	if x <= asymptoticJ0Min {
		return integralJ0Panels(0, x) - x*math.J0(x)
	}
	// The x J0 terms cancel exactly in the asymptotic form.
	return 1 + math.Pi*x/2*(math.J1(x)*struveK(0, x, false)-math.J0(x)*struveK(1, x, false))
}

// integralJ0Panels integrates J0 over [a, b] with 10-point Gauss–Legendre
// panels of width at most 1.
func integralJ0Panels(a, b float64) float64 {
	n := int(math.Ceil(b - a))
	if n < 1 {
		n = 1
	}
	h := (b - a) / float64(n)
	s := 0.0
	for p := 0; p < n; p++ {
		c := a + (float64(p)+0.5)*h
		for i, x := range gk21.x {
			if w := gk21.wG[i]; w != 0 {
				s += w * math.J0(c+0.5*h*x)
			}
		}
	}
	return 0.5 * h * s
}

// struveK returns the asymptotic value of 𝐊_ν(x) = H_ν(x) − Y_ν(x) for
// ν = 0, 1 and large x (DLMF 11.6.1):
//
//	𝐊_ν(x) ~ (1/π) Σ_k Γ(k+½) (x/2)^{ν−2k−1} / Γ(ν+½−k),
//
// summed until the terms stop decreasing or fall below 1e-17 of the sum.
// Consecutive terms differ by the factor (k+½)(ν−½−k)(2/x)², from
// Γ(k+3/2)/Γ(k+½) = k+½ and Γ(ν+½−k)/Γ(ν−½−k) = ν−½−k. With skipFirst the
// k = 0 term (2/(πx) for ν = 0, 2/π for ν = 1) is left out of the sum.
func struveK(nu int, x float64, skipFirst bool) float64 {
	v := float64(nu)
	// k = 0 term: Γ(½)(x/2)^{ν−1}/Γ(ν+½).
	term := math.Sqrt(math.Pi) * math.Pow(x/2, v-1) / math.Gamma(v+0.5)
	sum := term
	if skipFirst {
		sum = 0
	}
	q := 4 / (x * x)
	for k := 0; k < 60; k++ {
		next := term * (float64(k) + 0.5) * (v - 0.5 - float64(k)) * q
		if math.Abs(next) >= math.Abs(term) {
			break
		}
		term = next
		sum += term
		if math.Abs(term) < 1e-17*math.Abs(sum) || math.Abs(term) < 1e-300 {
			break
		}
	}
	return sum / math.Pi
}

// fAccumulator evaluates F(α r) at increasing α. ∫0^x J0 is accumulated
// from node to node with a 5-point Gauss–Legendre rule per step of at most
// 0.5 (a small fraction of a period of J0, where the rule is exact to
// rounding) while x ≤ 40; beyond, the asymptotic form is used directly.
type fAccumulator struct {
	r         float64
	acc, prev float64
}

// next returns F(α r); α must not decrease between calls.
func (f *fAccumulator) next(alpha float64) float64 {
	x := alpha * f.r
	if x > asymptoticJ0Min {
		return coilF(x)
	}
	for x-f.prev > 0.5 {
		f.acc += gl5Step(f.prev, f.prev+0.5)
		f.prev += 0.5
	}
	f.acc += gl5Step(f.prev, x)
	f.prev = x
	return f.acc - x*math.J0(x)
}

// gl5Step integrates J0 over [a, b] (b − a ≤ 0.5) with 5-point
// Gauss–Legendre; the error is below 1e-17 for such short steps.
func gl5Step(a, b float64) float64 {
	if b <= a {
		return 0
	}
	c, h := 0.5*(a+b), 0.5*(b-a)
	s := 0.0
	for i, x := range gl5x {
		s += gl5w[i] * math.J0(c+h*x)
	}
	return h * s
}
