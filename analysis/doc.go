// Package analysis finds, measures, sizes and classifies indications on
// calibrated bobbin scans, and scores the results against ground truth.
//
// Conventions. Samples are calibrated with the set-up of a
// calibrate.Calibration (calibrated = Gain·e^{j·rotation}·raw, so that
// the procedure's rotation reference sits at its angle and the
// normalisation reference reads its voltage); voltages are calibrated
// volts. Phases are in degrees in [0, 360) at the edges, measured
// counter-clockwise from +X, with the procedure's lobe convention for
// differential channels and, for absolute channels, the chord oriented
// from the baseline to the peak (see calibrate.MeasureWindow). Positions
// are metres along the scan's position axis; windows are half-open sample
// ranges [start, end). Depths are %TW.
//
// Detection is a threshold on the exact peak-to-peak amplitude in a
// sliding window (found in O(n) with measure.Spread, then measured
// exactly), plus the procedure's alarm regions. Landmarks (supports,
// tubesheets) are stretches where the landmark channel departs from its
// baseline by more than the calibration's landmark threshold.
//
// # Classification rules
//
// Every indication is classified by the first rule that fires, in this
// order; the rule's name is stored in Indication.Rule:
//
//	Rule          Class           When it fires
//	landmark-zone landmark        a raw (unmixed) channel, window inside a
//	                              landmark zone: the landmark's own signal
//	                              (flaws there are judged on the mix)
//	mix-residue   landmark        a mix channel, window inside a landmark
//	                              zone, Vpp at most ResidueMaxVpp, and either
//	                              phase outside the zone flaw band or phase
//	                              outside FlawPhaseDeg with a straight trace
//	                              (cross extent at most GeometryMaxCross ×
//	                              Vpp): what the mix leaves of the landmark
//	geometry      geometry        phase within GeometryBandDeg of the
//	                              channel's lift-off axis (horizontal unless
//	                              the set-up measures it; probe motion,
//	                              lift-off, dents) and Vpp at
//	                              least GeometryMinVpp, a straight trace
//	                              (cross extent at most GeometryMaxCross ×
//	                              Vpp), and, when S/N is at least 3 × MinSNR,
//	                              the maximum-rate phase within the band too
//	geometry-     analyst-review  the same lift-off-like chord, but the trace
//	composite                     bulges across it or its steepest step
//	                              leaves the lift-off axis: another signal
//	                              rides on the geometry signal
//	deposit       deposit         outside landmark zones, the landmark
//	                              channel's calibrated Vpp in the window is
//	                              at least DepositRatio × the indication's Vpp
//	zone-weak     analyst-review  a mix channel in a landmark zone, phase
//	                              inside the zone flaw band, S/N from
//	                              ZoneMinSNR up to MinSNR: a small flaw at a
//	                              support, too weak to be sized
//	noise         noise           S/N below MinSNR
//	flaw-phase    flaw-like       phase inside FlawPhaseDeg
//	unresolved    analyst-review  none of the above: not confidently
//	                              classified, an analyst decides
//	zone-shallow  analyst-review  after sizing: a flaw-like mix signal in a
//	                              landmark zone, inside the zone flaw band
//	                              but past the curve's shallow end; kept
//	                              reportable (OutOfRange set), not sized
//
// The zone flaw band of a mix runs from the lower of FlawPhaseDeg[0] and
// its sizing curve's deep end XMin less ZonePhaseMarginDeg (ID-origin
// flaws read below the OD curve) to the curve's shallow end XMax plus
// ZonePhaseMarginDeg (no band when the margin is zero or the sizing curve
// is not on phase). What a mix
// leaves of a support lies outside the band (near the lift-off axis on
// the demo data), while wall loss reads inside it; at a support a small flaw's mix signal
// is comparable with that residue in amplitude, so there phase decides
// (docs/calibration.md).
//
// Only flaw-like indications are sized; the thresholds come from the
// procedure's classification block, never from code.
package analysis
