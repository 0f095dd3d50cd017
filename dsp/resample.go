package dsp

import (
	"errors"
	"fmt"
	"maps"
	"math"
	"strconv"

	"gonum.org/v1/gonum/interp"

	"whorl/acquire"
)

// ErrPositions is returned (wrapped) for a position axis that cannot be
// resampled: missing, non-finite or not strictly monotonic.
var ErrPositions = errors.New("positions")

// ResampleOption modifies ResampleAxial.
type ResampleOption func(*resampleConfig)

type resampleConfig struct {
	speedMPS float64
	startM   float64
	useSpeed bool
}

// FromSpeed makes ResampleAxial derive positions from the time axis as
// startM + speedMPS·t instead of the scan's position column.
func FromSpeed(speedMPS, startM float64) ResampleOption {
	return func(c *resampleConfig) { c.speedMPS, c.startM, c.useSpeed = speedMPS, startM, true }
}

// ResampleAxial returns a copy of s on a uniform axial grid of stepM metres,
// so that channels recorded against time (or multiplexed at different
// instants) share one position axis. Positions come from s.PositionM (an
// encoder or position column) or, with FromSpeed, from the time axis; they
// must be strictly increasing or strictly decreasing. The grid runs upwards
// from the first multiple of stepM at or above the smallest position to the
// largest, and each of X, Y (and the time axis) is interpolated by a natural
// cubic spline through the original samples (gonum interp.NaturalCubic),
// which is exact for cubic polynomials and accurate to O(h⁴) for smooth
// signals. Meta.Extra records the step and the position source.
func ResampleAxial(s *acquire.Scan, stepM float64, opts ...ResampleOption) (*acquire.Scan, error) {
	var cfg resampleConfig
	for _, o := range opts {
		o(&cfg)
	}
	if !(stepM > 0) || math.IsInf(stepM, 0) {
		return nil, fmt.Errorf("%w: axial step %v m: expected a positive length", ErrPositions, stepM)
	}
	n := s.Len()
	var pos []float64
	source := "position column"
	switch {
	case cfg.useSpeed:
		if !(cfg.speedMPS != 0) || math.IsNaN(cfg.speedMPS) || math.IsInf(cfg.speedMPS, 0) {
			return nil, fmt.Errorf("%w: probe speed %v m/s: expected a non-zero finite speed", ErrPositions, cfg.speedMPS)
		}
		if s.TimeS == nil {
			return nil, fmt.Errorf("%w: scan %q has no time axis to derive positions from the probe speed", ErrPositions, s.Meta.Component)
		}
		pos = make([]float64, n)
		for i, t := range s.TimeS {
			pos[i] = cfg.startM + cfg.speedMPS*t
		}
		source = "probe speed " + strconv.FormatFloat(cfg.speedMPS, 'g', -1, 64) + " m/s"
	case s.PositionM != nil:
		pos = s.PositionM
	default:
		return nil, fmt.Errorf("%w: scan %q has no position column; give a probe speed", ErrPositions, s.Meta.Component)
	}
	if n < 2 {
		return nil, fmt.Errorf("%w: %d samples: need at least 2 to resample", ErrPositions, n)
	}
	for i, p := range pos {
		if math.IsNaN(p) || math.IsInf(p, 0) {
			return nil, fmt.Errorf("%w: sample %d position is %v", ErrPositions, i, p)
		}
	}
	dir := pos[1] - pos[0]
	if dir == 0 {
		return nil, fmt.Errorf("%w: not strictly monotonic at sample 1: position %v m repeats sample 0", ErrPositions, pos[1])
	}
	for i := 1; i < n; i++ {
		if d := pos[i] - pos[i-1]; d == 0 || (d > 0) != (dir > 0) {
			return nil, fmt.Errorf("%w: not strictly monotonic at sample %d: position %v m after %v m at sample %d", ErrPositions, i, pos[i], pos[i-1], i-1)
		}
	}
	// Ascending copies for the splines.
	xs := make([]float64, n)
	order := func(i int) int {
		if dir > 0 {
			return i
		}
		return n - 1 - i
	}
	for i := range xs {
		xs[i] = pos[order(i)]
	}
	lo, hi := xs[0], xs[n-1]
	first := math.Ceil(lo/stepM-1e-9) * stepM
	m := int(math.Floor((hi-first)/stepM+1e-9)) + 1
	if m < 2 {
		return nil, fmt.Errorf("%w: positions span %v m, less than two steps of %v m", ErrPositions, hi-lo, stepM)
	}
	grid := make([]float64, m)
	for k := range grid {
		grid[k] = math.Min(first+float64(k)*stepM, hi)
	}
	ys := make([]float64, n)
	fit := func(get func(i int) float64) ([]float64, error) {
		for i := range ys {
			ys[i] = get(order(i))
		}
		var nc interp.NaturalCubic
		if err := nc.Fit(xs, ys); err != nil {
			return nil, err
		}
		out := make([]float64, m)
		for k, g := range grid {
			out[k] = nc.Predict(g)
		}
		return out, nil
	}
	out := &acquire.Scan{Meta: s.Meta, AxialStepM: stepM, PositionM: grid}
	out.Meta.Extra = maps.Clone(s.Meta.Extra)
	if out.Meta.Extra == nil {
		out.Meta.Extra = map[string]string{}
	}
	out.Meta.Extra["resample_step_m"] = strconv.FormatFloat(stepM, 'g', -1, 64)
	out.Meta.Extra["resample_source"] = source
	if s.TimeS != nil {
		t, err := fit(func(i int) float64 { return s.TimeS[i] })
		if err != nil {
			return nil, fmt.Errorf("%w: %w", ErrPositions, err)
		}
		out.TimeS = t
	}
	for _, c := range s.Channels {
		re, err := fit(func(i int) float64 { return real(c.Samples[i]) })
		if err != nil {
			return nil, fmt.Errorf("%w: channel %q: %w", ErrPositions, c.Name, err)
		}
		im, err := fit(func(i int) float64 { return imag(c.Samples[i]) })
		if err != nil {
			return nil, fmt.Errorf("%w: channel %q: %w", ErrPositions, c.Name, err)
		}
		z := make([]complex128, m)
		for k := range z {
			z[k] = complex(re[k], im[k])
		}
		c.Samples = z
		out.Channels = append(out.Channels, c)
	}
	return out, nil
}
