package measure

import "math"

// Spread returns, for every sample i, the diagonal of the bounding box of
// the window of w samples centred on i (samples i−w/2 … i−w/2+w−1,
// clipped at the ends): sqrt((max X − min X)² + (max Y − min Y)²).
//
// The diagonal is an upper bound on the window's exact peak-to-peak
// amplitude and at least 1/√2 of it, so a threshold on Spread finds every
// window whose Vpp reaches the threshold (no misses) at the cost of some
// candidates that the exact measurement then rejects. The four running
// extremes use monotone double-ended queues, so the cost is O(n) whatever
// w is (the "ascending minima" method; D. Lemire, "Streaming
// maximum-minimum filter using no more than three comparisons per
// element", Nordic J. Computing 13(4), 2006, 328–339).
//
// dst is reused when it has room (it may be nil) and is returned.
// Spread panics if w < 1.
func Spread(dst []float64, z []complex128, w int) []float64 {
	var s Spreader
	return s.Spread(dst, z, w)
}

// Spreader computes Spread reusing its queue storage between calls; its
// zero value is ready to use. A Spreader must not be used by two
// goroutines at once.
type Spreader struct {
	buf []int
	s   spreader
}

// Spread is the function Spread with reused storage.
func (sp *Spreader) Spread(dst []float64, z []complex128, w int) []float64 {
	if w < 1 {
		panic("measure: spread window shorter than one sample")
	}
	n := len(z)
	if cap(dst) < n {
		dst = make([]float64, n)
	}
	dst = dst[:n]
	if n == 0 {
		return dst
	}
	if cap(sp.buf) < 4*n {
		sp.buf = make([]int, 4*n)
	}
	s := &sp.s
	s.init(sp.buf[:4*n], n)
	half := w / 2
	// Window for centre i is [i−half, i−half+w) ∩ [0, n).
	hi := 0 // next sample to push
	for i := 0; i < n; i++ {
		end := min(i-half+w, n)
		for ; hi < end; hi++ {
			s.push(z, hi)
		}
		s.popBefore(max(i-half, 0))
		dx := real(z[s.maxX[s.hMaxX]]) - real(z[s.minX[s.hMinX]])
		dy := imag(z[s.maxY[s.hMaxY]]) - imag(z[s.minY[s.hMinY]])
		dst[i] = math.Hypot(dx, dy)
	}
	return dst
}

// spreader holds four monotone queues of sample indices (head index h…).
type spreader struct {
	maxX, minX, maxY, minY     []int
	hMaxX, hMinX, hMaxY, hMinY int
}

func (s *spreader) init(buf []int, n int) {
	*s = spreader{}
	s.maxX, s.minX, s.maxY, s.minY = buf[0:0:n], buf[n:n:2*n], buf[2*n:2*n:3*n], buf[3*n:3*n:4*n]
}

func (s *spreader) push(z []complex128, i int) {
	x, y := real(z[i]), imag(z[i])
	for len(s.maxX) > s.hMaxX && real(z[s.maxX[len(s.maxX)-1]]) <= x {
		s.maxX = s.maxX[:len(s.maxX)-1]
	}
	s.maxX = append(s.maxX, i)
	for len(s.minX) > s.hMinX && real(z[s.minX[len(s.minX)-1]]) >= x {
		s.minX = s.minX[:len(s.minX)-1]
	}
	s.minX = append(s.minX, i)
	for len(s.maxY) > s.hMaxY && imag(z[s.maxY[len(s.maxY)-1]]) <= y {
		s.maxY = s.maxY[:len(s.maxY)-1]
	}
	s.maxY = append(s.maxY, i)
	for len(s.minY) > s.hMinY && imag(z[s.minY[len(s.minY)-1]]) >= y {
		s.minY = s.minY[:len(s.minY)-1]
	}
	s.minY = append(s.minY, i)
}

func (s *spreader) popBefore(lo int) {
	for s.maxX[s.hMaxX] < lo {
		s.hMaxX++
	}
	for s.minX[s.hMinX] < lo {
		s.hMinX++
	}
	for s.maxY[s.hMaxY] < lo {
		s.hMaxY++
	}
	for s.minY[s.hMinY] < lo {
		s.hMinY++
	}
}

// Peaks appends to dst the centres of the local maxima of sp that reach
// thr: sample i is a peak when no sample within radius of it is higher and
// none before it within radius is equal; a plateau of equal values is
// reported at its middle. Peaks are therefore more than radius samples
// apart, in increasing order. Peaks panics if radius < 0.
func Peaks(dst []int, sp []float64, thr float64, radius int) []int {
	if radius < 0 {
		panic("measure: negative peak radius")
	}
	n := len(sp)
	for i := 0; i < n; i++ {
		if !(sp[i] >= thr) {
			continue
		}
		lo, hi := max(0, i-radius), min(n, i+radius+1)
		isMax := true
		for k := lo; k < hi; k++ {
			if sp[k] > sp[i] || (sp[k] == sp[i] && k < i) {
				isMax = false
				break
			}
		}
		if !isMax {
			continue
		}
		j := i
		for j+1 < n && sp[j+1] == sp[i] {
			j++
		}
		dst = append(dst, (i+j)/2)
		i = j
	}
	return dst
}
