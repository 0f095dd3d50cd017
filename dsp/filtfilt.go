package dsp

import (
	"errors"
	"fmt"
)

// PadLen returns the number of samples by which FiltFilt extends each end
// of the signal: 3·(2·len(s)+1) minus the number of trailing zero
// coefficients shared by first-order sections (SciPy sosfiltfilt's default
// padlen, so that the two agree sample for sample).
func (s SOS) PadLen() int {
	nb, na := 0, 0
	for _, sec := range s {
		if sec.B[2] == 0 {
			nb++
		}
		if sec.A[2] == 0 {
			na++
		}
	}
	return 3 * (2*len(s) + 1 - min(nb, na))
}

// ErrTooShort is returned (wrapped) when a signal is too short for the
// requested operation.
var ErrTooShort = errors.New("signal too short")

// FiltFilt filters x forwards and then backwards through s, giving a
// zero-phase response |H(f)|², and returns the result in dst (nil: allocated;
// dst may be x). The ends are handled by odd extension over PadLen samples
// and steady-state initial conditions scaled to the first sample of each
// pass (see the package documentation); it returns an error wrapping
// ErrTooShort when len(x) ≤ PadLen. It panics if dst has the wrong length.
func (s SOS) FiltFilt(dst, x []complex128) ([]complex128, error) {
	dst = useDst(dst, len(x))
	w := &FiltFilter{sos: s}
	if err := w.Run(dst, x); err != nil {
		return nil, err
	}
	return dst, nil
}

// FiltFilter is a reusable zero-phase filter that keeps its work buffer
// between calls, for filtering many channels of the same length without
// allocation.
type FiltFilter struct {
	sos  SOS
	ext  []complex128
	zi   [][2]complex128
	z    [][2]complex128
	init bool
}

// NewFiltFilter returns a zero-phase filter for s.
func NewFiltFilter(s SOS) *FiltFilter { return &FiltFilter{sos: s} }

// Run filters x forwards and backwards into dst (len(dst) == len(x); dst
// may be x). It returns an error wrapping ErrTooShort when len(x) ≤ PadLen.
func (f *FiltFilter) Run(dst, x []complex128) error {
	if len(dst) != len(x) {
		panic("dsp: dst length mismatch")
	}
	s := f.sos
	pad := s.PadLen()
	n := len(x)
	if n <= pad {
		return fmt.Errorf("%w: %d samples, zero-phase filtering with %d sections needs more than %d", ErrTooShort, n, len(s), pad)
	}
	if !f.init {
		f.zi = s.steadyState()
		f.z = make([][2]complex128, len(s))
		f.init = true
	}
	m := n + 2*pad
	if cap(f.ext) < m {
		f.ext = make([]complex128, m)
	}
	ext := f.ext[:m]
	// Odd extension: ext[pad-i] = 2x[0] − x[i], ext[pad+n−1+i] = 2x[n−1] − x[n−1−i].
	x0, xn := 2*x[0], 2*x[n-1]
	for i := 1; i <= pad; i++ {
		ext[pad-i] = x0 - x[i]
		ext[pad+n-1+i] = xn - x[n-1-i]
	}
	copy(ext[pad:], x)
	// Forward pass from the steady state for a step of ext[0].
	for k := range f.z {
		f.z[k][0] = f.zi[k][0] * ext[0]
		f.z[k][1] = f.zi[k][1] * ext[0]
	}
	s.filterState(ext, ext, f.z)
	// Backward pass from the steady state for a step of the last output.
	reverse(ext)
	for k := range f.z {
		f.z[k][0] = f.zi[k][0] * ext[0]
		f.z[k][1] = f.zi[k][1] * ext[0]
	}
	s.filterState(ext, ext, f.z)
	for i := 0; i < n; i++ {
		dst[i] = ext[m-1-pad-i]
	}
	return nil
}

func reverse(x []complex128) {
	for i, j := 0, len(x)-1; i < j; i, j = i+1, j-1 {
		x[i], x[j] = x[j], x[i]
	}
}
