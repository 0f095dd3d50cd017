package gui

import (
	"fmt"
	"math"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/widget"

	"whorl/gui/pixels"
	"whorl/gui/viewmodel"
	"whorl/impedance"
)

// ModelDesk is the coil-model explorer: sliders for frequency,
// conductivity, lift-off, thickness and permeability; the impedance-plane
// families around the operating point; the eddy-current density magnitude
// and phase versus depth; and the frequency advice.
type ModelDesk struct {
	ex *viewmodel.Explorer
	th *Theme

	Content fyne.CanvasObject

	freq, sigma, lift, thick, mur *widget.Slider
	halfSpace                     *widget.Check
	values                        map[string]*widget.Label
	families, magnitude, phase    *XYPlot
	advice                        *widget.Label
	busy                          *widget.Label
	syncing                       bool
}

// NewModelDesk builds the explorer's view over ex.
func NewModelDesk(ex *viewmodel.Explorer, th *Theme) *ModelDesk {
	d := &ModelDesk{ex: ex, th: th, values: map[string]*widget.Label{}}
	d.build()
	ex.OnChange = d.refresh
	return d
}

// logSlider returns a slider over log10 of a quantity.
func logSlider(lo, hi float64, on func(float64)) *widget.Slider {
	s := widget.NewSlider(math.Log10(lo), math.Log10(hi))
	s.Step = 0.01
	s.OnChanged = on
	return s
}

func (d *ModelDesk) build() {
	p := d.ex.Params()
	set := func(f func(*viewmodel.ModelParams)) {
		if d.syncing {
			return
		}
		q := d.ex.Params()
		f(&q)
		d.showValues(q)
		d.ex.Set(q)
	}
	d.freq = logSlider(1e3, 5e6, func(v float64) { set(func(q *viewmodel.ModelParams) { q.FreqHz = math.Pow(10, v) }) })
	d.sigma = logSlider(0.5e6, 60e6, func(v float64) { set(func(q *viewmodel.ModelParams) { q.SigmaSPerM = math.Pow(10, v) }) })
	d.lift = widget.NewSlider(0, 3)
	d.lift.Step = 0.05
	d.lift.OnChanged = func(v float64) { set(func(q *viewmodel.ModelParams) { q.LiftoffM = v / 1000 }) }
	d.thick = logSlider(0.1e-3, 20e-3, func(v float64) {
		set(func(q *viewmodel.ModelParams) {
			if !d.halfSpace.Checked {
				q.ThicknessM = math.Pow(10, v)
			}
		})
	})
	d.halfSpace = widget.NewCheck("half-space (no back wall)", func(on bool) {
		set(func(q *viewmodel.ModelParams) {
			if on {
				q.ThicknessM = math.Inf(1)
			} else {
				q.ThicknessM = math.Pow(10, d.thick.Value)
			}
		})
	})
	d.mur = logSlider(1, 200, func(v float64) { set(func(q *viewmodel.ModelParams) { q.MuR = math.Pow(10, v) }) })

	row := func(name string, s fyne.CanvasObject) fyne.CanvasObject {
		v := widget.NewLabel("")
		v.TextStyle = fyne.TextStyle{Monospace: true}
		d.values[name] = v
		n := widget.NewLabel(name)
		n.TextStyle = fyne.TextStyle{Bold: true}
		return container.NewVBox(container.NewBorder(nil, nil, n, v), s)
	}
	coil := widget.NewLabel(coilText(p))
	coil.Wrapping = fyne.TextWrapWord
	d.busy = widget.NewLabel("")
	d.advice = widget.NewLabel("")
	d.advice.Wrapping = fyne.TextWrapWord
	adviceHead := widget.NewLabel("frequency advice")
	adviceHead.TextStyle = fyne.TextStyle{Bold: true}
	controls := container.NewVBox(
		row("frequency", d.freq),
		row("conductivity", d.sigma),
		row("lift-off", d.lift),
		row("thickness", d.thick), d.halfSpace,
		row("rel. permeability", d.mur),
		coil, d.busy, adviceHead, d.advice,
	)
	d.families = NewXYPlot(d.th, "impedance plane: families around the operating point", "ΔR / X0", "X / X0")
	d.families.Equal = true
	d.magnitude = NewXYPlot(d.th, "eddy-current density |J| versus depth", "depth / mm", "|J| / |J(0)|")
	d.phase = NewXYPlot(d.th, "phase of J versus depth (lag grows with depth)", "depth / mm", "phase / °")
	profiles := container.NewGridWithRows(2, d.magnitude, d.phase)
	plots := container.NewHSplit(d.families, profiles)
	plots.SetOffset(0.55)
	left := container.NewVScroll(controls)
	left.SetMinSize(fyne.NewSize(270, 200))
	d.Content = container.NewBorder(nil, nil, left, nil, plots)
	d.syncSliders(p)
	d.showValues(p)
}

func coilText(p viewmodel.ModelParams) string {
	c := p.Coil
	return fmt.Sprintf("coil: radii %.2f–%.2f mm, length %.2f mm, %.0f turns", c.InnerRadiusM*1000, c.OuterRadiusM*1000, c.LengthM*1000, c.Turns)
}

func (d *ModelDesk) syncSliders(p viewmodel.ModelParams) {
	d.syncing = true
	defer func() { d.syncing = false }()
	d.freq.SetValue(math.Log10(p.FreqHz))
	d.sigma.SetValue(math.Log10(p.SigmaSPerM))
	d.lift.SetValue(p.LiftoffM * 1000)
	if math.IsInf(p.ThicknessM, 1) {
		d.halfSpace.SetChecked(true)
	} else {
		d.thick.SetValue(math.Log10(p.ThicknessM))
	}
	d.mur.SetValue(math.Log10(max(p.MuR, 1)))
}

func (d *ModelDesk) showValues(p viewmodel.ModelParams) {
	d.values["frequency"].SetText(formatFreq(p.FreqHz))
	d.values["conductivity"].SetText(fmt.Sprintf("%.2f MS/m (%.1f %%IACS)", p.SigmaSPerM/1e6, p.SigmaSPerM/58e6*100))
	d.values["lift-off"].SetText(fmt.Sprintf("%.2f mm", p.LiftoffM*1000))
	if math.IsInf(p.ThicknessM, 1) {
		d.values["thickness"].SetText("half-space")
	} else {
		d.values["thickness"].SetText(fmt.Sprintf("%.2f mm", p.ThicknessM*1000))
	}
	d.values["rel. permeability"].SetText(fmt.Sprintf("%.1f", max(p.MuR, 1)))
}

func (d *ModelDesk) refresh() {
	res := d.ex.Results()
	fam, prof, adv, err := res.Families, res.Profile, res.Advice, res.Err
	if res.Busy {
		d.busy.SetText("evaluating the model…")
	} else {
		d.busy.SetText("")
	}
	if err != nil {
		d.busy.SetText(err.Error())
		d.busy.Importance = widget.DangerImportance
		d.busy.Refresh()
		return
	}
	d.busy.Importance = widget.MediumImportance
	d.families.Curves = d.families.Curves[:0]
	for i, c := range fam.Curves {
		xs, ys := make([]float64, len(c.Points)), make([]float64, len(c.Points))
		for k, z := range c.Points {
			xs[k], ys[k] = real(z), imag(z)
		}
		d.families.Curves = append(d.families.Curves, Curve{Series: pixels.Series{X: xs, Y: ys, Line: true, Marker: -1}, Name: c.Name, ColourIndex: i})
	}
	if len(fam.Curves) > 0 {
		d.families.Curves = append(d.families.Curves, Curve{Series: pixels.Series{X: []float64{real(fam.Operating)}, Y: []float64{imag(fam.Operating)}, Marker: 2}, Name: "operating point", ColourIndex: -1})
	}
	d.families.Refresh()
	mm := make([]float64, len(prof.DepthM))
	deg := make([]float64, len(prof.PhaseRad))
	for i, z := range prof.DepthM {
		mm[i] = z * 1000
	}
	for i, a := range prof.PhaseRad {
		deg[i] = a * 180 / math.Pi
	}
	d.magnitude.Curves = []Curve{{Series: pixels.Series{X: mm, Y: prof.MagRel, Line: true, Marker: -1}, Name: "|J|/|J(0)|", ColourIndex: 0}}
	d.phase.Curves = []Curve{{Series: pixels.Series{X: mm, Y: deg, Line: true, Marker: -1}, Name: "arg J − arg J(0)", ColourIndex: 1}}
	if adv.SkinDepthM > 0 {
		sd := adv.SkinDepthM * 1000
		d.magnitude.Curves = append(d.magnitude.Curves, Curve{Series: pixels.Series{X: []float64{sd, sd}, Y: []float64{0, 1}, Line: true, Marker: -1}, Name: "δ", ColourIndex: -1})
	}
	d.magnitude.Refresh()
	d.phase.Refresh()
	var b strings.Builder
	fmt.Fprintf(&b, "standard depth of penetration δ = %.3f mm\n", adv.SkinDepthM*1000)
	if !math.IsNaN(adv.F90Hz) && adv.F90Hz > 0 {
		fmt.Fprintf(&b, "f90 for this thickness = %s\n", formatFreq(adv.F90Hz))
	}
	for _, n := range adv.Notes {
		b.WriteString(n + "\n")
	}
	d.advice.SetText(strings.TrimSpace(b.String()))
}

// DefaultModelParams is the explorer's starting point: a small surface
// coil (1.0–1.6 mm radii, 1 mm long, 120 turns) 0.1 mm above a 2 mm
// aluminium-alloy plate of 20 MS/m at 100 kHz.
func DefaultModelParams() viewmodel.ModelParams {
	return viewmodel.ModelParams{Coil: impedance.Coil{InnerRadiusM: 1.0e-3, OuterRadiusM: 1.6e-3, LengthM: 1e-3, Turns: 120},
		LiftoffM: 0.1e-3, ThicknessM: 2e-3, SigmaSPerM: 20e6, MuR: 1, FreqHz: 100e3}
}
