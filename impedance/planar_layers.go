package impedance

import (
	"math"
	"math/cmplx"
)

// layerC is one layer prepared for a frequency: k² = ωμ0μrσ, μr, c.
type layerC struct {
	k2    float64
	mu    float64
	thick float64 // +Inf for a half-space
}

// stack is a layer stack prepared for one frequency.
type stack struct {
	ls []layerC
}

// stackBuf avoids an allocation for stacks of up to 4 layers.
type stackBuf struct {
	buf [4]layerC
}

func (b *stackBuf) prepare(layers []Layer, omega float64) stack {
	var ls []layerC
	if len(layers) <= len(b.buf) {
		ls = b.buf[:len(layers)]
	} else {
		ls = make([]layerC, len(layers))
	}
	for i, l := range layers {
		mu := l.RelPermeability
		if mu == 0 {
			mu = 1
		}
		ls[i] = layerC{k2: omega * mu0 * mu * l.ConductivitySPerM, mu: mu, thick: l.ThicknessM}
	}
	return stack{ls: ls}
}

// layerAlpha returns α_i = √(α² + jk²) with Re α_i > 0, from
// √(x + jy) = u + j y/(2u), u = √((|z| + x)/2), which has no cancellation
// for x = α² ≥ 0, y = k² ≥ 0 (the principal branch).
func layerAlpha(a2, k2 float64) complex128 {
	if k2 == 0 {
		return complex(math.Sqrt(a2), 0)
	}
	u := math.Sqrt((math.Hypot(a2, k2) + a2) / 2)
	return complex(u, k2/(2*u))
}

// interfaceR returns the reflection coefficient r_ij = (β_i − β_j)/(β_i +
// β_j), β = α_m/μ_m, between medium i (above) and j (below) in the
// cancellation-free form (MODEL.md §1.4(a), generalised here):
//
//	r_ij = [(μj² − μi²)α² + j(μj²k_i² − μi²k_j²)] / (μj α_i + μi α_j)²,
//
// obtained by multiplying numerator and denominator by (μjα_i + μiα_j) and
// using α_m² = α² + jk_m². It has no α_i − α_j difference, which cancels
// catastrophically when α ≫ |k|.
func interfaceR(a2 float64, ai complex128, mui, k2i float64, aj complex128, muj, k2j float64) complex128 {
	num := complex((muj*muj-mui*mui)*a2, muj*muj*k2i-mui*mui*k2j)
	d := complex(muj, 0)*ai + complex(mui, 0)*aj
	return num / (d * d)
}

// reflection returns φ(α) for the stack (Dodd & Deeds 1968 for one and two
// conductors; MODEL.md §1.4(c) recursion for any number). Starting from the
// bottom interface, the coefficient at the top of layer i seen from above
// is
//
//	Γ_i = (r_{i−1,i} + Γ_{i+1}E_i) / (1 + r_{i−1,i} Γ_{i+1} E_i),
//	E_i = e^{−2α_i c_i},
//
// which holds only decaying exponentials (|E_i| ≤ 1) and so never
// overflows for thick, highly conducting or magnetic layers. φ = Γ_1.
func (s stack) reflection(a float64) complex128 {
	a2 := a * a
	n := len(s.ls)
	last := s.ls[n-1]
	aBelow := layerAlpha(a2, last.k2)
	var g complex128 // reflection at the bottom of the current layer, seen from inside it
	if !math.IsInf(last.thick, 1) {
		// Air below the stack.
		g = interfaceR(a2, aBelow, last.mu, last.k2, complex(a, 0), 1, 0)
	}
	cur := aBelow
	for i := n - 1; i >= 0; i-- {
		l := s.ls[i]
		var aAbove complex128
		var muA, k2A float64
		if i > 0 {
			up := s.ls[i-1]
			aAbove = layerAlpha(a2, up.k2)
			muA, k2A = up.mu, up.k2
		} else {
			aAbove = complex(a, 0)
			muA, k2A = 1, 0
		}
		r := interfaceR(a2, aAbove, muA, k2A, cur, l.mu, l.k2)
		if g != 0 && !math.IsInf(l.thick, 1) {
			ge := g * cmplx.Exp(-2*cur*complex(l.thick, 0))
			g = (r + ge) / (1 + r*ge)
		} else {
			g = r
		}
		cur = aAbove
	}
	return g
}
