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
			modelTubeFlags(fs, true)
			fs.Var(&stringList{}, "freq", "excitation `frequency`, e.g. 100kHz (repeatable)")
			fs.Bool("json", false, "print JSON (an object, or an array for several --freq)")
		},
		run: runModelTube,
	})
	register(&command{
		name:     "model depth-profile",
		synopsis: "eddy-current density and phase lag versus depth under a coil or across a tube wall",
		usage:    "whorl model depth-profile COIL FLAGS --freq F (--liftoff H --layer T:SIGMA[:MUR]... [--radius R] | --placement P --tube-od D --wall T --conductivity S [--mur M] [--axial Z]) [--max-depth D] [--points N] [--format table|csv|json]",
		help: `Computes the eddy-current density induced by a coil above a layered
conductor (Dodd–Deeds model) at one radius from the coil axis (default: the
mean radius of the winding) and at evenly spaced depths below the surface.
Columns: depth, depth in standard depths of penetration δ of the layer at
that depth, |J| relative to the surface value, phase lag behind the surface
current in degrees (unwrapped), and J per ampere of coil current in A/m²
(real, imaginary). The default depth range is 5δ of the top layer, or the
stack if thinner.

With --placement (bobbin or encircling) and the tube flags of 'whorl model
tube' the profile is taken across the tube wall instead, depth measured from
the surface facing the coil (the bore for a bobbin coil, the outside for an
encircling coil), in the plane --axial from the coil centre (default 0).

Examples:
  whorl model depth-profile --inner-radius 2mm --outer-radius 3mm --coil-length 2mm \
      --turns 200 --liftoff 0.2mm --freq 50kHz --layer inf:1.4MS/m
  whorl model depth-profile ... --layer 1mm:58MS/m --max-depth 1mm --points 21 --format csv
  whorl model depth-profile --placement bobbin --tube-od 19.05mm --wall 1.09mm \
      --conductivity 1MS/m --inner-radius 7mm --outer-radius 7.6mm --coil-length 1.5mm \
      --turns 60 --freq 100kHz --points 12`,
		setFlags: func(fs *flag.FlagSet) {
			modelCoilFlags(fs)
			fs.String("liftoff", "", "plate: gap between the winding and the surface, e.g. 0.5mm")
			fs.String("freq", "", "excitation frequency, e.g. 50kHz (required)")
			fs.Var(&stringList{}, "layer", "plate: layer `T:SIGMA[:MUR]` top first (repeatable)")
			fs.String("radius", "", "plate: radius from the coil axis (default the mean winding radius)")
			modelTubeFlags(fs, false)
			fs.String("axial", "", "tube: axial distance from the coil centre, e.g. 1mm (default 0)")
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

// modelTubeFlags defines the tube flags shared by 'model tube' and
// 'model depth-profile'.
func modelTubeFlags(fs *flag.FlagSet, withMode bool) {
	fs.String("placement", "", "coil `placement`: bobbin (inside) or encircling (outside)")
	if withMode {
		fs.String("mode", "absolute", "absolute or differential")
		fs.String("coil-gap", "", "centre spacing of the two coils of a differential pair, e.g. 2.5mm")
	}
	fs.String("tube-od", "", "tube outer diameter, e.g. 19.05mm or 0.75in")
	fs.String("wall", "", "wall thickness, e.g. 1.09mm, or solid for a rod")
	fs.String("conductivity", "", "tube conductivity, e.g. 1.4MS/m or 2.4%IACS")
	fs.Float64("mur", 1, "relative permeability of the tube (≥ 1)")
}

// modelTubeProbe reads the tube flags for coil c.
func modelTubeProbe(fs *flag.FlagSet, c impedance.Coil) (impedance.TubeProbe, error) {
	var err error
	p := impedance.TubeProbe{Coil: c}
	switch pl := flagString(fs, "placement"); strings.ToLower(pl) {
	case "bobbin":
		p.Placement = impedance.Bobbin
	case "encircling":
		p.Placement = impedance.Encircling
	case "":
		return p, usagef("--placement is required: bobbin or encircling")
	default:
		return p, usagef("--placement %q: expected bobbin or encircling", pl)
	}
	md := "absolute"
	if fs.Lookup("mode") != nil {
		md = flagString(fs, "mode")
	}
	switch strings.ToLower(md) {
	case "absolute":
	case "differential":
		p.Differential = true
		if p.CoilGapM, err = modelRequired(fs, "coil-gap", units.Length); err != nil {
			return p, err
		}
	default:
		return p, usagef("--mode %q: expected absolute or differential", md)
	}
	od, err := modelRequired(fs, "tube-od", units.Length)
	if err != nil {
		return p, err
	}
	p.TubeOuterRadiusM = od / 2
	switch w := flagString(fs, "wall"); {
	case w == "":
		return p, usagef("--wall is required: a thickness such as 1.09mm, or solid for a rod")
	case strings.EqualFold(w, "solid"):
		p.TubeInnerRadiusM = 0
	default:
		t, err := units.Parse(units.Length, w)
		if err != nil {
			return p, usagef("--wall %v", err)
		}
		if !(t > 0) || !(t < p.TubeOuterRadiusM) {
			return p, usagef("--wall %q: expected a thickness between 0 and the outer radius %g m", w, p.TubeOuterRadiusM)
		}
		p.TubeInnerRadiusM = p.TubeOuterRadiusM - t
	}
	if p.ConductivitySPerM, err = modelRequired(fs, "conductivity", units.Conductivity); err != nil {
		return p, err
	}
	p.RelPermeability = flagFloat(fs, "mur")
	if err := p.Validate(); err != nil {
		return p, usagef("%v", err)
	}
	return p, nil
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
	p, err := modelTubeProbe(fs, c)
	if err != nil {
		return err
	}
	freqs, err := modelFreqs(fs)
	if err != nil {
		return err
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
	f, err := modelRequired(fs, "freq", units.Frequency)
	if err != nil {
		return err
	}
	if !(f > 0) {
		return usagef("--freq: expected a positive frequency")
	}
	format := strings.ToLower(flagString(fs, "format"))
	if flagBool(fs, "json") {
		format = "json"
	}
	if format != "table" && format != "csv" && format != "json" {
		return usagef("--format %q: expected table, csv or json", format)
	}
	n := flagInt(fs, "points")
	if n < 2 || n > 10000 {
		return usagef("--points %d: expected 2 to 10000", n)
	}
	maxSet, ok, err := flagQuantity(fs, "max-depth", units.Length)
	if err != nil {
		return err
	}
	if ok && !(maxSet > 0) {
		return usagef("--max-depth: expected a positive depth")
	}
	var (
		depths []float64
		j      []complex128
		layers []impedance.Layer // the material versus depth, for depth/δ
		title  string
	)
	if flagSet(fs, "placement") {
		p, err := modelTubeProbe(fs, c)
		if err != nil {
			return err
		}
		axial, _, err := flagQuantity(fs, "axial", units.Length)
		if err != nil {
			return err
		}
		wall := p.TubeOuterRadiusM - p.TubeInnerRadiusM
		layers = []impedance.Layer{{ThicknessM: wall, ConductivitySPerM: p.ConductivitySPerM, RelPermeability: p.RelPermeability}}
		depths = modelDepths(n, maxSet, f, layers)
		if depths[n-1] > wall {
			return usagef("--max-depth %g m: deeper than the wall (%g m)", depths[n-1], wall)
		}
		radii := make([]float64, n)
		for i, d := range depths {
			if p.Placement == impedance.Bobbin {
				radii[i] = math.Min(p.TubeInnerRadiusM+d, p.TubeOuterRadiusM)
			} else {
				radii[i] = math.Max(p.TubeOuterRadiusM-d, p.TubeInnerRadiusM)
			}
		}
		if err := ctx.Err(); err != nil {
			return err
		}
		if j, err = p.CurrentDensity(f, radii, axial); err != nil {
			return usagef("%v", err)
		}
		title = fmt.Sprintf("Eddy-current density across the wall (%s coil), %g mm from the coil centre, %g Hz (per ampere of coil current)", p.Placement, axial*1e3, f)
	} else {
		lift, err := modelRequired(fs, "liftoff", units.Length)
		if err != nil {
			return err
		}
		if layers, err = modelLayers(fs); err != nil {
			return err
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
		depths = modelDepths(n, maxSet, f, layers)
		if math.IsInf(depths[n-1], 0) || math.IsNaN(depths[n-1]) {
			return usagef("--max-depth is required when the top layer does not conduct")
		}
		p := impedance.Planar{Coil: c, LiftoffM: lift, Layers: layers}
		if err := ctx.Err(); err != nil {
			return err
		}
		if j, err = p.CurrentDensity(f, depths, radius); err != nil {
			return usagef("%v", err)
		}
		title = fmt.Sprintf("Eddy-current density at r = %.4g mm, %g Hz (per ampere of coil current)", radius*1e3, f)
	}
	rows := depthRows(depths, j, f, layers)
	switch format {
	case "json":
		return writeJSON(e.stdout, rows)
	case "csv":
		return writeDepthCSV(e.stdout, rows)
	}
	fmt.Fprintln(e.stdout, title)
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

// modelDepths returns n evenly spaced depths from 0 to maxD, or, if maxD is
// 0, to 5δ of the top layer or the whole stack if that is thinner.
func modelDepths(n int, maxD, freqHz float64, layers []impedance.Layer) []float64 {
	if maxD == 0 {
		top := layers[0]
		maxD = 5 * impedance.SkinDepthM(freqHz, top.ConductivitySPerM, top.RelPermeability)
		stack := 0.0
		for _, l := range layers {
			stack += l.ThicknessM
		}
		if stack < maxD {
			maxD = stack
		}
	}
	depths := make([]float64, n)
	for i := range depths {
		depths[i] = maxD * float64(i) / float64(n-1)
	}
	return depths
}

// depthRows turns current densities at depths into table rows: depth in
// standard depths of penetration counted layer by layer, magnitude
// relative to the first (surface) value and the unwrapped phase lag
// behind it.
func depthRows(depths []float64, j []complex128, freqHz float64, layers []impedance.Layer) []depthRow {
	rows := make([]depthRow, len(depths))
	j0 := j[0]
	prevPhase, unwrap := 0.0, 0.0
	for i, d := range depths {
		r := depthRow{DepthM: d, JRe: real(j[i]), JIm: imag(j[i])}
		acc, top := 0.0, 0.0
		for _, l := range layers {
			dl := impedance.SkinDepthM(freqHz, l.ConductivitySPerM, l.RelPermeability)
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
	return rows
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
