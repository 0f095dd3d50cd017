package dsp

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"maps"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"whorl/acquire"
)

// ChainVersion is the processing-chain file format version this package
// reads and writes.
const ChainVersion = 1

// ErrChain is returned (wrapped) for a processing chain that cannot be
// read or applied.
var ErrChain = errors.New("processing chain")

// Step is one operation of a processing chain. Op selects the operation;
// the other fields are its parameters (see docs/processing-chain.md for
// which apply to which operation). Channels limits a step to the named
// channels (empty: every channel); Output, with a single input channel,
// writes the result to a new channel of that name instead of replacing it.
type Step struct {
	Op       string   `json:"op"`
	Channels []string `json:"channels,omitempty"`
	Output   string   `json:"output,omitempty"`

	// Filters: lowpass, highpass, bandpass (zero-phase Butterworth).
	Order      int     `json:"order,omitempty"`
	CutoffHz   float64 `json:"cutoff_hz,omitempty"`
	LowHz      float64 `json:"low_hz,omitempty"`
	HighHz     float64 `json:"high_hz,omitempty"`
	CutoffPerM float64 `json:"cutoff_per_m,omitempty"`
	LowPerM    float64 `json:"low_per_m,omitempty"`
	HighPerM   float64 `json:"high_per_m,omitempty"`

	// median, baseline: window width in samples (odd).
	Width int `json:"width,omitempty"`
	// derivative: lag in samples.
	Lag int `json:"lag,omitempty"`

	// resample: axial step, and optionally the probe speed to derive
	// positions from time (0: use the scan's position column).
	StepM    float64 `json:"step_m,omitempty"`
	SpeedMPS float64 `json:"speed_mps,omitempty"`

	// null, span: window [start, end) in samples.
	Start int `json:"start,omitempty"`
	End   int `json:"end,omitempty"`
	// rotate: angle in degrees (anticlockwise).
	AngleDeg float64 `json:"angle_deg,omitempty"`
	// gain: factor; xygain: X and Y factors; span: target Vpp.
	Factor  float64 `json:"factor,omitempty"`
	XFactor float64 `json:"x_factor,omitempty"`
	YFactor float64 `json:"y_factor,omitempty"`
	VppV    float64 `json:"vpp_v,omitempty"`

	// differential: channel A minus channel B, written to Output.
	A string `json:"a,omitempty"`
	B string `json:"b,omitempty"`

	// mix: a trained mix, inline, or read from MixFile (relative to the
	// chain file) and inlined by LoadChain; Output names the mix channel.
	MixFile string `json:"mix_file,omitempty"`
	Mix     *Mix   `json:"mix,omitempty"`
}

// Chain is a processing chain: the ordered list of steps applied to a scan.
// Every scan it produces records the chain (Meta.Extra "chain", its
// canonical compact JSON) and the SHA-256 of that JSON ("chain_sha256").
type Chain struct {
	Version int    `json:"version"`
	Name    string `json:"name,omitempty"`
	// CoilLengthM is the effective coil length for the flaw-band warning
	// (0: no check).
	CoilLengthM float64 `json:"coil_length_m,omitempty"`
	Steps       []Step  `json:"steps"`
}

var stepOps = []string{"lowpass", "highpass", "bandpass", "median", "baseline", "derivative", "resample", "null", "rotate", "gain", "xygain", "span", "differential", "mix"}

// LoadChain reads and validates a chain file; mix steps that name a
// mix_file get the mix read and inlined, so the recorded chain is
// self-contained.
func LoadChain(path string) (*Chain, error) {
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	c, err := ParseChain(b)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	for i := range c.Steps {
		s := &c.Steps[i]
		if s.Op != "mix" || s.MixFile == "" {
			continue
		}
		mp := s.MixFile
		if !filepath.IsAbs(mp) {
			mp = filepath.Join(filepath.Dir(path), mp)
		}
		mb, err := os.ReadFile(mp)
		if err != nil {
			return nil, fmt.Errorf("%s: step %d (mix): %w", path, i+1, err)
		}
		m, err := ParseMix(mb)
		if err != nil {
			return nil, fmt.Errorf("%s: step %d (mix): %s: %w", path, i+1, mp, err)
		}
		s.Mix = m
	}
	return c, nil
}

// ParseChain reads a chain from JSON and validates it. Unknown keys are
// errors, so a misspelt parameter is not silently ignored.
func ParseChain(b []byte) (*Chain, error) {
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.DisallowUnknownFields()
	var c Chain
	if err := dec.Decode(&c); err != nil {
		return nil, fmt.Errorf("%w: %w", ErrChain, jsonErr(b, err, dec.InputOffset()))
	}
	if dec.More() {
		return nil, fmt.Errorf("%w: data after the chain object", ErrChain)
	}
	if err := c.Validate(); err != nil {
		return nil, err
	}
	return &c, nil
}

func finitePos(v float64) bool { return v > 0 && !math.IsInf(v, 0) }

// Validate checks the version and each step's parameters (without a scan:
// channel names and sample rates are checked by Apply).
func (c *Chain) Validate() error {
	if c.Version != ChainVersion {
		return fmt.Errorf("%w: version %d: expected %d", ErrChain, c.Version, ChainVersion)
	}
	if math.IsNaN(c.CoilLengthM) || c.CoilLengthM < 0 || math.IsInf(c.CoilLengthM, 0) {
		return fmt.Errorf("%w: coil_length_m %v: expected a non-negative length", ErrChain, c.CoilLengthM)
	}
	if len(c.Steps) == 0 {
		return fmt.Errorf("%w: no steps", ErrChain)
	}
	for i, s := range c.Steps {
		if err := s.validate(); err != nil {
			return fmt.Errorf("%w: step %d (%s): %w", ErrChain, i+1, s.Op, err)
		}
	}
	return nil
}

func (s *Step) validate() error {
	for _, v := range []float64{s.CutoffHz, s.LowHz, s.HighHz, s.CutoffPerM, s.LowPerM, s.HighPerM, s.StepM, s.SpeedMPS, s.AngleDeg, s.Factor, s.XFactor, s.YFactor, s.VppV} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return errors.New("non-finite parameter")
		}
	}
	if s.Output != "" && len(s.Channels) != 1 && s.Op != "differential" && s.Op != "mix" {
		return errors.New(`"output" needs exactly one input channel`)
	}
	switch s.Op {
	case "lowpass", "highpass":
		if s.Order < 1 || s.Order > 16 {
			return fmt.Errorf("order %d: expected 1 to 16", s.Order)
		}
		if (s.CutoffHz > 0) == (s.CutoffPerM > 0) {
			return errors.New("give exactly one positive cut-off: cutoff_hz or cutoff_per_m")
		}
	case "bandpass":
		if s.Order < 1 || s.Order > 16 {
			return fmt.Errorf("order %d: expected 1 to 16", s.Order)
		}
		hz := s.LowHz > 0 && s.HighHz > s.LowHz
		pm := s.LowPerM > 0 && s.HighPerM > s.LowPerM
		if hz == pm {
			return errors.New("give one positive band: low_hz < high_hz or low_per_m < high_per_m")
		}
	case "median", "baseline":
		if s.Width < 1 || s.Width%2 == 0 {
			return fmt.Errorf("width %d: expected a positive odd number of samples", s.Width)
		}
	case "derivative":
		if s.Lag < 1 {
			return fmt.Errorf("lag %d: expected at least 1 sample", s.Lag)
		}
	case "resample":
		if !finitePos(s.StepM) {
			return fmt.Errorf("step_m %v: expected a positive length", s.StepM)
		}
	case "null", "span":
		if s.Start < 0 || s.End <= s.Start {
			return fmt.Errorf("window %d:%d: expected 0 ≤ start < end", s.Start, s.End)
		}
		if s.Op == "span" && !finitePos(s.VppV) {
			return fmt.Errorf("vpp_v %v: expected a positive amplitude", s.VppV)
		}
	case "rotate":
	case "gain":
		if s.Factor == 0 {
			return errors.New("factor: expected a non-zero gain")
		}
	case "xygain":
		if s.XFactor == 0 || s.YFactor == 0 {
			return errors.New("x_factor, y_factor: expected non-zero gains")
		}
	case "differential":
		if s.A == "" || s.B == "" || s.Output == "" {
			return errors.New(`differential needs "a", "b" and "output"`)
		}
	case "mix":
		if s.Output == "" {
			return errors.New(`mix needs "output", the name of the mix channel`)
		}
		if s.Mix == nil && s.MixFile == "" {
			return errors.New(`mix needs "mix" (inline) or "mix_file"`)
		}
		if s.Mix != nil {
			if err := s.Mix.Validate(); err != nil {
				return err
			}
			if s.Mix.Primary == "" || len(s.Mix.Others) != len(s.Mix.Matrices) {
				return errors.New("the mix must name its primary and other channels")
			}
		}
	default:
		return fmt.Errorf("unknown operation %q: expected one of %s", s.Op, strings.Join(stepOps, ", "))
	}
	return nil
}

// Canonical returns the chain's canonical compact JSON (as recorded in
// processed scans) and its SHA-256 in hexadecimal.
func (c *Chain) Canonical() ([]byte, string, error) {
	b, err := json.Marshal(c)
	if err != nil {
		return nil, "", fmt.Errorf("%w: %w", ErrChain, err)
	}
	sum := sha256.Sum256(b)
	return b, hex.EncodeToString(sum[:]), nil
}

// Apply runs the chain on a copy of s and returns the processed scan; s is
// not changed. Warnings (such as a filter cut-off inside the flaw band)
// are recorded in Meta.Extra "chain_warnings"; ApplyWarn also returns them.
func (c *Chain) Apply(s *acquire.Scan) (*acquire.Scan, error) {
	out, _, err := c.ApplyWarn(s)
	return out, err
}

// ApplyWarn is Apply that also returns the warnings.
func (c *Chain) ApplyWarn(s *acquire.Scan) (*acquire.Scan, []string, error) {
	if err := c.Validate(); err != nil {
		return nil, nil, err
	}
	for _, st := range c.Steps {
		if st.Op == "mix" && st.Mix == nil {
			return nil, nil, fmt.Errorf("%w: mix step with mix_file %q not loaded (use LoadChain)", ErrChain, st.MixFile)
		}
	}
	if err := s.Validate(); err != nil {
		return nil, nil, fmt.Errorf("%w: input scan: %w", ErrChain, err)
	}
	cur := copyScan(s)
	var warns []string
	for i, st := range c.Steps {
		w, err := c.applyStep(cur, &cur, st)
		if err != nil {
			return nil, nil, fmt.Errorf("%w: step %d (%s): %w", ErrChain, i+1, st.Op, err)
		}
		warns = append(warns, w...)
	}
	b, sum, err := c.Canonical()
	if err != nil {
		return nil, nil, err
	}
	cur.Meta.Extra["chain"] = string(b)
	cur.Meta.Extra["chain_sha256"] = sum
	if len(warns) > 0 {
		cur.Meta.Extra["chain_warnings"] = strings.Join(warns, "; ")
	}
	return cur, warns, cur.Validate()
}

// copyScan copies the scan structure; sample slices are shared until a
// step replaces them (steps never write into existing slices).
func copyScan(s *acquire.Scan) *acquire.Scan {
	c := *s
	c.Meta.Extra = maps.Clone(s.Meta.Extra)
	if c.Meta.Extra == nil {
		c.Meta.Extra = map[string]string{}
	}
	c.Channels = slices.Clone(s.Channels)
	return &c
}

// targets returns the indices of the channels a step acts on.
func targets(s *acquire.Scan, st Step) ([]int, error) {
	if len(st.Channels) == 0 {
		idx := make([]int, len(s.Channels))
		for i := range idx {
			idx[i] = i
		}
		return idx, nil
	}
	var idx []int
	for _, name := range st.Channels {
		k := slices.IndexFunc(s.Channels, func(c acquire.Channel) bool { return c.Name == name })
		if k < 0 {
			return nil, fmt.Errorf("no channel %q in scan (channels: %s)", name, channelNames(s))
		}
		idx = append(idx, k)
	}
	return idx, nil
}

func channelNames(s *acquire.Scan) string {
	var n []string
	for _, c := range s.Channels {
		n = append(n, c.Name)
	}
	return strings.Join(n, ", ")
}

// put stores a step result: replace channel k, or add it as st.Output.
func put(s *acquire.Scan, k int, st Step, c acquire.Channel) error {
	if st.Output == "" {
		s.Channels[k] = c
		return nil
	}
	if s.Channel(st.Output) != nil {
		return fmt.Errorf("output channel %q already exists", st.Output)
	}
	c.Name = st.Output
	s.Channels = append(s.Channels, c)
	return nil
}

// rate returns the filter design rate and cut-offs for a filter step: in Hz
// on a time-sampled scan, or in cycles per metre on an axial grid.
func filterRate(s *acquire.Scan, st Step) (fs float64, perM bool, err error) {
	if st.CutoffPerM > 0 || st.LowPerM > 0 {
		if !(s.AxialStepM > 0) {
			return 0, false, errors.New("a cut-off per metre needs an axially sampled scan (resample first)")
		}
		return 1 / s.AxialStepM, true, nil
	}
	if !(s.SampleRateHz > 0) {
		return 0, false, errors.New("a cut-off in Hz needs a time-sampled scan with a sample rate")
	}
	return s.SampleRateHz, false, nil
}

func (c *Chain) applyStep(s *acquire.Scan, out **acquire.Scan, st Step) ([]string, error) {
	var warns []string
	switch st.Op {
	case "lowpass", "highpass", "bandpass":
		fs, perM, err := filterRate(s, st)
		if err != nil {
			return nil, err
		}
		var sos SOS
		cut := st.CutoffHz
		switch st.Op {
		case "lowpass":
			if perM {
				cut = st.CutoffPerM
			}
			sos, err = ButterworthLowpass(st.Order, cut, fs)
		case "highpass":
			if perM {
				cut = st.CutoffPerM
			}
			sos, err = ButterworthHighpass(st.Order, cut, fs)
		case "bandpass":
			lo, hi := st.LowHz, st.HighHz
			if perM {
				lo, hi = st.LowPerM, st.HighPerM
			}
			cut = hi
			sos, err = ButterworthBandpass(st.Order, lo, hi, fs)
		}
		if err != nil {
			return nil, err
		}
		// The flaw band: probe speed ÷ coil length in Hz, or 1 ÷ coil length
		// in cycles per metre on an axial grid.
		var w string
		switch {
		case perM:
			w = spatialFlawBandWarning(st.Op == "highpass", cut, c.CoilLengthM)
		case st.Op == "highpass":
			w = HighpassFlawBandWarning(cut, s.Meta.ProbeSpeedMPS, c.CoilLengthM)
		default:
			w = FlawBandWarning(cut, s.Meta.ProbeSpeedMPS, c.CoilLengthM)
		}
		if w != "" {
			warns = append(warns, w)
		}
		idx, err := targets(s, st)
		if err != nil {
			return nil, err
		}
		ff := NewFiltFilter(sos)
		for _, k := range idx {
			y := make([]complex128, len(s.Channels[k].Samples))
			if err := ff.Run(y, s.Channels[k].Samples); err != nil {
				return nil, fmt.Errorf("channel %q: %w", s.Channels[k].Name, err)
			}
			if err := put(s, k, st, withSamples(s.Channels[k], y)); err != nil {
				return nil, err
			}
		}
	case "median", "baseline", "derivative", "null", "rotate", "gain", "xygain", "span":
		idx, err := targets(s, st)
		if err != nil {
			return nil, err
		}
		for _, k := range idx {
			ch := s.Channels[k]
			var res acquire.Channel
			switch st.Op {
			case "median":
				res = withSamples(ch, MovingMedian(nil, ch.Samples, st.Width))
			case "baseline":
				res = withSamples(ch, RemoveBaseline(nil, ch.Samples, st.Width))
			case "derivative":
				step := s.AxialStepM
				if !(step > 0) {
					if !(s.SampleRateHz > 0) {
						return nil, errors.New("derivative needs an axial step or a sample rate")
					}
					step = 1 / s.SampleRateHz
				}
				if len(ch.Samples) <= st.Lag {
					return nil, fmt.Errorf("channel %q: %d samples for a lag of %d", ch.Name, len(ch.Samples), st.Lag)
				}
				res = withSamples(ch, Derivative(nil, ch.Samples, st.Lag, step))
			case "null":
				if res, err = Null(ch, [2]int{st.Start, st.End}); err != nil {
					return nil, err
				}
			case "rotate":
				res = Rotate(ch, st.AngleDeg*math.Pi/180)
			case "gain":
				res = Gain(ch, st.Factor)
			case "xygain":
				res = XYGain(ch, st.XFactor, st.YFactor)
			case "span":
				if res, _, err = Span(ch, [2]int{st.Start, st.End}, st.VppV); err != nil {
					return nil, err
				}
			}
			if err := put(s, k, st, res); err != nil {
				return nil, err
			}
		}
	case "resample":
		var opts []ResampleOption
		if st.SpeedMPS != 0 {
			opts = append(opts, FromSpeed(st.SpeedMPS, 0))
		} else if s.PositionM == nil && s.Meta.ProbeSpeedMPS > 0 {
			opts = append(opts, FromSpeed(s.Meta.ProbeSpeedMPS, 0))
		}
		r, err := ResampleAxial(s, st.StepM, opts...)
		if err != nil {
			return nil, err
		}
		*out = r
	case "differential":
		a, b := s.Channel(st.A), s.Channel(st.B)
		if a == nil || b == nil {
			return nil, fmt.Errorf("channels %q and %q: not both in scan (channels: %s)", st.A, st.B, channelNames(s))
		}
		d, err := DifferentialFrom(st.Output, *a, *b)
		if err != nil {
			return nil, err
		}
		if err := put(s, -1, st, d); err != nil {
			return nil, err
		}
	case "mix":
		ch, err := ApplyMixToScan(s, st.Mix, st.Output)
		if err != nil {
			return nil, err
		}
		if err := put(s, -1, st, ch); err != nil {
			return nil, err
		}
	}
	return warns, nil
}

// spatialFlawBandWarning is FlawBandWarning (or, for a high-pass,
// HighpassFlawBandWarning) for cut-offs in cycles per metre, where the flaw
// band is 1 ÷ coil length.
func spatialFlawBandWarning(highpass bool, cutPerM, coilLengthM float64) string {
	if !(coilLengthM > 0) || !(cutPerM > 0) {
		return ""
	}
	band := 1 / coilLengthM
	switch {
	case highpass && cutPerM > band:
		return fmt.Sprintf("high-pass cut-off %.4g cycles/m is above the flaw band %.4g cycles/m (1 ÷ coil length %.4g mm): flaw signals will be removed", cutPerM, band, coilLengthM*1e3)
	case !highpass && cutPerM < band:
		return fmt.Sprintf("low-pass cut-off %.4g cycles/m is below the flaw band %.4g cycles/m (1 ÷ coil length %.4g mm): flaw signals will be attenuated and distorted", cutPerM, band, coilLengthM*1e3)
	}
	return ""
}

// ApplyMixToScan applies m to the channels of s it names and returns the
// mix channel, named name, with the primary's frequency and mode. Extra
// records nothing; the caller adds the channel.
func ApplyMixToScan(s *acquire.Scan, m *Mix, name string) (acquire.Channel, error) {
	p := s.Channel(m.Primary)
	if p == nil {
		return acquire.Channel{}, fmt.Errorf("mix primary %q not in scan (channels: %s)", m.Primary, channelNames(s))
	}
	var others [][]complex128
	for _, o := range m.Others {
		c := s.Channel(o)
		if c == nil {
			return acquire.Channel{}, fmt.Errorf("mix channel %q not in scan (channels: %s)", o, channelNames(s))
		}
		others = append(others, c.Samples)
	}
	if len(others) != len(m.Matrices) {
		return acquire.Channel{}, fmt.Errorf("mix names %d other channels for %d matrices", len(m.Others), len(m.Matrices))
	}
	return acquire.Channel{Name: name, FreqHz: p.FreqHz, Mode: p.Mode, Samples: m.Apply(nil, p.Samples, others)}, nil
}

// ChainSHA256 returns the recorded chain hash of a processed scan, or "".
func ChainSHA256(s *acquire.Scan) string { return s.Meta.Extra["chain_sha256"] }

func jsonMarshal(v any) ([]byte, error) { return json.MarshalIndent(v, "", "  ") }
