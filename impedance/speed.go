package impedance

import "math"

// MagneticReynolds returns the magnetic Reynolds number Rm = μ0 μr σ v L of
// a conductor of conductivity sigmaSPerM and relative permeability mur
// moving at speedMPS past a field of length scale lengthM (for example the
// coil diameter). Rm compares the motion-induced eddy currents with the
// currents induced by the field's own variation; a reading is taken as
// quasi-static when Rm is well below ReynoldsWarn (common practice, no
// source). A mur of 0 is taken as 1.
func MagneticReynolds(sigmaSPerM, mur, speedMPS, lengthM float64) float64 {
	if mur == 0 {
		mur = 1
	}
	return mu0 * mur * sigmaSPerM * math.Abs(speedMPS) * lengthM
}

// RecessionSpeedMPS returns the speed w = 2/(μ0 σ d) at which the images of
// a magnet recede into a thin conducting sheet of conductivity sigmaSPerM
// and thickness thicknessM (Maxwell's receding-image construction; Reitz,
// J. Appl. Phys. 41, 2067 (1970); Saslow, Am. J. Phys. 60, 693 (1992)).
func RecessionSpeedMPS(sigmaSPerM, thicknessM float64) float64 {
	return 2 / (mu0 * sigmaSPerM * thicknessM)
}

// DynamicSkinDepthM returns δc = √(2h/(μ0σv)), the depth to which the
// motion-induced currents of a magnet at height heightM moving at speedMPS
// penetrate a thick conductor (Saslow 1992). The thin-sheet formulas of
// ThinSheetForces hold when the sheet is much thinner than δc.
func DynamicSkinDepthM(sigmaSPerM, speedMPS, heightM float64) float64 {
	return math.Sqrt(2 * heightM / (mu0 * sigmaSPerM * math.Abs(speedMPS)))
}

// PoleImageForceN returns the static repulsion between a magnetic pole of
// strength poleAm (A·m, Gilbert model) at height heightM and its image in a
// perfect conductor, μ0 q²/(4π (2h)²) = μ0 q²/(16π h²), in newtons.
func PoleImageForceN(poleAm, heightM float64) float64 {
	return mu0 * poleAm * poleAm / (16 * math.Pi * heightM * heightM)
}

// DipoleImageForceN returns the static repulsion between a vertically
// magnetised point dipole of moment momentAm2 (A·m²) at height heightM and
// its image in a perfect conductor: two coaxial dipoles 2h apart repel with
// 3μ0 m²/(2π (2h)⁴) = 3μ0 m²/(32π h⁴), in newtons.
func DipoleImageForceN(momentAm2, heightM float64) float64 {
	h2 := heightM * heightM
	return 3 * mu0 * momentAm2 * momentAm2 / (32 * math.Pi * h2 * h2)
}

// ThinSheetForces returns the lift (normal repulsion) and drag (opposing
// the motion) on a magnet moving at speedMPS parallel to a thin conducting
// sheet whose images recede at recessionMPS (RecessionSpeedMPS), given the
// static perfect-conductor image force imageForceN of the same magnet at
// the same height (PoleImageForceN, DipoleImageForceN):
//
//	lift = F_image · [1 − w/√(v² + w²)],   drag = (w/v) · lift.
//
// Derivation (receding images; Reitz 1970, Saslow 1992): a field component
// of wavevector k (|k| = k, k_x = k cos θ along the motion) is reflected by
// the sheet as g = −i k_x v/(w k − i k_x v) times its perfect-conductor
// image, because each image recedes at w and a component decays as e^{−wkt}.
// Re g = v² cos²θ/(w² + v² cos²θ) does not depend on k, so for a magnet whose
// field is symmetric about the vertical (a pole or a vertical dipole) the
// lift is F_image times the average of Re g over θ, and
// (1/2π)∫dθ/(1 + a cos²θ) = 1/√(1+a) gives the formula above. The drag
// component carries an extra factor w/v for every θ, which gives the ratio
// drag/lift = w/v for a magnet of any shape. Limits: lift → F_image and
// drag → F_image·w/v as v → ∞; lift ≈ F_image v²/(2w²) and drag ≈
// F_image v/(2w) as v → 0; the drag is largest at v = w√φ ≈ 1.272 w (φ the
// golden ratio), where it is φ^{−5/2} F_image ≈ 0.300 F_image.
//
// The formulas hold for a sheet much thinner than DynamicSkinDepthM; for a
// thick conductor the ratio drag/lift falls as √(v0/v) instead.
// A zero speed gives zero forces.
func ThinSheetForces(imageForceN, speedMPS, recessionMPS float64) (liftN, dragN float64) {
	v := math.Abs(speedMPS)
	w := recessionMPS
	if v == 0 {
		return 0, 0
	}
	// 1 − w/√(v²+w²) written as v²/(√(v²+w²)(√(v²+w²)+w)) to keep its
	// precision when v ≪ w.
	s := math.Hypot(v, w)
	liftN = imageForceN * v * v / (s * (s + w))
	dragN = imageForceN * v * w / (s * (s + w))
	return liftN, dragN
}
