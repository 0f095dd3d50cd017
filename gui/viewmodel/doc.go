// Package viewmodel holds the state and behaviour of the Whorl desktop
// workstation without any toolkit: which component is shown, the strip-chart
// view and analysis window, the impedance-plane display transform, the
// indication list and its decisions, the calibration under review and the
// coil-model explorer. The Fyne views in package gui only draw this state
// and forward user input to it, so everything here is tested without a
// display.
//
// Conventions:
//   - Quantities are SI inside (m, Hz, V, rad, S/m); views convert to mm,
//     kHz and degrees only when they format a label.
//   - Axial positions are metres along the component from its reference
//     end; an analysis window is a half-open range of sample indices
//     [Lo, Hi).
//   - The impedance-plane transform (rotation, span, null) changes only the
//     display; the samples handed to the measurement functions are never
//     altered.
//   - No physics and no analysis are computed here: measurements, calls,
//     calibrations, model evaluations and reports come from a Source (the
//     inspection workflow) and a Model (the coil model). Long operations run
//     in goroutines with a context.Context, and their results are applied on
//     the UI thread through the Post function given to each view-model.
//     Everything else must be called from the UI thread only.
package viewmodel
