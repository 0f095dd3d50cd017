package viewmodel

import (
	"math"
	"sort"
)

// Part selects which part of a complex sample a strip chart draws.
type Part int

// Parts of a complex sample.
const (
	PartX Part = iota // in-phase (real part)
	PartY             // quadrature (imaginary part)
)

// String returns "X" or "Y".
func (p Part) String() string {
	if p == PartX {
		return "X"
	}
	return "Y"
}

// Span is the smallest and largest value of one pixel column; Empty
// columns have no sample.
type Span struct {
	Min, Max float32
	Empty    bool
}

// Decimate reduces the samples [lo, hi) of one part of a channel to one
// min/max Span per pixel column, so that a trace never shows more than two
// points per column yet keeps every peak (min/max decimation). The columns
// cover the axis range [from, to] evenly; sample i falls in column
// floor((axis[i]−from)·cols/(to−from)), clamped to the first and last
// column; a nil axis uses the sample index as the axis value. dst is reused
// when it has room and returned with length cols. Decimate panics if
// cols < 0, the range lies outside the samples or the axis is shorter than
// the samples.
func Decimate(dst []Span, samples []complex128, axis []float64, p Part, lo, hi int, from, to float64, cols int) []Span {
	if cols < 0 || lo < 0 || hi > len(samples) || lo > hi || (axis != nil && len(axis) < len(samples)) {
		panic("viewmodel: Decimate range out of bounds")
	}
	if cap(dst) < cols {
		dst = make([]Span, cols)
	}
	dst = dst[:cols]
	for i := range dst {
		dst[i] = Span{Min: float32(math.Inf(1)), Max: float32(math.Inf(-1)), Empty: true}
	}
	if hi == lo || cols == 0 || !(to > from) {
		return dst
	}
	scale := float64(cols) / (to - from)
	last := cols - 1
	for i := lo; i < hi; i++ {
		x := float64(i)
		if axis != nil {
			x = axis[i]
		}
		c := int((x - from) * scale)
		if c < 0 {
			c = 0
		} else if c > last {
			c = last
		}
		var v float32
		if p == PartX {
			v = float32(real(samples[i]))
		} else {
			v = float32(imag(samples[i]))
		}
		s := &dst[c]
		if v < s.Min {
			s.Min = v
		}
		if v > s.Max {
			s.Max = v
		}
		s.Empty = false
	}
	return dst
}

// IndexRange returns the half-open sample range [lo, hi) whose positions
// lie within [fromM, toM], for a monotonic axis (increasing or decreasing).
// A nil axis is taken as the sample index itself.
func IndexRange(axis []float64, n int, fromM, toM float64) (lo, hi int) {
	if fromM > toM {
		fromM, toM = toM, fromM
	}
	if axis == nil {
		lo = max(0, int(math.Ceil(fromM)))
		hi = min(n, int(math.Floor(toM))+1)
		if hi < lo {
			hi = lo
		}
		return lo, hi
	}
	if len(axis) == 0 {
		return 0, 0
	}
	if axis[len(axis)-1] >= axis[0] {
		lo = sort.SearchFloat64s(axis, fromM)
		hi = sort.Search(len(axis), func(i int) bool { return axis[i] > toM })
		return lo, hi
	}
	// Decreasing axis.
	lo = sort.Search(len(axis), func(i int) bool { return axis[i] <= toM })
	hi = sort.Search(len(axis), func(i int) bool { return axis[i] < fromM })
	return lo, hi
}

// Ticks returns "nice" tick values (1, 2 or 5 × 10^k steps) covering
// [lo, hi] with about n ticks, and the step.
func Ticks(lo, hi float64, n int) (ticks []float64, step float64) {
	if !(hi > lo) || n < 1 || math.IsInf(hi-lo, 0) {
		return nil, 0
	}
	raw := (hi - lo) / float64(n)
	mag := math.Pow(10, math.Floor(math.Log10(raw)))
	switch r := raw / mag; {
	case r < 1.5:
		step = mag
	case r < 3.5:
		step = 2 * mag
	case r < 7.5:
		step = 5 * mag
	default:
		step = 10 * mag
	}
	for v := math.Ceil(lo/step) * step; v <= hi+step*1e-9; v += step {
		if math.Abs(v) < step*1e-9 {
			v = 0
		}
		ticks = append(ticks, v)
	}
	return ticks, step
}

// EnvelopeBlock is the number of samples summarised by one envelope entry.
const EnvelopeBlock = 16

// Envelope holds the minimum and maximum of X and Y over consecutive
// blocks of a channel's samples, so that decimating a long scan reads one
// entry per block instead of every sample.
type Envelope struct {
	block                  int
	xmin, xmax, ymin, ymax []float32
}

// NewEnvelope summarises z in blocks of EnvelopeBlock samples.
func NewEnvelope(z []complex128) *Envelope {
	b := EnvelopeBlock
	nb := (len(z) + b - 1) / b
	e := &Envelope{block: b, xmin: make([]float32, nb), xmax: make([]float32, nb), ymin: make([]float32, nb), ymax: make([]float32, nb)}
	for k := range nb {
		seg := z[k*b : min((k+1)*b, len(z))]
		xlo, xhi := float32(real(seg[0])), float32(real(seg[0]))
		ylo, yhi := float32(imag(seg[0])), float32(imag(seg[0]))
		for _, v := range seg[1:] {
			x, y := float32(real(v)), float32(imag(v))
			xlo, xhi = min(xlo, x), max(xhi, x)
			ylo, yhi = min(ylo, y), max(yhi, y)
		}
		e.xmin[k], e.xmax[k], e.ymin[k], e.ymax[k] = xlo, xhi, ylo, yhi
	}
	return e
}

// DecimateEnvelope gives the same result as Decimate, faster for long
// ranges: each column's samples are found by binary search on the axis and
// whole blocks inside a column are read from env. It falls back to
// Decimate for a nil envelope, an axis that is not increasing or a range
// with fewer than four samples per column.
func DecimateEnvelope(dst []Span, env *Envelope, samples []complex128, axis []float64, p Part, lo, hi int, from, to float64, cols int) []Span {
	if p == PartX {
		dst, _ = DecimateEnvelopeXY(dst, nil, env, samples, axis, lo, hi, from, to, cols)
		return dst
	}
	_, dst = DecimateEnvelopeXY(nil, dst, env, samples, axis, lo, hi, from, to, cols)
	return dst
}

// DecimateEnvelopeXY decimates X into dstX and Y into dstY in one pass
// (see DecimateEnvelope); a nil dstX or dstY with zero capacity is
// allocated, and both are returned with length cols.
func DecimateEnvelopeXY(dstX, dstY []Span, env *Envelope, samples []complex128, axis []float64, lo, hi int, from, to float64, cols int) ([]Span, []Span) {
	increasing := axis == nil || len(axis) < 2 || axis[len(axis)-1] >= axis[0]
	if env == nil || !increasing || cols <= 0 || !(to > from) || hi-lo < 4*cols {
		return Decimate(dstX, samples, axis, PartX, lo, hi, from, to, cols), Decimate(dstY, samples, axis, PartY, lo, hi, from, to, cols)
	}
	if lo < 0 || hi > len(samples) || lo > hi || (axis != nil && len(axis) < len(samples)) {
		panic("viewmodel: DecimateEnvelope range out of bounds")
	}
	if cap(dstX) < cols {
		dstX = make([]Span, cols)
	}
	if cap(dstY) < cols {
		dstY = make([]Span, cols)
	}
	dstX, dstY = dstX[:cols], dstY[:cols]
	scale := float64(cols) / (to - from)
	b := env.block
	inf := float32(math.Inf(1))
	start := lo
	for c := range cols {
		end := hi
		if c < cols-1 {
			// First sample of [start, hi) in a later column: the smallest i
			// with int((axis[i]−from)·scale) ≥ c+1 (the mapping of Decimate).
			l, h := start, hi
			for l < h {
				m := int(uint(l+h) >> 1)
				x := float64(m)
				if axis != nil {
					x = axis[m]
				}
				if int((x-from)*scale) >= c+1 {
					h = m
				} else {
					l = m + 1
				}
			}
			end = l
		}
		xlo, xhi, ylo, yhi := inf, -inf, inf, -inf
		i := start
		head := min(end, (i+b-1)/b*b)
		for ; i < head; i++ {
			x, y := float32(real(samples[i])), float32(imag(samples[i]))
			xlo, xhi, ylo, yhi = min(xlo, x), max(xhi, x), min(ylo, y), max(yhi, y)
		}
		for ; i+b <= end; i += b {
			k := i / b
			xlo, xhi = min(xlo, env.xmin[k]), max(xhi, env.xmax[k])
			ylo, yhi = min(ylo, env.ymin[k]), max(yhi, env.ymax[k])
		}
		for ; i < end; i++ {
			x, y := float32(real(samples[i])), float32(imag(samples[i]))
			xlo, xhi, ylo, yhi = min(xlo, x), max(xhi, x), min(ylo, y), max(yhi, y)
		}
		empty := end <= start
		dstX[c] = Span{Min: xlo, Max: xhi, Empty: empty}
		dstY[c] = Span{Min: ylo, Max: yhi, Empty: empty}
		start = end
	}
	return dstX, dstY
}
