package impedance

import (
	"sort"
	"strings"
)

// Material is a typical conductivity of a common alloy, for advice and
// sorting. Specifications give acceptance ranges; these are typical values.
type Material struct {
	Name              string  `json:"name"`
	Description       string  `json:"description"`
	ConductivitySPerM float64 `json:"conductivity_s_per_m"`
	RelPermeability   float64 `json:"rel_permeability"`
	Source            string  `json:"source"`
}

const (
	srcASNT   = "ASNT eddy-current programmed instruction, Table 9.1"
	srcAA     = "Aluminum Association typical values, as reproduced in distributor tables"
	srcMill   = "copper-mill datasheet"
	srcMemory = "from memory"
)

// resistivity converts ρ in µΩ·cm to σ in S/m.
func resistivity(microOhmCm float64) float64 { return 1e8 / microOhmCm }

// materials is a read-only table of typical values.
var materials = []Material{
	{"alloy600", "nickel alloy 600 (UNS N06600), ρ ≈ 103 µΩ·cm", resistivity(103), 1, srcASNT + " (1.7 %IACS); ρ " + srcMemory},
	{"alloy690", "nickel alloy 690 (UNS N06690), ρ ≈ 115 µΩ·cm", resistivity(115), 1, srcMemory},
	{"alloy800", "alloy 800, ρ ≈ 99 µΩ·cm", resistivity(99), 1, srcMemory},
	{"ss304", "304 stainless steel, ρ ≈ 72 µΩ·cm", resistivity(72), 1, srcASNT + " (2.5 %IACS); ρ " + srcMemory},
	{"ss316", "316 stainless steel, ρ ≈ 74 µΩ·cm", resistivity(74), 1, srcMemory},
	{"cuni9010", "90/10 copper-nickel C70600, ρ 19.1 µΩ·cm", resistivity(19.1), 1, srcMill},
	{"cuni7030", "70/30 copper-nickel C71500, about 4.6 %IACS", 4.6 * 58e4, 1, srcMemory},
	{"admiralty", "admiralty brass C44300, ρ ≈ 6.9 µΩ·cm", resistivity(6.9), 1, srcMemory},
	{"brass7030", "70/30 (cartridge) brass C26000, 28 %IACS", 28 * 58e4, 1, srcASNT},
	{"ti-gr2", "commercially pure titanium grade 2, ρ ≈ 56 µΩ·cm", resistivity(56), 1, srcMemory},
	{"copper", "annealed copper, 100 %IACS", 100 * 58e4, 1, srcASNT},
	{"al1100-o", "aluminium 1100-O, 59 %IACS", 59 * 58e4, 1, srcAA},
	{"al2024-t3", "aluminium 2024-T3, 30 %IACS", 30 * 58e4, 1, srcAA},
	{"al6061-t6", "aluminium 6061-T6, 43 %IACS", 43 * 58e4, 1, srcAA},
	{"al7075-t6", "aluminium 7075-T6, 33 %IACS", 33 * 58e4, 1, srcAA},
}

// Materials returns the table of typical materials, sorted by name.
func Materials() []Material {
	out := append([]Material(nil), materials...)
	sort.Slice(out, func(i, j int) bool { return out[i].Name < out[j].Name })
	return out
}

// LookupMaterial returns the material of that name (case-insensitive;
// "alloy 690", "Alloy690" and "alloy-690" all match) and whether it exists.
func LookupMaterial(name string) (Material, bool) {
	key := normaliseName(name)
	for _, m := range materials {
		if normaliseName(m.Name) == key {
			return m, true
		}
	}
	return Material{}, false
}

func normaliseName(s string) string {
	s = strings.ToLower(s)
	return strings.NewReplacer(" ", "", "-", "", "_", "", "/", "").Replace(s)
}
