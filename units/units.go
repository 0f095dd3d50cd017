package units

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"
)

// Exact conversion factors to SI.
const (
	// MetresPerInch is exact by the 1959 international yard and pound agreement.
	MetresPerInch = 0.0254
	// SiemensPerMetrePerIACS is 1 %IACS in S/m: 100 %IACS = 58.0 MS/m.
	SiemensPerMetrePerIACS = 58.0e6 / 100
)

// Kind is a physical dimension that a typed value may have.
type Kind int

const (
	Length Kind = iota + 1
	Frequency
	Conductivity
	Voltage
	Time
	Speed
	Angle
)

var kindNames = map[Kind]string{
	Length: "length", Frequency: "frequency", Conductivity: "conductivity",
	Voltage: "voltage", Time: "time", Speed: "speed", Angle: "angle",
}

// String names the kind.
func (k Kind) String() string { return kindNames[k] }

// suffixes maps each accepted unit spelling to its factor to SI.
var suffixes = map[Kind]map[string]float64{
	Length: {
		"m": 1, "cm": 1e-2, "mm": 1e-3, "um": 1e-6, "µm": 1e-6, "μm": 1e-6,
		"in": MetresPerInch, "inch": MetresPerInch, "mil": MetresPerInch / 1000, "thou": MetresPerInch / 1000,
	},
	Frequency: {"hz": 1, "khz": 1e3, "mhz": 1e6},
	Conductivity: {
		"s/m": 1, "ms/m": 1e6, "%iacs": SiemensPerMetrePerIACS, "iacs": SiemensPerMetrePerIACS,
	},
	Voltage: {"v": 1, "mv": 1e-3, "uv": 1e-6, "µv": 1e-6, "μv": 1e-6},
	Time:    {"s": 1, "ms": 1e-3, "us": 1e-6, "µs": 1e-6, "μs": 1e-6, "min": 60, "h": 3600},
	Speed:   {"m/s": 1, "mm/s": 1e-3, "in/s": MetresPerInch, "ips": MetresPerInch},
	Angle:   {"rad": 1, "deg": math.Pi / 180, "°": math.Pi / 180},
}

// caseSensitive lists spellings whose case matters: "MS/m" (megasiemens)
// and "mS/m" (millisiemens) differ by 10⁹, as do "MHz" and "mHz".
var caseSensitive = map[Kind]map[string]float64{
	Conductivity: {"MS/m": 1e6, "mS/m": 1e-3, "kS/m": 1e3, "S/m": 1},
	Frequency:    {"MHz": 1e6, "mHz": 1e-3},
}

// Factor returns the factor that converts a value in unit u to SI for the
// given kind, and whether u is known. Matching is case-insensitive except
// where case changes the meaning (MS/m and mS/m, MHz and mHz).
func Factor(k Kind, u string) (float64, bool) {
	u = strings.TrimSpace(u)
	if f, ok := caseSensitive[k][u]; ok {
		return f, true
	}
	f, ok := suffixes[k][strings.ToLower(u)]
	return f, ok
}

// Names lists the accepted unit spellings for a kind, sorted.
func Names(k Kind) []string {
	var out []string
	for s := range suffixes[k] {
		out = append(out, s)
	}
	sort.Strings(out)
	return out
}

// Parse reads a number with an optional unit suffix of the given kind, such
// as "0.1mm", "400 kHz", "17.4MS/m", "45%IACS", and returns it in SI. A bare
// number is taken as SI. It returns an error naming the text and the units
// expected when the number or the unit is not understood, or when the value
// is NaN or infinite.
func Parse(k Kind, s string) (float64, error) {
	t := strings.TrimSpace(s)
	i := numberPrefix(t)
	if i == 0 {
		return 0, fmt.Errorf("%q: expected a %s such as %s", s, k, example(k))
	}
	v, err := strconv.ParseFloat(t[:i], 64)
	if errors.Is(err, strconv.ErrRange) {
		return 0, fmt.Errorf("%q: expected a finite %s", s, k)
	} else if err != nil {
		return 0, fmt.Errorf("%q: expected a %s such as %s", s, k, example(k))
	}
	unit := strings.TrimSpace(t[i:])
	if unit == "" {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return 0, fmt.Errorf("%q: expected a finite %s", s, k)
		}
		return v, nil
	}
	f, ok := Factor(k, unit)
	if !ok {
		return 0, fmt.Errorf("%q: unknown %s unit %q (expected one of %s)", s, k, unit, strings.Join(Names(k), ", "))
	}
	v *= f
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("%q: expected a finite %s", s, k)
	}
	return v, nil
}

// numberPrefix returns the length of the leading decimal number in s.
func numberPrefix(s string) int {
	i := 0
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		i++
	}
	digits := 0
	for i < len(s) && (s[i] >= '0' && s[i] <= '9') {
		i++
		digits++
	}
	if i < len(s) && s[i] == '.' {
		i++
		for i < len(s) && (s[i] >= '0' && s[i] <= '9') {
			i++
			digits++
		}
	}
	if digits == 0 {
		return 0
	}
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		j := i + 1
		if j < len(s) && (s[j] == '+' || s[j] == '-') {
			j++
		}
		k := j
		for k < len(s) && s[k] >= '0' && s[k] <= '9' {
			k++
		}
		if k > j {
			i = k
		}
	}
	return i
}

func example(k Kind) string {
	switch k {
	case Length:
		return "0.1mm, 25um or 0.043in"
	case Frequency:
		return "400kHz"
	case Conductivity:
		return "17.4MS/m or 45%IACS"
	case Voltage:
		return "4V or 250mV"
	case Time:
		return "2ms"
	case Speed:
		return "0.3m/s"
	case Angle:
		return "40deg"
	}
	return "a number"
}

// IACSFromSiemens converts a conductivity in S/m to %IACS.
func IACSFromSiemens(sigmaSPerM float64) float64 { return sigmaSPerM / SiemensPerMetrePerIACS }

// SiemensFromIACS converts a conductivity in %IACS to S/m.
func SiemensFromIACS(pctIACS float64) float64 { return pctIACS * SiemensPerMetrePerIACS }

// Radians converts degrees to radians.
func Radians(deg float64) float64 { return deg * math.Pi / 180 }

// Degrees converts radians to degrees.
func Degrees(rad float64) float64 { return rad * 180 / math.Pi }
