// Package source connects the workstation's view-models to the rest of
// Whorl: CoilModel implements viewmodel.Model over package impedance, and
// Inspection implements viewmodel.Source over the inspection workflow,
// the record store, the analysis and the report writers. It holds no
// physics and no analysis of its own; it only converts between the
// packages' types and the view-models' types.
//
// Conventions are those of the packages it calls: SI units, e^{+jωt} time
// dependence, normalised impedance ΔR/X0 + j(X0+ΔX)/X0.
package source
