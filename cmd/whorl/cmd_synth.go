package main

import (
	"context"
	"flag"
	"fmt"
	"sort"
	"time"

	"whorl/internal/workflow"
	"whorl/synth"
	"whorl/units"
)

func init() {
	register(&command{
		name:     "synth",
		synopsis: "generate an invented demo inspection (scans, calibration standard, raw recordings, ground truth)",
		usage:    "whorl synth [--set demo|alternate] [--tubes N] [--seed N] [--length L] [--groups N] [--drifted-group N] [--raw N] [--flaw-rate X] [--json] DIR",
		help: `Writes an invented inspection made by Whorl's physics-based, seeded generator
(docs/demo-scenario.md) into DIR: scans/<tube>.csv, calibration/<group>-open.csv
and -close.csv, raw/*.csv, standard.json, truth.csv and manifest.json (written
last). The same seed and settings always give the same files. Tubes are
generated concurrently and streamed, so memory does not grow with --tubes.

--set demo is the Alloy 690 reboiler (288 tubes, 400/200/100/20 kHz, six
groups, the fourth failing its closing check); --set alternate is the 90/10
Cu-Ni cooler (96 tubes, 50/25/12/3 kHz). The other flags change that set;
--length re-spaces the supports evenly at about the same pitch.

The data are invented: no real plant, component, product or person.

Examples:
  whorl synth /tmp/demo
  whorl synth --set alternate /tmp/alt
  whorl synth --tubes 10000 --length 20m --raw 0 --json /tmp/scale`,
		setFlags: func(fs *flag.FlagSet) {
			fs.String("set", "demo", "base data set: demo or alternate")
			fs.Int("tubes", 0, "number of tubes (default: the set's)")
			fs.Uint64("seed", 0, "random seed (default: the set's)")
			fs.String("length", "", "tube length, e.g. 20m (default: the set's)")
			fs.Int("groups", 0, "number of calibration groups (default: the set's)")
			fs.Int("drifted-group", -2, "index of the group whose closing calibration drifts, -1 for none (default: the set's)")
			fs.Int("raw", -1, "number of raw coil-voltage recordings (default: the set's)")
			fs.Float64("flaw-rate", -1, "factor on the rate of every condition (default: the set's)")
			fs.Bool("json", false, "print the manifest as JSON")
		},
		run: runSynth,
	})
}

func runSynth(ctx context.Context, e *env, fs *flag.FlagSet, args []string) error {
	if len(args) != 1 {
		return usagef("expected one output folder, got %d arguments", len(args))
	}
	var cfg synth.Config
	switch s := flagString(fs, "set"); s {
	case "demo":
		cfg = synth.Demo()
	case "alternate":
		cfg = synth.Alternate()
	default:
		return usagef("--set %q: expected demo or alternate", s)
	}
	if flagSet(fs, "tubes") {
		cfg.Tubes = flagInt(fs, "tubes")
	}
	if flagSet(fs, "seed") {
		cfg.Seed = flagValue(fs, "seed").(uint64)
	}
	if l, ok, err := flagQuantity(fs, "length", units.Length); err != nil {
		return err
	} else if ok {
		if !(l > 2*cfg.TubesheetM+0.3) || l > 50 {
			return usagef("--length %v m: expected more than %.2f m and at most 50 m", l, 2*cfg.TubesheetM+0.3)
		}
		cfg = cfg.WithLength(l)
	}
	if flagSet(fs, "groups") {
		cfg.Groups = flagInt(fs, "groups")
		if cfg.DriftedGroup >= cfg.Groups {
			cfg.DriftedGroup = cfg.Groups - 1
		}
	}
	if flagSet(fs, "drifted-group") {
		cfg.DriftedGroup = flagInt(fs, "drifted-group")
	}
	if flagSet(fs, "raw") {
		cfg.Raw = flagInt(fs, "raw")
	}
	if flagSet(fs, "flaw-rate") {
		cfg.FlawRate = flagFloat(fs, "flaw-rate")
	}
	if cfg.Groups > cfg.Tubes {
		cfg.Groups = cfg.Tubes
		cfg.DriftedGroup = min(cfg.DriftedGroup, cfg.Groups-1)
	}
	if err := cfg.Validate(); err != nil {
		return usagef("%v", err)
	}
	show := workflow.NewProgressPrinter(e.stderr, e.isTerminal, 2*time.Second, e.now)
	m, err := synth.Write(ctx, args[0], cfg, func(done, total int) {
		show(workflow.Progress{Stage: "generate", Done: done, Total: total})
	})
	if err != nil {
		return err
	}
	if flagBool(fs, "json") {
		return writeJSON(e.stdout, m)
	}
	w := e.stdout
	fmt.Fprintf(w, "Invented inspection written to %s (%s, seed %d)\n", args[0], m.Generator, m.Seed)
	fmt.Fprintf(w, "  %s, %s: %d tubes of %s %.2f × %.2f mm, %.2f m long\n", cfg.Plant, cfg.Component, cfg.Tubes,
		cfg.Tube.Alloy, cfg.Tube.OuterDiameterM*1e3, cfg.Tube.WallM*1e3, cfg.LengthM)
	fmt.Fprintf(w, "  channels: %v\n", m.Channels)
	drift := "none"
	for _, g := range m.Groups {
		if g.Drifted {
			drift = g.Name
		}
	}
	fmt.Fprintf(w, "  %d calibration groups (drifted closing: %s), standard %s, %d raw recordings\n", len(m.Groups), drift, m.Standard, len(m.Raw))
	kinds := make([]string, 0, len(m.Conditions))
	for k := range m.Conditions {
		kinds = append(kinds, k)
	}
	sort.Strings(kinds)
	fmt.Fprintf(w, "  ground truth (%s):", m.Truth)
	for _, k := range kinds {
		fmt.Fprintf(w, " %s %d", k, m.Conditions[k])
	}
	fmt.Fprintf(w, "\n  %.1f MB written\n", float64(m.Bytes)/1e6)
	return nil
}
