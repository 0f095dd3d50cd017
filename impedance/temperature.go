package impedance

import (
	"fmt"
	"math"
	"sort"
	"strings"
)

// ReferenceTemperatureC is the temperature, in °C, to which conductivity
// values are corrected: IACS and certified conductivity standards are
// stated at 20 °C.
const ReferenceTemperatureC = 20

// TempCoefficient is a temperature coefficient of resistivity α (per °C,
// near 20 °C) with the source of the value.
type TempCoefficient struct {
	Material  string  `json:"material"`
	AlphaPerC float64 `json:"alpha_per_c"`
	Source    string  `json:"source"`
}

// tempCoefficients are typical values for sorting work. A Level III
// approves the value for a procedure; callers override it with their own.
var tempCoefficients = []TempCoefficient{
	{"copper", 0.00393, "annealed (IACS) copper at 20 °C, power-engineering handbook table of resistivity coefficients"},
	{"aluminium", 0.0043, "high-purity aluminium at 20 °C (from memory)"},
	{"aluminium-alloy", 0.002, "heat-treatable aluminium alloys, roughly 0.001–0.003 depending on alloy and temper; mid-range value (from memory)"},
	{"brass", 0.0015, "70/30 brass (from memory)"},
}

// TempCoefficients returns the built-in table of temperature coefficients,
// sorted by material name.
func TempCoefficients() []TempCoefficient {
	out := append([]TempCoefficient(nil), tempCoefficients...)
	sort.Slice(out, func(i, j int) bool { return out[i].Material < out[j].Material })
	return out
}

// LookupTempCoefficient returns the built-in coefficient for a material
// name (case-insensitive) and whether it exists.
func LookupTempCoefficient(material string) (TempCoefficient, bool) {
	m := strings.ToLower(strings.TrimSpace(material))
	for _, c := range tempCoefficients {
		if c.Material == m {
			return c, true
		}
	}
	return TempCoefficient{}, false
}

// ConductivityAt20C corrects a conductivity sigmaSPerM measured at tempC
// (°C) to 20 °C with the resistivity temperature coefficient alphaPerC:
//
//	σ20 = σT [1 + α (T − 20 °C)],
//
// which is exact for the linear resistivity law ρT = ρ20[1 + α(T − 20)]
// with σ = 1/ρ. It returns
// an error for a non-finite input or a correction factor ≤ 0.
func ConductivityAt20C(sigmaSPerM, tempC, alphaPerC float64) (float64, error) {
	for _, v := range []float64{sigmaSPerM, tempC, alphaPerC} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return 0, fmt.Errorf("temperature correction of %v S/m at %v °C with α = %v/°C: expected finite values", sigmaSPerM, tempC, alphaPerC)
		}
	}
	k := 1 + alphaPerC*(tempC-ReferenceTemperatureC)
	if !(k > 0) {
		return 0, fmt.Errorf("temperature correction factor 1 + α(T − 20) = %v at %v °C: expected a positive value", k, tempC)
	}
	return sigmaSPerM * k, nil
}
