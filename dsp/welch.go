package dsp

import (
	"errors"
	"fmt"
	"math"

	"github.com/mjibson/go-dsp/spectral"
	"github.com/mjibson/go-dsp/window"
	"gonum.org/v1/gonum/dsp/fourier"
)

// WelchOptions sets up a Welch power spectral density estimate.
type WelchOptions struct {
	// SegmentLen is the number of samples per segment (even; default 256,
	// or the signal length rounded down to even if shorter).
	SegmentLen int
	// Overlap is the number of samples shared by consecutive segments
	// (default SegmentLen/2); 0 ≤ Overlap < SegmentLen. Use NoOverlap for none.
	Overlap int
	// NoOverlap requests Overlap = 0 explicitly.
	NoOverlap bool
}

// ErrSpectrum is returned (wrapped) for input a spectrum cannot be
// estimated from.
var ErrSpectrum = errors.New("spectrum")

func (o WelchOptions) resolve(n int) (seg, overlap int, err error) {
	seg = o.SegmentLen
	if seg == 0 {
		seg = min(256, n-n%2)
	}
	if seg < 2 || seg%2 != 0 {
		return 0, 0, fmt.Errorf("%w: segment length %d: expected an even number ≥ 2", ErrSpectrum, seg)
	}
	if n < seg {
		return 0, 0, fmt.Errorf("%w: %d samples, shorter than one segment of %d", ErrSpectrum, n, seg)
	}
	overlap = o.Overlap
	if overlap == 0 && !o.NoOverlap {
		overlap = seg / 2
	}
	if overlap < 0 || overlap >= seg {
		return 0, 0, fmt.Errorf("%w: overlap %d: expected 0 ≤ overlap < %d", ErrSpectrum, overlap, seg)
	}
	return seg, overlap, nil
}

func checkFinite(x []float64) error {
	for i, v := range x {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("%w: sample %d is %v", ErrSpectrum, i, v)
		}
	}
	return nil
}

// WelchPSD returns the one-sided power spectral density of the real signal x
// in V²/Hz at frequencies k·fs/SegmentLen, k = 0 … SegmentLen/2, by Welch's
// method (Welch 1967): segments of SegmentLen samples stepping by
// SegmentLen−Overlap, each weighted by the symmetric Hann window, no
// detrending, periodograms averaged, normalised by fs·Σw², and the bins
// between 0 and Nyquist doubled. It is computed by go-dsp's spectral.Pwelch
// (whose FFT twiddle caches are guarded by sync.RWMutex, so concurrent calls
// are safe; each distinct segment length adds one cached table).
func WelchPSD(x []float64, sampleRateHz float64, opt WelchOptions) (freqHz, psd []float64, err error) {
	if !(sampleRateHz > 0) || math.IsInf(sampleRateHz, 0) {
		return nil, nil, fmt.Errorf("%w: sample rate %v Hz: expected a positive finite rate", ErrSpectrum, sampleRateHz)
	}
	seg, overlap, err := opt.resolve(len(x))
	if err != nil {
		return nil, nil, err
	}
	if err := checkFinite(x); err != nil {
		return nil, nil, err
	}
	p, f := spectral.Pwelch(x, sampleRateHz, &spectral.PwelchOptions{
		NFFT:     seg,
		Noverlap: overlap,
		Window:   window.Hann,
	})
	return f, p, nil
}

// WelchPSDComplex returns the PSD of a complex channel folded onto
// non-negative frequencies: the sum of the one-sided PSDs of X and Y
// (V²/Hz). It integrates to the variance of X plus that of Y.
func WelchPSDComplex(z []complex128, sampleRateHz float64, opt WelchOptions) (freqHz, psd []float64, err error) {
	x := make([]float64, len(z))
	y := make([]float64, len(z))
	for i, v := range z {
		x[i], y[i] = real(v), imag(v)
	}
	f, px, err := WelchPSD(x, sampleRateHz, opt)
	if err != nil {
		return nil, nil, err
	}
	_, py, err := WelchPSD(y, sampleRateHz, opt)
	if err != nil {
		return nil, nil, err
	}
	for i := range px {
		px[i] += py[i]
	}
	return f, px, nil
}

// AveragedPeriodogram is an independent implementation of the same
// estimate as WelchPSD, written directly from its definition with gonum's
// FFT (Welch 1967, eqs. 3–5; one-sided, symmetric Hann, no detrending). It
// exists to check WelchPSD and takes the same options.
func AveragedPeriodogram(x []float64, sampleRateHz float64, opt WelchOptions) (freqHz, psd []float64, err error) {
	seg, overlap, err := opt.resolve(len(x))
	if err != nil {
		return nil, nil, err
	}
	w := make([]float64, seg)
	var u float64
	for i := range w {
		w[i] = 0.5 * (1 - math.Cos(2*math.Pi*float64(i)/float64(seg-1)))
		u += w[i] * w[i]
	}
	fft := fourier.NewFFT(seg)
	buf := make([]float64, seg)
	coef := make([]complex128, seg/2+1)
	psd = make([]float64, seg/2+1)
	nseg := 0
	for start := 0; start+seg <= len(x); start += seg - overlap {
		for i := range buf {
			buf[i] = w[i] * x[start+i]
		}
		fft.Coefficients(coef, buf)
		for k, c := range coef {
			p := real(c)*real(c) + imag(c)*imag(c)
			if k > 0 && k < seg/2 {
				p *= 2
			}
			psd[k] += p
		}
		nseg++
	}
	freqHz = make([]float64, len(psd))
	for k := range psd {
		psd[k] /= float64(nseg) * sampleRateHz * u
		freqHz[k] = float64(k) * sampleRateHz / float64(seg)
	}
	return freqHz, psd, nil
}
