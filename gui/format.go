package gui

import (
	"fmt"
	"math"
	"strconv"
)

// formatFreq writes a frequency with a readable unit.
func formatFreq(hz float64) string {
	switch {
	case hz >= 1e6:
		return trimNum(hz/1e6, 3) + " MHz"
	case hz >= 1e3:
		return trimNum(hz/1e3, 3) + " kHz"
	}
	return trimNum(hz, 3) + " Hz"
}

// trimNum writes v with up to sig significant digits, no trailing zeros.
func trimNum(v float64, sig int) string {
	return strconv.FormatFloat(v, 'g', sig, 64)
}

// formatVolts writes a tick value in volts without the unit.
func formatVolts(v float64) string { return formatTick(v) }

// formatTick writes a tick value compactly.
func formatTick(v float64) string {
	if v == 0 {
		return "0"
	}
	// Drop the rounding noise of tick arithmetic (0.6000000000000001).
	v, _ = strconv.ParseFloat(strconv.FormatFloat(v, 'g', 9, 64), 64)
	a := math.Abs(v)
	switch {
	case a >= 1000 || a < 0.001:
		return strconv.FormatFloat(v, 'g', 3, 64)
	case a >= 100:
		return strconv.FormatFloat(v, 'f', 0, 64)
	}
	return strconv.FormatFloat(v, 'f', -1, 64)
}

// orDash writes v with the format, or "—" when v is NaN.
func orDash(format string, v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "—"
	}
	return fmt.Sprintf(format, v)
}
