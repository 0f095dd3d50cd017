package acquire

import (
	"fmt"
	"strings"
	"time"
)

// CoilMode says how a channel's coils are connected.
type CoilMode int

const (
	// Absolute is a single coil compared with an external reference.
	Absolute CoilMode = iota + 1
	// Differential is two axially offset coils connected in opposition.
	Differential
)

// String returns "absolute" or "differential".
func (m CoilMode) String() string {
	switch m {
	case Absolute:
		return "absolute"
	case Differential:
		return "differential"
	}
	return fmt.Sprintf("CoilMode(%d)", int(m))
}

// ParseCoilMode reads "absolute"/"abs" or "differential"/"diff" (any case).
func ParseCoilMode(s string) (CoilMode, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "absolute", "abs":
		return Absolute, nil
	case "differential", "diff":
		return Differential, nil
	}
	return 0, fmt.Errorf("coil mode %q: expected absolute or differential", s)
}

// Channel is one demodulated complex channel of a scan.
//
// Samples[i] = X + jY in volts at the scan's sample i, with X the in-phase
// and Y the quadrature component (see the package documentation for the
// sign convention).
type Channel struct {
	// Name identifies the channel within its scan, for example "400k-diff".
	Name string
	// FreqHz is the excitation frequency in hertz.
	FreqHz float64
	// Mode is the coil connection.
	Mode CoilMode
	// Samples holds X + jY in volts, one per sample of the scan.
	Samples []complex128
}

// Meta describes one probe pass through one component.
type Meta struct {
	// Component identifies the examined item, for example the tube "R12C034".
	Component string
	// ProbeID is the probe's serial or identifier.
	ProbeID string
	// ProbeType is the probe kind: "bobbin", "surface", "encircling", ...
	ProbeType string
	// ProbeSpeedMPS is the nominal probe speed in m/s (0 when unknown).
	ProbeSpeedMPS float64
	// Direction is the direction of travel: "pull" or "push" (empty when unknown).
	Direction string
	// Start is the date and time of the first sample (zero when unknown).
	Start time.Time
	// CalGroup names the calibration group the scan belongs to.
	CalGroup string
	// Procedure is the procedure reference and revision.
	Procedure string
	// Extra holds any further metadata keys, kept and written back in key order.
	Extra map[string]string
}

// Scan is one probe pass through one component: metadata and N complex
// channels on a common sample axis.
//
// Sample i was taken at TimeS[i] seconds from the start of the scan and at
// axial position PositionM[i] metres along the component. Either axis may be
// nil (a time-only scan before resampling, or an encoder-triggered scan with
// no clock), but not both.
type Scan struct {
	Meta Meta
	// SampleRateHz is the nominal sample rate of a time-sampled scan (0 if none).
	SampleRateHz float64
	// AxialStepM is the nominal sample spacing of a position-sampled scan (0 if none).
	AxialStepM float64
	// TimeS is the time of each sample in seconds, or nil.
	TimeS []float64
	// PositionM is the axial position of each sample in metres, or nil.
	PositionM []float64
	// Channels are the complex channels, all of length Len().
	Channels []Channel
}

// Len returns the number of samples per channel.
func (s *Scan) Len() int {
	switch {
	case len(s.Channels) > 0:
		return len(s.Channels[0].Samples)
	case s.TimeS != nil:
		return len(s.TimeS)
	}
	return len(s.PositionM)
}

// Channel returns the channel with the given name, or nil.
func (s *Scan) Channel(name string) *Channel {
	for i := range s.Channels {
		if s.Channels[i].Name == name {
			return &s.Channels[i]
		}
	}
	return nil
}

// Validate reports the first structural problem of s: no sample axis, axes
// or channels of different lengths, empty or duplicate channel names, or a
// non-positive frequency.
func (s *Scan) Validate() error {
	n := s.Len()
	if s.TimeS == nil && s.PositionM == nil {
		return fmt.Errorf("scan %q: no time or position axis", s.Meta.Component)
	}
	if s.TimeS != nil && len(s.TimeS) != n {
		return fmt.Errorf("scan %q: %d time values for %d samples", s.Meta.Component, len(s.TimeS), n)
	}
	if s.PositionM != nil && len(s.PositionM) != n {
		return fmt.Errorf("scan %q: %d positions for %d samples", s.Meta.Component, len(s.PositionM), n)
	}
	seen := make(map[string]bool, len(s.Channels))
	for _, c := range s.Channels {
		if c.Name == "" {
			return fmt.Errorf("scan %q: channel with no name", s.Meta.Component)
		}
		if seen[c.Name] {
			return fmt.Errorf("scan %q: duplicate channel %q", s.Meta.Component, c.Name)
		}
		seen[c.Name] = true
		if len(c.Samples) != n {
			return fmt.Errorf("scan %q: channel %q has %d samples, want %d", s.Meta.Component, c.Name, len(c.Samples), n)
		}
		if !(c.FreqHz > 0) {
			return fmt.Errorf("scan %q: channel %q frequency %v Hz: expected a positive frequency", s.Meta.Component, c.Name, c.FreqHz)
		}
	}
	return nil
}

// RawRecord is a sampled coil voltage before demodulation.
//
// With SlotS == 0 the coil is driven by all ExcitationHz at once (multi-tone).
// With SlotS > 0 the excitation is time-multiplexed: starting at the first
// sample, each frequency of ExcitationHz in turn is applied for SlotS
// seconds, cycling.
type RawRecord struct {
	Meta Meta
	// Coil names the coil, for example "diff" or "abs".
	Coil string
	// Mode is the coil connection.
	Mode CoilMode
	// SampleRateHz is the ADC sample rate in hertz.
	SampleRateHz float64
	// ExcitationHz lists the excitation frequencies in hertz.
	ExcitationHz []float64
	// SlotS is the multiplex slot length in seconds (0 for simultaneous tones).
	SlotS float64
	// VoltageV is the coil voltage in volts, one value per sample.
	VoltageV []float64
	// ReferenceV is the recorded excitation reference in volts, or nil.
	ReferenceV []float64
	// PositionM is the axial position of each sample in metres, or nil.
	PositionM []float64
}
