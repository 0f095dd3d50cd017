// Package impedance computes what an eddy-current probe coil sees: the
// Dodd–Deeds analytical models for coils above layered planar conductors
// and coaxial with rods and tubes, impedance-plane diagrams, and fits and
// inversions from instrument readings to conductivity, lift-off and
// thickness.
//
// Conventions: SI units throughout; time dependence e^{+jωt}, so an
// inductive coil has Z = R + jX with X > 0 and ΔZ = Z(with conductor) −
// Z(in air). Normalised impedance is ΔR/X0 + j(X0+ΔX)/X0 with X0 = ωL0.
package impedance
