package impedance

import (
	"math/cmplx"
)

// panelIntegral integrates f over [0, ∞) with 21-point Gauss–Kronrod
// panels laid out by panelEdges: geometrically graded panels on [0, h],
// then panels of width h. After each panel past the first few it calls
// remainder(A), a bound of |∫_A^∞ (f − smooth)|, and stops once that is
// below 0.1·relTol·|sum| (or at maxA). smooth, if not nil, is an
// approximation of f valid for large α (the non-oscillating mean); its
// integral from A to ∞ is added with the 12-point rule in u = 1/α.
//
// f is called at increasing α, so it may keep running state (such as the
// ∫J0 accumulators of the coil integral). The returned error is the sum
// over panels of |Kronrod − Gauss| plus remainder(A).
func panelIntegral(h, maxA, relTol float64, f func(a float64) complex128, remainder func(A float64) float64, smooth func(a float64) complex128) (complex128, float64) {
	var sum complex128
	var errSum float64
	A := 0.0
	for p := 0; ; p++ {
		a, b := panelEdges(p, h)
		cm, hw := 0.5*(a+b), 0.5*(b-a)
		var pk, pd complex128
		for i, x := range gk21.x {
			v := f(cm + hw*x)
			pk += complex(hw*gk21.wK[i], 0) * v
			pd += complex(hw*(gk21.wK[i]-gk21.wG[i]), 0) * v
		}
		sum += pk
		errSum += cmplx.Abs(pd)
		A = b
		if p > gradeLevels+2 && (remainder(b) <= 0.1*relTol*cmplx.Abs(sum) || b >= maxA) {
			break
		}
	}
	if smooth != nil {
		var tail complex128
		forTail(A, func(a, w float64) { tail += complex(w, 0) * smooth(a) })
		sum += tail
	}
	return sum, errSum + remainder(A)
}

// panelIntegralVec integrates the n-component function f over [0, ∞) on the
// panels of panelEdges, f(a, dst) writing its values into dst. It stops
// after three consecutive panels whose contributions are all below
// relTol·|sum| of their component (past the graded panels), or at maxA.
// f is called at increasing α. It returns the integrals and, per component,
// the sum over panels of |Kronrod − Gauss|.
func panelIntegralVec(h, maxA, relTol float64, n int, f func(a float64, dst []complex128)) ([]complex128, []float64) {
	sums := make([]complex128, n)
	errs := make([]float64, n)
	pk := make([]complex128, n)
	pd := make([]complex128, n)
	v := make([]complex128, n)
	quiet := 0
	for p := 0; ; p++ {
		a, b := panelEdges(p, h)
		cm, hw := 0.5*(a+b), 0.5*(b-a)
		for j := range pk {
			pk[j], pd[j] = 0, 0
		}
		for i, x := range gk21.x {
			f(cm+hw*x, v)
			wk, wd := complex(hw*gk21.wK[i], 0), complex(hw*(gk21.wK[i]-gk21.wG[i]), 0)
			for j := range v {
				pk[j] += wk * v[j]
				pd[j] += wd * v[j]
			}
		}
		small := true
		for j := range sums {
			sums[j] += pk[j]
			errs[j] += cmplx.Abs(pd[j])
			if cmplx.Abs(pk[j]) > relTol*cmplx.Abs(sums[j]) {
				small = false
			}
		}
		if small && p > gradeLevels+2 {
			quiet++
		} else {
			quiet = 0
		}
		if quiet >= 3 || b >= maxA {
			return sums, errs
		}
	}
}
