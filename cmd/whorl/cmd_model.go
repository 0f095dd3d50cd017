package main

import (
	"context"
	"encoding/csv"
	"flag"
	"fmt"
	"io"
	"math"
	"math/cmplx"
	"strconv"
	"strings"
	"text/tabwriter"

	"whorl/impedance"
	"whorl/units"
)

func init() {
	register(&command{
		name:     "model plate",
		synopsis: "coil impedance above a layered plate or half-space (Dodd–Deeds model)",
		usage:    "whorl model plate --inner-radius R1 --outer-radius R2 --coil-length L --turns N --liftoff H --freq F [--freq F...] --layer T:SIGMA[:MUR] [--layer ...] [--json]",
		help: `Computes the impedance of an air-cored coil (axis normal to the surface) at a
lift-off above a stack of conducting layers, by the Dodd–Deeds model: the
coil's inductance in air L0, Z0 = jωL0, the change ΔZ caused by the
conductor, and the normalised impedance (ΔR/X0, (X0+ΔX)/X0) with X0 = ωL0.
Time dependence e^{+jωt}; wire resistance is not included.

Each --layer is THICKNESS:CONDUCTIVITY[:RELATIVE-PERMEABILITY], top layer
first; THICKNESS "inf" makes a half-space (last layer only). Without a
half-space, air lies below the stack. The error estimate is the relative
quadrature and truncation error of ΔZ.

Examples:
  whorl model plate --inner-radius 6.15mm --outer-radius 12.4mm --coil-length 6.15mm \
      --turns 3790 --liftoff 0.88mm --freq 900Hz --layer inf:30.6MS/m
  whorl model plate --inner-radius 1mm --outer-radius 2mm --coil-length 1mm --turns 100 \
      --liftoff 0.1mm --freq 100kHz --layer 0.1mm:100%IACS --layer inf:5MS/m:80 --json
  whorl model plate ... --freq 1kHz --freq 10kHz --freq 100kHz --json   (a JSON array)`,
		setFlags: func(fs *flag.FlagSet) {
			modelCoilFlags(fs)
			fs.String("liftoff", "", "gap between the winding and the surface, e.g. 0.5mm (required)")
			fs.Var(&stringList{}, "freq", "excitation `frequency`, e.g. 100kHz (repeatable)")
			fs.Var(&stringList{}, "layer", "layer `T:SIGMA[:MUR]` top first, e.g. inf:17.4MS/m (repeatable)")
			fs.Bool("json", false, "print JSON (an object, or an array for several --freq)")
		},
		run: runModelPlate,
	})
	register(&command{
		name:     "model tube",
		synopsis: "bobbin or encircling coil impedance with a tube or rod (Dodd–Deeds model)",
		usage:    "whorl model tube --placement bobbin|encircling [--mode absolute|differential --coil-gap D] --tube-od D --wall T|solid --conductivity SIGMA [--mur M] COIL FLAGS --freq F... [--json]",
		help: `Computes the impedance of a coil coaxial with a tube or rod by the
Dodd–Deeds cylindrical model: a bobbin (internal) coil in the bore, or an
encircling coil around the tube (--wall solid: a solid rod). Output as for
'whorl model plate': L0, Z0, ΔZ of one coil, normalised impedance and error
estimate. With --mode differential the probe is two identical coils with
centres --coil-gap apart: the values are those of each coil, plus their
mutual inductance in air, the change of the mutual impedance, and the
bridge output Z1 − Z2, which is zero in a uniform tube.

Examples:
  whorl model tube --placement bobbin --tube-od 19.05mm --wall 1.09mm \
      --conductivity 1MS/m --inner-radius 7mm --outer-radius 7.6mm \
      --coil-length 1.5mm --turns 60 --freq 100kHz --freq 300kHz
  whorl model tube --placement encircling --tube-od 19.05mm --wall solid \
      --conductivity 45%IACS --inner-radius 10.5mm --outer-radius 11.5mm \
      --coil-length 2mm --turns 100 --freq 10kHz --json
  whorl model tube --placement bobbin --mode differential --coil-gap 2.5mm ...`,
		setFlags: func(fs *flag.FlagSet) {
			modelCoilFlags(fs)
			fs.String("placement", "", "coil `placement`: bobbin (inside) or encircling (outside) (required)")
			fs.String("mode", "absolute", "absolute or differential")
			fs.String("coil-gap", "", "centre spacing of the two coils of a differential pair, e.g. 2.5mm")
			fs.String("tube-od", "", "tube outer diameter, e.g. 19.05mm or 0.75in (required)")
			fs.String("wall", "", "wall thickness, e.g. 1.09mm, or solid for a rod (required)")
			fs.String("conductivity", "", "tube conductivity, e.g. 1.4MS/m or 2.4%IACS (required)")
			fs.Float64("mur", 1, "relative permeability of the tube (≥ 1)")
			fs.Var(&stringList{}, "freq", "excitation `frequency`, e.g. 100kHz (repeatable)")
			fs.Bool("json", false, "print JSON (an object, or an array for several --freq)")
		},
		run: runModelTube,
	})
	register(&command{
		name:     "model depth-profile",
		synopsis: "eddy-current density and phase lag versus depth under a coil",
		usage:    "whorl model depth-profile COIL FLAGS --liftoff H --freq F --layer T:SIGMA[:MUR]... [--radius R] [--max-depth D] [--points N] [--format table|csv|json]",
		help: `Computes the eddy-current density induced by a coil above a layered
conductor (Dodd–Deeds model) at one radius from the coil axis (default: the
mean radius of the winding) and at evenly spaced depths below the surface.
Columns: depth, depth in standard depths of penetration δ of the layer at
that depth, |J| relative to the surface value, phase lag behind the surface
current in degrees (unwrapped), and J per ampere of coil current in A/m²
(real, imaginary). The default depth range is 5δ of the top layer, or the
stack if thinner.

Examples:
  whorl model depth-profile --inner-radius 2mm --outer-radius 3mm --coil-length 2mm \
      --turns 200 --liftoff 0.2mm --freq 50kHz --layer inf:1.4MS/m
  whorl model depth-profile ... --layer 1mm:58MS/m --max-depth 1mm --points 21 --format csv`,
		setFlags: func(fs *flag.FlagSet) {
			modelCoilFlags(fs)
			fs.String("liftoff", "", "gap between the winding and the surface, e.g. 0.5mm (required)")
			fs.String("freq", "", "excitation frequency, e.g. 50kHz (required)")
			fs.Var(&stringList{}, "layer", "layer `T:SIGMA[:MUR]` top first (repeatable)")
			fs.String("radius", "", "radius from the coil axis (default the mean winding radius)")
			fs.String("max-depth", "", "deepest point, e.g. 2mm (default 5δ or the stack)")
			fs.Int("points", 26, "number of depths from 0 to --max-depth (2..10000)")
			fs.String("format", "table", "output format: table, csv or json")
			fs.Bool("json", false, "same as --format json")
		},
		run: runModelDepthProfile,
	})
}

// modelCoilFlags defines the coil geometry flags shared by the model commands.
func modelCoilFlags(fs *flag.FlagSet) {
	fs.String("inner-radius", "", "inner winding radius, e.g. 6.15mm (required)")
	fs.String("outer-radius", "", "outer winding radius, e.g. 12.4mm (required)")
	fs.String("coil-length", "", "winding length along the axis, e.g. 6.15mm (required)")
	fs.Float64("turns", 0, "number of turns (required)")
}

// modelRequired returns the value of a required quantity flag.
func modelRequired(fs *flag.FlagSet, name string, k units.Kind) (float64, error) {
	v, ok, err := flagQuantity(fs, name, k)
	if err != nil {
		return 0, err
	}
	if !ok {
		return 0, usagef("--%s is required (a %s such as %s)", name, k, modelExample(k))
	}
	return v, nil
}

func modelExample(k units.Kind) string {
	switch k {
	case units.Length:
		return "1.5mm"
	case units.Frequency:
		return "100kHz"
	case units.Conductivity:
		return "17.4MS/m"
	}
	return "a number"
}

// modelCoil reads and validates the coil flags.
func modelCoil(fs *flag.FlagSet) (impedance.Coil, error) {
	var c impedance.Coil
	var err error
	if c.InnerRadiusM, err = modelRequired(fs, "inner-radius", units.Length); err != nil {
		return c, err
	}
	if c.OuterRadiusM, err = modelRequired(fs, "outer-radius", units.Length); err != nil {
		return c, err
	}
	if c.LengthM, err = modelRequired(fs, "coil-length", units.Length); err != nil {
		return c, err
	}
	c.Turns = flagFloat(fs, "turns")
	if !flagSet(fs, "turns") {
		return c, usagef("--turns is required (the number of turns, e.g. 100)")
	}
	if err := c.Validate(); err != nil {
		return c, usagef("coil: %v", err)
	}
	return c, nil
}

// modelFreqs reads the repeatable --freq flag.
func modelFreqs(fs *flag.FlagSet) ([]float64, error) {
	ss := flagStrings(fs, "freq")
	if len(ss) == 0 {
		return nil, usagef("--freq is required (a frequency such as 100kHz; repeat for several)")
	}
	out := make([]float64, len(ss))
	for i, s := range ss {
		v, err := units.Parse(units.Frequency, s)
		if err != nil {
			return nil, usagef("--freq %v", err)
		}
		if !(v > 0) {
			return nil, usagef("--freq %q: expected a positive frequency", s)
		}
		out[i] = v
	}
	return out, nil
}

// parseLayerSpec reads one --layer value T:SIGMA[:MUR].
func parseLayerSpec(s string) (impedance.Layer, error) {
	parts := strings.Split(s, ":")
	if len(parts) < 2 || len(parts) > 3 {
		return impedance.Layer{}, usagef("--layer %q: expected THICKNESS:CONDUCTIVITY[:RELATIVE-PERMEABILITY], e.g. inf:17.4MS/m or 0.1mm:100%%IACS:1", s)
	}
	var l impedance.Layer
	if t := strings.TrimSpace(parts[0]); strings.EqualFold(t, "inf") {
		l.ThicknessM = math.Inf(1)
	} else {
		v, err := units.Parse(units.Length, t)
		if err != nil {
			return l, usagef("--layer %q: thickness %v", s, err)
		}
		if !(v > 0) {
			return l, usagef("--layer %q: thickness must be positive or inf", s)
		}
		l.ThicknessM = v
	}
	v, err := units.Parse(units.Conductivity, parts[1])
	if err != nil {
		return l, usagef("--layer %q: conductivity %v", s, err)
	}
	if !(v >= 0) {
		return l, usagef("--layer %q: conductivity must be ≥ 0", s)
	}
	l.ConductivitySPerM = v
	l.RelPermeability = 1
	if len(parts) == 3 {
		mu, err := strconv.ParseFloat(strings.TrimSpace(parts[2]), 64)
		if err != nil || !(mu >= 1) || math.IsInf(mu, 0) {
			return l, usagef("--layer %q: relative permeability %q: expected a number ≥ 1", s, parts[2])
		}
		l.RelPermeability = mu
	}
	return l, nil
}

// modelLayers reads the repeatable --layer flag and validates the stack.
func modelLayers(fs *flag.FlagSet) ([]impedance.Layer, error) {
	ss := flagStrings(fs, "layer")
	if len(ss) == 0 {
		return nil, usagef("--layer is required (THICKNESS:CONDUCTIVITY[:MUR], e.g. inf:17.4MS/m; repeat top first)")
	}
	var out []impedance.Layer
	for i, s := range ss {
		l, err := parseLayerSpec(s)
		if err != nil {
			return nil, err
		}
		if math.IsInf(l.ThicknessM, 1) && i != len(ss)-1 {
			return nil, usagef("--layer %q: only the last (deepest) layer may be a half-space (inf)", s)
		}
		out = append(out, l)
	}
	return out, nil
}

// modelComplex is a complex number in JSON.
type modelComplex struct {
	Re float64 `json:"re"`
	Im float64 `json:"im"`
}

func toModelComplex(z complex128) modelComplex { return modelComplex{real(z), imag(z)} }

// modelOutput is one frequency of 'model plate' or 'model tube' in JSON.
type modelOutput struct {
	FreqHz     float64      `json:"freq_hz"`
	L0H        float64      `json:"l0_h"`
	Z0Ohm      modelComplex `json:"z0_ohm"`
	DZOhm      modelComplex `json:"dz_ohm"`
	Normalized struct {
		R float64 `json:"r"`
		X float64 `json:"x"`
	} `json:"normalized"`
	ErrorEstimate float64 `json:"error_estimate"`
	// Differential pairs only.
	MutualL0H             *float64      `json:"mutual_l0_h,omitempty"`
	MutualDZOhm           *modelComplex `json:"mutual_dz_ohm,omitempty"`
	DifferentialOutputOhm *modelComplex `json:"differential_output_ohm,omitempty"`
}

func newModelOutput(r impedance.Result) modelOutput {
	o := modelOutput{FreqHz: r.FreqHz, L0H: r.L0H, Z0Ohm: toModelComplex(r.Z0Ohm), DZOhm: toModelComplex(r.DZOhm), ErrorEstimate: r.ErrorEstimate}
	zn := r.Normalized()
	o.Normalized.R, o.Normalized.X = real(zn), imag(zn)
	return o
}

// writeModelOutputs prints the results as JSON (object or array) or a table.
func writeModelOutputs(e *env, outs []modelOutput, asJSON bool) error {
	if asJSON {
		if len(outs) == 1 {
			return writeJSON(e.stdout, outs[0])
		}
		return writeJSON(e.stdout, outs)
	}
	tw := tabwriter.NewWriter(e.stdout, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "freq [Hz]\tL0 [H]\tΔR [Ω]\tΔX [Ω]\tRn\tXn\terror est.\t")
	for _, o := range outs {
		fmt.Fprintf(tw, "%g\t%.6g\t%.6g\t%.6g\t%.5f\t%.5f\t%.1e\t\n", o.FreqHz, o.L0H, o.DZOhm.Re, o.DZOhm.Im, o.Normalized.R, o.Normalized.X, o.ErrorEstimate)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	for _, o := range outs {
		if o.MutualL0H != nil {
			fmt.Fprintf(e.stdout, "%g Hz: mutual L %.6g H, mutual ΔZ %.6g %+.6gj Ω, differential output %g %+gj Ω (uniform tube)\n",
				o.FreqHz, *o.MutualL0H, o.MutualDZOhm.Re, o.MutualDZOhm.Im, o.DifferentialOutputOhm.Re, o.DifferentialOutputOhm.Im)
		}
	}
	_, err := fmt.Fprintln(e.stdout, "\n"+caution)
	return err
}

func runModelPlate(ctx context.Context, e *env, fs *flag.FlagSet, args []string) error {
	if len(args) > 0 {
		return usagef("unexpected argument %q (all inputs are flags)", args[0])
	}
	c, err := modelCoil(fs)
	if err != nil {
		return err
	}
	lift, err := modelRequired(fs, "liftoff", units.Length)
	if err != nil {
		return err
	}
	if !(lift >= 0) {
		return usagef("--liftoff: expected a value ≥ 0")
	}
	freqs, err := modelFreqs(fs)
	if err != nil {
		return err
	}
	layers, err := modelLayers(fs)
	if err != nil {
		return err
	}
	m, err := impedance.NewPlanarModel(c, 1e-8)
	if err != nil {
		return usagef("coil: %v", err)
	}
	outs := make([]modelOutput, 0, len(freqs))
	for _, f := range freqs {
		if err := ctx.Err(); err != nil {
			return err
		}
		r, err := m.Impedance(f, lift, layers)
		if err != nil {
			return usagef("%v", err)
		}
		outs = append(outs, newModelOutput(r))
	}
	return writeModelOutputs(e, outs, flagBool(fs, "json"))
}

func runModelTube(ctx context.Context, e *env, fs *flag.FlagSet, args []string) error {
	if len(args) > 0 {
		return usagef("unexpected argument %q (all inputs are flags)", args[0])
	}
	c, err := modelCoil(fs)
	if err != nil {
		return err
	}
	p := impedance.TubeProbe{Coil: c}
	switch pl := flagString(fs, "placement"); strings.ToLower(pl) {
	case "bobbin":
		p.Placement = impedance.Bobbin
	case "encircling":
		p.Placement = impedance.Encircling
	case "":
		return usagef("--placement is required: bobbin or encircling")
	default:
		return usagef("--placement %q: expected bobbin or encircling", pl)
	}
	switch md := flagString(fs, "mode"); strings.ToLower(md) {
	case "absolute":
	case "differential":
		p.Differential = true
		if p.CoilGapM, err = modelRequired(fs, "coil-gap", units.Length); err != nil {
			return err
		}
	default:
		return usagef("--mode %q: expected absolute or differential", md)
	}
	od, err := modelRequired(fs, "tube-od", units.Length)
	if err != nil {
		return err
	}
	p.TubeOuterRadiusM = od / 2
	switch w := flagString(fs, "wall"); {
	case w == "":
		return usagef("--wall is required: a thickness such as 1.09mm, or solid for a rod")
	case strings.EqualFold(w, "solid"):
		p.TubeInnerRadiusM = 0
	default:
		t, err := units.Parse(units.Length, w)
		if err != nil {
			return usagef("--wall %v", err)
		}
		if !(t > 0) || !(t < p.TubeOuterRadiusM) {
			return usagef("--wall %q: expected a thickness between 0 and the outer radius %g m", w, p.TubeOuterRadiusM)
		}
		p.TubeInnerRadiusM = p.TubeOuterRadiusM - t
	}
	if p.ConductivitySPerM, err = modelRequired(fs, "conductivity", units.Conductivity); err != nil {
		return err
	}
	p.RelPermeability = flagFloat(fs, "mur")
	freqs, err := modelFreqs(fs)
	if err != nil {
		return err
	}
	if err := p.Validate(); err != nil {
		return usagef("%v", err)
	}
	outs := make([]modelOutput, 0, len(freqs))
	for _, f := range freqs {
		if err := ctx.Err(); err != nil {
			return err
		}
		if p.Differential {
			d, err := p.DifferentialImpedance(f)
			if err != nil {
				return usagef("%v", err)
			}
			o := newModelOutput(d.Coil)
			ml, mdz, out := d.MutualL0H, toModelComplex(d.MutualDZOhm), toModelComplex(d.OutputOhm)
			o.MutualL0H, o.MutualDZOhm, o.DifferentialOutputOhm = &ml, &mdz, &out
			outs = append(outs, o)
			continue
		}
		r, err := p.Impedance(f)
		if err != nil {
			return usagef("%v", err)
		}
		outs = append(outs, newModelOutput(r))
	}
	return writeModelOutputs(e, outs, flagBool(fs, "json"))
}

// depthRow is one depth of 'model depth-profile'.
type depthRow struct {
	DepthM       float64 `json:"depth_m"`
	DepthDelta   float64 `json:"depth_over_delta"`
	MagnitudeRel float64 `json:"magnitude_rel"`
	PhaseLagDeg  float64 `json:"phase_lag_deg"`
	JRe          float64 `json:"j_re_a_per_m2"`
	JIm          float64 `json:"j_im_a_per_m2"`
}

func runModelDepthProfile(ctx context.Context, e *env, fs *flag.FlagSet, args []string) error {
	if len(args) > 0 {
		return usagef("unexpected argument %q (all inputs are flags)", args[0])
	}
	c, err := modelCoil(fs)
	if err != nil {
		return err
	}
	lift, err := modelRequired(fs, "liftoff", units.Length)
	if err != nil {
		return err
	}
	f, err := modelRequired(fs, "freq", units.Frequency)
	if err != nil {
		return err
	}
	if !(f > 0) {
		return usagef("--freq: expected a positive frequency")
	}
	layers, err := modelLayers(fs)
	if err != nil {
		return err
	}
	format := strings.ToLower(flagString(fs, "format"))
	if flagBool(fs, "json") {
		format = "json"
	}
	if format != "table" && format != "csv" && format != "json" {
		return usagef("--format %q: expected table, csv or json", format)
	}
	radius := (c.InnerRadiusM + c.OuterRadiusM) / 2
	if v, ok, err := flagQuantity(fs, "radius", units.Length); err != nil {
		return err
	} else if ok {
		if !(v > 0) {
			return usagef("--radius: expected a positive radius")
		}
		radius = v
	}
	n := flagInt(fs, "points")
	if n < 2 || n > 10000 {
		return usagef("--points %d: expected 2 to 10000", n)
	}
	// Depth range and the δ of the layer at each depth.
	top := layers[0]
	stack := 0.0
	for _, l := range layers {
		stack += l.ThicknessM
	}
	maxD := 5 * impedance.SkinDepthM(f, top.ConductivitySPerM, top.RelPermeability)
	if stack < maxD {
		maxD = stack
	}
	if v, ok, err := flagQuantity(fs, "max-depth", units.Length); err != nil {
		return err
	} else if ok {
		if !(v > 0) {
			return usagef("--max-depth: expected a positive depth")
		}
		maxD = v
	}
	if math.IsInf(maxD, 0) {
		return usagef("--max-depth is required when the top layer does not conduct")
	}
	depths := make([]float64, n)
	for i := range depths {
		depths[i] = maxD * float64(i) / float64(n-1)
	}
	p := impedance.Planar{Coil: c, LiftoffM: lift, Layers: layers}
	if err := ctx.Err(); err != nil {
		return err
	}
	j, err := p.CurrentDensity(f, depths, radius)
	if err != nil {
		return usagef("%v", err)
	}
	rows := make([]depthRow, n)
	j0 := j[0]
	prevPhase, unwrap := 0.0, 0.0
	for i, d := range depths {
		r := depthRow{DepthM: d, JRe: real(j[i]), JIm: imag(j[i])}
		// δ of the layer at this depth, and the depth in δ counted layer by layer.
		acc, top := 0.0, 0.0
		for _, l := range layers {
			dl := impedance.SkinDepthM(f, l.ConductivitySPerM, l.RelPermeability)
			seg := math.Min(d, top+l.ThicknessM) - top
			if seg > 0 && !math.IsInf(dl, 0) {
				acc += seg / dl
			}
			top += l.ThicknessM
			if d <= top {
				break
			}
		}
		r.DepthDelta = acc
		if j0 != 0 && j[i] != 0 {
			r.MagnitudeRel = cmplx.Abs(j[i]) / cmplx.Abs(j0)
			ph := -cmplx.Phase(j[i] / j0)
			if i > 0 {
				for ph+unwrap-prevPhase > math.Pi {
					unwrap -= 2 * math.Pi
				}
				for ph+unwrap-prevPhase < -math.Pi {
					unwrap += 2 * math.Pi
				}
			}
			prevPhase = ph + unwrap
			r.PhaseLagDeg = prevPhase * 180 / math.Pi
		}
		rows[i] = r
	}
	switch format {
	case "json":
		return writeJSON(e.stdout, rows)
	case "csv":
		return writeDepthCSV(e.stdout, rows)
	}
	fmt.Fprintf(e.stdout, "Eddy-current density at r = %.4g mm, %g Hz (per ampere of coil current)\n", radius*1e3, f)
	tw := tabwriter.NewWriter(e.stdout, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "depth [mm]\tdepth/δ\t|J|/|J0|\tlag [deg]\t|J| [A/m²]\t")
	for _, r := range rows {
		fmt.Fprintf(tw, "%.4f\t%.3f\t%.4f\t%.1f\t%.4g\t\n", r.DepthM*1e3, r.DepthDelta, r.MagnitudeRel, r.PhaseLagDeg, math.Hypot(r.JRe, r.JIm))
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	_, err = fmt.Fprintln(e.stdout, "\n"+caution)
	return err
}

func writeDepthCSV(w io.Writer, rows []depthRow) error {
	cw := csv.NewWriter(w)
	_ = cw.Write([]string{"depth_m", "depth_over_delta", "magnitude_rel", "phase_lag_deg", "j_re_a_per_m2", "j_im_a_per_m2"})
	g := func(v float64) string { return strconv.FormatFloat(v, 'g', 10, 64) }
	for _, r := range rows {
		_ = cw.Write([]string{g(r.DepthM), g(r.DepthDelta), g(r.MagnitudeRel), g(r.PhaseLagDeg), g(r.JRe), g(r.JIm)})
	}
	cw.Flush()
	return cw.Error()
}
