package analysis

import (
	"math"
	"sort"
)

// Truth is one known condition of a component, for scoring: what it is,
// where (true position along the component, metres), how long and deep
// (%TW, 0 for non-wall-loss conditions), and whether it is wall loss.
type Truth struct {
	Component      string  `json:"component"`
	Kind           string  `json:"kind"`
	AxialPositionM float64 `json:"axial_position_m"`
	LengthM        float64 `json:"length_m"`
	DepthPct       float64 `json:"depth_pct"`
	Origin         string  `json:"origin,omitempty"`
	// Flaw is true for wall loss (pits, wear, cracks), false for
	// non-relevant conditions (dents, deposits, marks).
	Flaw bool `json:"flaw"`
}

// ScoreOptions are the targets and tolerances of Score.
type ScoreOptions struct {
	// Tubes is the number of components analysed (for false calls per 10).
	Tubes int
	// ToleranceM is how far beyond half its length an indication may sit
	// from a condition and still match it (default 0.025 m).
	ToleranceM float64
	// Landmarks are the true landmarks of the components (true positions),
	// used to map each indication's landmark-relative location onto the
	// true axis; nil uses the recorded positions as they are.
	Landmarks []Landmark
	// DetectMinPct: every flaw at least this deep must be called (default 40).
	DetectMinPct float64
	// SizeMinPct, SizeMaxPct: OD flaws in this range enter the sizing
	// error (defaults 20 and 100).
	SizeMinPct, SizeMaxPct float64
	// MaxMAEPct is the sizing target (default 5 %TW); MaxFalsePer10 the
	// false-call target (default 1 per 10 components).
	MaxMAEPct, MaxFalsePer10 float64
}

func (o *ScoreOptions) defaults() {
	if o.ToleranceM == 0 {
		o.ToleranceM = 0.025
	}
	if o.DetectMinPct == 0 {
		o.DetectMinPct = 40
	}
	if o.SizeMinPct == 0 && o.SizeMaxPct == 0 {
		o.SizeMinPct, o.SizeMaxPct = 20, 100
	}
	if o.MaxMAEPct == 0 {
		o.MaxMAEPct = 5
	}
	if o.MaxFalsePer10 == 0 {
		o.MaxFalsePer10 = 1
	}
}

// Scored is one condition or call in an accuracy listing.
type Scored struct {
	Component string   `json:"component"`
	Kind      string   `json:"kind,omitempty"`
	PositionM float64  `json:"position_m"`
	DepthPct  float64  `json:"depth_pct,omitempty"`
	SizedPct  *float64 `json:"sized_pct,omitempty"`
	Channel   string   `json:"channel,omitempty"`
	Class     Class    `json:"class,omitempty"`
	Location  string   `json:"location,omitempty"`
}

// Accuracy holds the figures of Score and whether each target is met.
type Accuracy struct {
	Tubes int `json:"tubes"`
	// Flaws at least DetectMinPct deep, how many were called, which not.
	DetectMinPct float64  `json:"detect_min_pct"`
	ToDetect     int      `json:"to_detect"`
	Detected     int      `json:"detected"`
	Missed       []Scored `json:"missed,omitempty"`
	// Sizing of OD flaws in [SizeMinPct, SizeMaxPct]: how many were sized,
	// their mean absolute error (%TW), and each pair.
	SizeRangePct [2]float64 `json:"size_range_pct"`
	ToSize       int        `json:"to_size"`
	Sized        int        `json:"sized"`
	MAEPct       float64    `json:"mae_pct"`
	SizingPairs  []Scored   `json:"sizing_pairs,omitempty"`
	// Calls matching no flaw, per 10 components, and the list.
	FalseCalls      int      `json:"false_calls"`
	FalseCallsPer10 float64  `json:"false_calls_per_10"`
	FalseList       []Scored `json:"false_list,omitempty"`
	// SupportCalls counts false calls at a support: support signals
	// reported as flaws.
	SupportCalls int `json:"support_calls"`
	// Targets.
	DetectOK  bool `json:"detect_ok"`
	SizingOK  bool `json:"sizing_ok"`
	FalseOK   bool `json:"false_ok"`
	SupportOK bool `json:"support_ok"`
	Pass      bool `json:"pass"`
}

// IsCall reports whether an indication is a call an analyst would act on:
// flaw-like or sent to analyst review, and reportable.
func IsCall(ind *Indication) bool {
	return (ind.Class == ClassFlaw || ind.Class == ClassReview) && ind.Reportable
}

// TruePosition maps an indication onto the true axis through its nearest
// landmark: the true landmark of the same kind nearest to the recorded
// one, plus the indication's offset from it. Without landmarks it returns
// the recorded position.
func TruePosition(ind *Indication, lms []Landmark) float64 {
	if ind.Landmark == "" || len(lms) == 0 {
		return ind.PositionM
	}
	best, bestD := -1, math.Inf(1)
	for i, l := range lms {
		if l.Kind != ind.LandmarkKind {
			continue
		}
		if d := math.Abs(l.CentreM - ind.LandmarkM); d < bestD {
			best, bestD = i, d
		}
	}
	if best < 0 {
		return ind.PositionM
	}
	l := lms[best]
	ref := l.CentreM
	switch ind.LandmarkRef {
	case RefStart:
		ref = l.StartM
	case RefEnd:
		ref = l.EndM
	}
	return ref + ind.OffsetM
}

// Score compares calls (see IsCall) with the ground truth: detection of
// every flaw at least DetectMinPct deep, the mean absolute sizing error of
// OD flaws in the size range, false calls per 10 components, and false
// calls at supports. A call matches a condition of the same component when
// its true position (TruePosition) lies within half the condition's length
// plus ToleranceM of the condition's centre.
func Score(ind []Indication, truth []Truth, opt ScoreOptions) Accuracy {
	opt.defaults()
	acc := Accuracy{Tubes: opt.Tubes, DetectMinPct: opt.DetectMinPct, SizeRangePct: [2]float64{opt.SizeMinPct, opt.SizeMaxPct}}
	byComp := map[string][]int{}
	for i, t := range truth {
		byComp[t.Component] = append(byComp[t.Component], i)
	}
	truePos := make([]float64, len(ind))
	matched := make([]bool, len(truth)) // a call matched this flaw
	var sumErr float64
	bestSize := map[int]int{} // truth index -> indication index of its sizing call
	for k := range ind {
		x := &ind[k]
		truePos[k] = TruePosition(x, opt.Landmarks)
		if !IsCall(x) {
			continue
		}
		hitFlaw, hitAny := false, false
		for _, ti := range byComp[x.Component] {
			t := truth[ti]
			if math.Abs(truePos[k]-t.AxialPositionM) > t.LengthM/2+opt.ToleranceM {
				continue
			}
			hitAny = true
			if !t.Flaw {
				continue
			}
			hitFlaw = true
			matched[ti] = true
			if x.DepthPct != nil {
				if j, ok := bestSize[ti]; !ok || math.Abs(truePos[k]-t.AxialPositionM) < math.Abs(truePos[j]-t.AxialPositionM) {
					bestSize[ti] = k
				}
			}
		}
		if !hitFlaw {
			acc.FalseCalls++
			s := Scored{Component: x.Component, PositionM: truePos[k], Channel: x.Channel, Class: x.Class, Location: x.Location, SizedPct: x.DepthPct}
			if hitAny {
				s.Kind = "non-relevant condition"
			}
			acc.FalseList = append(acc.FalseList, s)
			for _, l := range opt.Landmarks {
				if l.Kind == KindSupport && truePos[k] >= l.StartM-opt.ToleranceM && truePos[k] <= l.EndM+opt.ToleranceM {
					acc.SupportCalls++
					break
				}
			}
		}
	}
	for ti, t := range truth {
		if t.Flaw && t.DepthPct >= opt.DetectMinPct {
			acc.ToDetect++
			if matched[ti] {
				acc.Detected++
			} else {
				acc.Missed = append(acc.Missed, Scored{Component: t.Component, Kind: t.Kind, PositionM: t.AxialPositionM, DepthPct: t.DepthPct})
			}
		}
		if t.Flaw && t.Origin == "OD" && t.DepthPct >= opt.SizeMinPct && t.DepthPct <= opt.SizeMaxPct {
			acc.ToSize++
			if k, ok := bestSize[ti]; ok {
				acc.Sized++
				sumErr += math.Abs(*ind[k].DepthPct - t.DepthPct)
				acc.SizingPairs = append(acc.SizingPairs, Scored{Component: t.Component, Kind: t.Kind, PositionM: t.AxialPositionM, DepthPct: t.DepthPct, SizedPct: ind[k].DepthPct, Channel: ind[k].Channel})
			}
		}
	}
	sort.SliceStable(acc.Missed, func(i, j int) bool { return acc.Missed[i].Component < acc.Missed[j].Component })
	if acc.Sized > 0 {
		acc.MAEPct = sumErr / float64(acc.Sized)
	}
	if opt.Tubes > 0 {
		acc.FalseCallsPer10 = 10 * float64(acc.FalseCalls) / float64(opt.Tubes)
	}
	acc.DetectOK = acc.Detected == acc.ToDetect
	acc.SizingOK = acc.Sized > 0 && acc.MAEPct <= opt.MaxMAEPct
	acc.FalseOK = opt.Tubes > 0 && acc.FalseCallsPer10 <= opt.MaxFalsePer10
	acc.SupportOK = acc.SupportCalls == 0
	acc.Pass = acc.DetectOK && acc.SizingOK && acc.FalseOK && acc.SupportOK
	return acc
}
