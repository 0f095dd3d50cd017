// Package synth generates invented, physics-based, seeded and
// deterministic eddy-current inspection data for demonstration and
// testing: bobbin-probe scans of every tube of an invented heat exchanger,
// the calibration standard and its scans at the opening and closing of each
// calibration group, raw coil-voltage recordings, and the ground truth kept
// apart from the scans. The scenario is described in docs/demo-scenario.md;
// nothing in it is a real plant, company, product or person.
//
// # Determinism
//
// Every random number comes from a PCG stream seeded by Config.Seed and an
// index: tube i's conditions from rand.NewPCG(seed, i), its noise from a
// second, salted stream, each calibration scan, the standard, the
// instrument and each raw recording from streams of their own. Tube(i) thus
// depends only on the Config and i: tubes can be generated in any order, one
// at a time, or concurrently, and give the same bytes.
//
// # Axes and units
//
// Positions are metres along the tube in the direction of travel of the
// pull, from the tube end where the pull starts (landmark "end-B") to
// Config.LengthM ("end-A"). Samples lie on a uniform grid of recorded
// (encoder) positions, Config.SamplesPerM per metre (30 per inch in the
// demo, common practice, no source; FIELD.md §8), rounded to whole
// micrometres; the encoder's reading differs slightly from the coils' true
// position (a scale error and a slow wiggle, a few millimetres over a tube,
// up to ±2 % on the short calibration standard), and the pull speed varies
// by up to ±Config.SpeedVariation, so sample times, rounded to whole
// microseconds, are not uniform. Ground truth gives true positions.
// Samples are X + jY volts rounded to 1 mV.
//
// # Signal model (FIELD.md §8, with the choices made here)
//
// Time dependence is e^{+jωt}. The standard depth of penetration is
// δ = 1/√(π f μ0 μr σ) (impedance.SkinDepthM).
//
// A thin element of missing wall at distance x from the coil-side (inside)
// surface responds as
//
//	e^{−(1+j)·2x/δ}                                  (ElementResponse)
//
// that is with amplitude e^{−2x/δ} and a phase lag of 2x/δ. The lag is the
// plane-wave rule: eddy currents at depth x lag the surface currents by x/δ
// radians and the coil signal from a flaw there by about twice that (Cecco,
// Van Drunen & Sharp, Eddy Current Testing Vol. 1, AECL-7523, 1983, from
// memory; FIELD.md §1.4). The amplitude uses the same round trip, e^{−2x/δ}
// rather than the one-way e^{−x/δ}: the field driving the element is
// attenuated once on the way in and the element's own field once more on
// the way back to the coil, and taking both factors together keeps the
// element response an analytic function of (1+j)x/δ, the form of the
// plane-wave solution.
//
// A flaw occupying depths x1 … x2 with circumferential width w responds as
// w·∫ e^{−κx} dx = w·(e^{−κx1} − e^{−κx2})/κ with κ = 2(1+j)/δ
// (LayerResponse, closed form): OD-origin flaws of depth d %TW occupy
// t(1 − d/100) … t, ID-origin flaws 0 … t·d/100, through-wall holes 0 … t.
// Deeper OD flaws are larger and rotate toward the through-wall phase. At
// the demo's prime frequency (400 kHz, δ = 0.85 mm, t = 1.09 mm) and with
// the through-wall hole put at 40°, the standard's holes fall at about 67°
// (80 %), 91° (60 %), 109° (40 %) and 127° (20 %), and lift-off at about
// −3° — close to the typical angles FIELD.md §1.4 lists.
//
// A limit of the rule: thin elements at the inside and outside surfaces
// are 2t/δ apart, 90° when t = (π/4)δ, whereas the f90 formula of FIELD.md
// §2.3 puts 90° at t ≈ 1.09δ; at that frequency the rule gives 125°. The
// demo follows the plane-wave rule throughout, so its phase spread between
// ID and OD is somewhat wider than a real coil's at the same frequency;
// calibration curves are taken from the demo's own standard, as FIELD.md
// §1.4 advises, so analysis is unaffected.
//
// Axially, a feature occupying [z1, z2] is seen by a coil of Gaussian
// sensitivity (full width at half maximum Config.CoilLengthM) as
// B(z) = ½[erf((z−z1)/(√2σ)) − erf((z−z2)/(√2σ))] (AbsoluteShape): a
// Gaussian of the coil's width for a short flaw, the flaw's extent for a long
// one. The absolute channel is response·B(z); the differential channel is
// the difference of two absolute responses offset by the coil spacing s,
// response·[B(z − s/2) − B(z + s/2)] (DifferentialShape), so it is
// antisymmetric about a symmetric flaw.
//
// Each frequency is normalised so that the standard's four 20 %TW
// flat-bottom holes read 4 V peak-to-peak on its differential channel
// (FIELD.md §1.3); these are "normalised volts". Other sources, in
// normalised volts at the prime frequency:
//
//   - Lift-off-like features (the open tube ends, the expansion (roll)
//     transitions inside the tubesheets, dents, dings, probe wobble): the
//     phase of a surface element (model phase 0), the same amplitude at every
//     frequency. Dents and dings reduce the gap, so their sign is opposite to
//     wall loss.
//   - Support plates and tubesheets (carbon steel outside the tube): their
//     own response is a magnetic part, dominant below the geometric mean
//     f_c of the frequency set, plus an eddy-current part, dominant above it
//     and opposite to wall loss: 0.6·f_c/(f+f_c)·e^{−jπ/2} − 0.4·f/(f+f_c),
//     reaching the coil through the wall as e^{−κt}. Their phase therefore
//     turns by about 90° between 400 and 100 kHz. Their axial blur is the
//     coil's widened by 0.9 δ (the field reaches further out at low
//     frequency), so a two-frequency mix cannot cancel them exactly and
//     leaves about 9 % (FIELD.md §8: real mixes leave 5–15 %). Demo model
//     choices, not published laws.
//   - Magnetic deposits: the magnetic part only, through the wall, so they
//     are several times larger at the low frequency than at the prime.
//   - Burnish marks: a very shallow ID layer (5 %TW) over 10–40 mm.
//   - Noise on each channel: white (rms Config.NoiseV on differential
//     channels, 1.5 times that on absolute ones), 1/f-like noise as a sum of
//     first-order autoregressive processes with correlation lengths 5 mm,
//     50 mm (and 0.5 m on absolute channels), and a slow drift (a random
//     linear trend plus a 2 m-correlated wander, ten times smaller on the
//     differential channels). Probe wobble is a smooth gap change
//     (correlation length 15 mm, rms 0.15 V) in the lift-off direction, in
//     full on the absolute channels and as the two coils' difference plus a
//     5 % coil imbalance on the differential ones. In all, a differential
//     channel carries about 0.04 V rms, up to about 0.2 V peak-to-peak over
//     30 mm (FIELD.md §8: 0.05–0.2 V), an absolute channel about 0.15 V rms.
//
// # Instrument
//
// The recorded sample of channel c is gain_c·e^{j·rot_c}·conj(signal) +
// offset_c. The conjugate is the demo instrument's quadrature sign: it shows
// a phase lag as a counter-clockwise turn, the trade's display convention in
// which shallower OD flaws sit at larger angles than the through-wall hole
// (FIELD.md §1.4), so calibration needs only a rotation and a gain. The gain
// (0.4 to 2.4) and rotation (any angle) are drawn per channel, change
// slightly at each group's set-up (±1.5°, ±2 %), and drift within tolerance
// across a group (±1°, ±1 %). The closing calibration of
// Config.DriftedGroup turns by a further Config.DriftDeg and gains
// Config.DriftGain, and that group's tubes drift linearly towards it, so the
// closing check fails. Calibration must find each channel's rotation and
// gain from the standard; InstrumentState exposes them for tests.
//
// # Raw recordings
//
// Raw(i) samples the coil voltage over a few centimetres of a tube or the
// standard at Config.RawSampleRateHz: the sum over tones of
// Re{P_f·e^{j(ω(t−t0)+φ_f)}} (simultaneous tones) or one tone per slot of
// SlotS seconds in turn (time-multiplexed), with P_f = 0.02 V per
// normalised volt of the channel's signal plus a bridge imbalance, ADC
// noise of 0.2 mV rms and 10 µV resolution. Where the reference is
// recorded it is Σ cos(ω(t−t0)+φ_f) (the active tone only when
// multiplexed); without it φ_f = 0. Demodulated as the dsp package does
// (z = 2·LP{v·e^{−jω(t−t0)}}, referred to the reference) the record gives
// P_f.
package synth
