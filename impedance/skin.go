package impedance

import (
	"math"

	"gonum.org/v1/gonum/unit/constant"
)

// mu0 is the magnetic constant μ0 in H/m (CODATA via gonum/unit/constant).
var mu0 = float64(constant.MagneticConstant)

// SkinDepthM returns the standard depth of penetration
// δ = 1/√(π f μ0 μr σ) in metres for a plane wave in a conductor of
// conductivity sigmaSPerM (S/m) and relative permeability mur at freqHz.
// A mur of 0 is taken as 1. It returns +Inf for a zero frequency or
// conductivity.
func SkinDepthM(freqHz, sigmaSPerM, mur float64) float64 {
	if mur == 0 {
		mur = 1
	}
	return 1 / math.Sqrt(math.Pi*freqHz*mu0*mur*sigmaSPerM)
}
