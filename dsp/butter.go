package dsp

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"sort"
)

// Section is one second-order section of a digital filter,
//
//	H(z) = (B[0] + B[1] z⁻¹ + B[2] z⁻²) / (A[0] + A[1] z⁻¹ + A[2] z⁻²),
//
// with A[0] = 1 for every section this package designs. A first-order
// section has B[2] = A[2] = 0.
type Section struct {
	B [3]float64 `json:"b"`
	A [3]float64 `json:"a"`
}

// SOS is a cascade of second-order sections, applied in order.
type SOS []Section

// ErrFilterSpec is returned (wrapped) for an impossible filter specification:
// a non-positive order, a cut-off outside (0, fs/2), or band edges in the
// wrong order.
var ErrFilterSpec = errors.New("impossible filter specification")

// ButterworthPrototypePoles returns the n left-half-plane poles of the
// normalised analog Butterworth low-pass filter (cut-off 1 rad/s),
//
//	s_k = exp(jπ(2k+n−1)/(2n)),  k = 1 … n,
//
// (Butterworth 1930; e.g. Oppenheim & Schafer, Discrete-Time Signal
// Processing, 3rd ed., §7.2.3 eq. 7.10). It panics if n < 1.
func ButterworthPrototypePoles(n int) []complex128 {
	if n < 1 {
		panic("dsp: Butterworth order < 1")
	}
	p := make([]complex128, n)
	for k := 1; k <= n; k++ {
		p[k-1] = cmplx.Exp(complex(0, math.Pi*float64(2*k+n-1)/float64(2*n)))
	}
	return p
}

func checkCutoff(what string, fHz, fsHz float64) error {
	if !(fsHz > 0) || math.IsInf(fsHz, 0) {
		return fmt.Errorf("%w: sample rate %v Hz: expected a positive finite rate", ErrFilterSpec, fsHz)
	}
	if !(fHz > 0 && fHz < fsHz/2) {
		return fmt.Errorf("%w: %s %v Hz: expected 0 < f < %v Hz (half the sample rate)", ErrFilterSpec, what, fHz, fsHz/2)
	}
	return nil
}

func checkOrder(order int) error {
	if order < 1 || order > 64 {
		return fmt.Errorf("%w: order %d: expected 1 to 64", ErrFilterSpec, order)
	}
	return nil
}

// prewarp maps a digital frequency to the analog frequency (rad/s) that the
// bilinear transform s = 2fs(z−1)/(z+1) sends onto it.
func prewarp(fHz, fsHz float64) float64 { return 2 * fsHz * math.Tan(math.Pi*fHz/fsHz) }

// bilinear maps an analog root s to the z plane, z = (2fs+s)/(2fs−s).
func bilinear(s complex128, fsHz float64) complex128 {
	k := complex(2*fsHz, 0)
	return (k + s) / (k - s)
}

// ButterworthLowpass designs an order-n digital Butterworth low-pass filter
// with its −3.01 dB point at cutoffHz, by the bilinear transform with
// pre-warping (Oppenheim & Schafer §7.2.1–7.2.3). Sections are ordered from
// the pole farthest from the unit circle to the nearest, the overall gain
// is carried by the first section and the gain at 0 Hz is 1 (the same
// layout as SciPy's butter(..., output='sos')).
func ButterworthLowpass(order int, cutoffHz, sampleRateHz float64) (SOS, error) {
	if err := checkOrder(order); err != nil {
		return nil, err
	}
	if err := checkCutoff("low-pass cut-off", cutoffHz, sampleRateHz); err != nil {
		return nil, err
	}
	wc := prewarp(cutoffHz, sampleRateHz)
	var poles []complex128
	for _, p := range ButterworthPrototypePoles(order) {
		poles = append(poles, bilinear(p*complex(wc, 0), sampleRateHz))
	}
	zeros := make([]complex128, order)
	for i := range zeros {
		zeros[i] = -1
	}
	return assemble(zeros, poles, 1, sampleRateHz), nil
}

// ButterworthHighpass designs an order-n digital Butterworth high-pass
// filter with its −3.01 dB point at cutoffHz (analog low-pass to high-pass
// transform s → Ωc/s, then the bilinear transform with pre-warping). The
// gain at the Nyquist frequency is 1.
func ButterworthHighpass(order int, cutoffHz, sampleRateHz float64) (SOS, error) {
	if err := checkOrder(order); err != nil {
		return nil, err
	}
	if err := checkCutoff("high-pass cut-off", cutoffHz, sampleRateHz); err != nil {
		return nil, err
	}
	wc := prewarp(cutoffHz, sampleRateHz)
	var poles []complex128
	for _, p := range ButterworthPrototypePoles(order) {
		poles = append(poles, bilinear(complex(wc, 0)/p, sampleRateHz))
	}
	zeros := make([]complex128, order)
	for i := range zeros {
		zeros[i] = 1
	}
	return assemble(zeros, poles, 0.5, sampleRateHz), nil
}

// ButterworthBandpass designs a digital Butterworth band-pass filter from an
// order-n prototype (so the filter has order 2n) with −3.01 dB points at
// lowHz and highHz (analog low-pass to band-pass transform
// s → (s² + Ω0²)/(s·B) with pre-warped edges, Ω0² = Ω1Ω2, B = Ω2 − Ω1, then
// the bilinear transform). The gain at the centre frequency
// fs/π·atan(Ω0/(2fs)) is 1.
func ButterworthBandpass(order int, lowHz, highHz, sampleRateHz float64) (SOS, error) {
	if err := checkOrder(order); err != nil {
		return nil, err
	}
	if err := checkCutoff("band-pass lower edge", lowHz, sampleRateHz); err != nil {
		return nil, err
	}
	if err := checkCutoff("band-pass upper edge", highHz, sampleRateHz); err != nil {
		return nil, err
	}
	if !(lowHz < highHz) {
		return nil, fmt.Errorf("%w: band-pass edges %v Hz and %v Hz: expected lower < upper", ErrFilterSpec, lowHz, highHz)
	}
	w1, w2 := prewarp(lowHz, sampleRateHz), prewarp(highHz, sampleRateHz)
	w0sq, bw := w1*w2, w2-w1
	var poles []complex128
	for _, p := range ButterworthPrototypePoles(order) {
		pb := p * complex(bw, 0)
		d := cmplx.Sqrt(pb*pb - complex(4*w0sq, 0))
		poles = append(poles, bilinear((pb+d)/2, sampleRateHz), bilinear((pb-d)/2, sampleRateHz))
	}
	zeros := make([]complex128, 0, 2*order)
	for i := 0; i < order; i++ {
		zeros = append(zeros, 1, -1)
	}
	fc := sampleRateHz / math.Pi * math.Atan(math.Sqrt(w0sq)/(2*sampleRateHz))
	return assemble(zeros, poles, fc/sampleRateHz, sampleRateHz), nil
}

// assemble pairs conjugate poles into sections (a lone real pole becomes a
// first-order section), gives each section a pair of zeros, orders sections
// from the smallest to the largest pole radius and scales the first section
// so that |H| = 1 at the normalised frequency normF (cycles per sample).
func assemble(zeros, poles []complex128, normF, fsHz float64) SOS {
	// Keep one pole of each conjugate pair (upper half plane) and the real ones.
	type group struct {
		p    complex128
		real bool
	}
	var groups []group
	const tol = 1e-12
	for _, p := range poles {
		switch {
		case math.Abs(imag(p)) <= tol*math.Max(1, cmplx.Abs(p)):
			groups = append(groups, group{complex(real(p), 0), true})
		case imag(p) > 0:
			groups = append(groups, group{p, false})
		}
	}
	sort.SliceStable(groups, func(i, j int) bool { return cmplx.Abs(groups[i].p) < cmplx.Abs(groups[j].p) })
	// Denominators: real poles first (in pairs, a lone one as a first-order
	// section), then the conjugate pairs by increasing radius.
	var dens [][3]float64
	var realPoles []float64
	for _, g := range groups {
		if g.real {
			realPoles = append(realPoles, real(g.p))
		}
	}
	for i := 0; i < len(realPoles); i += 2 {
		if i+1 < len(realPoles) {
			p1, p2 := realPoles[i], realPoles[i+1]
			dens = append(dens, [3]float64{1, -(p1 + p2), p1 * p2})
		} else {
			dens = append(dens, [3]float64{1, -realPoles[i], 0})
		}
	}
	for _, g := range groups {
		if !g.real {
			dens = append(dens, [3]float64{1, -2 * real(g.p), real(g.p)*real(g.p) + imag(g.p)*imag(g.p)})
		}
	}
	// Numerators: pad the zeros with z = 0 to two per section, then, from
	// the last section (poles nearest the unit circle) to the first, give
	// each section the remaining zero nearest its outer pole and the
	// remaining zero nearest its inner pole (nearest-pairing, the rule of
	// SciPy's zpk2sos, so the sections agree coefficient for coefficient).
	sos := make(SOS, len(dens))
	zs := make([]float64, 0, 2*len(dens))
	for _, z := range zeros {
		zs = append(zs, real(z))
	}
	for len(zs) < 2*len(dens) {
		zs = append(zs, 0)
	}
	take := func(p complex128) float64 {
		best := 0
		for i := range zs {
			if cmplx.Abs(complex(zs[i], 0)-p) < cmplx.Abs(complex(zs[best], 0)-p) {
				best = i
			}
		}
		z := zs[best]
		zs = append(zs[:best], zs[best+1:]...)
		return z
	}
	for k := len(dens) - 1; k >= 0; k-- {
		a := dens[k]
		var outer, inner complex128
		if d := a[1]*a[1] - 4*a[2]; d < 0 {
			outer = complex(-a[1]/2, math.Sqrt(-d)/2)
			inner = outer
		} else {
			r1, r2 := (-a[1]+math.Sqrt(d))/2, (-a[1]-math.Sqrt(d))/2
			if math.Abs(r2) > math.Abs(r1) {
				r1, r2 = r2, r1
			}
			outer, inner = complex(r1, 0), complex(r2, 0)
		}
		za := take(outer)
		zb := take(inner)
		sos[k].A = a
		sos[k].B = [3]float64{1, -(za + zb), za * zb}
	}
	g := cmplx.Abs(sos.Response(normF*fsHz, fsHz))
	for k := range sos[0].B {
		sos[0].B[k] /= g
	}
	return sos
}

// Response returns the complex frequency response H(e^{j2πf/fs}) of the
// cascade at freqHz.
func (s SOS) Response(freqHz, sampleRateHz float64) complex128 {
	zinv := cmplx.Exp(complex(0, -2*math.Pi*freqHz/sampleRateHz))
	h := complex(1, 0)
	for _, sec := range s {
		num := complex(sec.B[0], 0) + zinv*(complex(sec.B[1], 0)+zinv*complex(sec.B[2], 0))
		den := complex(sec.A[0], 0) + zinv*(complex(sec.A[1], 0)+zinv*complex(sec.A[2], 0))
		h *= num / den
	}
	return h
}

// Poles returns the poles of every section in the z plane (two per
// second-order section, one per first-order section).
func (s SOS) Poles() []complex128 {
	var p []complex128
	for _, sec := range s {
		a0, a1, a2 := sec.A[0], sec.A[1], sec.A[2]
		if a2 == 0 {
			p = append(p, complex(-a1/a0, 0))
			continue
		}
		d := cmplx.Sqrt(complex(a1*a1-4*a0*a2, 0))
		p = append(p, (complex(-a1, 0)+d)/complex(2*a0, 0), (complex(-a1, 0)-d)/complex(2*a0, 0))
	}
	return p
}

// Validate reports a section with A[0] ≠ 1, a non-finite coefficient, or a
// pole on or outside the unit circle.
func (s SOS) Validate() error {
	if len(s) == 0 {
		return errors.New("filter has no sections")
	}
	for i, sec := range s {
		for _, v := range append(sec.B[:], sec.A[:]...) {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("section %d: non-finite coefficient", i)
			}
		}
		if sec.A[0] != 1 {
			return fmt.Errorf("section %d: a0 = %v, expected 1", i, sec.A[0])
		}
	}
	for _, p := range s.Poles() {
		if cmplx.Abs(p) >= 1 {
			return fmt.Errorf("pole %v on or outside the unit circle: filter unstable", p)
		}
	}
	return nil
}

// Filter runs x through the cascade from rest (zero initial state) in
// transposed direct form II and returns the output in dst, which may be nil
// (then allocated) or x itself. It panics if dst is non-nil with a length
// different from x.
func (s SOS) Filter(dst, x []complex128) []complex128 {
	dst = useDst(dst, len(x))
	z := make([][2]complex128, len(s))
	s.filterState(dst, x, z)
	return dst
}

// FilterReal is Filter for real samples.
func (s SOS) FilterReal(dst, x []float64) []float64 {
	if dst == nil {
		dst = make([]float64, len(x))
	}
	if len(dst) != len(x) {
		panic("dsp: dst length mismatch")
	}
	copy(dst, x)
	for _, sec := range s {
		b0, b1, b2, a1, a2 := sec.B[0], sec.B[1], sec.B[2], sec.A[1], sec.A[2]
		var z1, z2 float64
		for i, v := range dst {
			y := b0*v + z1
			z1 = (b1*v + z2) - a1*y
			z2 = b2*v - a2*y
			dst[i] = y
		}
	}
	return dst
}

func useDst(dst []complex128, n int) []complex128 {
	if dst == nil {
		return make([]complex128, n)
	}
	if len(dst) != n {
		panic("dsp: dst length mismatch")
	}
	return dst
}

// filterState filters x into dst starting from (and updating) the section
// states z. dst may alias x.
func (s SOS) filterState(dst, x []complex128, z [][2]complex128) {
	src := x
	k := 0
	// Sections two at a time in one loop: each section's recursion is a
	// chain of dependent operations, and running two of them side by side
	// lets the processor overlap them. Each section does exactly what it
	// does alone, so the result is the same to the bit.
	for ; k+1 < len(s); k += 2 {
		filterPair(s[k], s[k+1], dst, src, &z[k], &z[k+1])
		src = dst
	}
	if k < len(s) {
		sec := s[k]
		b0, b1, b2, a1, a2 := sec.B[0], sec.B[1], sec.B[2], sec.A[1], sec.A[2]
		z1r, z1i := real(z[k][0]), imag(z[k][0])
		z2r, z2i := real(z[k][1]), imag(z[k][1])
		dst := dst[:len(src)]
		for i, v := range src {
			vr, vi := real(v), imag(v)
			// Ordered so the recursive path (y → a1·y → z1 → next y) is
			// one multiply and two adds long.
			yr := b0*vr + z1r
			yi := b0*vi + z1i
			z1r = (b1*vr + z2r) - a1*yr
			z1i = (b1*vi + z2i) - a1*yi
			z2r = b2*vr - a2*yr
			z2i = b2*vi - a2*yi
			dst[i] = complex(yr, yi)
		}
		z[k] = [2]complex128{complex(z1r, z1i), complex(z2r, z2i)}
	}
	if len(s) == 0 {
		copy(dst, x)
	}
}

// filterPairGo runs the sections p then q (states zp, zq) over x into
// dst in one loop, with the operations of filterState's single-section
// loop (the portable form of filterPair).
func filterPairGo(p, q Section, dst, x []complex128, zp, zq *[2]complex128) {
	pb0, pb1, pb2, pa1, pa2 := p.B[0], p.B[1], p.B[2], p.A[1], p.A[2]
	qb0, qb1, qb2, qa1, qa2 := q.B[0], q.B[1], q.B[2], q.A[1], q.A[2]
	p1r, p1i, p2r, p2i := real(zp[0]), imag(zp[0]), real(zp[1]), imag(zp[1])
	q1r, q1i, q2r, q2i := real(zq[0]), imag(zq[0]), real(zq[1]), imag(zq[1])
	dst = dst[:len(x)]
	for i, v := range x {
		vr, vi := real(v), imag(v)
		yr := pb0*vr + p1r
		yi := pb0*vi + p1i
		p1r = (pb1*vr + p2r) - pa1*yr
		p1i = (pb1*vi + p2i) - pa1*yi
		p2r = pb2*vr - pa2*yr
		p2i = pb2*vi - pa2*yi
		wr := qb0*yr + q1r
		wi := qb0*yi + q1i
		q1r = (qb1*yr + q2r) - qa1*wr
		q1i = (qb1*yi + q2i) - qa1*wi
		q2r = qb2*yr - qa2*wr
		q2i = qb2*yi - qa2*wi
		dst[i] = complex(wr, wi)
	}
	*zp = [2]complex128{complex(p1r, p1i), complex(p2r, p2i)}
	*zq = [2]complex128{complex(q1r, q1i), complex(q2r, q2i)}
}

// steadyState returns the section states of the cascade after a unit step
// has run for ever (the initial conditions of SciPy's sosfilt_zi): for each
// section in transposed direct form II with input level u and DC gain G,
// z1 = u(G − b0), z2 = u(b2 − a2·G), and the next section sees u·G.
func (s SOS) steadyState() [][2]complex128 {
	z := make([][2]complex128, len(s))
	u := 1.0
	for k, sec := range s {
		g := (sec.B[0] + sec.B[1] + sec.B[2]) / (sec.A[0] + sec.A[1] + sec.A[2])
		z[k] = [2]complex128{complex(u*(g-sec.B[0]), 0), complex(u*(sec.B[2]-sec.A[2]*g), 0)}
		u *= g
	}
	return z
}
