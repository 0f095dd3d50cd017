// Package calibrate holds reference standards, procedures, and the
// calibrations built from standard scans: rotation and amplitude
// normalisation, phase- and amplitude-to-depth curves, and calibration
// groups with their opening and closing checks.
//
// Conventions: phase is measured counter-clockwise from +X in degrees at
// the edges (files, reports) and radians inside; depths are in percent of
// wall thickness (%TW); lengths are metres.
package calibrate
