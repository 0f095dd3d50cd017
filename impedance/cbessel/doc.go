// Package cbessel computes the modified Bessel functions I0, I1, K0 and K1
// of complex argument, plain and exponentially scaled, to about 2e-13
// relative accuracy for |arg z| ≤ π/4 and 1e-12 for |arg z| ≤ π/3.
//
// Domain: Re z ≥ 0. The coil models need real arguments αb and the
// arguments α1·b with α1 = √(α² + jωμσ), which lie in the sector
// 0 ≤ arg z ≤ π/4, where the accuracy is 2e-13 (verified against mpmath
// tables and the Wronskian in the tests); it is 1e-12 for |arg z| ≤ π/3.
// Towards the
// imaginary axis the power series of I loses digits (|I_n(iy)| = |J_n(y)|
// is small while its terms are large); K needs Re z > 0 and returns NaN
// otherwise. For Re z < 0, I_n(−z) = (−1)^n I_n(z) is applied.
//
// Scaling follows the AMOS / SciPy ive and kve conventions:
//
//	I0Scaled(z) = e^{−|Re z|} I0(z),   K0Scaled(z) = e^{z} K0(z),
//
// so that neither overflows or underflows for large |z|. The unscaled
// functions overflow to ±Inf (I) or underflow to 0 (K) once |Re z| ≳ 700.
//
// Methods (each cited above its implementation):
//   - ascending power series for I_n (|z| ≤ 17) and K_n (|z| ≤ 2);
//   - the Hankel asymptotic expansions for |z| > 17, with the exponentially
//     small e^{−z} companion term for I kept off the real axis;
//   - the integral K_ν(z) = ∫0^∞ e^{−z cosh t} cosh νt dt by the
//     trapezoidal rule (exponentially convergent) for 2 < |z| ≤ 17.
package cbessel
