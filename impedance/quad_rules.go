package impedance

import (
	"sort"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/mat"
)

// kronrod is a Gauss–Kronrod pair on [−1, 1]: the 2n+1 Kronrod nodes, their
// weights, and the weights of the embedded n-point Gauss rule at the same
// nodes (zero at the nodes that only the Kronrod rule uses).
type kronrod struct {
	x  []float64 // nodes, increasing
	wK []float64 // Kronrod weights (exact for degree 3n+1)
	wG []float64 // Gauss weights at the Gauss nodes, 0 elsewhere
}

// gk21 is the 10-point Gauss / 21-point Kronrod pair used by every
// wavenumber integral of the package. It is computed once at start-up and
// only read afterwards.
var gk21 = newKronrod(10)

// gl12 is a 12-point Gauss–Legendre rule on [−1, 1] (nodes, weights), used
// for the tail integrals after the substitution u = 1/α.
var gl12x, gl12w = gaussLegendre(12)

// gl5x, gl5w is a 5-point Gauss–Legendre rule, used to step ∫J0 between
// neighbouring nodes.
var gl5x, gl5w = gaussLegendre(5)

// gaussLegendre returns the n-point Gauss–Legendre nodes and weights on
// [−1, 1] from gonum's integrate/quad.
func gaussLegendre(n int) (x, w []float64) {
	x = make([]float64, n)
	w = make([]float64, n)
	quad.Legendre{}.FixedLocations(x, w, -1, 1)
	// Return the nodes in increasing order (gonum lists them decreasing).
	sort.Sort(nodeSort{x, w})
	return x, w
}

// legendreP evaluates the Legendre polynomials P_0..P_m at x by the
// three-term recurrence (k+1)P_{k+1} = (2k+1)x P_k − k P_{k−1}
// (Abramowitz & Stegun 22.7.10) into dst.
func legendreP(dst []float64, x float64) {
	dst[0] = 1
	if len(dst) > 1 {
		dst[1] = x
	}
	for k := 1; k+1 < len(dst); k++ {
		dst[k+1] = (float64(2*k+1)*x*dst[k] - float64(k)*dst[k-1]) / float64(k+1)
	}
}

// newKronrod builds the (2n+1)-point Kronrod extension of the n-point
// Gauss–Legendre rule.
//
// Kronrod (1965); the construction follows Monegato, "Stieltjes
// polynomials and related quadrature rules", SIAM Review 24(2), 137–158
// (1982), §2: the n+1 new nodes are the zeros of the Stieltjes polynomial
// E_{n+1}, defined by ∫ P_n(x) E_{n+1}(x) x^k dx = 0 for k = 0..n. E_{n+1}
// is expanded in Legendre polynomials of the parity of n+1 (leading
// coefficient 1 on P_{n+1}); the orthogonality conditions form a small
// linear system whose matrix entries ∫P_n P_j P_k are computed exactly by
// a 2n+2-point Gauss–Legendre rule. The zeros interlace with the Gauss
// nodes (Szegő), so each lies in a bracket and is found by bisection. The
// weights make the rule exact for P_0..P_{2n}; it is then exact to degree
// 3n+1, which the tests verify.
func newKronrod(n int) kronrod {
	gx, gw := gaussLegendre(n)
	// Exact Gram integrals ∫ P_n P_j P_k over [−1, 1] (degree ≤ 3n+1).
	qx, qw := gaussLegendre(2*n + 2)
	p := make([]float64, n+2)
	var ks, js []int
	for k := (n + 1) % 2; k <= n-1; k += 2 {
		ks = append(ks, k)
	}
	// Conditions are needed only for j of the parity that makes n+j+k
	// even, i.e. odd j; the others hold for any coefficients.
	for j := 1; len(js) < len(ks); j += 2 {
		js = append(js, j)
	}
	m := len(ks)
	a := mat.NewDense(m, m, nil)
	b := mat.NewVecDense(m, nil)
	for q := range qx {
		legendreP(p, qx[q])
		for r, j := range js {
			base := qw[q] * p[n] * p[j]
			for c, k := range ks {
				a.Set(r, c, a.At(r, c)+base*p[k])
			}
			b.SetVec(r, b.AtVec(r)-base*p[n+1])
		}
	}
	coef := make([]float64, n+2)
	coef[n+1] = 1
	if m > 0 {
		var sol mat.VecDense
		if err := sol.SolveVec(a, b); err != nil {
			panic("impedance: Kronrod system is singular: " + err.Error())
		}
		for c, k := range ks {
			coef[k] = sol.AtVec(c)
		}
	}
	stieltjes := func(x float64) float64 {
		legendreP(p, x)
		s := 0.0
		for k, c := range coef {
			s += c * p[k]
		}
		return s
	}
	// Brackets: [−1, g1], [g1, g2], …, [gn, 1].
	edges := append(append([]float64{-1}, gx...), 1)
	kx := make([]float64, 0, n+1)
	for i := 0; i+1 < len(edges); i++ {
		lo, hi := edges[i], edges[i+1]
		flo := stieltjes(lo)
		for it := 0; it < 200 && hi-lo > 1e-17; it++ {
			mid := 0.5 * (lo + hi)
			fm := stieltjes(mid)
			if (fm < 0) == (flo < 0) {
				lo, flo = mid, fm
			} else {
				hi = mid
			}
		}
		kx = append(kx, 0.5*(lo+hi))
	}
	// Merge nodes in increasing order.
	x := make([]float64, 0, 2*n+1)
	isGauss := make([]bool, 0, 2*n+1)
	for i := 0; i <= n; i++ {
		x = append(x, kx[i])
		isGauss = append(isGauss, false)
		if i < n {
			x = append(x, gx[i])
			isGauss = append(isGauss, true)
		}
	}
	// Weights: exact for P_0..P_{2n}.
	nn := 2*n + 1
	v := mat.NewDense(nn, nn, nil)
	pp := make([]float64, nn)
	for c, xc := range x {
		legendreP(pp, xc)
		for r := 0; r < nn; r++ {
			v.Set(r, c, pp[r])
		}
	}
	rhs := mat.NewVecDense(nn, nil)
	rhs.SetVec(0, 2)
	var w mat.VecDense
	if err := w.SolveVec(v, rhs); err != nil {
		panic("impedance: Kronrod weight system is singular: " + err.Error())
	}
	r := kronrod{x: x, wK: make([]float64, nn), wG: make([]float64, nn)}
	gi := 0
	for c := range x {
		r.wK[c] = w.AtVec(c)
		if isGauss[c] {
			r.wG[c] = gw[gi]
			gi++
		}
	}
	return r
}

// nodeSort orders quadrature nodes and their weights together.
type nodeSort struct{ x, w []float64 }

func (s nodeSort) Len() int           { return len(s.x) }
func (s nodeSort) Less(i, j int) bool { return s.x[i] < s.x[j] }
func (s nodeSort) Swap(i, j int) {
	s.x[i], s.x[j] = s.x[j], s.x[i]
	s.w[i], s.w[j] = s.w[j], s.w[i]
}
