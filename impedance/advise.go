package impedance

import (
	"errors"
	"fmt"
	"math"
	"sort"
)

// F90Hz returns the characteristic frequency f90 of a tube wall, in hertz:
// the frequency at which the signals of shallow inside- and outside-surface
// flaws are about 90° apart in phase. It uses the rule of Cecco et al.
// (Eddy Current Manual, AECL-7523; from memory, also in IAEA training
// material)
//
//	f90 [kHz] ≈ 3 ρ[µΩ·cm] / (t²[mm²] μr),
//
// which is f90 [Hz] = 3×10⁵ ρ[Ω·m]/(t²[m²] μr) in SI, the frequency at which
// t ≈ 1.09 δ. An alternative rule puts t = 0.8 δ (f90 = 280/(t² σ) with f90
// in kHz, t in mm and σ in %IACS); see F90RuleHz. A mur of 0 is taken as 1.
// It returns NaN unless wall and conductivity are positive.
func F90Hz(sigmaSPerM, mur, wallM float64) float64 {
	if mur == 0 {
		mur = 1
	}
	if !(sigmaSPerM > 0) || !(wallM > 0) || !(mur > 0) {
		return math.NaN()
	}
	return 3e5 / (sigmaSPerM * wallM * wallM * mur)
}

// F90RuleHz returns the frequency at which the wall is a given multiple of
// the standard depth of penetration, t = ratio·δ, in hertz:
// f = ratio²/(π μ0 μr σ t²). The ratio 0.8 gives the "t = 0.8 δ" form of
// the f90 rule (280/(t²σ) kHz with t in mm and σ in %IACS); 1.09 reproduces
// F90Hz. A mur of 0 is taken as 1.
func F90RuleHz(sigmaSPerM, mur, wallM, ratio float64) float64 {
	if mur == 0 {
		mur = 1
	}
	if !(sigmaSPerM > 0) || !(wallM > 0) || !(mur > 0) || !(ratio > 0) {
		return math.NaN()
	}
	return ratio * ratio / (math.Pi * mu0 * mur * sigmaSPerM * wallM * wallM)
}

// PhaseSpreadRad returns the plane-wave estimate 2t/δ of the phase
// difference, in radians, between the signals of flaws at the inside and
// the outside surface of a wall of thickness wallM at freqHz. The phase of
// an eddy-current wave lags by x/δ at depth x; the signal of a flaw at depth
// x returns with a lag of 2x/δ (Cecco et al., AECL-7523, phase-lag rule;
// from memory). The rule overstates the spread seen with real coils: at f90
// (t ≈ 1.09 δ) it gives about 125° against the 90° that defines f90, so use
// it to compare candidate frequencies, not as a predicted flaw phase.
func PhaseSpreadRad(freqHz, sigmaSPerM, mur, wallM float64) float64 {
	return 2 * wallM / SkinDepthM(freqHz, sigmaSPerM, mur)
}

// MinFreqForThicknessHz returns the lowest frequency at which a part of
// thickness thicknessM is at least nDepths standard depths thick:
// f = nDepths²/(π μ0 μr σ t²). Conductivity measurement wants the part to
// be at least three standard depths thick (NDT Resource Center, Iowa State
// University, conductivity measurement notes), so nDepths is usually 3.
func MinFreqForThicknessHz(sigmaSPerM, mur, thicknessM, nDepths float64) float64 {
	return F90RuleHz(sigmaSPerM, mur, thicknessM, nDepths)
}

// FrequencyRole names what a recommended frequency is used for.
type FrequencyRole string

// Roles of the frequencies in a recommended set.
const (
	RolePrime      FrequencyRole = "prime"       // detection and phase sizing
	RoleMixPartner FrequencyRole = "mix-partner" // partner of the prime for support suppression
	RoleLandmark   FrequencyRole = "landmark"    // supports, tubesheet, deposits
	RoleID         FrequencyRole = "id"          // inside-surface sensitivity (optional)
)

// Recommendation is one frequency of a recommended set.
type Recommendation struct {
	Role   FrequencyRole `json:"role"`
	FreqHz float64       `json:"freq_hz"`
	// SkinDepthM is the standard depth of penetration at FreqHz.
	SkinDepthM float64 `json:"skin_depth_m"`
	// PhaseSpreadRad is the plane-wave ID–OD phase spread 2t/δ at FreqHz.
	PhaseSpreadRad float64 `json:"phase_spread_rad"`
	// Basis states the rule the frequency comes from and its source.
	Basis string `json:"basis"`
}

// AdviceInput describes the material, the part and the acquisition for
// Advise. Zero fields are unknown and the checks that need them are
// skipped.
type AdviceInput struct {
	ConductivitySPerM float64 // σ, S/m (required)
	RelPermeability   float64 // μr; 0 means 1
	WallM             float64 // tube wall or plate thickness, m
	TubeOuterDiamM    float64 // tube outside diameter, m (reported only)
	// CandidateHz, if positive, is a frequency the user proposes; its skin
	// depth and phase spread are reported.
	CandidateHz float64
	// ProbeSpeedMPS is the axial probe (or part) speed in m/s.
	ProbeSpeedMPS float64
	// SampleRateHz is the acquisition sample rate in Hz.
	SampleRateHz float64
	// LowpassHz is the cut-off of the low-pass filter after demodulation.
	LowpassHz float64
	// CoilLengthM is the effective length of the coil's field along the
	// scan (coil length plus, for a differential probe, the coil gap); it
	// sets the flaw signal bandwidth.
	CoilLengthM float64
	// FieldLengthM is the length scale L of the magnetic Reynolds number
	// (for example the coil diameter); 0 uses CoilLengthM, then the wall.
	FieldLengthM float64
	// IncludeID adds an inside-surface frequency above the prime.
	IncludeID bool
	// MagnetMomentAm2 and MagnetHeightM describe a vertically magnetised
	// magnet (point dipole, A·m²) moving at ProbeSpeedMPS at a height above
	// a sheet of thickness WallM; when both are positive the drag and lift
	// of the thin-sheet model are reported (ThinSheetForces).
	MagnetMomentAm2 float64
	MagnetHeightM   float64
}

// MagnetForces is the speed effect on a magnet moving over a thin sheet.
type MagnetForces struct {
	RecessionMPS      float64 `json:"recession_speed_m_per_s"` // w = 2/(μ0σd)
	ImageForceN       float64 `json:"image_force_n"`           // static perfect-image repulsion
	LiftN             float64 `json:"lift_n"`
	DragN             float64 `json:"drag_n"`
	DynamicSkinDepthM float64 `json:"dynamic_skin_depth_m"` // √(2h/(μ0σv))
}

// Advice is the frequency advice for one material, part and acquisition.
type Advice struct {
	ConductivitySPerM float64 `json:"conductivity_s_per_m"`
	ConductivityIACS  float64 `json:"conductivity_pct_iacs"`
	RelPermeability   float64 `json:"rel_permeability"`
	WallM             float64 `json:"wall_m,omitempty"`
	// F90Hz is f90 by the 3ρ/(t²μr) rule (Cecco et al.), F90AltHz by the
	// t = 0.8δ rule; both are zero when no wall was given.
	F90Hz    float64 `json:"f90_hz,omitempty"`
	F90AltHz float64 `json:"f90_alt_hz,omitempty"`
	// MinFreq3DeltaHz is the lowest frequency for which the wall is at least
	// three standard depths thick (conductivity measurement).
	MinFreq3DeltaHz float64          `json:"min_freq_3delta_hz,omitempty"`
	Set             []Recommendation `json:"recommended,omitempty"`
	// Candidate holds the skin depth and phase spread at the candidate
	// frequency, if one was given.
	Candidate *Recommendation `json:"candidate,omitempty"`
	// SamplesPerMetre is SampleRateHz/ProbeSpeedMPS; FlawBandwidthHz is
	// ProbeSpeedMPS/CoilLengthM.
	SamplesPerMetre float64 `json:"samples_per_m,omitempty"`
	FlawBandwidthHz float64 `json:"flaw_bandwidth_hz,omitempty"`
	// ReynoldsNumber is the magnetic Reynolds number μ0σvL of the motion.
	ReynoldsNumber float64 `json:"magnetic_reynolds_number,omitempty"`
	// Magnet holds the drag and lift on a moving magnet, if one was given.
	Magnet *MagnetForces `json:"magnet,omitempty"`
	// Warnings lists every rule the input breaks, in plain words.
	Warnings []string `json:"warnings"`
}

// Thresholds used by Advise.
const (
	// MinSamplesPerInch is the common-practice minimum axial sampling
	// density of tube examinations, 30 samples per inch (common practice,
	// no source).
	MinSamplesPerInch = 30
	// ReynoldsWarn is the magnetic Reynolds number above which motion-induced
	// eddy currents are taken to distort a quasi-static reading (common
	// practice, no source).
	ReynoldsWarn = 0.1
)

// ErrNoConductivity is returned by Advise when the conductivity is not a
// positive finite number.
var ErrNoConductivity = errors.New("conductivity must be a positive finite value")

// Advise computes the standard depth of penetration, f90, the ID–OD phase
// spread, a recommended frequency set, and checks the acquisition
// (sampling density, filter cut-off against the flaw bandwidth, magnetic
// Reynolds number). The recommended set follows the roles used for bobbin
// examination: a prime between f90 and 1.5·f90 for detection and phase
// sizing; a mix partner at no more than half the prime for suppressing
// external variables such as support plates (IAEA-derived level-2 training
// text); a landmark frequency about a fifteenth of the prime (common
// practice, no source); and optionally an inside-surface frequency at twice
// the prime (internal variables want at least twice the primary, same
// training text). Values are rounded to the 1-1.2-1.5-2-2.5-3-4-5-6-8
// series. The set is advice: the technique sheet governs.
func Advise(in AdviceInput) (Advice, error) {
	sigma := in.ConductivitySPerM
	if !(sigma > 0) || math.IsInf(sigma, 0) {
		return Advice{}, ErrNoConductivity
	}
	mur := in.RelPermeability
	if mur == 0 {
		mur = 1
	}
	if !(mur >= 1) || math.IsInf(mur, 0) {
		return Advice{}, fmt.Errorf("relative permeability %v: expected a finite value ≥ 1", in.RelPermeability)
	}
	for _, q := range []struct {
		name string
		v    float64
	}{{"wall", in.WallM}, {"tube outside diameter", in.TubeOuterDiamM}, {"candidate frequency", in.CandidateHz},
		{"probe speed", in.ProbeSpeedMPS}, {"sample rate", in.SampleRateHz}, {"low-pass cut-off", in.LowpassHz},
		{"coil length", in.CoilLengthM}, {"field length", in.FieldLengthM},
		{"magnet moment", in.MagnetMomentAm2}, {"magnet height", in.MagnetHeightM}} {
		if !(q.v >= 0) || math.IsInf(q.v, 0) {
			return Advice{}, fmt.Errorf("%s %v: expected a finite value ≥ 0", q.name, q.v)
		}
	}
	a := Advice{
		ConductivitySPerM: sigma,
		ConductivityIACS:  sigma / 58e4,
		RelPermeability:   mur,
		WallM:             in.WallM,
		Warnings:          []string{},
	}
	rec := func(role FrequencyRole, f float64, basis string) Recommendation {
		r := Recommendation{Role: role, FreqHz: f, SkinDepthM: SkinDepthM(f, sigma, mur), Basis: basis}
		if in.WallM > 0 {
			r.PhaseSpreadRad = PhaseSpreadRad(f, sigma, mur, in.WallM)
		}
		return r
	}
	if in.TubeOuterDiamM > 0 && in.WallM > 0 && 2*in.WallM >= in.TubeOuterDiamM {
		return Advice{}, fmt.Errorf("wall %g m: expected less than half the outside diameter %g m", in.WallM, in.TubeOuterDiamM)
	}
	if in.WallM > 0 {
		a.F90Hz = F90Hz(sigma, mur, in.WallM)
		a.F90AltHz = F90RuleHz(sigma, mur, in.WallM, 0.8)
		a.MinFreq3DeltaHz = MinFreqForThicknessHz(sigma, mur, in.WallM, 3)
		prime := primeFrequency(a.F90Hz)
		a.Set = append(a.Set,
			rec(RolePrime, prime, "f90 to 1.5·f90, f90 ≈ 3ρ/(t²μr) (Cecco et al., AECL-7523; from memory)"),
			rec(RoleMixPartner, roundDown125(prime/2), "no more than half the prime for external variables such as supports (IAEA level-2 eddy-current training text)"),
			rec(RoleLandmark, roundNearest125(prime/15), "about prime/15 for supports, tubesheet and deposits (common practice, no source)"),
		)
		if in.IncludeID {
			a.Set = append(a.Set, rec(RoleID, roundUp125(2*prime), "at least twice the prime for internal variables (IAEA level-2 eddy-current training text)"))
		}
		if mur > 1 {
			a.Warnings = append(a.Warnings, fmt.Sprintf("relative permeability %g: f90 and skin depth assume a uniform, known μr; magnetic tube normally needs saturation or another technique", mur))
		}
	}
	if in.CandidateHz > 0 {
		c := rec("candidate", in.CandidateHz, "user candidate")
		a.Candidate = &c
		// The 3δ rule concerns conductivity measurement on a part or plate,
		// not tube examination, where the wall is about one δ by design.
		if in.WallM > 0 && in.TubeOuterDiamM == 0 && in.WallM < 3*c.SkinDepthM {
			a.Warnings = append(a.Warnings, fmt.Sprintf("thickness %.4g mm < 3δ = %.4g mm at %.4g kHz: a conductivity reading depends on thickness; use at least %.4g kHz (three standard depths, NDT Resource Center)",
				in.WallM*1e3, 3*c.SkinDepthM*1e3, in.CandidateHz/1e3, a.MinFreq3DeltaHz/1e3))
		}
	}
	v := in.ProbeSpeedMPS
	if v > 0 && in.SampleRateHz > 0 {
		a.SamplesPerMetre = in.SampleRateHz / v
		perInch := a.SamplesPerMetre * 0.0254
		if perInch < MinSamplesPerInch {
			a.Warnings = append(a.Warnings, fmt.Sprintf("%.3g samples per inch at %.3g m/s and %.4g Hz: below the usual minimum of %d (common practice); slow the probe to %.3g m/s or sample at %.4g Hz",
				perInch, v, in.SampleRateHz, MinSamplesPerInch, in.SampleRateHz*0.0254/MinSamplesPerInch, MinSamplesPerInch*v/0.0254))
		}
	}
	if v > 0 && in.CoilLengthM > 0 {
		a.FlawBandwidthHz = v / in.CoilLengthM
		if in.LowpassHz > 0 && in.LowpassHz < a.FlawBandwidthHz {
			a.Warnings = append(a.Warnings, fmt.Sprintf("low-pass cut-off %.4g Hz is below the flaw bandwidth ≈ speed/coil length = %.4g Hz: flaw signals will be attenuated and smeared", in.LowpassHz, a.FlawBandwidthHz))
		}
		if in.SampleRateHz > 0 && in.SampleRateHz < 2*a.FlawBandwidthHz {
			a.Warnings = append(a.Warnings, fmt.Sprintf("sample rate %.4g Hz cannot carry the flaw bandwidth %.4g Hz (needs more than %.4g Hz)", in.SampleRateHz, a.FlawBandwidthHz, 2*a.FlawBandwidthHz))
		}
	}
	if in.LowpassHz > 0 && in.SampleRateHz > 0 && in.LowpassHz >= in.SampleRateHz/2 {
		a.Warnings = append(a.Warnings, fmt.Sprintf("low-pass cut-off %.4g Hz is at or above the Nyquist frequency %.4g Hz of the sample rate", in.LowpassHz, in.SampleRateHz/2))
	}
	if v > 0 {
		l := in.FieldLengthM
		if l == 0 {
			l = in.CoilLengthM
		}
		if l == 0 {
			l = in.WallM
		}
		if l > 0 {
			a.ReynoldsNumber = MagneticReynolds(sigma, mur, v, l)
			if a.ReynoldsNumber > ReynoldsWarn {
				a.Warnings = append(a.Warnings, fmt.Sprintf("magnetic Reynolds number μ0σvL = %.3g > %g: motion-induced eddy currents distort the reading at %.3g m/s; calibrate at the examination speed or slow down", a.ReynoldsNumber, ReynoldsWarn, v))
			}
		}
	}
	if in.MagnetMomentAm2 > 0 || in.MagnetHeightM > 0 {
		if !(in.MagnetMomentAm2 > 0) || !(in.MagnetHeightM > 0) || !(in.WallM > 0) || !(v > 0) {
			return Advice{}, fmt.Errorf("magnet forces need a moment, a height, a sheet thickness (wall) and a speed, all positive")
		}
		mf := &MagnetForces{
			RecessionMPS:      RecessionSpeedMPS(sigma, in.WallM),
			ImageForceN:       DipoleImageForceN(in.MagnetMomentAm2, in.MagnetHeightM),
			DynamicSkinDepthM: DynamicSkinDepthM(sigma, v, in.MagnetHeightM),
		}
		mf.LiftN, mf.DragN = ThinSheetForces(mf.ImageForceN, v, mf.RecessionMPS)
		a.Magnet = mf
		if in.WallM > mf.DynamicSkinDepthM/3 {
			a.Warnings = append(a.Warnings, fmt.Sprintf("sheet %.3g mm is not thin against the dynamic skin depth %.3g mm: the thin-sheet drag and lift are only indicative", in.WallM*1e3, mf.DynamicSkinDepthM*1e3))
		}
		if mur > 1 {
			a.Warnings = append(a.Warnings, "magnetic sheet: the thin-sheet forces assume μr = 1")
		}
	}
	return a, nil
}

// series125 is the preferred-number series used to round frequencies.
var series125 = []float64{1, 1.2, 1.5, 2, 2.5, 3, 4, 5, 6, 8}

// seriesValues returns the series values within a decade either side of x.
func seriesValues(x float64) []float64 {
	e := math.Floor(math.Log10(x))
	var out []float64
	for d := e - 1; d <= e+1; d++ {
		p := math.Pow(10, d)
		for _, s := range series125 {
			out = append(out, s*p)
		}
	}
	sort.Float64s(out)
	return out
}

// roundDown125 returns the largest series value ≤ x.
func roundDown125(x float64) float64 {
	best := 0.0
	for _, v := range seriesValues(x) {
		if v <= x*(1+1e-12) {
			best = v
		}
	}
	return best
}

// roundUp125 returns the smallest series value ≥ x.
func roundUp125(x float64) float64 {
	for _, v := range seriesValues(x) {
		if v >= x*(1-1e-12) {
			return v
		}
	}
	return x
}

// roundNearest125 returns the series value nearest to x on a log scale.
func roundNearest125(x float64) float64 {
	lo, hi := roundDown125(x), roundUp125(x)
	if math.Log(x/lo) <= math.Log(hi/x) {
		return lo
	}
	return hi
}

// primeFrequency picks the prime from [f90, 1.5·f90]: the largest series
// value in the range, or 1.25·f90 when the range holds none.
func primeFrequency(f90 float64) float64 {
	p := roundDown125(1.5 * f90)
	if p >= f90*(1-1e-12) {
		return p
	}
	return 1.25 * f90
}
