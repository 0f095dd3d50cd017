package measure

import (
	"math"
	"math/cmplx"
	"slices"
)

// Chord is the longest chord between two samples of a window: its length
// is the peak-to-peak amplitude.
type Chord struct {
	// I and J are the sample indices of the endpoints (I < J), relative
	// to the slice measured; for a one-sample window I == J.
	I, J int
	// Vpp is the chord length in volts.
	Vpp float64
	// PhaseRad is the direction from sample I to sample J in [0, 2π).
	PhaseRad float64
}

// Vector returns the chord as the complex number z[J] − z[I].
func (c Chord) Vector() complex128 {
	return cmplx.Rect(c.Vpp, c.PhaseRad)
}

// WrapRad returns a reduced to [0, 2π).
func WrapRad(a float64) float64 {
	a = math.Mod(a, 2*math.Pi)
	if a < 0 {
		a += 2 * math.Pi
	}
	if a >= 2*math.Pi { // -tiny + 2π rounds to 2π
		a = 0
	}
	return a
}

// bruteLimit is the window length at or below which the O(n²) search over
// all pairs is cheaper than building the hull.
const bruteLimit = 24

// PeakToPeak is a reusable worker for the exact peak-to-peak chord. Its
// zero value is ready to use; it keeps its scratch buffers between calls so
// that repeated measurements do not allocate. A PeakToPeak must not be used
// by two goroutines at once.
type PeakToPeak struct {
	idx  []int
	hull []int
}

// Measure returns the longest chord between any two samples of z.
//
// Method: the diameter of a finite point set is attained by two vertices
// of its convex hull (Shamos, "Computational Geometry", PhD thesis, Yale
// 1978, §4; Preparata & Shamos, "Computational Geometry: An Introduction",
// Springer 1985, §4.2.3). The hull is built with Andrew's monotone chain
// (A. M. Andrew, Inf. Process. Lett. 9(5), 1979, 216–219) in O(n log n),
// and its antipodal vertex pairs are walked with rotating calipers in O(h).
// Among equally long chords the first found is returned, so the result is
// deterministic. Measure panics if z is empty.
func (p *PeakToPeak) Measure(z []complex128) Chord {
	n := len(z)
	if n == 0 {
		panic("measure: empty window")
	}
	var bi, bj int
	var best float64 = -1
	if n <= bruteLimit {
		for i := 0; i < n; i++ {
			for j := i + 1; j < n; j++ {
				if d := sqDist(z[i], z[j]); d > best {
					best, bi, bj = d, i, j
				}
			}
		}
	} else {
		h := p.convexHull(z)
		bi, bj, best = diameterPair(z, h)
	}
	if best <= 0 {
		return Chord{I: 0, J: 0}
	}
	if bi > bj {
		bi, bj = bj, bi
	}
	d := z[bj] - z[bi]
	return Chord{I: bi, J: bj, Vpp: math.Sqrt(best), PhaseRad: WrapRad(math.Atan2(imag(d), real(d)))}
}

func sqDist(a, b complex128) float64 {
	dx, dy := real(a)-real(b), imag(a)-imag(b)
	return dx*dx + dy*dy
}

// cross returns (b−a) × (c−a), positive when a→b→c turns counter-clockwise.
func cross(a, b, c complex128) float64 {
	return (real(b)-real(a))*(imag(c)-imag(a)) - (imag(b)-imag(a))*(real(c)-real(a))
}

// convexHull returns the indices of the hull vertices of z in
// counter-clockwise order, without collinear points (Andrew 1979).
func (p *PeakToPeak) convexHull(z []complex128) []int {
	n := len(z)
	p.idx = p.idx[:0]
	for i := 0; i < n; i++ {
		p.idx = append(p.idx, i)
	}
	slices.SortFunc(p.idx, func(a, b int) int {
		switch {
		case real(z[a]) < real(z[b]):
			return -1
		case real(z[a]) > real(z[b]):
			return 1
		case imag(z[a]) < imag(z[b]):
			return -1
		case imag(z[a]) > imag(z[b]):
			return 1
		}
		return a - b
	})
	h := p.hull[:0]
	for _, i := range p.idx { // lower hull
		for len(h) >= 2 && cross(z[h[len(h)-2]], z[h[len(h)-1]], z[i]) <= 0 {
			h = h[:len(h)-1]
		}
		h = append(h, i)
	}
	lower := len(h) + 1
	for k := n - 2; k >= 0; k-- { // upper hull
		i := p.idx[k]
		for len(h) >= lower && cross(z[h[len(h)-2]], z[h[len(h)-1]], z[i]) <= 0 {
			h = h[:len(h)-1]
		}
		h = append(h, i)
	}
	h = h[:len(h)-1] // the last point repeats the first
	p.hull = h
	return h
}

// diameterPair walks the antipodal pairs of the counter-clockwise hull h
// with rotating calipers (Preparata & Shamos 1985, §4.2.3) and returns the
// farthest pair and its squared distance.
func diameterPair(z []complex128, h []int) (int, int, float64) {
	m := len(h)
	switch m {
	case 1:
		return h[0], h[0], 0
	case 2:
		return h[0], h[1], sqDist(z[h[0]], z[h[1]])
	}
	best := -1.0
	var bi, bj int
	k := 1
	for i := 0; i < m; i++ {
		ni := (i + 1) % m
		// Advance k while the triangle area (distance from edge i→ni) grows.
		for {
			nk := (k + 1) % m
			if cross(z[h[i]], z[h[ni]], z[h[nk]]) > cross(z[h[i]], z[h[ni]], z[h[k]]) {
				k = nk
				continue
			}
			break
		}
		// The area comparison above can stop one or two vertices early
		// or late when neighbouring areas tie within rounding (a very
		// flat hull, or parallel edges); checking the vertices around k
		// keeps the result exact at a cost of O(1) per edge.
		for dk := -2; dk <= 2; dk++ {
			kk := h[((k+dk)%m+m)%m]
			if d := sqDist(z[h[i]], z[kk]); d > best {
				best, bi, bj = d, h[i], kk
			}
			if d := sqDist(z[h[ni]], z[kk]); d > best {
				best, bi, bj = d, h[ni], kk
			}
		}
	}
	return bi, bj, best
}

// Vpp returns the exact peak-to-peak chord of z using a fresh worker. Use
// a PeakToPeak to measure many windows without allocating. Vpp panics if z
// is empty.
func Vpp(z []complex128) Chord {
	var p PeakToPeak
	return p.Measure(z)
}

// Rate is the steepest step of a window: the largest change between
// consecutive samples.
type Rate struct {
	// I is the index of the step's first sample (the step is I → I+1).
	I int
	// Magnitude is |z[I+1] − z[I]| in volts per sample.
	Magnitude float64
	// PhaseRad is the direction of the step in [0, 2π).
	PhaseRad float64
}

// MaxRate returns the maximum-rate step of z: the consecutive pair whose
// difference is largest, and that difference's direction (the
// maximum-rate phase; the steepest part of the Lissajous trace). Among
// equal steps the first is returned. MaxRate panics if len(z) < 2.
func MaxRate(z []complex128) Rate {
	if len(z) < 2 {
		panic("measure: maximum-rate phase needs at least two samples")
	}
	best := -1.0
	var bi int
	for i := 0; i+1 < len(z); i++ {
		if d := sqDist(z[i+1], z[i]); d > best {
			best, bi = d, i
		}
	}
	d := z[bi+1] - z[bi]
	return Rate{I: bi, Magnitude: math.Sqrt(best), PhaseRad: WrapRad(math.Atan2(imag(d), real(d)))}
}

// SignalToNoise returns signalVpp divided by the peak-to-peak amplitude of
// the clean window noise (the common definition: reference Vpp over
// baseline-noise Vpp). It returns +Inf when the noise window has no spread
// and 0 when it is empty.
func SignalToNoise(signalVpp float64, noise []complex128) float64 {
	if len(noise) == 0 {
		return 0
	}
	n := Vpp(noise).Vpp
	if n == 0 {
		return math.Inf(1)
	}
	return signalVpp / n
}

// RMS returns the root-mean-square distance of z from its mean, in volts
// (0 for an empty window).
func RMS(z []complex128) float64 {
	if len(z) == 0 {
		return 0
	}
	var m complex128
	for _, v := range z {
		m += v
	}
	m /= complex(float64(len(z)), 0)
	var s float64
	for _, v := range z {
		s += sqDist(v, m)
	}
	return math.Sqrt(s / float64(len(z)))
}

// CrossExtent returns the extent of z across the direction dirRad: the
// peak-to-peak spread of the samples' components perpendicular to it, in
// volts. A straight-line trace along dirRad has cross extent 0; a figure
// that bulges away from its chord has a cross extent of the bulge.
func CrossExtent(z []complex128, dirRad float64) float64 {
	if len(z) == 0 {
		return 0
	}
	s, c := math.Sincos(dirRad)
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range z {
		p := -s*real(v) + c*imag(v)
		lo, hi = math.Min(lo, p), math.Max(hi, p)
	}
	return hi - lo
}
