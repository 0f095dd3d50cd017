// Package impedance computes what an eddy-current probe coil sees: the
// Dodd–Deeds analytical models for coils above layered planar conductors
// and coaxial with rods and tubes, impedance-plane diagrams, and fits and
// inversions from instrument readings to conductivity, lift-off and
// thickness.
//
// Conventions: SI units throughout; time dependence e^{+jωt}, so an
// inductive coil has Z = R + jX with X > 0 and ΔZ = Z(with conductor) −
// Z(in air). Normalised impedance is ΔR/X0 + j(X0+ΔX)/X0 with X0 = ωL0.
//
// # Coil models
//
// Coils are air-cored with a rectangular winding section (Coil: r1, r2,
// length l, N turns) and a uniform current density; impedances are per
// coil with wire resistance excluded (Z0 = jωL0). Currents are peak
// amplitudes: CurrentDensity returns A/m² per ampere of coil current.
//
// Planar (Dodd & Deeds 1968): the coil axis is normal to the conductor;
// LiftoffM is the gap between the bottom of the winding and the top
// surface; Layers are listed top first, the last may be a half-space
// (ThicknessM = +Inf), otherwise air lies below. Depths are measured
// downwards from the top surface. PlanarModel caches what depends on the
// coil only and is the fast path for fits and diagrams (about 25 µs per
// ΔZ); Planar.Impedance builds one per call. MutualPlanar gives the
// driver–pickup (transmit–receive) mutual impedance of coaxial coils.
//
// Each Result carries ErrorEstimate, the relative error of ΔZ estimated
// from the quadrature (sum over panels of |Kronrod − Gauss| of the
// 21-point Gauss–Kronrod pair) plus a bound on the neglected oscillating
// tail of the wavenumber integral. It is conservative: against mpmath the
// actual error is usually 10–100 times smaller.
//
// Tubes and rods (Dodd & Deeds 1968 cylindrical solutions): TubeProbe is
// a bobbin coil in the bore of a tube (or a borehole, outer radius +Inf)
// or an encircling coil around a tube or solid rod (inner radius 0). Its
// Result is that of one coil; for a differential pair of identical coils,
// DifferentialImpedance adds their mutual inductance in air, the change of
// the mutual impedance, and the bridge output Z1 − Z2, which is zero in a
// uniform tube (the models are axisymmetric and have no flaws).
//
// The complex modified Bessel functions the cylindrical models need are
// in the subpackage cbessel; impedancetest holds coils and cases of known
// answer for tests of code built on this package.
//
// # Diagrams, fits and inversions
//
// ComputeDiagram evaluates impedance-plane families (conductivity curves
// per lift-off, lift-off lines, thickness, permeability and frequency
// curves per conductivity) concurrently under a context; Diagram.Save
// draws them with gonum/plot (PNG, SVG or PDF by extension) on axes ΔR/X0
// and X/X0. NormalizedImpedance gives the normalised impedance of one
// specimen, with a coil-scale factor applied through the similarity of the
// Dodd–Deeds solution.
//
// An instrument reads V = g·Zn + c (volts; g holds gain and rotation, c the
// offset) per frequency. Calibrate fits g and c, and optionally the
// effective lift-off and a coil scale, to readings on certified blocks and
// shims (Levenberg–Marquardt with variable projection); Calibration.Invert
// turns readings into conductivity, lift-off above the calibration
// lift-off (a non-conducting coating) and plate thickness, at one or more
// frequencies, with standard uncertainties (k = 1) from the reading noise
// and the calibration covariance by first-order propagation. Lift-off in
// a Calibration is the effective distance from the winding to a bare
// surface; lift-off in an Inversion is measured from there.
//
// Advise, F90Hz and PhaseSpreadRad give frequency advice; MagneticReynolds
// and ThinSheetForces the speed effect; ConductivityAt20C the temperature
// correction σ20 = σT[1 + α(T − 20 °C)]. File formats are described in
// docs/conductivity.md.
package impedance
