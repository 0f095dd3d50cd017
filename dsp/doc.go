// Package dsp turns raw coil voltages and demodulated eddy-current scans into
// clean channels: digital lock-in demodulation, Butterworth filters in
// second-order sections, zero-phase filtering, spike and drift removal,
// resampling to a uniform axial grid, channel operations (null, rotate,
// gain), multi-frequency mixing and noise spectra.
//
// Nothing in this package changes its input: every operation returns new
// sample slices, channels or scans, so raw data stay raw.
//
// # Conventions
//
// Time dependence. Phasors follow e^{+jωt}: a coil voltage
//
//	v(t) = A cos(ωt + θ) = Re{A e^{jθ} e^{+jωt}}
//
// is represented by the complex sample z = X + jY = A e^{jθ}, so that
// X = A cos θ is the in-phase and Y = A sin θ the quadrature component, in
// volts (peak amplitude, not RMS). The lock-in forms
// z = 2·LP{v(t)·e^{-jω(t−t0)}}, where LP is the demodulation low-pass
// filter with unit gain at 0 Hz, and t0 is the time of the record's first
// sample, so a synthetic A cos(ω(t−t0) + θ) demodulates to A e^{jθ}.
// When a reference channel r(t) = R cos(ω(t−t0) + φ) was recorded, the
// output is referred to it: z = A e^{j(θ−φ)}, so a coil voltage in phase
// with the reference gives a purely real z.
//
// Rotation. Rotate(c, α) multiplies every sample by e^{jα}: a positive angle turns the
// impedance-plane trace anticlockwise.
//
// Filters. Digital filters are second-order sections (SOS)
//
//	H(z) = Π_k (b0k + b1k z⁻¹ + b2k z⁻²) / (1 + a1k z⁻¹ + a2k z⁻²)
//
// run in transposed direct form II. Butterworth designs use the bilinear
// transform s = 2fs (z−1)/(z+1) with the cut-off frequencies pre-warped,
// Ω = 2fs tan(π f/fs), so the −3.01 dB point (|H| = 1/√2) falls exactly at
// the requested digital cut-off. Filters act on X and Y alike (real
// coefficients applied to complex samples).
//
// Zero-phase filtering (FiltFilt) runs the filter forwards then backwards,
// so its response is |H|² with zero phase. Edges use the standard
// odd-extension method: the signal is extended at each end by
// 3·(2·sections+1) samples reflected through the end value
// (2x[0] − x[i]), and each pass starts from the steady-state section states
// for a step of the first extended value. This is the same padding and
// initial condition as SciPy's sosfiltfilt defaults (padtype "odd"), and the
// tests compare against it. It is not Gustafsson's (1996) optimal
// initialisation.
//
// Spectra. The FFT is unnormalised (X_k = Σ x_n e^{−j2πkn/N}). WelchPSD
// returns a one-sided power spectral density in V²/Hz: the bins between 0
// and the Nyquist frequency are doubled, so that the integral of the PSD
// over [0, fs/2] (sum × bin width) equals the mean square of the windowed
// segments, which for a stationary zero-mean signal is its variance.
// Segments are weighted by the symmetric Hann window w[n] =
// 0.5(1 − cos(2πn/(N−1))) (MATLAB/go-dsp convention, SciPy
// signal.windows.hann(N, sym=True)), no detrending is applied, and the
// density is normalised by fs·Σw². For a complex channel the PSD is
// the sum of the PSDs of X and Y, which is the two-sided PSD of X+jY folded
// onto positive frequencies: it integrates to the variance of X plus the
// variance of Y.
//
// Lock-in demodulation (Demodulate) of simultaneous tones is two zero-phase
// stages: a centred B-spline (four boxcars, CIC response) decimator whose
// nulls sit on every multiple of the intermediate rate, then the
// Butterworth low-pass run forwards and backwards at that rate; output
// samples are centred on input samples (no delay). Time-multiplexed records
// give one Blackman–Harris-weighted lock-in value per slot after the
// settling time (weights: the symmetric 4-term Blackman–Harris window,
// w[k] over k = 0 … N−1 with N−1 in the cosines, gonum dsp/window),
// interpolated onto the centre of each cycle. Channels are
// named "<kHz>k-<coil>", for example "400k-diff" (ChannelLabel).
//
// Concurrency. Functions here keep no package state (beyond a read-only
// flag, set at start-up, saying whether the processor has AVX); a
// FiltFilter or demodulator is not safe for concurrent use, everything
// else is. DemodOptions.Workers splits the lock-in's first stage into time
// ranges and filters tones concurrently, with the same output bits as one
// worker. WelchPSD calls github.com/mjibson/go-dsp, whose FFT keeps
// package-level twiddle-factor caches guarded by sync.RWMutex (fft/radix2.go, fft/bluestein.go at the
// pinned version), so concurrent calls are safe; a test runs them
// concurrently under the race detector. Each distinct segment length adds
// one cached table for the life of the process.
//
// Mixing. A mix subtracts from a primary channel z1 the least-squares
// image of one or two other channels over training windows (see TrainMix):
// affine form m = z1 − Σ(α_k z_k + β_k conj(z_k)) − c, rotate-and-scale form
// m = z1 − Σ w_k z_k − c.
//
// Indices. Sample windows are half-open [start, end) index ranges;
// ParseWindows also reads them as position or time ranges with units.
package dsp
