// Package measure holds the impedance-plane measurements taken on a window
// of complex eddy-current samples: the peak-to-peak chord (Vpp and its
// phase), the maximum-rate phase and the signal-to-noise ratio.
//
// Conventions: a sample is X + jY in volts (calibrated volts after a
// calibration is applied). Phase is the angle of a vector measured
// counter-clockwise from +X, in radians in [0, 2π). The phase of a chord is
// the direction from its endpoint that comes earlier in the window to the
// one that comes later, so that a differential figure traced in scan order
// has a definite direction; a caller wanting the other lobe adds π.
// Windows are half-open sample ranges [Start, End) of the slice given.
//
// The measurements are exact: the peak-to-peak chord is the diameter of the
// finite point set (found with a convex hull and rotating calipers), not an
// approximation from component extremes.
package measure
