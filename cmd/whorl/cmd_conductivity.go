package main

import (
	"context"
	"encoding/csv"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"sort"
	"strconv"
	"strings"
	"text/tabwriter"

	"whorl/impedance"
	"whorl/internal/version"
	"whorl/units"
)

// Commands of this file: model diagram, conductivity calibrate/measure,
// coating calibrate/measure, advise. File formats: docs/conductivity.md.

func init() {
	register(&command{
		name:     "model diagram",
		synopsis: "draw an impedance-plane diagram (conductivity, lift-off, thickness, permeability or frequency curves)",
		usage:    "whorl model diagram [flags] -o FIG.png|svg|pdf",
		help: `Computes a family of impedance-plane curves of a surface coil above a
single layer (or half-space) with the Dodd–Deeds planar model, in normalised
coordinates ΔR/X0 and X/X0, and draws them (PNG, SVG or PDF by the file
extension of -o) or writes them as CSV (--csv FILE, or stdout without -o)
or JSON (--json).

Families (--family):
  conductivity  σ varies along each curve; one curve per --curve lift-off
                (default: --liftoff). Default span: ωμ0σr̄² from 0.01 to 1e4.
  liftoff       lift-off varies; one curve per --curve conductivity
                (default: the --layer conductivity).
  thickness     plate thickness varies (default 0.05δ to 5δ).
  permeability  μr varies (default 1 to 100).
  frequency     frequency varies (each point normalised at its own X0).
--from/--to/--points set the span along the curves, in the family's units.

Examples:
  whorl model diagram --inner-radius 1mm --outer-radius 2.5mm --coil-length 1.5mm \
      --turns 200 --liftoff 0.3mm --freq 60kHz --curve 0.2mm --curve 0.5mm -o cond.png
  whorl model diagram --probe probe.json --family liftoff --freq 60kHz \
      --curve 30%IACS --curve 61%IACS --csv lines.csv
  whorl model diagram --probe probe.json --family thickness --freq 20kHz \
      --layer inf:43%IACS -o thick.svg`,
		setFlags: func(fs *flag.FlagSet) {
			condCoilFlags(fs)
			fs.String("freq", "", "frequency (e.g. 60kHz); required except for --family frequency")
			fs.String("family", "conductivity", "curve family: conductivity, liftoff, thickness, permeability or frequency")
			fs.Var(&stringList{}, "layer", "specimen T:SIGMA[:MUR], T a thickness or inf, e.g. inf:43%IACS or 1.6mm:17.4MS/m (one layer)")
			fs.Var(&stringList{}, "curve", "value labelling one curve (repeatable): a lift-off for --family conductivity, else a conductivity")
			fs.String("from", "", "first value along the curves (family units)")
			fs.String("to", "", "last value along the curves (family units)")
			fs.Int("points", 40, "points per curve (spaced evenly in logarithm)")
			fs.String("o", "", "write the figure to this .png, .svg or .pdf file")
			fs.String("csv", "", "write the curve data to this CSV file")
			fs.Bool("json", false, "print the curve data as JSON")
			fs.Float64("model-tol", 1e-8, "relative accuracy of the coil model")
		},
		run: runModelDiagram,
	})
	register(&command{
		name:     "conductivity calibrate",
		synopsis: "fit a conductivity set-up from readings on certified blocks (and shims)",
		usage:    "whorl conductivity calibrate --probe PROBE.json --blocks BLOCKS.csv [--shims SHIMS.csv] --readings CAL.csv -o SETUP.json",
		help: `Fits the instrument transform V = g·Zn + c of every frequency (gain,
rotation and offset) and, by default, the effective lift-off of the probe, to
readings on reference blocks of certified conductivity, bare and under
certified shims, by nonlinear least squares on the Dodd–Deeds planar model.
Prints the fit, the residual of every reading and warnings; writes the
set-up for 'whorl conductivity measure'. An "air" reading (block_id air)
pins the offset and is recommended.

Practice: at least two blocks (MIL-STD-1537C field standards: one in 25–32
and one in 38–62 %IACS, at least 10 %IACS apart) that bracket the parts;
shims of known thickness let the fit find the effective lift-off.

Examples:
  whorl conductivity calibrate --probe probe.json --blocks blocks.csv \
      --shims shims.csv --readings conductivity-calibration.csv -o cond-setup.json
  whorl conductivity calibrate --inner-radius 1mm --outer-radius 2.5mm \
      --coil-length 1.5mm --turns 200 --liftoff 0.3mm --blocks blocks.csv \
      --readings cal.csv --fit-liftoff=false -o setup.json --json`,
		setFlags: func(fs *flag.FlagSet) { condCalibrateFlags(fs, true) },
		run: func(ctx context.Context, e *env, fs *flag.FlagSet, args []string) error {
			return runCondCalibrate(ctx, e, fs, args, impedance.SetupConductivity)
		},
	})
	register(&command{
		name:     "conductivity measure",
		synopsis: "convert readings to conductivity (%IACS, MS/m) and lift-off with uncertainties",
		usage:    "whorl conductivity measure --setup SETUP.json [flags] READINGS.csv...",
		help: `Inverts every spot of the readings files into conductivity and lift-off
(several rows of one spot at different frequencies are inverted together),
with standard uncertainties (k = 1) from the reading noise and the
calibration, and corrects the conductivity to 20 °C where the temperature
and the material's coefficient are known: σ20 = σT[1 + α(T − 20 °C)].
A part thickness (column thickness_mm or --thickness) is used in the model.
With --solve thickness the plate thickness and lift-off are found at a known
--conductivity (the thickness column or --thickness is the starting value,
default 1 mm); --solve all finds conductivity, thickness and lift-off
together from two or more frequencies.

Flags in the output: "thickness < 3δ", "thickness not given",
"outside calibrated range", "lift-off outside calibrated range",
"2u > target" (expanded uncertainty above --target, default ±1.0 %IACS,
MIL-STD-1537C), "misfit" (readings at several frequencies disagree),
"not temperature-corrected", "failed: ...".

` + alphaTableHelp() + `
Examples:
  whorl conductivity measure --setup cond-setup.json conductivity-readings.csv
  whorl conductivity measure --setup cond-setup.json --material aluminium-alloy \
      --thickness 2mm --csv > results.csv
  whorl conductivity measure --setup cond-setup.json --solve thickness \
      --conductivity 42.6%IACS conductivity-readings.csv`,
		setFlags: func(fs *flag.FlagSet) {
			fs.String("setup", "", "set-up file from 'whorl conductivity calibrate' (required)")
			fs.String("thickness", "", "part thickness where the readings file gives none (e.g. 2mm)")
			fs.String("material", "", "material for the temperature coefficient where the file gives none")
			fs.String("alpha", "", "temperature coefficient α per °C, e.g. 0.0025 (overrides the material table)")
			fs.String("target", "1%IACS", "accuracy target: results with 2u above it are flagged")
			fs.String("solve", "conductivity", "unknowns: conductivity (with lift-off), thickness (with lift-off, at --conductivity) or all (conductivity, thickness and lift-off; two or more frequencies)")
			fs.String("conductivity", "", "known conductivity for --solve thickness (e.g. 43%IACS)")
			fs.Bool("csv", false, "print CSV instead of a table")
			fs.Bool("json", false, "print JSON")
		},
		run: runCondMeasure,
	})
	register(&command{
		name:     "conductivity check",
		synopsis: "check a conductivity set-up on certified blocks; exit 4 when one is out of tolerance",
		usage:    "whorl conductivity check --setup SETUP.json --blocks BLOCKS.csv [--shims SHIMS.csv] READINGS.csv",
		help: `Measures certified blocks (readings in the calibration-readings format:
block_id, shim_id, freq, x, y) with a set-up and compares each with its
certificate: the check fails, with exit code 4, when a block reads further
from its certified value than --tolerance (default ±1.0 %IACS, the
MIL-STD-1537C instrument accuracy for aluminium alloys) or, with
--liftoff-tolerance, a shim reads further from its thickness. Use it when
re-standardising during work (conductivity practice re-checks the
instrument frequently and whenever the temperature changes).

Examples:
  whorl conductivity check --setup cond-setup.json --blocks blocks.csv \
      --shims shims.csv conductivity-calibration.csv
  whorl conductivity check --setup cond-setup.json --blocks blocks.csv \
      --tolerance 0.5%IACS --liftoff-tolerance 5um --json recheck.csv`,
		setFlags: func(fs *flag.FlagSet) {
			fs.String("setup", "", "set-up file from 'whorl conductivity calibrate' (required)")
			fs.String("blocks", "", "reference-block file (CSV, required)")
			fs.String("shims", "", "shim file (CSV), if readings use shims")
			fs.String("tolerance", "1%IACS", "largest accepted deviation from a block's certified conductivity")
			fs.String("liftoff-tolerance", "", "largest accepted deviation from a shim's thickness (default: not checked)")
			fs.Bool("json", false, "print JSON")
		},
		run: runCondCheck,
	})
	register(&command{
		name:     "coating calibrate",
		synopsis: "fit a coating-thickness set-up from readings on a bare base and certified shims",
		usage:    "whorl coating calibrate --probe PROBE.json --blocks BLOCKS.csv --shims SHIMS.csv --readings CAL.csv -o SETUP.json",
		help: `Fits the instrument transform from readings on the bare base metal and
on certified non-conducting shims laid on it (ASTM E376 practice: zero on the
uncoated base of the same alloy, temper and thickness; shims bracketing the
expected coating). The base is the block named in the readings (--base when
there are several). The effective lift-off is kept from the probe file unless
--fit-liftoff is given: one base block fixes it poorly.

Examples:
  whorl coating calibrate --probe probe.json --blocks blocks.csv --shims shims.csv \
      --readings coating-calibration.csv -o coat-setup.json`,
		setFlags: func(fs *flag.FlagSet) {
			condCalibrateFlags(fs, false)
			fs.String("base", "", "block_id of the base metal (default: the only block in the readings)")
		},
		run: func(ctx context.Context, e *env, fs *flag.FlagSet, args []string) error {
			return runCondCalibrate(ctx, e, fs, args, impedance.SetupCoating)
		},
	})
	register(&command{
		name:     "coating measure",
		synopsis: "convert readings to non-conducting coating thickness with uncertainties",
		usage:    "whorl coating measure --setup SETUP.json [flags] READINGS.csv...",
		help: `Inverts every spot into coating thickness (the lift-off above the bare
base) and the base conductivity, with standard uncertainties (k = 1). With
--fix-base the base conductivity is held at the set-up's value and only the
thickness is fitted. The ASTM E376 tolerance under ideal conditions,
±max(10 %, 2.5 µm), is printed beside each result; "2u > E376" flags a
result whose expanded uncertainty exceeds it, "outside shim range" one
beyond the thickest shim.

Examples:
  whorl coating measure --setup coat-setup.json coating-readings.csv
  whorl coating measure --setup coat-setup.json --fix-base --json coating-readings.csv`,
		setFlags: func(fs *flag.FlagSet) {
			fs.String("setup", "", "set-up file from 'whorl coating calibrate' (required)")
			fs.Bool("fix-base", false, "hold the base conductivity at the set-up value")
			fs.Bool("csv", false, "print CSV instead of a table")
			fs.Bool("json", false, "print JSON")
		},
		run: runCoatingMeasure,
	})
	register(&command{
		name:     "advise",
		synopsis: "frequency advice: skin depth, f90, ID–OD phase spread, recommended set, acquisition and speed checks",
		usage:    "whorl advise (--material NAME | --conductivity SIGMA) [--wall T] [flags]",
		help: `Prints the standard depth of penetration, f90 of the wall (3ρ/(t²μr) rule
and the t = 0.8δ rule), the plane-wave ID–OD phase spread 2t/δ, a
recommended frequency set (prime f90–1.5·f90, mix partner ≤ prime/2,
landmark, optional ID frequency), the lowest frequency for a 3δ-thick part,
and checks the acquisition: samples per inch (≥ 30, common practice), the
low-pass cut-off against the flaw bandwidth speed/coil length, and the
magnetic Reynolds number μ0σvL of the motion (> 0.1 warns). With
--magnet-moment and --magnet-height it gives the lift and drag on a magnet
moving at --probe-speed over a thin sheet of thickness --wall (receding
images: lift = F_image[1 − w/√(v² + w²)], drag = (w/v)·lift, w = 2/(μ0σd)).
The technique sheet governs the frequencies actually used.

Materials (--material): ` + materialNames() + `

Examples:
  whorl advise --material alloy690 --wall 1.09mm --tube-od 19.05mm --id
  whorl advise --conductivity 43%IACS --wall 2mm --freq 60kHz
  whorl advise --material alloy600 --wall 0.043in --probe-speed 0.6m/s \
      --sample-rate 800Hz --lowpass 100Hz --coil-length 3mm --json
  whorl advise --conductivity 35MS/m --wall 1mm --probe-speed 20m/s \
      --magnet-moment 1 --magnet-height 10mm`,
		setFlags: func(fs *flag.FlagSet) {
			fs.String("material", "", "material name (see the list above)")
			fs.String("conductivity", "", "conductivity (e.g. 1.45MS/m, 43%IACS); overrides the material's")
			fs.Float64("mur", 1, "relative permeability μr")
			fs.String("wall", "", "tube wall or part thickness (e.g. 1.09mm, 0.043in)")
			fs.String("tube-od", "", "tube outside diameter (reported)")
			fs.String("freq", "", "candidate frequency to assess (e.g. 300kHz)")
			fs.String("probe-speed", "", "probe or part speed (e.g. 0.5m/s, 20in/s)")
			fs.String("sample-rate", "", "sample rate (e.g. 1000Hz)")
			fs.String("lowpass", "", "low-pass filter cut-off (e.g. 150Hz)")
			fs.String("coil-length", "", "effective coil (field) length along the scan (e.g. 3mm)")
			fs.String("field-length", "", "length scale of the magnetic Reynolds number (default: coil length, then wall)")
			fs.Bool("id", false, "add an inside-surface frequency above the prime")
			fs.Float64("magnet-moment", 0, "moment of a vertically magnetised magnet moving over the sheet (--wall), A·m²")
			fs.String("magnet-height", "", "height of the magnet's centre above the sheet (e.g. 10mm)")
			fs.Bool("json", false, "print JSON")
		},
		run: runAdvise,
	})
}

// condCoilFlags defines the probe-coil flags shared by the commands here.
func condCoilFlags(fs *flag.FlagSet) {
	fs.String("probe", "", "probe file (JSON: coil and lift-off); the coil flags override it")
	fs.String("inner-radius", "", "coil inner radius (e.g. 1mm)")
	fs.String("outer-radius", "", "coil outer radius")
	fs.String("coil-length", "", "coil length (axial)")
	fs.Float64("turns", 0, "number of turns")
	fs.String("liftoff", "", "effective lift-off of the winding above a bare surface (e.g. 0.3mm)")
}

func condCalibrateFlags(fs *flag.FlagSet, conductivity bool) {
	condCoilFlags(fs)
	fs.String("blocks", "", "reference-block file (CSV, required)")
	fs.String("shims", "", "shim file (CSV)")
	fs.String("readings", "", "calibration readings file (CSV, required)")
	fs.Bool("fit-liftoff", conductivity, "fit the effective lift-off")
	fs.Bool("fit-coil-scale", false, "fit a scale factor of the coil dimensions")
	fs.String("noise", "", "reading noise per component (e.g. 0.5mV); default: from the residuals")
	fs.Float64("model-tol", 1e-8, "relative accuracy of the coil model")
	fs.String("o", "", "write the set-up to this JSON file")
	fs.Bool("json", false, "print the fit as JSON")
}

// condProbe reads --probe and applies the coil flags over it.
func condProbe(fs *flag.FlagSet) (impedance.Probe, error) {
	var p impedance.Probe
	if name := flagString(fs, "probe"); name != "" {
		f, err := openData(name)
		if err != nil {
			return p, err
		}
		defer f.Close()
		if p, err = impedance.ReadProbe(f, name); err != nil {
			return p, dataError(err)
		}
	}
	for _, q := range []struct {
		flag string
		dst  *float64
	}{{"inner-radius", &p.InnerRadiusM}, {"outer-radius", &p.OuterRadiusM}, {"coil-length", &p.LengthM}, {"liftoff", &p.LiftoffM}} {
		v, ok, err := flagQuantity(fs, q.flag, units.Length)
		if err != nil {
			return p, err
		}
		if ok {
			*q.dst = v
		}
	}
	if flagSet(fs, "turns") {
		p.Turns = flagFloat(fs, "turns")
	}
	if err := p.Validate(); err != nil {
		return p, usagef("probe: %v (give --probe FILE or --inner-radius, --outer-radius, --coil-length, --turns and --liftoff)", err)
	}
	return p, nil
}

// condLayer parses T:SIGMA[:MUR] (as --layer of model plate) into a
// specimen: a thickness of inf gives a half-space.
func condLayer(s string) (impedance.Specimen, error) {
	l, err := parseLayerSpec(s)
	if err != nil {
		return impedance.Specimen{}, err
	}
	sp := impedance.Specimen{ConductivitySPerM: l.ConductivitySPerM, RelPermeability: l.RelPermeability}
	if !math.IsInf(l.ThicknessM, 1) {
		sp.ThicknessM = l.ThicknessM
	}
	return sp, nil
}

// familyKind returns the unit kind of the values along the curves of a
// family (0 for the dimensionless μr).
func familyKind(f impedance.Family) units.Kind {
	switch f {
	case impedance.FamilyConductivity:
		return units.Conductivity
	case impedance.FamilyLiftoff, impedance.FamilyThickness:
		return units.Length
	case impedance.FamilyFrequency:
		return units.Frequency
	}
	return 0
}

func parseFamilyValue(k units.Kind, flagName, s string) (float64, error) {
	if k == 0 {
		v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return 0, usagef("--%s %q: expected a number", flagName, s)
		}
		return v, nil
	}
	v, err := units.Parse(k, s)
	if err != nil {
		return 0, usagef("--%s %v", flagName, err)
	}
	return v, nil
}

func runModelDiagram(ctx context.Context, e *env, fs *flag.FlagSet, args []string) error {
	if len(args) > 0 {
		return usagef("unexpected arguments %q", args)
	}
	probe, err := condProbe(fs)
	if err != nil {
		return err
	}
	fam := impedance.Family(strings.ToLower(flagString(fs, "family")))
	along, _ := fam.Param()
	if along == "" {
		return usagef("--family %q: expected conductivity, liftoff, thickness, permeability or frequency", fam)
	}
	freq, haveFreq, err := flagQuantity(fs, "freq", units.Frequency)
	if err != nil {
		return err
	}
	if fam != impedance.FamilyFrequency && !(freq > 0) {
		return usagef("--freq: a positive frequency is required for --family %s", fam)
	}
	if fam == impedance.FamilyFrequency && haveFreq {
		return usagef("--freq does not apply to --family frequency (use --from and --to)")
	}
	sp := impedance.Specimen{RelPermeability: 1}
	layers := flagStrings(fs, "layer")
	if len(layers) > 1 {
		return usagef("--layer given %d times: diagrams take one layer or half-space", len(layers))
	}
	if len(layers) == 1 {
		if sp, err = condLayer(layers[0]); err != nil {
			return err
		}
	}
	points := flagInt(fs, "points")
	if points < 2 || points > 2000 {
		return usagef("--points %d: expected 2 to 2000", points)
	}
	m, err := impedance.NewPlanarModel(probe.Coil(), flagFloat(fs, "model-tol"))
	if err != nil {
		return usagef("%v", err)
	}
	spec := impedance.DiagramSpec{Family: fam, FreqHz: freq, LiftoffM: probe.LiftoffM, Specimen: sp}
	// Curves.
	curveKind := units.Conductivity
	if fam == impedance.FamilyConductivity {
		curveKind = units.Length
	}
	for _, s := range flagStrings(fs, "curve") {
		v, err := units.Parse(curveKind, s)
		if err != nil || !(v > 0) {
			return usagef("--curve %q: expected a positive %s", s, curveKind)
		}
		spec.Curves = append(spec.Curves, v)
	}
	if len(spec.Curves) == 0 {
		if fam == impedance.FamilyConductivity {
			spec.Curves = []float64{probe.LiftoffM}
		} else {
			if !(sp.ConductivitySPerM > 0) {
				return usagef("--family %s needs a conductivity: give --curve SIGMA or --layer T:SIGMA", fam)
			}
			spec.Curves = []float64{sp.ConductivitySPerM}
		}
	}
	// Span along the curves.
	k := familyKind(fam)
	var lo, hi float64
	refSigma := spec.Curves[0]
	switch fam {
	case impedance.FamilyConductivity:
		lo, hi = impedance.ConductivitySpan(probe.Coil(), freq, sp.RelPermeability, 0.01, 1e4)
	case impedance.FamilyLiftoff:
		lo, hi = 0.02*probe.OuterRadiusM, 2*probe.OuterRadiusM
	case impedance.FamilyThickness:
		d := impedance.SkinDepthM(freq, refSigma, sp.RelPermeability)
		lo, hi = 0.05*d, 5*d
	case impedance.FamilyPermeability:
		lo, hi = 1, 100
	case impedance.FamilyFrequency:
		c := probe.Coil()
		b1, b2 := impedance.ConductivitySpan(c, 1, sp.RelPermeability, 0.01, 1e4)
		// σ(β) at 1 Hz is β/(2πμ0μr r̄²); the frequency for β at refSigma is
		// β/(2πμ0μr r̄² σ) = σ(β at 1 Hz)/σ.
		lo, hi = b1/refSigma, b2/refSigma
	}
	if s := flagString(fs, "from"); s != "" {
		if lo, err = parseFamilyValue(k, "from", s); err != nil {
			return err
		}
	}
	if s := flagString(fs, "to"); s != "" {
		if hi, err = parseFamilyValue(k, "to", s); err != nil {
			return err
		}
	}
	if !(lo > 0) || !(hi > 0) || lo == hi {
		return usagef("--from %g and --to %g: expected two different positive values", lo, hi)
	}
	spec.Values = impedance.LogSpace(lo, hi, points)
	d, err := impedance.ComputeDiagram(ctx, m, spec)
	if err != nil {
		if errors.Is(err, context.Canceled) {
			return err
		}
		return usagef("%v", err)
	}
	out := flagString(fs, "o")
	csvOut := flagString(fs, "csv")
	if out != "" {
		if err := d.Save(out); err != nil {
			return err
		}
		fmt.Fprintf(e.stderr, "wrote %s\n", out)
	}
	if csvOut != "" {
		if err := writeFileWith(csvOut, d.WriteCSV); err != nil {
			return err
		}
		fmt.Fprintf(e.stderr, "wrote %s\n", csvOut)
	}
	if flagBool(fs, "json") {
		return writeJSON(e.stdout, diagramJSON(d))
	}
	if out == "" && csvOut == "" {
		return d.WriteCSV(e.stdout)
	}
	return nil
}

type pointJSON struct {
	R float64 `json:"r"`
	X float64 `json:"x"`
}

type curveJSON struct {
	Label  string      `json:"label"`
	Param  string      `json:"param"`
	Value  float64     `json:"value"`
	Values []float64   `json:"values"`
	Points []pointJSON `json:"points"`
}

type diagramOut struct {
	Family string      `json:"family"`
	Title  string      `json:"title"`
	FreqHz float64     `json:"freq_hz,omitempty"`
	XLabel string      `json:"x_label"`
	YLabel string      `json:"y_label"`
	Curves []curveJSON `json:"curves"`
}

func diagramJSON(d *impedance.Diagram) diagramOut {
	o := diagramOut{Family: string(d.Family), Title: d.Title, FreqHz: d.FreqHz, XLabel: d.XLabel, YLabel: d.YLabel}
	for _, c := range d.Curves {
		cj := curveJSON{Label: c.Label, Param: c.Param, Value: c.Value, Values: c.Values}
		for _, z := range c.Points {
			cj.Points = append(cj.Points, pointJSON{real(z), imag(z)})
		}
		o.Curves = append(o.Curves, cj)
	}
	return o
}

// writeFileWith creates path and writes it with fn.
func writeFileWith(path string, fn func(io.Writer) error) (err error) {
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	defer func() {
		if cerr := f.Close(); err == nil {
			err = cerr
		}
	}()
	return fn(f)
}

func openData(name string) (*os.File, error) {
	f, err := os.Open(name)
	if err != nil {
		if errors.Is(err, os.ErrNotExist) {
			return nil, dataError(err)
		}
		return nil, err
	}
	return f, nil
}

// readWith opens name and parses it with fn; parse errors are data errors.
func readWith[T any](name string, fn func(io.Reader, string) (T, error)) (T, error) {
	var zero T
	f, err := openData(name)
	if err != nil {
		return zero, err
	}
	defer f.Close()
	v, err := fn(f, name)
	if err != nil {
		return zero, dataError(err)
	}
	return v, nil
}

// calibrationReport is the JSON and table form of a fitted set-up.
type calibrationReport struct {
	Kind           string                 `json:"kind"`
	SetupFile      string                 `json:"setup_file,omitempty"`
	LiftoffM       float64                `json:"liftoff_m"`
	ULiftoffM      float64                `json:"u_liftoff_m,omitempty"`
	CoilScale      float64                `json:"coil_scale"`
	UCoilScale     float64                `json:"u_coil_scale,omitempty"`
	NoiseV         float64                `json:"noise_v"`
	NoiseEstimated bool                   `json:"noise_estimated"`
	Dof            int                    `json:"dof"`
	Channels       []channelReport        `json:"channels"`
	Residuals      []residualReport       `json:"residuals"`
	Blocks         []blockReport          `json:"blocks"`
	Warnings       []string               `json:"warnings"`
	Calibration    *impedance.Calibration `json:"-"`
}

type channelReport struct {
	FreqHz   float64 `json:"freq_hz"`
	GainV    float64 `json:"gain_v"`
	PhaseDeg float64 `json:"rotation_deg"`
	OffsetX  float64 `json:"offset_x_v"`
	OffsetY  float64 `json:"offset_y_v"`
}

// blockReport summarises the residuals of one reference (block or air).
type blockReport struct {
	Block    string  `json:"block"`
	Readings int     `json:"readings"`
	RMSV     float64 `json:"rms_residual_v"`
	MaxV     float64 `json:"max_residual_v"`
}

type residualReport struct {
	Block     string  `json:"block"`
	Shim      string  `json:"shim,omitempty"`
	FreqHz    float64 `json:"freq_hz"`
	IACS      float64 `json:"conductivity_pct_iacs"`
	ShimM     float64 `json:"shim_m"`
	ResidualV float64 `json:"residual_v"`
}

func runCondCalibrate(_ context.Context, e *env, fs *flag.FlagSet, args []string, kind string) error {
	if len(args) > 0 {
		return usagef("unexpected arguments %q", args)
	}
	probe, err := condProbe(fs)
	if err != nil {
		return err
	}
	blocksFile, readingsFile, shimsFile := flagString(fs, "blocks"), flagString(fs, "readings"), flagString(fs, "shims")
	if blocksFile == "" || readingsFile == "" {
		return usagef("--blocks and --readings are required")
	}
	if kind == impedance.SetupCoating && shimsFile == "" {
		return usagef("--shims is required for a coating set-up")
	}
	out := flagString(fs, "o")
	if out == "" && !flagBool(fs, "json") {
		return usagef("-o SETUP.json is required (or --json to print the fit only)")
	}
	noise, _, err := flagQuantity(fs, "noise", units.Voltage)
	if err != nil {
		return err
	}
	if noise < 0 {
		return usagef("--noise must not be negative")
	}
	blocks, err := readWith(blocksFile, impedance.ReadBlocks)
	if err != nil {
		return err
	}
	var shims []impedance.Shim
	if shimsFile != "" {
		if shims, err = readWith(shimsFile, impedance.ReadShims); err != nil {
			return err
		}
	}
	rs, err := readWith(readingsFile, impedance.ReadCalReadings)
	if err != nil {
		return err
	}
	pts, err := impedance.CalPointsFrom(blocks, shims, rs, readingsFile)
	if err != nil {
		return dataError(err)
	}
	setup := &impedance.Setup{Format: impedance.SetupFormat, Kind: kind, CreatedUTC: e.now().UTC().Format("2006-01-02T15:04:05Z"),
		Software: version.Name + " " + version.String(), Probe: probe, ModelRelTol: flagFloat(fs, "model-tol"), Shims: shims, Caution: caution}
	used := map[string]bool{}
	for _, p := range pts {
		if p.Specimen.ConductivitySPerM > 0 {
			used[p.Block] = true
		}
	}
	for _, b := range blocks {
		if used[b.ID] {
			setup.Blocks = append(setup.Blocks, b)
		}
	}
	var warnings []string
	if kind == impedance.SetupCoating {
		base := flagString(fs, "base")
		if base == "" {
			if len(setup.Blocks) != 1 {
				return usagef("the readings use %d blocks: name the base with --base", len(setup.Blocks))
			}
			base = setup.Blocks[0].ID
		}
		var kept []impedance.CalPoint
		for _, p := range pts {
			if p.Block == base || p.Specimen.ConductivitySPerM == 0 {
				kept = append(kept, p)
			}
		}
		found := false
		for _, b := range setup.Blocks {
			if b.ID == base {
				setup.BaseConductivitySPerM = b.ConductivitySPerM
				setup.Blocks = []impedance.RefBlock{b}
				found = true
			}
		}
		if !found {
			return dataError(fmt.Errorf("%s: no reading on base block %q", readingsFile, base))
		}
		pts = kept
	} else {
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, b := range setup.Blocks {
			lo, hi = math.Min(lo, b.ConductivitySPerM), math.Max(hi, b.ConductivitySPerM)
		}
		if len(setup.Blocks) < 2 {
			return dataError(fmt.Errorf("%s: readings on %d conducting block(s): at least 2 are needed", readingsFile, len(setup.Blocks)))
		}
		if (hi-lo)/58e4 < 10 {
			warnings = append(warnings, fmt.Sprintf("blocks span %.1f %%IACS: field standards should differ by at least 10 %%IACS (MIL-STD-1537C)", (hi-lo)/58e4))
		}
	}
	m, err := impedance.NewPlanarModel(probe.Coil(), setup.ModelRelTol)
	if err != nil {
		return usagef("%v", err)
	}
	cal, err := impedance.Calibrate(m, pts, impedance.CalibrationOptions{Coil: probe.Coil(), LiftoffM: probe.LiftoffM,
		FitLiftoff: flagBool(fs, "fit-liftoff"), FitCoilScale: flagBool(fs, "fit-coil-scale"), ReadingNoiseV: noise})
	if err != nil {
		return dataError(fmt.Errorf("%s: %w", readingsFile, err))
	}
	setup.Calibration = cal
	rep := calibrationReportOf(cal, kind, out)
	rep.Warnings = append(warnings, rep.Warnings...)
	if out != "" {
		if err := writeFileWith(out, func(w io.Writer) error { return writeJSON(w, setup) }); err != nil {
			return err
		}
	}
	if flagBool(fs, "json") {
		return writeJSON(e.stdout, rep)
	}
	printCalibrationReport(e.stdout, rep)
	return nil
}

func calibrationReportOf(cal *impedance.Calibration, kind, file string) calibrationReport {
	rep := calibrationReport{Kind: kind, SetupFile: file, LiftoffM: cal.LiftoffM, CoilScale: cal.CoilScale,
		NoiseV: cal.NoiseV, NoiseEstimated: cal.NoiseEstimated, Dof: cal.Dof, Calibration: cal, Warnings: []string{}}
	n := len(cal.Params)
	for i, name := range cal.Params {
		u := math.Sqrt(cal.Covariance[i*n+i])
		switch name {
		case "liftoff_m":
			rep.ULiftoffM = u
		case "ln_coil_scale":
			rep.UCoilScale = u * cal.CoilScale
		}
	}
	for _, ch := range cal.Channels {
		rep.Channels = append(rep.Channels, channelReport{FreqHz: ch.FreqHz, GainV: math.Hypot(real(ch.Gain), imag(ch.Gain)),
			PhaseDeg: math.Atan2(imag(ch.Gain), real(ch.Gain)) * 180 / math.Pi, OffsetX: real(ch.Offset), OffsetY: imag(ch.Offset)})
	}
	worst := 0.0
	for _, r := range cal.Residuals {
		d := r.ResidualV()
		a := math.Hypot(real(d), imag(d))
		worst = math.Max(worst, a)
		rep.Residuals = append(rep.Residuals, residualReport{Block: r.Block, Shim: r.Shim, FreqHz: r.FreqHz,
			IACS: r.ConductivitySPerM / 58e4, ShimM: r.ExtraLiftoffM, ResidualV: a})
	}
	at := map[string]int{}
	for _, r := range rep.Residuals {
		i, ok := at[r.Block]
		if !ok {
			i = len(rep.Blocks)
			at[r.Block] = i
			rep.Blocks = append(rep.Blocks, blockReport{Block: r.Block})
		}
		b := &rep.Blocks[i]
		b.Readings++
		b.RMSV += r.ResidualV * r.ResidualV
		b.MaxV = math.Max(b.MaxV, r.ResidualV)
	}
	for i := range rep.Blocks {
		rep.Blocks[i].RMSV = math.Sqrt(rep.Blocks[i].RMSV / float64(rep.Blocks[i].Readings))
	}
	if cal.NoiseV > 0 && worst > 4*cal.NoiseV {
		rep.Warnings = append(rep.Warnings, fmt.Sprintf("largest residual %.3g mV is %.1f× the noise: check that reading and its block or shim", worst*1e3, worst/cal.NoiseV))
	}
	if !cal.NoiseEstimated && cal.NoiseV == 0 {
		rep.Warnings = append(rep.Warnings, "as many parameters as reading components: the reading noise cannot be estimated; give --noise or more readings, or uncertainties will cover the certificates only")
	}
	if rep.ULiftoffM > 20e-6 {
		rep.Warnings = append(rep.Warnings, fmt.Sprintf("effective lift-off poorly determined (u = %.0f µm; its effect is carried into the reported uncertainties): thicker shims or more blocks fix it better", rep.ULiftoffM*1e6))
	}
	return rep
}

func printCalibrationReport(w io.Writer, rep calibrationReport) {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintf(w, "%s set-up", rep.Kind)
	if rep.SetupFile != "" {
		fmt.Fprintf(w, " written to %s", rep.SetupFile)
	}
	fmt.Fprintln(w)
	fmt.Fprintf(w, "effective lift-off  %.1f µm", rep.LiftoffM*1e6)
	if rep.ULiftoffM > 0 {
		fmt.Fprintf(w, " ± %.1f µm (fitted)", rep.ULiftoffM*1e6)
	}
	fmt.Fprintln(w)
	if rep.UCoilScale > 0 {
		fmt.Fprintf(w, "coil scale          %.4f ± %.4f\n", rep.CoilScale, rep.UCoilScale)
	}
	src := "from residuals"
	if !rep.NoiseEstimated {
		src = "given"
	}
	fmt.Fprintf(w, "reading noise       %.3g mV per component (%s, %d degrees of freedom)\n\n", rep.NoiseV*1e3, src, rep.Dof)
	fmt.Fprintln(tw, "FREQ\tGAIN V\tROTATION °\tOFFSET X V\tOFFSET Y V")
	for _, c := range rep.Channels {
		fmt.Fprintf(tw, "%s\t%.4f\t%.2f\t%.4f\t%.4f\n", impedance.FormatFrequency(c.FreqHz), c.GainV, c.PhaseDeg, c.OffsetX, c.OffsetY)
	}
	tw.Flush()
	fmt.Fprintln(w)
	fmt.Fprintln(tw, "BLOCK\tSHIM\tFREQ\t%IACS\tSHIM µm\tRESIDUAL mV")
	for _, r := range rep.Residuals {
		shim := r.Shim
		if shim == "" {
			shim = "-"
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%.2f\t%.1f\t%.3f\n", r.Block, shim, impedance.FormatFrequency(r.FreqHz), r.IACS, r.ShimM*1e6, r.ResidualV*1e3)
	}
	tw.Flush()
	fmt.Fprintln(w)
	fmt.Fprintln(tw, "BLOCK\tREADINGS\tRMS RESIDUAL mV\tMAX mV")
	for _, b := range rep.Blocks {
		fmt.Fprintf(tw, "%s\t%d\t%.3f\t%.3f\n", b.Block, b.Readings, b.RMSV*1e3, b.MaxV*1e3)
	}
	tw.Flush()
	for _, s := range rep.Warnings {
		fmt.Fprintf(w, "warning: %s\n", s)
	}
	fmt.Fprintf(w, "\n%s\n", caution)
}

// loadSetup reads a setup of the given kind and builds its model.
func loadSetup(fs *flag.FlagSet, kind string) (*impedance.Setup, *impedance.PlanarModel, error) {
	name := flagString(fs, "setup")
	if name == "" {
		return nil, nil, usagef("--setup is required")
	}
	s, err := readWith(name, impedance.ReadSetup)
	if err != nil {
		return nil, nil, err
	}
	if s.Kind != kind {
		return nil, nil, usagef("%s is a %s set-up; this command needs a %s set-up", name, s.Kind, kind)
	}
	m, err := impedance.NewPlanarModel(s.Probe.Coil(), s.ModelRelTol)
	if err != nil {
		return nil, nil, dataError(fmt.Errorf("%s: %w", name, err))
	}
	return s, m, nil
}

// readSpots reads and groups the readings of every file.
func readSpots(args []string) ([]impedance.Spot, []string, error) {
	if len(args) == 0 {
		return nil, nil, usagef("give one or more READINGS.csv files")
	}
	var spots []impedance.Spot
	var files []string
	for _, name := range args {
		rs, err := readWith(name, impedance.ReadSpotReadings)
		if err != nil {
			return nil, nil, err
		}
		for _, s := range impedance.GroupSpots(rs) {
			spots = append(spots, s)
			files = append(files, name)
		}
	}
	return spots, files, nil
}

// spotResult is one line of conductivity or coating output.
type spotResult struct {
	File      string    `json:"file"`
	Spot      string    `json:"spot"`
	FreqsHz   []float64 `json:"freqs_hz"`
	IACS      float64   `json:"conductivity_pct_iacs"`
	UIACS     float64   `json:"u_conductivity_pct_iacs"`
	MSPerM    float64   `json:"conductivity_ms_per_m"`
	UMSPerM   float64   `json:"u_conductivity_ms_per_m"`
	LiftoffUM float64   `json:"liftoff_um"`
	ULiftUM   float64   `json:"u_liftoff_um"`
	TempC     *float64  `json:"temperature_c"`
	IACS20    *float64  `json:"conductivity_20c_pct_iacs"`
	UIACS20   *float64  `json:"u_conductivity_20c_pct_iacs"`
	AlphaPerC *float64  `json:"alpha_per_c"`
	ThickMM   *float64  `json:"thickness_mm"`
	UThickMM  *float64  `json:"u_thickness_mm,omitempty"`
	E376UM    *float64  `json:"e376_tolerance_um,omitempty"`
	Flags     []string  `json:"flags"`
	failed    bool
}

func runCondMeasure(_ context.Context, e *env, fs *flag.FlagSet, args []string) error {
	setup, m, err := loadSetup(fs, impedance.SetupConductivity)
	if err != nil {
		return err
	}
	thick, _, err := flagQuantity(fs, "thickness", units.Length)
	if err != nil {
		return err
	}
	target, _, err := flagQuantity(fs, "target", units.Conductivity)
	if err != nil {
		return err
	}
	alphaGiven := flagString(fs, "alpha") != ""
	var alphaFlag float64
	if alphaGiven {
		alphaFlag, err = strconv.ParseFloat(strings.TrimSpace(flagString(fs, "alpha")), 64)
		if err != nil || math.IsNaN(alphaFlag) || math.IsInf(alphaFlag, 0) || math.Abs(alphaFlag) > 0.1 {
			return usagef("--alpha %q: expected a coefficient per °C such as 0.0025", flagString(fs, "alpha"))
		}
	}
	var solve impedance.Unknown
	switch flagString(fs, "solve") {
	case "conductivity":
		solve = impedance.SolveConductivity | impedance.SolveLiftoff
	case "thickness":
		solve = impedance.SolveThickness | impedance.SolveLiftoff
	case "all":
		solve = impedance.SolveConductivity | impedance.SolveThickness | impedance.SolveLiftoff
	default:
		return usagef("--solve %q: expected conductivity, thickness or all", flagString(fs, "solve"))
	}
	knownSigma, haveSigma, err := flagQuantity(fs, "conductivity", units.Conductivity)
	if err != nil {
		return err
	}
	if solve&impedance.SolveConductivity == 0 && !(knownSigma > 0) {
		return usagef("--solve thickness needs --conductivity (a positive value)")
	}
	if solve&impedance.SolveConductivity != 0 && haveSigma {
		return usagef("--conductivity applies to --solve thickness only")
	}
	material := flagString(fs, "material")
	if material != "" {
		if _, ok := impedance.LookupTempCoefficient(material); !ok && !alphaGiven {
			return usagef("--material %q has no temperature coefficient: give --alpha (%s)", material, alphaNames())
		}
	}
	spots, files, err := readSpots(args)
	if err != nil {
		return err
	}
	cal := setup.Calibration
	var results []spotResult
	failed := 0
	for i, sp := range spots {
		res := spotResult{File: files[i], Spot: sp.ID, Flags: []string{}}
		var rd []impedance.Reading
		tC, t, mat := math.NaN(), thick, material
		for _, r := range sp.Readings {
			rd = append(rd, impedance.Reading{FreqHz: r.FreqHz, V: r.V})
			res.FreqsHz = append(res.FreqsHz, r.FreqHz)
			if !math.IsNaN(r.TempC) {
				tC = r.TempC
			}
			if r.ThicknessM > 0 {
				t = r.ThicknessM
			}
			if r.Material != "" {
				mat = r.Material
			}
		}
		if t > 0 {
			v := t * 1e3
			res.ThickMM = &v
		}
		opt := impedance.InvertOptions{Solve: solve, Specimen: impedance.Specimen{ConductivitySPerM: knownSigma, ThicknessM: t}}
		if solve&impedance.SolveThickness != 0 && !(t > 0) {
			opt.Specimen.ThicknessM = 1e-3
		}
		inv, ok := invertInto(&res, cal, m, rd, opt)
		if !ok {
			failed++
			results = append(results, res)
			continue
		}
		if solve&impedance.SolveThickness != 0 {
			v, u := inv.ThicknessM*1e3, inv.UThicknessM*1e3
			res.ThickMM, res.UThickMM = &v, &u
			t = inv.ThicknessM
		}
		res.Flags = append(res.Flags, condFlags(cal, inv, t, rd, target)...)
		// Temperature correction of a measured conductivity.
		if solve&impedance.SolveConductivity == 0 {
			results = append(results, res)
			continue
		}
		if !math.IsNaN(tC) {
			v := tC
			res.TempC = &v
			alpha, ok := alphaFlag, alphaGiven
			if !ok && mat != "" {
				if c, found := impedance.LookupTempCoefficient(mat); found {
					alpha, ok = c.AlphaPerC, true
				}
			}
			if ok {
				s20, err := impedance.ConductivityAt20C(inv.ConductivitySPerM, tC, alpha)
				if err != nil {
					res.Flags = append(res.Flags, "not temperature-corrected: "+err.Error())
				} else {
					k := s20 / inv.ConductivitySPerM
					v20, u20, a := s20/58e4, res.UIACS*k, alpha
					res.IACS20, res.UIACS20, res.AlphaPerC = &v20, &u20, &a
				}
			} else {
				res.Flags = append(res.Flags, fmt.Sprintf("not temperature-corrected: no coefficient for material %q", mat))
			}
		} else {
			res.Flags = append(res.Flags, "not temperature-corrected: no temperature")
		}
		results = append(results, res)
	}
	if err := printSpotResults(e.stdout, fs, results, false); err != nil {
		return err
	}
	if failed > 0 {
		return dataError(fmt.Errorf("%d of %d spots could not be inverted (see their flags)", failed, len(results)))
	}
	return nil
}

// invertInto inverts the readings of one spot and fills res with the
// result; on failure it marks res failed with the reason and returns false.
func invertInto(res *spotResult, cal *impedance.Calibration, m impedance.PlanarForward, rd []impedance.Reading, opt impedance.InvertOptions) (impedance.Inversion, bool) {
	inv, err := cal.Invert(m, rd, opt)
	if err != nil {
		res.failed = true
		res.Flags = append(res.Flags, "failed: "+err.Error())
		return inv, false
	}
	res.MSPerM, res.UMSPerM = inv.ConductivitySPerM/1e6, inv.UConductivitySPerM/1e6
	res.IACS, res.UIACS = inv.ConductivitySPerM/58e4, inv.UConductivitySPerM/58e4
	res.LiftoffUM, res.ULiftUM = inv.ExtraLiftoffM*1e6, inv.UExtraLiftoffM*1e6
	return inv, true
}

// condFlags lists the conditions that qualify a conductivity result.
func condFlags(cal *impedance.Calibration, inv impedance.Inversion, thickM float64, rd []impedance.Reading, target float64) []string {
	var f []string
	fmin := math.Inf(1)
	for _, r := range rd {
		fmin = math.Min(fmin, r.FreqHz)
	}
	delta := impedance.SkinDepthM(fmin, inv.ConductivitySPerM, 1)
	switch {
	case inv.Solve&impedance.SolveThickness != 0:
		// A measured thickness is resolved while the plate is thin
		// against δ; beyond about 2.5δ the readings barely depend on it.
		if thickM > 2.5*delta {
			f = append(f, fmt.Sprintf("thickness > 2.5δ (%.3g mm at %s): poorly resolved", 2.5*delta*1e3, impedance.FormatFrequency(fmin)))
		}
	case thickM > 0 && thickM < 3*delta:
		f = append(f, fmt.Sprintf("thickness < 3δ (%.3g mm at %s): result depends on the stated thickness", 3*delta*1e3, impedance.FormatFrequency(fmin)))
	case thickM == 0:
		f = append(f, "thickness not given: taken as thick (3δ rule unchecked)")
	}
	r := cal.ConductivityRangeSPerM
	if inv.ConductivitySPerM < r[0] || inv.ConductivitySPerM > r[1] {
		f = append(f, fmt.Sprintf("outside calibrated range %.1f–%.1f %%IACS", r[0]/58e4, r[1]/58e4))
	}
	lr := cal.ExtraLiftoffRangeM
	if inv.ExtraLiftoffM < lr[0]-10e-6 || inv.ExtraLiftoffM > lr[1]+10e-6 {
		f = append(f, fmt.Sprintf("lift-off outside calibrated range %.0f–%.0f µm", lr[0]*1e6, lr[1]*1e6))
	}
	if target > 0 && 2*inv.UConductivitySPerM > target {
		f = append(f, fmt.Sprintf("2u > target ±%.2g %%IACS", target/58e4))
	}
	if 2*len(rd) > 2 && cal.NoiseV > 0 && inv.MisfitV > 3*cal.NoiseV {
		f = append(f, fmt.Sprintf("misfit: the frequencies disagree (%.1f× noise)", inv.MisfitV/cal.NoiseV))
	}
	return f
}

func runCoatingMeasure(_ context.Context, e *env, fs *flag.FlagSet, args []string) error {
	setup, m, err := loadSetup(fs, impedance.SetupCoating)
	if err != nil {
		return err
	}
	spots, files, err := readSpots(args)
	if err != nil {
		return err
	}
	cal := setup.Calibration
	baseThick := 0.0
	if len(setup.Blocks) == 1 {
		baseThick = setup.Blocks[0].ThicknessM
	}
	opt := impedance.InvertOptions{Specimen: impedance.Specimen{ConductivitySPerM: setup.BaseConductivitySPerM, ThicknessM: baseThick}}
	unknowns := 2 // coating thickness and base conductivity
	if flagBool(fs, "fix-base") {
		opt.Solve = impedance.SolveLiftoff
		unknowns = 1
	}
	var results []spotResult
	failed := 0
	for i, sp := range spots {
		res := spotResult{File: files[i], Spot: sp.ID, Flags: []string{}}
		var rd []impedance.Reading
		for _, r := range sp.Readings {
			rd = append(rd, impedance.Reading{FreqHz: r.FreqHz, V: r.V})
			res.FreqsHz = append(res.FreqsHz, r.FreqHz)
		}
		inv, ok := invertInto(&res, cal, m, rd, opt)
		if !ok {
			failed++
			results = append(results, res)
			continue
		}
		// ASTM E376 Note 2: ±10 % of the thickness or ±2.5 µm, whichever is greater.
		tol := math.Max(0.1*math.Abs(res.LiftoffUM), 2.5)
		res.E376UM = &tol
		if 2*res.ULiftUM > tol {
			res.Flags = append(res.Flags, "2u > E376 tolerance")
		}
		lr := cal.ExtraLiftoffRangeM
		if inv.ExtraLiftoffM > lr[1]*1.1+2.5e-6 {
			res.Flags = append(res.Flags, fmt.Sprintf("outside shim range (thickest %.1f µm)", lr[1]*1e6))
		}
		if inv.ExtraLiftoffM < -2*inv.UExtraLiftoffM-2.5e-6 {
			res.Flags = append(res.Flags, "below the bare-base zero: check the zero and the base")
		}
		if 2*len(rd) > unknowns && cal.NoiseV > 0 && inv.MisfitV > 3*cal.NoiseV {
			res.Flags = append(res.Flags, fmt.Sprintf("misfit (%.1f× noise)", inv.MisfitV/cal.NoiseV))
		}
		results = append(results, res)
	}
	if err := printSpotResults(e.stdout, fs, results, true); err != nil {
		return err
	}
	if failed > 0 {
		return dataError(fmt.Errorf("%d of %d spots could not be inverted (see their flags)", failed, len(results)))
	}
	return nil
}

func fmtOpt(p *float64, prec int) string {
	if p == nil {
		return ""
	}
	return strconv.FormatFloat(*p, 'f', prec, 64)
}

func freqList(fs []float64) string {
	var s []string
	for _, f := range fs {
		s = append(s, impedance.FormatFrequency(f))
	}
	return strings.Join(s, "+")
}

func printSpotResults(w io.Writer, fs *flag.FlagSet, rs []spotResult, coating bool) error {
	if flagBool(fs, "json") {
		return writeJSON(w, struct {
			Results []spotResult `json:"results"`
			Caution string       `json:"caution"`
		}{rs, caution})
	}
	if flagBool(fs, "csv") {
		cw := csv.NewWriter(w)
		head := []string{"file", "spot", "freqs_hz", "conductivity_pct_iacs", "u_conductivity_pct_iacs", "conductivity_ms_per_m", "u_conductivity_ms_per_m", "liftoff_um", "u_liftoff_um"}
		if coating {
			head = append(head, "e376_tolerance_um", "flags")
		} else {
			head = append(head, "temperature_c", "alpha_per_c", "conductivity_20c_pct_iacs", "u_conductivity_20c_pct_iacs", "thickness_mm", "u_thickness_mm", "flags")
		}
		if err := cw.Write(head); err != nil {
			return err
		}
		for _, r := range rs {
			var fq []string
			for _, f := range r.FreqsHz {
				fq = append(fq, strconv.FormatFloat(f, 'g', -1, 64))
			}
			rec := []string{r.File, r.Spot, strings.Join(fq, ";")}
			if r.failed {
				rec = append(rec, "", "", "", "", "", "")
			} else {
				rec = append(rec, strconv.FormatFloat(r.IACS, 'f', 3, 64), strconv.FormatFloat(r.UIACS, 'f', 3, 64),
					strconv.FormatFloat(r.MSPerM, 'f', 4, 64), strconv.FormatFloat(r.UMSPerM, 'f', 4, 64),
					strconv.FormatFloat(r.LiftoffUM, 'f', 2, 64), strconv.FormatFloat(r.ULiftUM, 'f', 2, 64))
			}
			if coating {
				rec = append(rec, fmtOpt(r.E376UM, 2))
			} else {
				rec = append(rec, fmtOpt(r.TempC, 1), fmtOpt(r.AlphaPerC, 5), fmtOpt(r.IACS20, 3), fmtOpt(r.UIACS20, 3), fmtOpt(r.ThickMM, 4), fmtOpt(r.UThickMM, 4))
			}
			rec = append(rec, strings.Join(r.Flags, "; "))
			if err := cw.Write(rec); err != nil {
				return err
			}
		}
		cw.Flush()
		return cw.Error()
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	if coating {
		fmt.Fprintln(tw, "SPOT\tFREQ\tCOATING µm\t±u µm\tE376 ± µm\tBASE %IACS\t±u\tFLAGS")
	} else {
		fmt.Fprintln(tw, "SPOT\tFREQ\t%IACS\t±u\tMS/m\tLIFT-OFF µm\t±u\tTHICK mm\tT °C\t%IACS@20°C\t±u\tFLAGS")
	}
	for _, r := range rs {
		flags := strings.Join(r.Flags, "; ")
		if r.failed {
			fmt.Fprintf(tw, "%s\t%s\t\t\t\t\t\t%s\n", r.Spot, freqList(r.FreqsHz), flags)
			continue
		}
		if coating {
			fmt.Fprintf(tw, "%s\t%s\t%.1f\t%.1f\t%s\t%.2f\t%.2f\t%s\n", r.Spot, freqList(r.FreqsHz), r.LiftoffUM, r.ULiftUM, fmtOpt(r.E376UM, 1), r.IACS, r.UIACS, flags)
		} else {
			th := fmtOpt(r.ThickMM, 3)
			if r.UThickMM != nil {
				th += " ± " + fmtOpt(r.UThickMM, 3)
			}
			fmt.Fprintf(tw, "%s\t%s\t%.2f\t%.2f\t%.3f\t%.1f\t%.1f\t%s\t%s\t%s\t%s\t%s\n", r.Spot, freqList(r.FreqsHz), r.IACS, r.UIACS, r.MSPerM,
				r.LiftoffUM, r.ULiftUM, th, fmtOpt(r.TempC, 1), fmtOpt(r.IACS20, 2), fmtOpt(r.UIACS20, 2), flags)
		}
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	fmt.Fprintln(w, "\nUncertainties are standard uncertainties (k = 1) from reading noise and calibration; model error is not included.")
	_, err := fmt.Fprintf(w, "%s\n", caution)
	return err
}

func runAdvise(_ context.Context, e *env, fs *flag.FlagSet, args []string) error {
	if len(args) > 0 {
		return usagef("unexpected arguments %q", args)
	}
	var in impedance.AdviceInput
	matName := ""
	if name := flagString(fs, "material"); name != "" {
		mat, ok := impedance.LookupMaterial(name)
		if !ok {
			return usagef("--material %q: expected one of %s", name, materialNames())
		}
		in.ConductivitySPerM, in.RelPermeability = mat.ConductivitySPerM, mat.RelPermeability
		matName = mat.Description + " (" + mat.Source + ")"
	}
	if v, ok, err := flagQuantity(fs, "conductivity", units.Conductivity); err != nil {
		return err
	} else if ok {
		in.ConductivitySPerM = v
		matName = ""
	}
	if in.ConductivitySPerM == 0 {
		return usagef("give --material NAME or --conductivity SIGMA")
	}
	if flagSet(fs, "mur") || in.RelPermeability == 0 {
		in.RelPermeability = flagFloat(fs, "mur")
	}
	for _, q := range []struct {
		name string
		kind units.Kind
		dst  *float64
	}{
		{"wall", units.Length, &in.WallM}, {"tube-od", units.Length, &in.TubeOuterDiamM}, {"freq", units.Frequency, &in.CandidateHz},
		{"probe-speed", units.Speed, &in.ProbeSpeedMPS}, {"sample-rate", units.Frequency, &in.SampleRateHz},
		{"lowpass", units.Frequency, &in.LowpassHz}, {"coil-length", units.Length, &in.CoilLengthM}, {"field-length", units.Length, &in.FieldLengthM},
	} {
		v, _, err := flagQuantity(fs, q.name, q.kind)
		if err != nil {
			return err
		}
		*q.dst = v
	}
	in.IncludeID = flagBool(fs, "id")
	in.MagnetMomentAm2 = flagFloat(fs, "magnet-moment")
	if v, _, err := flagQuantity(fs, "magnet-height", units.Length); err != nil {
		return err
	} else {
		in.MagnetHeightM = v
	}
	a, err := impedance.Advise(in)
	if err != nil {
		return usagef("%v", err)
	}
	if flagBool(fs, "json") {
		return writeJSON(e.stdout, struct {
			impedance.Advice
			Material string `json:"material,omitempty"`
			Caution  string `json:"caution"`
		}{a, matName, caution})
	}
	w := e.stdout
	if matName != "" {
		fmt.Fprintf(w, "material            %s\n", matName)
	}
	fmt.Fprintf(w, "conductivity        %.4g MS/m = %.3g %%IACS, μr %g\n", a.ConductivitySPerM/1e6, a.ConductivityIACS, a.RelPermeability)
	if a.WallM > 0 {
		fmt.Fprintf(w, "wall                %.3f mm\n", a.WallM*1e3)
		fmt.Fprintf(w, "f90                 %s (3ρ/(t²μr)); %s by t = 0.8δ\n", impedance.FormatFrequency(a.F90Hz), impedance.FormatFrequency(a.F90AltHz))
		fmt.Fprintf(w, "3δ ≤ wall from      %s (conductivity measurement of a part this thick)\n\n", impedance.FormatFrequency(a.MinFreq3DeltaHz))
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "ROLE\tFREQ\tδ mm\tID–OD SPREAD °\tBASIS")
		for _, r := range a.Set {
			fmt.Fprintf(tw, "%s\t%s\t%.3f\t%.0f\t%s\n", r.Role, impedance.FormatFrequency(r.FreqHz), r.SkinDepthM*1e3, r.PhaseSpreadRad*180/math.Pi, r.Basis)
		}
		tw.Flush()
	}
	if c := a.Candidate; c != nil {
		fmt.Fprintf(w, "\ncandidate %s: δ = %.3f mm", impedance.FormatFrequency(c.FreqHz), c.SkinDepthM*1e3)
		if a.WallM > 0 {
			fmt.Fprintf(w, ", ID–OD spread 2t/δ = %.0f°", c.PhaseSpreadRad*180/math.Pi)
		}
		fmt.Fprintln(w)
	}
	if a.SamplesPerMetre > 0 {
		fmt.Fprintf(w, "sampling            %.1f samples/in\n", a.SamplesPerMetre*0.0254)
	}
	if a.FlawBandwidthHz > 0 {
		fmt.Fprintf(w, "flaw bandwidth      %.4g Hz (speed / coil length)\n", a.FlawBandwidthHz)
	}
	if a.ReynoldsNumber > 0 {
		fmt.Fprintf(w, "magnetic Reynolds   %.3g (μ0σvL)\n", a.ReynoldsNumber)
	}
	if mf := a.Magnet; mf != nil {
		fmt.Fprintf(w, "magnet over sheet   lift %.4g N, drag %.4g N (image force %.4g N, images recede at %.4g m/s; thin-sheet model)\n",
			mf.LiftN, mf.DragN, mf.ImageForceN, mf.RecessionMPS)
	}
	for _, s := range a.Warnings {
		fmt.Fprintf(w, "warning: %s\n", s)
	}
	fmt.Fprintf(w, "\nThe phase spread is the plane-wave estimate 2t/δ; the technique sheet governs the frequencies used.\n%s\n", caution)
	return nil
}

func materialNames() string {
	var s []string
	for _, m := range impedance.Materials() {
		s = append(s, m.Name)
	}
	return strings.Join(s, ", ")
}

func alphaNames() string {
	var s []string
	for _, c := range impedance.TempCoefficients() {
		s = append(s, c.Material)
	}
	return strings.Join(s, ", ")
}

func alphaTableHelp() string {
	var b strings.Builder
	b.WriteString("Temperature coefficients (--material, or the material column; --alpha overrides):\n")
	cs := impedance.TempCoefficients()
	sort.Slice(cs, func(i, j int) bool { return cs[i].Material < cs[j].Material })
	for _, c := range cs {
		fmt.Fprintf(&b, "  %-16s %.5f/°C  %s\n", c.Material, c.AlphaPerC, c.Source)
	}
	b.WriteString("A Level III approves the coefficient used in a procedure.\n")
	return b.String()
}

// checkRow is one line of conductivity check output.
type checkRow struct {
	Block      string    `json:"block"`
	Shim       string    `json:"shim,omitempty"`
	FreqsHz    []float64 `json:"freqs_hz"`
	CertIACS   float64   `json:"certified_pct_iacs"`
	IACS       float64   `json:"measured_pct_iacs"`
	UIACS      float64   `json:"u_measured_pct_iacs"`
	DevIACS    float64   `json:"deviation_pct_iacs"`
	ShimUM     float64   `json:"shim_um"`
	LiftoffUM  float64   `json:"measured_liftoff_um"`
	ULiftoffUM float64   `json:"u_measured_liftoff_um"`
	Pass       bool      `json:"pass"`
	Reason     string    `json:"reason,omitempty"`
}

func runCondCheck(_ context.Context, e *env, fs *flag.FlagSet, args []string) error {
	setup, m, err := loadSetup(fs, impedance.SetupConductivity)
	if err != nil {
		return err
	}
	if len(args) != 1 {
		return usagef("give one READINGS.csv file (calibration-readings format)")
	}
	if flagString(fs, "blocks") == "" {
		return usagef("--blocks is required")
	}
	tol, _, err := flagQuantity(fs, "tolerance", units.Conductivity)
	if err != nil {
		return err
	}
	ltol, checkLift, err := flagQuantity(fs, "liftoff-tolerance", units.Length)
	if err != nil {
		return err
	}
	if !(tol > 0) || (checkLift && !(ltol > 0)) {
		return usagef("tolerances must be positive")
	}
	blocks, err := readWith(flagString(fs, "blocks"), impedance.ReadBlocks)
	if err != nil {
		return err
	}
	var shims []impedance.Shim
	if name := flagString(fs, "shims"); name != "" {
		if shims, err = readWith(name, impedance.ReadShims); err != nil {
			return err
		}
	}
	rs, err := readWith(args[0], impedance.ReadCalReadings)
	if err != nil {
		return err
	}
	pts, err := impedance.CalPointsFrom(blocks, shims, rs, args[0])
	if err != nil {
		return dataError(err)
	}
	// One inversion per block and shim, over all its frequencies.
	type key struct{ block, shim string }
	var order []key
	group := map[key][]impedance.CalPoint{}
	for _, p := range pts {
		if p.Specimen.ConductivitySPerM == 0 {
			continue // air
		}
		k := key{p.Block, p.Shim}
		if _, ok := group[k]; !ok {
			order = append(order, k)
		}
		group[k] = append(group[k], p)
	}
	if len(order) == 0 {
		return dataError(fmt.Errorf("%s: no readings on conducting blocks", args[0]))
	}
	var rows []checkRow
	failed := 0
	for _, k := range order {
		g := group[k]
		row := checkRow{Block: k.block, Shim: k.shim, CertIACS: g[0].Specimen.ConductivitySPerM / 58e4, ShimUM: g[0].ExtraLiftoffM * 1e6}
		var rd []impedance.Reading
		for _, p := range g {
			rd = append(rd, impedance.Reading{FreqHz: p.FreqHz, V: p.ReadingV})
			row.FreqsHz = append(row.FreqsHz, p.FreqHz)
		}
		inv, err := setup.Calibration.Invert(m, rd, impedance.InvertOptions{Specimen: impedance.Specimen{ThicknessM: g[0].Specimen.ThicknessM}})
		switch {
		case err != nil:
			row.Reason = "failed: " + err.Error()
		default:
			row.IACS, row.UIACS = inv.ConductivitySPerM/58e4, inv.UConductivitySPerM/58e4
			row.DevIACS = row.IACS - row.CertIACS
			row.LiftoffUM, row.ULiftoffUM = inv.ExtraLiftoffM*1e6, inv.UExtraLiftoffM*1e6
			row.Pass = true
			if math.Abs(row.DevIACS) > tol/58e4 {
				row.Pass = false
				row.Reason = fmt.Sprintf("deviation %+.2f %%IACS beyond ±%.2g", row.DevIACS, tol/58e4)
			}
			if checkLift && math.Abs(row.LiftoffUM-row.ShimUM) > ltol*1e6 {
				row.Pass = false
				row.Reason = strings.TrimPrefix(row.Reason+fmt.Sprintf("; lift-off %.1f µm against shim %.1f µm beyond ±%.3g µm", row.LiftoffUM, row.ShimUM, ltol*1e6), "; ")
			}
		}
		if !row.Pass {
			failed++
		}
		rows = append(rows, row)
	}
	if flagBool(fs, "json") {
		if err := writeJSON(e.stdout, struct {
			Pass    bool       `json:"pass"`
			Rows    []checkRow `json:"blocks"`
			Caution string     `json:"caution"`
		}{failed == 0, rows, caution}); err != nil {
			return err
		}
	} else {
		tw := tabwriter.NewWriter(e.stdout, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "BLOCK\tSHIM\tFREQ\tCERTIFIED %IACS\tMEASURED\t±u\tDEVIATION\tLIFT-OFF µm\tRESULT")
		for _, r := range rows {
			shim := r.Shim
			if shim == "" {
				shim = "-"
			}
			res := "pass"
			if !r.Pass {
				res = "FAIL: " + r.Reason
			}
			fmt.Fprintf(tw, "%s\t%s\t%s\t%.2f\t%.2f\t%.2f\t%+.2f\t%.1f\t%s\n", r.Block, shim, freqList(r.FreqsHz), r.CertIACS, r.IACS, r.UIACS, r.DevIACS, r.LiftoffUM, res)
		}
		tw.Flush()
		fmt.Fprintf(e.stdout, "\n%s\n", caution)
	}
	if failed > 0 {
		return checkFailed(fmt.Errorf("%d of %d block readings out of tolerance", failed, len(rows)))
	}
	return nil
}
