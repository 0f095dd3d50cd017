package calibrate

import (
	"fmt"

	"whorl/dsp"
)

// MixRecord is a mix trained on the standard scan: its definition and the
// dsp mix (coefficients, training windows and quality figures).
type MixRecord struct {
	Name          string   `json:"name"`
	Primary       string   `json:"primary"`
	Inputs        []string `json:"inputs"`
	TrainingFlaws []string `json:"training_flaws"`
	Mix           *dsp.Mix `json:"mix"`
	// Residue is the mix's residue template, when the procedure asks for one.
	Residue *Residue `json:"residue,omitempty"`
}

// Residue is what a mix leaves of its training flaw (a support ring) on
// the standard scan, with the same flaw's signal on the landmark channel,
// both raw and baseline-removed (the mean of each window's two end
// samples subtracted), over the same window centred on the flaw. At a
// support of a tube, the landmark-channel signal fitted to Landmark gives
// the complex scale (and shift) by which Mix is subtracted from the mix
// output.
type Residue struct {
	FlawID string `json:"flaw_id"`
	// Landmark and Mix hold [X, Y] pairs in raw volts.
	Landmark [][2]float64 `json:"landmark"`
	Mix      [][2]float64 `json:"mix"`
}

// Complex returns the templates as complex samples.
func (r *Residue) Complex() (landmark, mix []complex128) {
	conv := func(xy [][2]float64) []complex128 {
		z := make([]complex128, len(xy))
		for i, v := range xy {
			z[i] = complex(v[0], v[1])
		}
		return z
	}
	return conv(r.Landmark), conv(r.Mix)
}

// Apply returns the mix output for the channels in samples (by name).
func (r *MixRecord) Apply(dst []complex128, samples map[string][]complex128) ([]complex128, error) {
	p := samples[r.Primary]
	if p == nil {
		return nil, fmt.Errorf("mix %s: primary channel %s: %w", r.Name, r.Primary, errNoMix)
	}
	others := make([][]complex128, len(r.Inputs))
	for k, in := range r.Inputs {
		if others[k] = samples[in]; others[k] == nil {
			return nil, fmt.Errorf("mix %s: input channel %s: %w", r.Name, in, errNoMix)
		}
	}
	return r.Mix.Apply(dst, p, others), nil
}

// trainMix trains one mix over windows of m.WindowM centred on the
// located training flaws and returns it with its output on the standard scan.
func trainMix(m MixDef, samples map[string][]complex128, found map[string]*LocatedFlaw, n int, stepM float64) (*MixRecord, []complex128, error) {
	form, err := dsp.ParseMixForm(m.Form)
	if err != nil {
		return nil, nil, fmt.Errorf("mix %s: %w", m.Name, err)
	}
	var windows [][2]int
	for _, id := range m.TrainingFlaws {
		lf := found[id]
		if lf == nil {
			return nil, nil, fmt.Errorf("mix %s: training flaw %s was not found on the standard scan", m.Name, id)
		}
		c := lf.Sample
		half := WindowSamples(m.WindowM, stepM) / 2
		windows = append(windows, [2]int{max(0, c-half), min(n, c+half)})
	}
	rec := &MixRecord{Name: m.Name, Primary: m.Primary, Inputs: m.Inputs, TrainingFlaws: m.TrainingFlaws}
	others := make([][]complex128, len(m.Inputs))
	for k, in := range m.Inputs {
		others[k] = samples[in]
	}
	mx, err := dsp.TrainMix(form, samples[m.Primary], others, windows)
	if err != nil {
		return nil, nil, fmt.Errorf("mix %s: %w", m.Name, err)
	}
	mx.Primary, mx.Others = m.Primary, m.Inputs
	rec.Mix = mx
	out := mx.Apply(nil, samples[m.Primary], others)
	return rec, out, nil
}

// residueTemplate cuts the residue template of a mix around the located
// flaw lf from the mix output and the landmark channel.
func residueTemplate(m MixDef, lf *LocatedFlaw, out, landmark []complex128, stepM float64) (*Residue, error) {
	h := WindowSamples(m.ResidueWindowM, stepM) / 2
	lo, hi := lf.Sample-h, lf.Sample+h+1
	if lo < 0 || hi > len(out) {
		return nil, fmt.Errorf("mix %s: the residue window of %g m around %s runs off the standard scan", m.Name, m.ResidueWindowM, lf.FlawID)
	}
	cut := func(z []complex128) [][2]float64 {
		w := z[lo:hi]
		base := (w[0] + w[len(w)-1]) / 2
		out := make([][2]float64, len(w))
		for i, v := range w {
			out[i] = [2]float64{real(v - base), imag(v - base)}
		}
		return out
	}
	return &Residue{FlawID: lf.FlawID, Landmark: cut(landmark), Mix: cut(out)}, nil
}
