package synth

import (
	"math"
	"math/cmplx"
)

// kappa returns the complex attenuation constant of the round trip,
// κ = 2(1+j)/δ, so that a thin element at depth x responds as e^{−κx}.
func kappa(deltaM float64) complex128 {
	return complex(2/deltaM, 2/deltaM)
}

// ElementResponse returns the response of a thin flaw element at distance
// xM from the coil-side (inside) surface of the wall, relative to the same
// element at the surface, for a standard depth of penetration deltaM:
//
//	e^{−(1+j)·2x/δ}
//
// Its magnitude is e^{−2x/δ} and its phase −2x/δ radians, a lag of 2x/δ:
// the plane-wave attenuation and phase lag of the eddy currents reaching
// the element (x/δ) taken twice, once for the field driving the element and
// once for its field returning to the coil (Cecco, Van Drunen & Sharp,
// Eddy Current Testing Vol. 1, AECL-7523, 1983, from memory; FIELD.md
// §1.4). The time dependence is e^{+jωt}, so a lag is a negative phase.
func ElementResponse(xM, deltaM float64) complex128 {
	return cmplx.Exp(-kappa(deltaM) * complex(xM, 0))
}

// LayerResponse returns the response of a layer of flaw elements from
// x1M to x2M (metres from the coil-side surface, x1M ≤ x2M), the integral
// of ElementResponse over the layer in closed form:
//
//	∫_{x1}^{x2} e^{−κx} dx = e^{−κ x1}·(1 − e^{−κ(x2−x1)})/κ,  κ = 2(1+j)/δ.
//
// The result is in metres (response per unit element area times depth).
// A thin layer tends to (x2−x1)·ElementResponse(x1); deeper flaws give
// larger responses whose phase moves towards that of the elements nearest
// the coil.
func LayerResponse(x1M, x2M, deltaM float64) complex128 {
	k := kappa(deltaM)
	z := k * complex(x2M-x1M, 0)
	var oneMinus complex128 // 1 − e^{−z}, by series where it would cancel
	if cmplx.Abs(z) < 1e-3 {
		oneMinus = z * (1 - z/2*(1-z/3*(1-z/4)))
	} else {
		oneMinus = 1 - cmplx.Exp(-z)
	}
	return cmplx.Exp(-k*complex(x1M, 0)) * oneMinus / k
}

// boxBlur returns the response of a coil with Gaussian axial sensitivity
// of standard deviation sigma to a uniform feature occupying [z1, z2] when
// the coil is at z: ½[erf((z−z1)/(√2σ)) − erf((z−z2)/(√2σ))]. It is 1
// deep inside a long feature and ≈ (z2−z1)·N(z; centre, σ) for a short
// one, so a short feature's absolute response is a Gaussian of width σ and
// a long one's follows its extent.
func boxBlur(z, z1, z2, sigma float64) float64 {
	s := math.Sqrt2 * sigma
	return 0.5 * (math.Erf((z-z1)/s) - math.Erf((z-z2)/s))
}

// AbsoluteShape returns the real axial shape of an absolute coil's
// response, at probe position zM, to a uniform feature occupying [z1M,
// z2M], for a coil of Gaussian sensitivity with standard deviation sigmaM.
// A feature's absolute signal is its complex response times this shape.
func AbsoluteShape(zM, z1M, z2M, sigmaM float64) float64 {
	return boxBlur(zM, z1M, z2M, sigmaM)
}

// DifferentialShape returns the real axial shape of the differential
// response, the difference of two absolute responses offset by the coil
// spacing spacingM:
//
//	D(z) = B(z − s/2) − B(z + s/2)
//
// with B the AbsoluteShape (FIELD.md §8 demo signal model). For a feature
// symmetric about its centre z0, D(z0+u) = −D(z0−u).
func DifferentialShape(zM, z1M, z2M, sigmaM, spacingM float64) float64 {
	h := spacingM / 2
	return boxBlur(zM-h, z1M, z2M, sigmaM) - boxBlur(zM+h, z1M, z2M, sigmaM)
}

// sigmaFromFWHM converts a full width at half maximum to the standard
// deviation of a Gaussian: FWHM = 2√(2 ln 2)·σ.
func sigmaFromFWHM(fwhm float64) float64 {
	return fwhm / (2 * math.Sqrt(2*math.Ln2))
}
