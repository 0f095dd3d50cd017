package impedance

import "math"

// Radial coil integrals of the cylindrical models (MODEL.md §2):
//
//	κ_I(α) = ∫_{αr1}^{αr2} x I1(x) dx,   κ_K(α) = ∫_{αr1}^{αr2} x K1(x) dx,
//
// returned exponentially scaled so that they never overflow.

// besselIAsym holds b_k = Π_{j≤k}(2j−1)²/(k! 8^k), the coefficients of
// I0(x) ~ e^x/√(2πx) Σ b_k x^{−k} (DLMF 10.40.1 with ν = 0), and c_k of
// ∫0^x I0 ~ e^x/√(2πx) Σ c_k x^{−k}, from c_k = b_k + (k − ½)c_{k−1}
// (differentiate the ansatz and match powers of x). Read-only.
var besselIAsymB, besselIAsymC = func() ([]float64, []float64) {
	const n = 40
	b := make([]float64, n)
	c := make([]float64, n)
	b[0], c[0] = 1, 1
	for k := 1; k < n; k++ {
		fk := float64(k)
		b[k] = b[k-1] * (2*fk - 1) * (2*fk - 1) / (8 * fk)
		c[k] = b[k] + (fk-0.5)*c[k-1]
	}
	return b, c
}()

// gIScaled returns e^{−X} ∫0^x t I1(t) dt for 0 ≤ x ≤ X.
//
// For x ≤ 35 it sums the series obtained by integrating the ascending
// series of I1 term by term (A&S 9.6.10), Σ x^{2k+3}/(2^{2k+1}k!(k+1)!(2k+3)),
// whose terms are all positive. Above, it uses ∫ t I1 = x I0(x) − ∫0^x I0
// (integration by parts with I1 = I0′, DLMF 10.29.3) and the asymptotic
// expansions of I0 and ∫I0 above, summed to the smallest term.
func gIScaled(x, X float64) float64 {
	if x == 0 {
		return 0
	}
	if x <= 35 {
		t := x * x * x / 2
		q := x * x / 4
		s := t / 3
		for k := 0; k < 200; k++ {
			fk := float64(k)
			t *= q / ((fk + 1) * (fk + 2))
			d := t / (2*fk + 5)
			s += d
			if d < 1e-17*s {
				break
			}
		}
		return s * math.Exp(-X)
	}
	ix := 1 / x
	p := 1.0
	sb, sc := 0.0, 0.0
	prev := math.Inf(1)
	for k := range besselIAsymB {
		tb, tc := besselIAsymB[k]*p, besselIAsymC[k]*p
		if math.Abs(tc) > prev {
			break
		}
		prev = math.Abs(tc)
		sb += tb
		sc += tc
		p *= ix
	}
	return math.Exp(x-X) / math.Sqrt(2*math.Pi*x) * (x*sb - sc)
}

// tKScaled returns e^{x} T(x), T(x) = ∫_x^∞ t K1(t) dt, for x > 0.
//
// With K1(t) = ∫0^∞ e^{−t cosh s} cosh s ds (DLMF 10.32.9) and the t
// integral done in closed form, T(x) = ∫0^∞ e^{−x cosh s}(x + sech s) ds.
// The integrand is analytic in |Im s| < π/2 and decays doubly
// exponentially, so the trapezoidal rule converges like e^{−2πd/h}
// (Trefethen & Weideman, SIAM Review 56(3), 2014, §5) times the growth
// e^{x(1−cos d)} of the integrand at distance d from the real axis. With
// h = min(0.25, 0.5/√x) the bound is below 1e-17 for every x (for large x
// choose d = 12.6/√x). The range ends where x(cosh s − 1) > 41.5 or
// sech s < 1e-18.
func tKScaled(x float64) float64 {
	h := 0.25
	if v := 0.5 / math.Sqrt(x); v < h {
		h = v
	}
	smax := 42.0
	if v := math.Acosh(1 + 41.5/x); v < smax {
		smax = v
	}
	n := int(math.Ceil(smax / h))
	s := 0.5 * (x + 1)
	for i := 1; i <= n; i++ {
		u := float64(i) * h
		ch := math.Cosh(u)
		s += math.Exp(-x*(ch-1)) * (x + 1/ch)
	}
	return s * h
}

// kappaIScaled returns e^{−αr2} κ_I(α).
func kappaIScaled(alpha, r1, r2 float64) float64 {
	X := alpha * r2
	return gIScaled(X, X) - gIScaled(alpha*r1, X)
}

// kappaKScaled returns e^{αr1} κ_K(α) = e^{αr1}[T(αr1) − T(αr2)] for r1 > 0.
func kappaKScaled(alpha, r1, r2 float64) float64 {
	x1, x2 := alpha*r1, alpha*r2
	return tKScaled(x1) - tKScaled(x2)*math.Exp(x1-x2)
}
