package dsp

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"

	"whorl/acquire"
	"whorl/units"
)

// ErrWindow is returned (wrapped) for a window specification that cannot be
// read or does not fit the scan.
var ErrWindow = errors.New("window")

// ParseWindows reads sample windows written "START:END[,START:END]": each
// range is either half-open sample indices ("120:180") or, with a unit on
// both ends, a position range ("1.20m:1.26m", "1195mm:1260mm") or a time
// range ("0.5s:0.6s"), converted to the samples of s whose position (or
// time) lies within it, [first, last+1). Errors name the offending range:
// indices out of order or past the scan, unknown units, a missing axis,
// fewer than two samples in range, or an axis that enters the range twice.
func ParseWindows(spec string, s *acquire.Scan) ([][2]int, error) {
	var out [][2]int
	for _, part := range strings.Split(spec, ",") {
		a, b, ok := strings.Cut(strings.TrimSpace(part), ":")
		if !ok {
			return nil, fmt.Errorf("%w %q: expected START:END", ErrWindow, part)
		}
		ia, errA := strconv.Atoi(strings.TrimSpace(a))
		ib, errB := strconv.Atoi(strings.TrimSpace(b))
		if errA == nil && errB == nil {
			if ia < 0 || ib <= ia || ib > s.Len() {
				return nil, fmt.Errorf("%w %q: expected 0 ≤ start < end ≤ %d samples", ErrWindow, part, s.Len())
			}
			out = append(out, [2]int{ia, ib})
			continue
		}
		axis, what := s.PositionM, "position"
		va, err1 := units.Parse(units.Length, a)
		vb, err2 := units.Parse(units.Length, b)
		if err1 != nil || err2 != nil {
			axis, what = s.TimeS, "time"
			va, err1 = units.Parse(units.Time, a)
			vb, err2 = units.Parse(units.Time, b)
			if err1 != nil || err2 != nil {
				return nil, fmt.Errorf("%w %q: expected sample numbers, or both ends with a length unit (1.20m:1.26m) or a time unit (0.5s:0.6s)", ErrWindow, part)
			}
		}
		if axis == nil {
			return nil, fmt.Errorf("%w %q: the scan has no %s axis", ErrWindow, part, what)
		}
		lo, hi := math.Min(va, vb), math.Max(va, vb)
		first, last := -1, -1
		for i, v := range axis {
			if v >= lo && v <= hi {
				if first < 0 {
					first = i
				} else if last != i-1 {
					return nil, fmt.Errorf("%w %q: the %s axis passes through it more than once (sample %d)", ErrWindow, part, what, i)
				}
				last = i
			}
		}
		if first < 0 || last == first {
			return nil, fmt.Errorf("%w %q: fewer than two samples have a %s in it", ErrWindow, part, what)
		}
		out = append(out, [2]int{first, last + 1})
	}
	return out, nil
}
