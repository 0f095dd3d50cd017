// Package calibrate holds reference standards, procedures, and the
// calibrations built from standard scans: rotation and amplitude
// normalisation, phase- and amplitude-to-depth curves, mixes, calibration
// groups with their opening and closing checks, and approval.
//
// Conventions. Phase is measured counter-clockwise from +X, in degrees in
// [0, 360) at the edges (files, reports, the Calibration record) and
// radians inside the measurement code. A set-up turns raw samples into
// calibrated ones as Gain·e^{j·RotationDeg}·raw (a positive rotation turns
// the trace anticlockwise, the dsp package's convention). Voltages after
// set-up are calibrated volts, a relative unit defined by the procedure's
// normalisation. Depths are percent of wall thickness (%TW); lengths and
// positions metres; times seconds. The phase of a differential signal is the
// direction of its peak-to-peak chord from the end reached earlier in scan
// order to the later one (the procedure's lobe "later"; "earlier" adds
// 180°); an absolute signal's chord points from the baseline to the peak.
//
// All angles, references, voltages and tolerances come from a Procedure;
// none is in the code. Curves are fitted through the standard's as-built
// depths, never the nominal ones. File formats: docs/standard.md,
// docs/procedure.md, docs/calibration.md.
package calibrate
