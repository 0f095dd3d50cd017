package dsp

import (
	"fmt"
	"math"
	"sort"
)

// Vpp returns the peak-to-peak amplitude of z in volts: the largest distance
// between any two samples (the diameter of the point set), computed exactly
// on the convex hull (Andrew's monotone chain, Andrew 1979) in
// O(n log n + h²). It returns 0 for fewer than two samples.
func Vpp(z []complex128) float64 {
	if len(z) < 2 {
		return 0
	}
	pts := make([]complex128, len(z))
	copy(pts, z)
	sort.Slice(pts, func(i, j int) bool {
		if real(pts[i]) != real(pts[j]) {
			return real(pts[i]) < real(pts[j])
		}
		return imag(pts[i]) < imag(pts[j])
	})
	cross := func(o, a, b complex128) float64 {
		return (real(a)-real(o))*(imag(b)-imag(o)) - (imag(a)-imag(o))*(real(b)-real(o))
	}
	hull := make([]complex128, 0, 2*len(pts))
	for _, p := range pts {
		for len(hull) >= 2 && cross(hull[len(hull)-2], hull[len(hull)-1], p) <= 0 {
			hull = hull[:len(hull)-1]
		}
		hull = append(hull, p)
	}
	lower := len(hull) + 1
	for i := len(pts) - 2; i >= 0; i-- {
		p := pts[i]
		for len(hull) >= lower && cross(hull[len(hull)-2], hull[len(hull)-1], p) <= 0 {
			hull = hull[:len(hull)-1]
		}
		hull = append(hull, p)
	}
	var d float64
	for i := range hull {
		for j := i + 1; j < len(hull); j++ {
			e := hull[i] - hull[j]
			d = math.Max(d, math.Hypot(real(e), imag(e)))
		}
	}
	return d
}

// checkWindow reports a window outside [0, n) or empty.
func checkWindow(w [2]int, n int) error {
	if w[0] < 0 || w[1] > n || w[0] >= w[1] {
		return fmt.Errorf("window %d:%d: expected 0 ≤ start < end ≤ %d samples", w[0], w[1], n)
	}
	return nil
}

// SNR returns the signal-to-noise ratio of z as the peak-to-peak amplitude
// over the signal window divided by that over the noise window (an
// amplitude ratio; 20·log10 gives dB). Windows are half-open sample ranges.
func SNR(z []complex128, signal, noise [2]int) (float64, error) {
	if err := checkWindow(signal, len(z)); err != nil {
		return 0, fmt.Errorf("signal %w", err)
	}
	if err := checkWindow(noise, len(z)); err != nil {
		return 0, fmt.Errorf("noise %w", err)
	}
	n := Vpp(z[noise[0]:noise[1]])
	if n == 0 {
		return 0, fmt.Errorf("noise window %d:%d has zero amplitude", noise[0], noise[1])
	}
	return Vpp(z[signal[0]:signal[1]]) / n, nil
}
