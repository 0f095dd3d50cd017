package acquire

import (
	"fmt"
	"math"
)

// Problem kinds reported by Inspect and InspectRaw.
const (
	ProblemNonFinite    = "non-finite"     // NaN or infinite value
	ProblemNonMonotonic = "non-monotonic"  // axis does not advance in one direction
	ProblemGap          = "gap"            // a step more than 1.5 times the median step
	ProblemRate         = "rate-mismatch"  // time steps disagree with SampleRateHz
	ProblemStep         = "step-mismatch"  // position steps disagree with AxialStepM
	ProblemSpeed        = "speed-mismatch" // position over time disagrees with the probe speed
	ProblemConstant     = "constant"       // a channel that never changes
	ProblemClipped      = "clipped"        // runs of samples stuck at the channel's extreme
)

// Tolerances of Inspect. They are screening thresholds for an analyst's
// attention, common practice, no source.
const (
	gapFactor   = 1.5  // a step this many times the median step is a gap
	rateRelTol  = 0.01 // median step versus the nominal rate or step
	speedRelTol = 0.10 // mean speed versus the nominal probe speed
	clipRunMin  = 3    // consecutive samples at the extreme that count as clipping
)

// Problem is one finding of Inspect or InspectRaw.
type Problem struct {
	// Kind is one of the Problem... constants.
	Kind string `json:"kind"`
	// Channel names the channel concerned ("time", "position", "voltage"
	// or "reference" for those columns; empty for the whole scan).
	Channel string `json:"channel,omitempty"`
	// Index is the first sample concerned (0-based), or -1.
	Index int `json:"index"`
	// Count is the number of samples or steps concerned (0 if not counted).
	Count int `json:"count,omitempty"`
	// Message describes the finding for a person.
	Message string `json:"message"`
}

// Inspect screens a scan for problems an analyst should know about before
// trusting it: NaN or infinite values, axes that do not advance, gaps in
// time or position, a time column that disagrees with the sample rate, a
// position column that disagrees with the axial step, a position-over-time
// speed that disagrees with the probe speed, channels that never change,
// and channels clipped at their extremes. It returns nil when it finds
// nothing. s must have passed Validate.
func Inspect(s *Scan) []Problem {
	var out []Problem
	out = append(out, axisProblems("time", s.TimeS, true)...)
	out = append(out, axisProblems("position", s.PositionM, false)...)
	if s.SampleRateHz > 0 && len(s.TimeS) > 1 {
		// An encoder-triggered scan (one sampled on a position grid) takes
		// its samples as fast as the probe moves: its sample rate is the
		// nominal one at the nominal speed, and its time steps vary with the
		// speed, so they are held to the speed tolerance instead.
		tol := rateRelTol
		if s.AxialStepM > 0 && len(s.PositionM) > 1 {
			tol = speedRelTol
		}
		if med := medianStep(s.TimeS); med > 0 {
			want := 1 / s.SampleRateHz
			if math.Abs(med-want) > tol*want {
				out = append(out, Problem{Kind: ProblemRate, Channel: "time", Index: -1,
					Message: fmt.Sprintf("median time step %.6g s is %.6g Hz, but the sample rate is %.6g Hz", med, 1/med, s.SampleRateHz)})
			}
		}
	}
	if s.AxialStepM > 0 && len(s.PositionM) > 1 {
		if med := medianStep(s.PositionM); med > 0 {
			if math.Abs(med-s.AxialStepM) > rateRelTol*s.AxialStepM {
				out = append(out, Problem{Kind: ProblemStep, Channel: "position", Index: -1,
					Message: fmt.Sprintf("median position step %.6g m, but the axial step is %.6g m", med, s.AxialStepM)})
			}
		}
	}
	if v := s.Meta.ProbeSpeedMPS; v > 0 && len(s.TimeS) > 1 && len(s.PositionM) == len(s.TimeS) {
		n := len(s.TimeS)
		dt := s.TimeS[n-1] - s.TimeS[0]
		if dt > 0 {
			got := math.Abs(s.PositionM[n-1]-s.PositionM[0]) / dt
			if math.Abs(got-v) > speedRelTol*v {
				out = append(out, Problem{Kind: ProblemSpeed, Index: -1,
					Message: fmt.Sprintf("mean speed from position and time is %.4g m/s, but the probe speed is %.4g m/s", got, v)})
			}
		}
	}
	for _, c := range s.Channels {
		x := make([]float64, len(c.Samples))
		y := make([]float64, len(c.Samples))
		for i, v := range c.Samples {
			x[i], y[i] = real(v), imag(v)
		}
		out = append(out, valueProblems(c.Name, map[string][]float64{"X": x, "Y": y}, []string{"X", "Y"})...)
	}
	return out
}

// InspectRaw screens a raw record for non-finite, constant and clipped
// voltages and for a position column that does not advance.
func InspectRaw(r *RawRecord) []Problem {
	var out []Problem
	out = append(out, axisProblems("position", r.PositionM, false)...)
	out = append(out, valueProblems("voltage", map[string][]float64{"": r.VoltageV}, []string{""})...)
	if r.ReferenceV != nil {
		out = append(out, valueProblems("reference", map[string][]float64{"": r.ReferenceV}, []string{""})...)
	}
	return out
}

// axisProblems checks an axis for non-finite values, steps that do not
// keep one direction (time: increasing), and gaps.
func axisProblems(name string, v []float64, increasing bool) []Problem {
	if len(v) == 0 {
		return nil
	}
	var out []Problem
	for i, x := range v {
		if !isFinite(x) {
			out = append(out, Problem{Kind: ProblemNonFinite, Channel: name, Index: i, Message: fmt.Sprintf("%s %d is %v", name, i, x)})
			return out
		}
	}
	dir := 0.0
	if increasing {
		dir = 1
	}
	for i := 1; i < len(v); i++ {
		d := v[i] - v[i-1]
		if dir == 0 && d != 0 {
			dir = math.Copysign(1, d)
		}
		if d == 0 || d*dir < 0 {
			out = append(out, Problem{Kind: ProblemNonMonotonic, Channel: name, Index: i,
				Message: fmt.Sprintf("%s does not advance at sample %d (%.9g after %.9g)", name, i, v[i], v[i-1])})
			return out
		}
	}
	med := medianStep(v)
	if med == 0 {
		return out
	}
	first, count := -1, 0
	largest := 0.0
	for i := 1; i < len(v); i++ {
		if d := math.Abs(v[i] - v[i-1]); d > gapFactor*med {
			if first < 0 {
				first = i
			}
			count++
			largest = math.Max(largest, d)
		}
	}
	if count > 0 {
		out = append(out, Problem{Kind: ProblemGap, Channel: name, Index: first, Count: count,
			Message: fmt.Sprintf("%d %s step(s) longer than %.3g times the median step %.6g, the first before sample %d, the longest %.6g", count, name, gapFactor, med, first, largest)})
	}
	return out
}

// medianStep returns the median absolute step of v (0 for fewer than two
// values).
func medianStep(v []float64) float64 {
	if len(v) < 2 {
		return 0
	}
	d := make([]float64, len(v)-1)
	for i := range d {
		d[i] = math.Abs(v[i+1] - v[i])
	}
	return median(d)
}

// median returns the median of a (the mean of the two middle values for
// an even length), reordering a. It runs in linear expected time.
func median(a []float64) float64 {
	n := len(a)
	m := kth(a, n/2)
	if n%2 == 1 {
		return m
	}
	// After kth, a[:n/2] holds the n/2 smallest values.
	lower := a[0]
	for _, x := range a[1 : n/2] {
		lower = math.Max(lower, x)
	}
	return (lower + m) / 2
}

// kth returns the k-th smallest value of a (from 0) and reorders a so that
// a[:k] holds values no larger and a[k+1:] values no smaller. It is Hoare's
// selection algorithm (C. A. R. Hoare, "Algorithm 65: Find", Comm. ACM
// 4(7), 1961) with a median-of-three pivot. It panics if k is out of range;
// a must not hold NaN.
func kth(a []float64, k int) float64 {
	if k < 0 || k >= len(a) {
		panic("acquire: kth index out of range")
	}
	lo, hi := 0, len(a)-1
	for lo < hi {
		mid := lo + (hi-lo)/2
		if a[mid] < a[lo] {
			a[mid], a[lo] = a[lo], a[mid]
		}
		if a[hi] < a[lo] {
			a[hi], a[lo] = a[lo], a[hi]
		}
		if a[hi] < a[mid] {
			a[hi], a[mid] = a[mid], a[hi]
		}
		pivot := a[mid]
		i, j := lo, hi
		for i <= j {
			for a[i] < pivot {
				i++
			}
			for a[j] > pivot {
				j--
			}
			if i <= j {
				a[i], a[j] = a[j], a[i]
				i++
				j--
			}
		}
		switch {
		case k <= j:
			hi = j
		case k >= i:
			lo = i
		default:
			return a[k]
		}
	}
	return a[k]
}

// valueProblems checks the components of one channel for non-finite
// values, for never changing, and for runs stuck at an extreme: runs of
// clipRunMin or more samples equal to the minimum or maximum, where that
// extreme lies farther from the median than a quarter of the range (a peak cut
// off by the instrument, not a quiet baseline).
func valueProblems(name string, parts map[string][]float64, order []string) []Problem {
	var out []Problem
	var scratch []float64
	constant := true
	for _, p := range order {
		v := parts[p]
		label := name
		if p != "" {
			label = name + " " + p
		}
		for i, x := range v {
			if !isFinite(x) {
				out = append(out, Problem{Kind: ProblemNonFinite, Channel: name, Index: i, Message: fmt.Sprintf("%s sample %d is %v", label, i, x)})
				return out
			}
		}
		if len(v) < 2 {
			constant = false
			continue
		}
		lo, hi := v[0], v[0]
		for _, x := range v {
			lo, hi = math.Min(lo, x), math.Max(hi, x)
		}
		if lo == hi {
			continue
		}
		constant = false
		// Only an extreme far from the bulk of the signal can be a clipped
		// peak; a quiet baseline that happens to be the minimum is not.
		scratch = append(scratch[:0], v...)
		mid := kth(scratch, len(scratch)/2)
		first, clipped := -1, 0
		for _, ext := range []float64{lo, hi} {
			if math.Abs(ext-mid) <= 0.25*(hi-lo) {
				continue
			}
			run := 0
			for i, x := range v {
				if x == ext {
					run++
					continue
				}
				if run >= clipRunMin {
					clipped += run
					if first < 0 || i-run < first {
						first = i - run
					}
				}
				run = 0
			}
			if run >= clipRunMin {
				clipped += run
				if first < 0 || len(v)-run < first {
					first = len(v) - run
				}
			}
		}
		if clipped > 0 {
			out = append(out, Problem{Kind: ProblemClipped, Channel: name, Index: first, Count: clipped,
				Message: fmt.Sprintf("%s: %d samples in runs of %d or more at its extreme (%.6g V or %.6g V), the first at sample %d", label, clipped, clipRunMin, lo, hi, first)})
		}
	}
	if constant && len(order) > 0 && len(parts[order[0]]) >= 2 {
		out = append(out, Problem{Kind: ProblemConstant, Channel: name, Index: -1, Count: len(parts[order[0]]),
			Message: fmt.Sprintf("%s never changes", name)})
	}
	return out
}
