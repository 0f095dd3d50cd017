package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"

	"whorl/acquire"
	"whorl/dsp"
	"whorl/units"
)

func init() {
	register(&command{
		name:     "demod",
		synopsis: "demodulate a raw coil-voltage record into a Whorl scan (digital lock-in)",
		usage:    "whorl demod [--rate HZ] [--lowpass HZ] [--order N] [--settle S] [--coil-length L] [--workers N] [--json] -o OUT.csv RAW.csv",
		help: `Demodulates each excitation frequency of a raw record (# whorl-raw 1) by
digital lock-in: multiplication by the in-phase and quadrature references,
a zero-phase low-pass and decimation to the output rate. With a recorded
reference column the output phase is referred to it; without one the
reference is the stated frequency with zero phase at the first sample, and
the estimated phase of each channel's mean is printed (rotate by its
negative to put the balance point on +X). Time-multiplexed records (slot
length > 0) give one sample per cycle, the settling part of each slot
discarded (default a quarter slot). Raw samples are never changed.

Examples:
  whorl demod -o R01C012.csv 01-R01C012-diff-tones.csv
  whorl demod --rate 4kHz --lowpass 500Hz --coil-length 2mm -o out.csv raw.csv
  whorl demod --json -o out.csv raw.csv`,
		setFlags: func(fs *flag.FlagSet) {
			fs.String("o", "", "output scan `file` (required)")
			fs.String("rate", "", "output sample rate, e.g. 2kHz (default 2 kHz)")
			fs.String("lowpass", "", "low-pass cut-off, e.g. 400Hz (default a fifth of the rate)")
			fs.Int("order", 4, "Butterworth order of the low-pass")
			fs.String("settle", "", "settling time discarded per multiplex slot, e.g. 0.2ms")
			fs.String("coil-length", "", "effective coil length for the flaw-band check, e.g. 2mm")
			fs.Int("workers", 1, "goroutines for the lock-in (CPU cores to use); the output does not depend on it")
			fs.Bool("json", false, "print the demodulation report as JSON")
		},
		run: runDemod,
	})
	register(&command{
		name:     "process",
		synopsis: "apply a processing chain (filters, resampling, nulls, mixes) to a scan",
		usage:    "whorl process --chain CHAIN.json [--json] -o OUT.csv IN.csv",
		help: `Applies the steps of a processing-chain file (docs/processing-chain.md) to a
copy of the scan and writes the result; the output records the chain and
its SHA-256 (metadata keys chain and chain_sha256). Warnings, such as a
low-pass cut-off inside the flaw band, go to standard error.

Examples:
  whorl process --chain bobbin.json -o R01C012-proc.csv R01C012.csv
  whorl process --chain bobbin.json --json -o out.csv in.csv`,
		setFlags: func(fs *flag.FlagSet) {
			fs.String("chain", "", "processing chain `file` (required)")
			fs.String("o", "", "output scan `file` (required)")
			fs.Bool("json", false, "print the result summary as JSON")
		},
		run: runProcess,
	})
	register(&command{
		name:     "mix train",
		synopsis: "train a multi-frequency mix on a window of a scan (e.g. the support ring)",
		usage:    "whorl mix train --primary CH --with CH [--with CH] --window START:END[,START:END] [--form affine|rotate-scale] [--flaw START:END] [--json] -o MIX.json SCAN.csv",
		help: `Fits the least-squares mix that removes from the primary channel what one
or two other channels predict over the training windows. Windows are
half-open sample ranges (120:180) or positions or times with units
(1.20m:1.26m, 0.5s:0.6s). Prints the quality figures: Vpp in each window
before and after, the residual ratio and the condition number; with
--flaw, also the largest support residual relative to that flaw's Vpp in
the mix (it should be small against the smallest reportable flaw).

Examples:
  whorl mix train --primary 400k-diff --with 100k-diff --window 0.62m:0.68m --flaw 0.38m:0.42m -o support.json cal.csv
  whorl mix train --primary 400k-diff --with 100k-diff --with 20k-abs --window 400:520,900:960 --form rotate-scale -o mix.json cal.csv`,
		setFlags: func(fs *flag.FlagSet) {
			fs.String("primary", "", "primary `channel` (required)")
			fs.Var(&stringList{}, "with", "other `channel` (repeat for a second)")
			fs.String("window", "", "training windows START:END[,START:END] (required)")
			fs.String("form", "affine", "mix form: affine or rotate-scale")
			fs.String("flaw", "", "window START:END of a reference flaw (e.g. the 20% FBH) for the residual-to-flaw ratio")
			fs.String("o", "", "output mix `file` (required)")
			fs.Bool("json", false, "print the mix as JSON")
		},
		run: runMixTrain,
	})
	register(&command{
		name:     "mix apply",
		synopsis: "apply a trained mix to a scan, adding the mix channel",
		usage:    "whorl mix apply --mix MIX.json [--name CH] [--json] -o OUT.csv SCAN.csv",
		help: `Adds the mix channel (default name mix-<primary>) computed with a trained
mix file to a copy of the scan and prints the mix's quality figures.

Examples:
  whorl mix apply --mix support.json -o R01C012-mix.csv R01C012.csv
  whorl mix apply --mix support.json --name mix-1 -o out.csv in.csv`,
		setFlags: func(fs *flag.FlagSet) {
			fs.String("mix", "", "trained mix `file` (required)")
			fs.String("name", "", "name of the mix channel (default mix-<primary>)")
			fs.String("o", "", "output scan `file` (required)")
			fs.Bool("json", false, "print the mix as JSON")
		},
		run: runMixApply,
	})
	register(&command{
		name:     "spectrum",
		synopsis: "noise power spectral density of a channel (Welch), CSV and PNG",
		usage:    "whorl spectrum --channel CH [--window START:END] [--segment N] [--axis auto|time|position] [--json] -o PSD.csv [--png PSD.png] SCAN.csv",
		help: `Estimates the one-sided power spectral density of a channel (X and Y
summed) by Welch's method: Hann-windowed segments (symmetric window) with
50 % overlap, in V²/Hz for a time-sampled scan or V²·m for an axially
resampled one (by default a scan with an axial step is analysed against
position; --axis time uses the nominal sample rate).
Choose a window free of indications for a noise spectrum.

Examples:
  whorl spectrum --channel 400k-diff -o psd.csv scan.csv
  whorl spectrum --channel 400k-diff --window 0.2m:0.9m --png psd.png -o psd.csv scan.csv`,
		setFlags: func(fs *flag.FlagSet) {
			fs.String("channel", "", "`channel` to analyse (required)")
			fs.String("window", "", "part of the scan START:END (samples, or with a length/time unit)")
			fs.Int("segment", 256, "Welch segment length in samples (even)")
			fs.String("axis", "auto", "analyse against time (V²/Hz) or position (V²·m); auto: position when the scan has an axial step")
			fs.String("o", "", "output CSV `file` (required)")
			fs.String("png", "", "also draw the spectrum to this PNG `file`")
			fs.Bool("json", false, "print the spectrum as JSON")
		},
		run: runSpectrum,
	})
}

// inputs returns the command's one input file and the values of its
// required string flags, in the order named.
func inputs(fs *flag.FlagSet, args []string, required ...string) (string, []string, error) {
	if len(args) != 1 {
		return "", nil, usagef("expected one input file, got %d", len(args))
	}
	vals := make([]string, len(required))
	for i, name := range required {
		if vals[i] = flagString(fs, name); vals[i] == "" {
			return "", nil, usagef("--%s is required", name)
		}
	}
	return args[0], vals, nil
}

func runDemod(ctx context.Context, e *env, fs *flag.FlagSet, args []string) error {
	in, req, err := inputs(fs, args, "o")
	if err != nil {
		return err
	}
	out := req[0]
	var opt dsp.DemodOptions
	if opt.OutputRateHz, _, err = flagQuantity(fs, "rate", units.Frequency); err != nil {
		return err
	}
	if opt.LowpassHz, _, err = flagQuantity(fs, "lowpass", units.Frequency); err != nil {
		return err
	}
	if opt.SettleS, _, err = flagQuantity(fs, "settle", units.Time); err != nil {
		return err
	}
	if opt.CoilLengthM, _, err = flagQuantity(fs, "coil-length", units.Length); err != nil {
		return err
	}
	opt.Order = flagInt(fs, "order")
	if opt.Workers = flagInt(fs, "workers"); opt.Workers < 1 {
		return usagef("--workers %d: expected at least 1", opt.Workers)
	}
	if opt.Order < 1 || opt.Order > 16 {
		return usagef("--order %d: expected 1 to 16", opt.Order)
	}
	rec, err := acquire.ReadRawFile(in)
	if err != nil {
		return dataError(err)
	}
	scan, rep, err := dsp.Demodulate(rec, opt)
	if err != nil {
		return dataError(fmt.Errorf("%s: %w", in, err))
	}
	if err := acquire.WriteScanFile(out, scan); err != nil {
		return err
	}
	for _, w := range rep.Warnings {
		fmt.Fprintf(e.stderr, "warning: %s\n", w)
	}
	if flagBool(fs, "json") {
		return writeJSON(e.stdout, rep)
	}
	lp := "no low-pass"
	if rep.LowpassHz > 0 {
		lp = fmt.Sprintf("zero-phase low-pass %g Hz, order %d", rep.LowpassHz, rep.Order)
	}
	if rep.SlotS > 0 {
		lp = fmt.Sprintf("multiplexed, slot %g s, %g s settling discarded, %s", rep.SlotS, rep.SettleS, lp)
	}
	fmt.Fprintf(e.stdout, "%s: %d samples at %g Hz → %d samples at %g Hz (%s)\n",
		in, len(rec.VoltageV), rep.InputRateHz, scan.Len(), rep.OutputRateHz, lp)
	for _, t := range rep.Tones {
		if t.ReferenceRecorded {
			fmt.Fprintf(e.stdout, "  %-14s %10g Hz  reference %.4g V at %.3f°\n", t.Channel, t.FreqHz, t.ReferenceAmplitudeV, t.ReferencePhaseRad*180/math.Pi)
		} else {
			fmt.Fprintf(e.stdout, "  %-14s %10g Hz  no reference recorded: estimated reference phase %.3f°\n", t.Channel, t.FreqHz, t.EstimatedPhaseRad*180/math.Pi)
		}
	}
	fmt.Fprintf(e.stdout, "wrote %s\n", out)
	return nil
}

func runProcess(ctx context.Context, e *env, fs *flag.FlagSet, args []string) error {
	in, req, err := inputs(fs, args, "chain", "o")
	if err != nil {
		return err
	}
	cp, out := req[0], req[1]
	chain, err := dsp.LoadChain(cp)
	if err != nil {
		return dataError(err)
	}
	scan, err := acquire.ReadScanFile(in)
	if err != nil {
		return dataError(err)
	}
	res, warns, err := chain.ApplyWarn(scan)
	if err != nil {
		return dataError(fmt.Errorf("%s: %w", in, err))
	}
	if err := acquire.WriteScanFile(out, res); err != nil {
		return err
	}
	for _, w := range warns {
		fmt.Fprintf(e.stderr, "warning: %s\n", w)
	}
	var names []string
	for _, c := range res.Channels {
		names = append(names, c.Name)
	}
	if flagBool(fs, "json") {
		return writeJSON(e.stdout, map[string]any{
			"input": in, "output": out, "chain": cp, "chain_name": chain.Name,
			"chain_sha256": dsp.ChainSHA256(res), "steps": len(chain.Steps),
			"samples": res.Len(), "channels": names, "warnings": warns,
		})
	}
	fmt.Fprintf(e.stdout, "%s: %d steps of chain %q (sha256 %s)\n", in, len(chain.Steps), chain.Name, dsp.ChainSHA256(res))
	fmt.Fprintf(e.stdout, "  %d samples, channels %s\nwrote %s\n", res.Len(), strings.Join(names, ", "), out)
	return nil
}

func channelOf(s *acquire.Scan, name, file string) (*acquire.Channel, error) {
	c := s.Channel(name)
	if c == nil {
		var names []string
		for _, ch := range s.Channels {
			names = append(names, ch.Name)
		}
		return nil, fmt.Errorf("%s: no channel %q (channels: %s)", file, name, strings.Join(names, ", "))
	}
	return c, nil
}

func printMix(w io.Writer, m *dsp.Mix) {
	fmt.Fprintf(w, "mix %s: primary %s, with %s\n", m.Form, m.Primary, strings.Join(m.Others, ", "))
	for k, a := range m.Matrices {
		fmt.Fprintf(w, "  A%d = [[%.6g %.6g] [%.6g %.6g]]\n", k+1, a[0][0], a[0][1], a[1][0], a[1][1])
		if m.Form == dsp.MixRotateScale {
			fmt.Fprintf(w, "      gain %.6g, rotation %.3f°\n", math.Hypot(a[0][0], a[1][0]), math.Atan2(a[1][0], a[0][0])*180/math.Pi)
		}
	}
	fmt.Fprintf(w, "  offset %.6g, %.6g V\n", m.OffsetV[0], m.OffsetV[1])
	for _, win := range m.Windows {
		ratio := math.NaN()
		if win.PrimaryVppV > 0 {
			ratio = win.ResidualVppV / win.PrimaryVppV
		}
		fmt.Fprintf(w, "  window %d:%d  Vpp before %.4g V, after %.4g V (%.1f %%)\n", win.Start, win.End, win.PrimaryVppV, win.ResidualVppV, 100*ratio)
	}
	fmt.Fprintf(w, "  residual ratio %.4g, condition number %.4g, %d training samples\n", m.ResidualRatio, m.ConditionNumber, m.TrainingSamples)
	if r := m.Reference; r != nil {
		fmt.Fprintf(w, "  reference flaw %d:%d: Vpp %.4g V in the mix; largest support residual is %.1f %% of it\n", r.Start, r.End, r.ResidualVppV, 100*m.ReferenceRatio)
	}
}

func runMixTrain(ctx context.Context, e *env, fs *flag.FlagSet, args []string) error {
	in, req, err := inputs(fs, args, "primary", "window", "o")
	if err != nil {
		return err
	}
	primary, spec, out := req[0], req[1], req[2]
	with := flagStrings(fs, "with")
	if len(with) < 1 || len(with) > 2 {
		return usagef("--with: expected one or two other channels, got %d", len(with))
	}
	form, err := dsp.ParseMixForm(flagString(fs, "form"))
	if err != nil {
		return usagef("--form: %v", err)
	}
	scan, err := acquire.ReadScanFile(in)
	if err != nil {
		return dataError(err)
	}
	p, err := channelOf(scan, primary, in)
	if err != nil {
		return dataError(err)
	}
	var others [][]complex128
	for _, w := range with {
		c, err := channelOf(scan, w, in)
		if err != nil {
			return dataError(err)
		}
		others = append(others, c.Samples)
	}
	wins, err := dsp.ParseWindows(spec, scan)
	if err != nil {
		return usagef("--window: %v", err)
	}
	m, err := dsp.TrainMix(form, p.Samples, others, wins)
	if err != nil {
		return dataError(fmt.Errorf("%s: %w", in, err))
	}
	if spec := flagString(fs, "flaw"); spec != "" {
		fw, err := dsp.ParseWindows(spec, scan)
		if err != nil || len(fw) != 1 {
			if err == nil {
				err = errors.New("expected one START:END range")
			}
			return usagef("--flaw: %v", err)
		}
		if err := m.SetReference(p.Samples, others, fw[0]); err != nil {
			return dataError(fmt.Errorf("%s: %w", in, err))
		}
	}
	m.Primary, m.Others = primary, with
	b, err := json.MarshalIndent(m, "", "  ")
	if err != nil {
		return err
	}
	if err := os.WriteFile(out, append(b, '\n'), 0o644); err != nil {
		return err
	}
	if flagBool(fs, "json") {
		return writeJSON(e.stdout, m)
	}
	printMix(e.stdout, m)
	fmt.Fprintf(e.stdout, "wrote %s\n", out)
	return nil
}

func runMixApply(ctx context.Context, e *env, fs *flag.FlagSet, args []string) error {
	in, req, err := inputs(fs, args, "mix", "o")
	if err != nil {
		return err
	}
	mp, out := req[0], req[1]
	mb, err := os.ReadFile(mp)
	if err != nil {
		return dataError(err)
	}
	m, err := dsp.ParseMix(mb)
	if err != nil {
		return dataError(fmt.Errorf("%s: %w", mp, err))
	}
	if m.Primary == "" || len(m.Others) != len(m.Matrices) {
		return dataError(fmt.Errorf("%s: the mix does not name its primary and other channels", mp))
	}
	scan, err := acquire.ReadScanFile(in)
	if err != nil {
		return dataError(err)
	}
	name := flagString(fs, "name")
	if name == "" {
		name = "mix-" + m.Primary
	}
	if scan.Channel(name) != nil {
		return usagef("--name: channel %q already exists in %s", name, in)
	}
	ch, err := dsp.ApplyMixToScan(scan, m, name)
	if err != nil {
		return dataError(fmt.Errorf("%s: %w", in, err))
	}
	res := *scan
	res.Channels = append(append([]acquire.Channel(nil), scan.Channels...), ch)
	res.Meta.Extra = map[string]string{}
	for k, v := range scan.Meta.Extra {
		res.Meta.Extra[k] = v
	}
	var compact bytes.Buffer
	if err := json.Compact(&compact, mb); err != nil {
		return dataError(fmt.Errorf("%s: %w", mp, err))
	}
	res.Meta.Extra["mix."+name] = compact.String()
	if err := acquire.WriteScanFile(out, &res); err != nil {
		return err
	}
	if flagBool(fs, "json") {
		return writeJSON(e.stdout, map[string]any{"output": out, "channel": name, "mix": m})
	}
	printMix(e.stdout, m)
	fmt.Fprintf(e.stdout, "added channel %s; wrote %s\n", name, out)
	return nil
}

func runSpectrum(ctx context.Context, e *env, fs *flag.FlagSet, args []string) error {
	in, req, err := inputs(fs, args, "channel", "o")
	if err != nil {
		return err
	}
	name, out := req[0], req[1]
	scan, err := acquire.ReadScanFile(in)
	if err != nil {
		return dataError(err)
	}
	c, err := channelOf(scan, name, in)
	if err != nil {
		return dataError(err)
	}
	z := c.Samples
	win := [2]int{0, len(z)}
	if spec := flagString(fs, "window"); spec != "" {
		ws, err := dsp.ParseWindows(spec, scan)
		if err != nil {
			return usagef("--window: %v", err)
		}
		if len(ws) != 1 {
			return usagef("--window: expected one START:END range")
		}
		win = ws[0]
	}
	// By default a uniform axial grid is preferred: encoder-triggered
	// samples are uniform in position while their times follow the probe.
	rate, xLabel, unit := scan.SampleRateHz, "Frequency (Hz)", "V²/Hz"
	switch axis := flagString(fs, "axis"); {
	case axis == "position" || (axis == "auto" && scan.AxialStepM > 0):
		if !(scan.AxialStepM > 0) {
			return dataError(fmt.Errorf("%s: the scan has no axial step (resample it first)", in))
		}
		rate, xLabel, unit = 1/scan.AxialStepM, "Spatial frequency (cycles/m)", "V²·m"
	case axis != "time" && axis != "auto":
		return usagef("--axis %q: expected auto, time or position", axis)
	case !(rate > 0):
		return dataError(fmt.Errorf("%s: the scan has no sample rate", in))
	}
	seg := flagInt(fs, "segment")
	n := win[1] - win[0]
	if seg > n {
		seg = n - n%2
	}
	f, p, err := dsp.WelchPSDComplex(z[win[0]:win[1]], rate, dsp.WelchOptions{SegmentLen: seg})
	if err != nil {
		return dataError(fmt.Errorf("%s: channel %s: %w", in, name, err))
	}
	var sb strings.Builder
	fmt.Fprintf(&sb, "# whorl spectrum of %s, channel %s, samples %d:%d, Welch: Hann (symmetric) segments of %d, 50%% overlap, one-sided, X and Y summed\n", in, name, win[0], win[1], seg)
	col := "freq_hz"
	if unit == "V²·m" {
		col = "freq_per_m"
	}
	fmt.Fprintf(&sb, "%s,psd_%s\n", col, map[string]string{"V²/Hz": "v2_per_hz", "V²·m": "v2_m"}[unit])
	var total float64
	for k := range f {
		fmt.Fprintf(&sb, "%s,%s\n", strconv.FormatFloat(f[k], 'g', 10, 64), strconv.FormatFloat(p[k], 'g', 10, 64))
		if k > 0 {
			total += p[k] * (f[1] - f[0])
		}
	}
	if err := os.WriteFile(out, []byte(sb.String()), 0o644); err != nil {
		return err
	}
	if png := flagString(fs, "png"); png != "" {
		if err := plotPSD(png, f, p, xLabel, unit, fmt.Sprintf("%s %s (samples %d:%d)", c.Name, scan.Meta.Component, win[0], win[1])); err != nil {
			return err
		}
	}
	rms := math.Sqrt(total)
	if flagBool(fs, "json") {
		return writeJSON(e.stdout, map[string]any{"channel": name, "window": win, "segment": seg, "unit": unit,
			"freq": f, "psd": p, "rms_v_excluding_dc": rms})
	}
	binUnit := "Hz"
	if unit == "V²·m" {
		binUnit = "cycles/m"
	}
	fmt.Fprintf(e.stdout, "%s %s: %d bins, bin width %.4g %s, RMS (excluding 0) %.4g V\nwrote %s\n", in, name, len(f), f[1]-f[0], binUnit, rms, out)
	return nil
}

// plotPSD draws the spectrum on a logarithmic power axis.
func plotPSD(path string, f, p []float64, xLabel, unit, title string) error {
	pl := plot.New()
	pl.Title.Text = title
	pl.X.Label.Text = xLabel
	pl.Y.Label.Text = "PSD (" + unit + ")"
	pl.Y.Scale = plot.LogScale{}
	pl.Y.Tick.Marker = plot.LogTicks{Prec: 1}
	floor := math.Inf(1)
	for _, v := range p[1:] {
		if v > 0 {
			floor = math.Min(floor, v)
		}
	}
	if math.IsInf(floor, 1) {
		return errors.New("spectrum is zero everywhere: nothing to plot on a logarithmic axis")
	}
	xy := make(plotter.XYs, 0, len(f)-1)
	for k := 1; k < len(f); k++ {
		xy = append(xy, plotter.XY{X: f[k], Y: math.Max(p[k], floor)})
	}
	line, err := plotter.NewLine(xy)
	if err != nil {
		return err
	}
	pl.Add(plotter.NewGrid(), line)
	return pl.Save(7*vg.Inch, 4.5*vg.Inch, path)
}
