package cbessel

import (
	"math"
	"math/cmplx"
)

const (
	seriesIMax  = 17.0 // |z| up to which the series for I is used
	seriesKMax  = 2.0  // |z| up to which the series for K is used
	eulerGamma  = 0.57721566490153286060651209008240243
	asymptTerms = 60
)

// I0 returns the modified Bessel function of the first kind of order 0.
func I0(z complex128) complex128 { i0, _ := i01(z, false); return i0 }

// I1 returns the modified Bessel function of the first kind of order 1.
func I1(z complex128) complex128 { _, i1 := i01(z, false); return i1 }

// K0 returns the modified Bessel function of the second kind of order 0
// (Macdonald function) for Re z > 0; NaN otherwise.
func K0(z complex128) complex128 { k0, _ := k01(z, false); return k0 }

// K1 returns the modified Bessel function of the second kind of order 1
// for Re z > 0; NaN otherwise.
func K1(z complex128) complex128 { _, k1 := k01(z, false); return k1 }

// I01Scaled returns e^{−|Re z|} I0(z) and e^{−|Re z|} I1(z).
func I01Scaled(z complex128) (i0, i1 complex128) { return i01(z, true) }

// K01Scaled returns e^{z} K0(z) and e^{z} K1(z) for Re z > 0.
func K01Scaled(z complex128) (k0, k1 complex128) { return k01(z, true) }

// I0Scaled returns e^{−|Re z|} I0(z).
func I0Scaled(z complex128) complex128 { i0, _ := i01(z, true); return i0 }

// I1Scaled returns e^{−|Re z|} I1(z).
func I1Scaled(z complex128) complex128 { _, i1 := i01(z, true); return i1 }

// K0Scaled returns e^{z} K0(z) for Re z > 0.
func K0Scaled(z complex128) complex128 { k0, _ := k01(z, true); return k0 }

// K1Scaled returns e^{z} K1(z) for Re z > 0.
func K1Scaled(z complex128) complex128 { _, k1 := k01(z, true); return k1 }

func isBad(z complex128) bool {
	return math.IsNaN(real(z)) || math.IsNaN(imag(z)) || math.IsInf(real(z), 0) || math.IsInf(imag(z), 0)
}

func i01(z complex128, scaled bool) (complex128, complex128) {
	if isBad(z) {
		n := cmplx.NaN()
		return n, n
	}
	if real(z) < 0 {
		// DLMF 10.25.2 / 10.27.1: I_n(−z) = (−1)^n I_n(z).
		i0, i1 := i01(-z, scaled)
		return i0, -i1
	}
	if cmplx.Abs(z) <= seriesIMax {
		i0, i1 := iSeries(z)
		if scaled {
			s := complex(math.Exp(-real(z)), 0)
			i0, i1 = i0*s, i1*s
		}
		return i0, i1
	}
	i0, i1 := iAsymptoticScaled(z)
	if !scaled {
		s := complex(math.Exp(real(z)), 0)
		i0, i1 = i0*s, i1*s
	}
	return i0, i1
}

// iSeries sums the ascending series (Abramowitz & Stegun 9.6.10;
// DLMF 10.25.2)
//
//	I_ν(z) = (z/2)^ν Σ_k (z²/4)^k / (k! Γ(ν+k+1))
//
// for ν = 0 and 1 together.
func iSeries(z complex128) (complex128, complex128) {
	q := z * z / 4
	t0 := complex(1, 0) // (z²/4)^k/(k!)²
	t1 := complex(1, 0) // (z²/4)^k/(k!(k+1)!)
	s0, s1 := t0, t1
	for k := 1; k < 200; k++ {
		fk := float64(k)
		t0 *= q / complex(fk*fk, 0)
		t1 *= q / complex(fk*(fk+1), 0)
		s0 += t0
		s1 += t1
		if cmplx.Abs(t0) < 1e-17*cmplx.Abs(s0) && cmplx.Abs(t1) < 1e-17*cmplx.Abs(s1) {
			break
		}
	}
	return s0, s1 * z / 2
}

// asymptoticSums returns S−(z) = Σ (−1)^k a_k(ν)/z^k and S+(z) = Σ a_k(ν)/z^k
// for ν = 0, 1, with a_k(ν) = Π_{j=1}^k (4ν² − (2j−1)²) / (k! 8^k)
// (DLMF 10.17.1), summed to the smallest term.
func asymptoticSums(z complex128) (m0, p0, m1, p1 complex128) {
	iz := 1 / z
	for nu := 0; nu <= 1; nu++ {
		mu := 4 * float64(nu*nu)
		t := complex(1, 0)
		sm, sp := t, t
		prev := math.Inf(1)
		for k := 1; k < asymptTerms; k++ {
			fk := float64(k)
			next := t * complex((mu-(2*fk-1)*(2*fk-1))/(8*fk), 0) * iz
			a := cmplx.Abs(next)
			if a >= prev {
				break // the divergent tail starts: stop at the smallest term
			}
			prev, t = a, next
			if k%2 == 1 {
				sm -= t
			} else {
				sm += t
			}
			sp += t
			if a < 1e-17 {
				break
			}
		}
		if nu == 0 {
			m0, p0 = sm, sp
		} else {
			m1, p1 = sm, sp
		}
	}
	return
}

// iAsymptoticScaled returns e^{−Re z} I_ν(z), ν = 0, 1, for large |z|, Re z ≥ 0,
// from the Hankel expansion (DLMF 10.40.5; A&S 9.7.1):
//
//	I_ν(z) ~ e^{z}/√(2πz) Σ(−1)^k a_k/z^k ± i e^{±νπi} e^{−z}/√(2πz) Σ a_k/z^k,
//
// upper signs for Im z > 0, lower for Im z < 0. The second (exponentially
// small) term matters when Re z is moderate and |Im z| large; on the real
// axis, where I_ν is real, it is omitted (Stokes line).
func iAsymptoticScaled(z complex128) (complex128, complex128) {
	m0, p0, m1, p1 := asymptoticSums(z)
	root := cmplx.Sqrt(2 * math.Pi * z)
	// e^{z}/e^{Re z} = e^{i Im z}
	ph := cmplx.Exp(complex(0, imag(z)))
	i0 := ph * m0 / root
	i1 := ph * m1 / root
	if imag(z) != 0 {
		sgn := 1.0
		if imag(z) < 0 {
			sgn = -1
		}
		// e^{−z}/e^{Re z} = e^{−2 Re z} e^{−i Im z}
		e := complex(math.Exp(-2*real(z)), 0) * cmplx.Exp(complex(0, -imag(z))) / root
		// ± i e^{±iνπ}: ν = 0 → ±i; ν = 1 → ∓i.
		i0 += complex(0, sgn) * e * p0
		i1 -= complex(0, sgn) * e * p1
	}
	return i0, i1
}

func k01(z complex128, scaled bool) (complex128, complex128) {
	if isBad(z) || !(real(z) > 0) {
		n := cmplx.NaN()
		return n, n
	}
	r := cmplx.Abs(z)
	switch {
	case r <= seriesKMax:
		k0, k1 := kSeries(z)
		if scaled {
			s := cmplx.Exp(z)
			k0, k1 = k0*s, k1*s
		}
		return k0, k1
	case r <= seriesIMax:
		k0, k1 := kIntegralScaled(z)
		if !scaled {
			s := cmplx.Exp(-z)
			k0, k1 = k0*s, k1*s
		}
		return k0, k1
	}
	k0, k1 := kAsymptoticScaled(z)
	if !scaled {
		s := cmplx.Exp(-z)
		k0, k1 = k0*s, k1*s
	}
	return k0, k1
}

// kSeries uses the ascending series (DLMF 10.31.1; A&S 9.6.13 and 9.6.11):
//
//	K0(z) = −(ln(z/2) + γ) I0(z) + Σ_{k≥1} H_k (z²/4)^k/(k!)²,
//	K1(z) = 1/z + ln(z/2) I1(z) − (z/4) Σ_{k≥0} [ψ(k+1) + ψ(k+2)] (z²/4)^k/(k!(k+1)!),
//
// with H_k the harmonic numbers and ψ(k+1) = −γ + H_k.
func kSeries(z complex128) (complex128, complex128) {
	i0, i1 := iSeries(z)
	lz := cmplx.Log(z / 2)
	q := z * z / 4
	t0 := complex(1, 0)
	t1 := complex(1, 0)
	h := 0.0 // H_k
	s0 := complex(0, 0)
	s1 := complex(-eulerGamma+(1-eulerGamma), 0) // ψ(1) + ψ(2) for k = 0
	for k := 1; k < 100; k++ {
		fk := float64(k)
		h += 1 / fk
		t0 *= q / complex(fk*fk, 0)
		t1 *= q / complex(fk*(fk+1), 0)
		d0 := t0 * complex(h, 0)
		d1 := t1 * complex(2*(-eulerGamma+h)+1/(fk+1), 0)
		s0 += d0
		s1 += d1
		if cmplx.Abs(d0) < 1e-17*cmplx.Abs(s0) && cmplx.Abs(d1) < 1e-17*cmplx.Abs(s1) {
			break
		}
	}
	k0 := -(lz+complex(eulerGamma, 0))*i0 + s0
	k1 := 1/z + lz*i1 - z/4*s1
	return k0, k1
}

// kAsymptoticScaled returns e^{z} K_ν(z), ν = 0, 1, from the Hankel
// expansion (DLMF 10.40.2; A&S 9.7.2), valid for |arg z| < 3π/2:
//
//	K_ν(z) ~ √(π/(2z)) e^{−z} Σ a_k(ν)/z^k.
func kAsymptoticScaled(z complex128) (complex128, complex128) {
	_, p0, _, p1 := asymptoticSums(z)
	f := cmplx.Sqrt(math.Pi / (2 * z))
	return f * p0, f * p1
}

// kIntegralScaled evaluates e^{z} K_ν(z) = ∫0^∞ e^{−z(cosh t − 1)} cosh νt dt
// (DLMF 10.32.9) for ν = 0, 1 by the trapezoidal rule. The integrand is
// analytic in the strip |Im t| < π/2 − |arg z| and decays doubly
// exponentially, so the rule converges like e^{−2πd/h} (Trefethen &
// Weideman, SIAM Review 56(3), 385–458, 2014, §5); h = d/6 gives about
// e^{−12π} ≈ 4e-17. The range stops where Re z (cosh t − 1) > 41.5
// (e^{−41.5} ≈ 1e-18).
func kIntegralScaled(z complex128) (complex128, complex128) {
	d := math.Pi/2 - math.Abs(cmplx.Phase(z))
	h := d / 6
	if h > 0.1 {
		h = 0.1
	}
	tmax := math.Acosh(1 + 41.5/real(z))
	n := int(math.Ceil(tmax / h))
	// t = 0 carries half weight.
	s0 := complex(0.5, 0)
	s1 := complex(0.5, 0)
	for i := 1; i <= n; i++ {
		t := float64(i) * h
		ch := math.Cosh(t)
		e := cmplx.Exp(-z * complex(ch-1, 0))
		s0 += e
		s1 += e * complex(ch, 0)
	}
	return s0 * complex(h, 0), s1 * complex(h, 0)
}
