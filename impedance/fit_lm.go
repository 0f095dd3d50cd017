package impedance

import (
	"errors"
	"fmt"
	"math"
)

// ConvergenceError reports a least-squares fit that stopped without meeting
// its tolerance.
type ConvergenceError struct {
	Iter     int     // iterations made
	Residual float64 // root-sum-square residual at the last accepted point
}

// Error describes the stalled fit.
func (e *ConvergenceError) Error() string {
	return fmt.Sprintf("least-squares fit did not converge after %d iterations (residual %.3g)", e.Iter, e.Residual)
}

// errSingular is returned when the normal equations cannot be solved.
var errSingular = errors.New("normal equations are singular: the parameters cannot be told apart from these readings")

// residualFunc writes the m residuals at the parameters p into dst.
type residualFunc func(dst, p []float64) error

// lmProblem is a nonlinear least-squares problem min ½‖r(p)‖² with m
// residuals and len(p) parameters.
type lmProblem struct {
	m        int
	residual residualFunc
	// step holds the forward-difference step of each parameter.
	step []float64
	// maxIter bounds the iterations (0 means 100); tol is the relative
	// reduction of the cost and the relative step below which the fit has
	// converged (0 means 1e-12).
	maxIter int
	tol     float64
	// central selects central differences (twice the residual calls,
	// error O(h²) instead of O(h)) for an ill-conditioned problem.
	central bool
}

// lmResult is the solution of an lmProblem.
type lmResult struct {
	p    []float64
	r    []float64 // residuals at p
	jac  []float64 // m × n Jacobian at p, row-major
	cost float64   // ‖r‖²
	iter int
}

// lmWork holds the scratch space of one solve.
type lmWork struct {
	r, rTry, pTry, jac, a, g, d, col []float64
}

// solve minimises ½‖r(p)‖² from p0 by the Levenberg–Marquardt method
// (K. Levenberg, Q. Appl. Math. 2, 164–168 (1944); D. W. Marquardt,
// J. SIAM 11, 431–441 (1963)): each step solves
// (JᵀJ + λ diag(JᵀJ)) δ = −Jᵀr, with Marquardt's diagonal scaling so the
// step does not depend on the units of the parameters; λ falls by 10 after
// a step that lowers the cost and rises by 10 otherwise. The Jacobian is
// taken by forward differences with the steps in prob.step.
func (prob *lmProblem) solve(p0 []float64) (lmResult, error) {
	n := len(p0)
	m := prob.m
	if m < n {
		return lmResult{}, fmt.Errorf("%d residuals for %d parameters: need at least as many readings as unknowns", m, n)
	}
	maxIter := prob.maxIter
	if maxIter == 0 {
		maxIter = 100
	}
	tol := prob.tol
	if tol == 0 {
		tol = 1e-12
	}
	w := lmWork{
		r: make([]float64, m), rTry: make([]float64, m), pTry: make([]float64, n),
		jac: make([]float64, m*n), a: make([]float64, n*n), g: make([]float64, n),
		d: make([]float64, n), col: make([]float64, 2*m),
	}
	p := append([]float64(nil), p0...)
	if err := prob.residual(w.r, p); err != nil {
		return lmResult{}, err
	}
	cost := sumSq(w.r)
	if !isFinite(cost) {
		return lmResult{}, fmt.Errorf("residual at the starting point is not finite")
	}
	lambda := 1e-3
	iter := 0
	converged := false
	// jacFresh is set when w.jac holds the Jacobian at p, or at a point
	// so near it (the last step was below 1e-4 of the difference steps)
	// that a new one would differ only by rounding.
	jacFresh := false
	for ; iter < maxIter && !converged; iter++ {
		if err := prob.jacobian(w.jac, p, w.r, w.col); err != nil {
			return lmResult{}, err
		}
		jacFresh = true
		normalEquations(w.a, w.g, w.jac, w.r, m, n)
		if cost == 0 {
			converged = true
			break
		}
		for {
			if err := dampedStep(w.d, w.a, w.g, lambda, n); err != nil {
				lambda *= 10
				if lambda > 1e16 {
					return lmResult{}, errSingular
				}
				continue
			}
			for j := range p {
				w.pTry[j] = p[j] + w.d[j]
			}
			err := prob.residual(w.rTry, w.pTry)
			costTry := math.Inf(1)
			if err == nil {
				costTry = sumSq(w.rTry)
			}
			if costTry < cost || costTry == 0 {
				small := true
				for j := range p {
					if math.Abs(w.d[j]) > 1e-4*math.Abs(prob.step[j]) {
						small = false
					}
				}
				rel := (cost - costTry) / cost
				jacFresh = small
				copy(p, w.pTry)
				w.r, w.rTry = w.rTry, w.r
				cost = costTry
				lambda = math.Max(lambda/10, 1e-12)
				if rel < tol || small || cost == 0 {
					converged = true
				}
				break
			}
			lambda *= 10
			if lambda > 1e16 {
				// No step lowers the cost: p is a minimum to working precision.
				converged = true
				break
			}
		}
	}
	if !jacFresh {
		if err := prob.jacobian(w.jac, p, w.r, w.col); err != nil {
			return lmResult{}, err
		}
	}
	res := lmResult{p: p, r: w.r, jac: w.jac, cost: cost, iter: iter}
	if !converged {
		return res, &ConvergenceError{Iter: iter, Residual: math.Sqrt(cost)}
	}
	return res, nil
}

// jacobian fills jac (m × n, row-major) by forward (or central)
// differences around p, whose residuals are r; col is scratch of length 2m.
func (prob *lmProblem) jacobian(jac, p, r, col []float64) error {
	n := len(p)
	m := len(r)
	for j := range p {
		pj := p[j]
		h := prob.step[j]
		p[j] = pj + h
		err := prob.residual(col[:m], p)
		p[j] = pj
		if err == nil && prob.central {
			p[j] = pj - h
			err2 := prob.residual(col[m:], p)
			p[j] = pj
			if err2 == nil {
				for i := 0; i < m; i++ {
					jac[i*n+j] = (col[i] - col[m+i]) / (2 * h)
				}
				continue
			}
		}
		col := col[:m]
		if err != nil {
			// Try the other side, for a parameter at the edge of its domain.
			p[j] = pj - h
			err = prob.residual(col, p)
			p[j] = pj
			if err != nil {
				return err
			}
			h = -h
		}
		for i := range col {
			jac[i*n+j] = (col[i] - r[i]) / h
		}
	}
	return nil
}

// normalEquations forms a = JᵀJ (n × n) and g = Jᵀr.
func normalEquations(a, g, jac, r []float64, m, n int) {
	for i := range a {
		a[i] = 0
	}
	for j := range g {
		g[j] = 0
	}
	for k := 0; k < m; k++ {
		row := jac[k*n : (k+1)*n]
		for i := 0; i < n; i++ {
			g[i] += row[i] * r[k]
			for j := 0; j <= i; j++ {
				a[i*n+j] += row[i] * row[j]
			}
		}
	}
	for i := 0; i < n; i++ {
		for j := 0; j < i; j++ {
			a[j*n+i] = a[i*n+j]
		}
	}
}

// dampedStep solves (a + λ diag(a)) d = −g by Cholesky factorisation.
func dampedStep(d, a, g []float64, lambda float64, n int) error {
	var buf [64]float64
	var l []float64
	if n*n <= len(buf) {
		l = buf[:n*n]
	} else {
		l = make([]float64, n*n)
	}
	copy(l, a)
	for i := 0; i < n; i++ {
		diag := a[i*n+i]
		if diag == 0 {
			diag = 1e-30
		}
		l[i*n+i] += lambda * diag
	}
	if !cholesky(l, n) {
		return errSingular
	}
	for i := range d {
		d[i] = -g[i]
	}
	choleskySolve(l, d, n)
	return nil
}

// cholesky overwrites the lower triangle of the symmetric n × n matrix a
// with L such that a = LLᵀ, and reports whether a is positive definite.
func cholesky(a []float64, n int) bool {
	for j := 0; j < n; j++ {
		s := a[j*n+j]
		for k := 0; k < j; k++ {
			s -= a[j*n+k] * a[j*n+k]
		}
		if !(s > 0) {
			return false
		}
		ljj := math.Sqrt(s)
		a[j*n+j] = ljj
		for i := j + 1; i < n; i++ {
			s := a[i*n+j]
			for k := 0; k < j; k++ {
				s -= a[i*n+k] * a[j*n+k]
			}
			a[i*n+j] = s / ljj
		}
	}
	return true
}

// choleskySolve solves LLᵀx = b in place, with L from cholesky.
func choleskySolve(l, b []float64, n int) {
	for i := 0; i < n; i++ {
		s := b[i]
		for k := 0; k < i; k++ {
			s -= l[i*n+k] * b[k]
		}
		b[i] = s / l[i*n+i]
	}
	for i := n - 1; i >= 0; i-- {
		s := b[i]
		for k := i + 1; k < n; k++ {
			s -= l[k*n+i] * b[k]
		}
		b[i] = s / l[i*n+i]
	}
}

// invertSPD returns the inverse of the symmetric positive-definite n × n
// matrix a (unchanged), or errSingular. Rows and columns are first scaled by
// the diagonal so that parameters of very different units do not spoil the
// factorisation.
func invertSPD(a []float64, n int) ([]float64, error) {
	sc := make([]float64, n)
	for i := 0; i < n; i++ {
		if !(a[i*n+i] > 0) {
			return nil, errSingular
		}
		sc[i] = 1 / math.Sqrt(a[i*n+i])
	}
	l := make([]float64, n*n)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			l[i*n+j] = a[i*n+j] * sc[i] * sc[j]
		}
	}
	if !cholesky(l, n) {
		return nil, errSingular
	}
	inv := make([]float64, n*n)
	col := make([]float64, n)
	for j := 0; j < n; j++ {
		for i := range col {
			col[i] = 0
		}
		col[j] = 1
		choleskySolve(l, col, n)
		for i := 0; i < n; i++ {
			inv[i*n+j] = col[i] * sc[i] * sc[j]
		}
	}
	return inv, nil
}

func sumSq(x []float64) float64 {
	s := 0.0
	for _, v := range x {
		s += v * v
	}
	return s
}

func isFinite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
