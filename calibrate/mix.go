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
