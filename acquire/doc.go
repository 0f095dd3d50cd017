// Package acquire reads and writes eddy-current scan files: demodulated
// multi-channel scans and raw coil-voltage recordings, in Whorl's own CSV
// layout and in foreign CSV layouts described by a column-mapping file.
//
// Conventions: samples are complex, X + jY in volts, X in-phase and Y
// quadrature with the excitation (time dependence e^{+jωt}, the dsp
// package's convention). Time is in seconds from the first sample,
// position in metres along the component. Units in files are converted to
// SI on import and back on export; nothing else changes a sample.
package acquire
