package impedance

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
)

// Probe describes a surface probe for conductivity and coating work: its
// coil, the effective lift-off of the winding on a bare surface, and
// optionally its frequencies. It is stored as JSON (docs/conductivity.md).
type Probe struct {
	ID           string    `json:"id,omitempty"`
	InnerRadiusM float64   `json:"inner_radius_m"`
	OuterRadiusM float64   `json:"outer_radius_m"`
	LengthM      float64   `json:"length_m"`
	Turns        float64   `json:"turns"`
	LiftoffM     float64   `json:"liftoff_m"`
	FreqsHz      []float64 `json:"freqs_hz,omitempty"`
}

// Coil returns the probe's coil.
func (p Probe) Coil() Coil {
	return Coil{InnerRadiusM: p.InnerRadiusM, OuterRadiusM: p.OuterRadiusM, LengthM: p.LengthM, Turns: p.Turns}
}

// Validate reports an impossible probe.
func (p Probe) Validate() error {
	if err := p.Coil().Validate(); err != nil {
		return err
	}
	if !(p.LiftoffM > 0) || math.IsInf(p.LiftoffM, 0) {
		return fmt.Errorf("probe lift-off %v m: expected a finite positive value", p.LiftoffM)
	}
	for _, f := range p.FreqsHz {
		if !(f > 0) || math.IsInf(f, 0) {
			return fmt.Errorf("probe frequency %v Hz: expected a finite positive value", f)
		}
	}
	return nil
}

// ReadProbe reads and validates a probe file; unknown fields are errors.
func ReadProbe(r io.Reader, name string) (Probe, error) {
	var p Probe
	dec := json.NewDecoder(r)
	dec.DisallowUnknownFields()
	if err := dec.Decode(&p); err != nil {
		return Probe{}, fmt.Errorf("%s: %w", name, err)
	}
	if err := p.Validate(); err != nil {
		return Probe{}, fmt.Errorf("%s: %w", name, err)
	}
	return p, nil
}

// Setup kinds.
const (
	SetupConductivity = "conductivity"
	SetupCoating      = "coating"
)

// SetupFormat is the format tag of a setup file.
const SetupFormat = "whorl-impedance-setup/1"

// Setup is a stored conductivity or coating set-up: the probe, the fitted
// calibration and the references it was fitted on.
type Setup struct {
	Format      string       `json:"format"`
	Kind        string       `json:"kind"`
	CreatedUTC  string       `json:"created_utc"`
	Software    string       `json:"software,omitempty"`
	Probe       Probe        `json:"probe"`
	ModelRelTol float64      `json:"model_rel_tol"`
	Calibration *Calibration `json:"calibration"`
	Blocks      []RefBlock   `json:"blocks,omitempty"`
	Shims       []Shim       `json:"shims,omitempty"`
	// BaseConductivitySPerM is the conductivity of the base metal of a
	// coating set-up.
	BaseConductivitySPerM float64 `json:"base_conductivity_s_per_m,omitempty"`
	Caution               string  `json:"caution,omitempty"`
}

// ErrSetup is wrapped by every error of ReadSetup about the content.
var ErrSetup = errors.New("bad setup file")

// ReadSetup reads and checks a setup file.
func ReadSetup(r io.Reader, name string) (*Setup, error) {
	var s Setup
	dec := json.NewDecoder(r)
	dec.DisallowUnknownFields()
	if err := dec.Decode(&s); err != nil {
		return nil, fmt.Errorf("%s: %w: %v", name, ErrSetup, err)
	}
	bad := func(format string, a ...any) error {
		return fmt.Errorf("%s: %w: %s", name, ErrSetup, fmt.Sprintf(format, a...))
	}
	if s.Format != SetupFormat {
		return nil, bad("format %q, expected %q", s.Format, SetupFormat)
	}
	if s.Kind != SetupConductivity && s.Kind != SetupCoating {
		return nil, bad("kind %q, expected %q or %q", s.Kind, SetupConductivity, SetupCoating)
	}
	if err := s.Probe.Validate(); err != nil {
		return nil, bad("%v", err)
	}
	c := s.Calibration
	if c == nil || len(c.Channels) == 0 {
		return nil, bad("no calibration channels")
	}
	for _, ch := range c.Channels {
		if !(ch.FreqHz > 0) || ch.Gain == 0 || !isFinite(real(ch.Gain)) || !isFinite(imag(ch.Gain)) || !isFinite(real(ch.Offset)) || !isFinite(imag(ch.Offset)) {
			return nil, bad("channel at %v Hz: expected a positive frequency, a finite non-zero gain and a finite offset", ch.FreqHz)
		}
	}
	if n := len(c.Params); len(c.Covariance) != n*n {
		return nil, bad("covariance has %d entries for %d parameters", len(c.Covariance), n)
	}
	if !(c.LiftoffM > 0) || !(c.CoilScale > 0) || !(c.NoiseV >= 0) {
		return nil, bad("lift-off %v m, coil scale %v, noise %v V: expected positive values", c.LiftoffM, c.CoilScale, c.NoiseV)
	}
	if c.Coil != s.Probe.Coil() {
		return nil, bad("calibration coil differs from the probe coil")
	}
	return &s, nil
}
