package main

import (
	"context"
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"whorl/gui/viewmodel"
)

// guiConfig is the parsed command line of `whorl gui`.
type guiConfig struct {
	paths     []string
	actor     viewmodel.Actor
	signIn    bool // no identity in the environment: ask in the window
	desk      string
	theme     string
	width     float32
	height    float32
	reportDir string
	demoDir   string
}

func init() {
	register(&command{
		name:     "gui",
		synopsis: "open the desktop workstation on an inspection, scan files or the demo",
		usage:    "whorl gui [flags] [INSPECTION.db | SCAN.csv...]",
		help: `Opens the workstation window. With an inspection database it reviews the
recorded inspection; with scan files it shows those scans; with nothing
it opens the demo inspection (generated on first use under --demo-dir).

The person at the workstation is taken from WHORL_USER and WHORL_ROLE
(level1, level2, level3 or qa); when either is missing a sign-in form
asks for them. Every call and approval is recorded under that name.

Desks: review (F2), calibration (F3), coil model (F4), report (F5); F1
lists the keyboard shortcuts. See docs/gui.md.

This command needs a build with cgo and the OpenGL/X11 headers (the
default on a desktop with the packages listed in README.md). A build made
with CGO_ENABLED=0 or -tags nogui has every other command but not this one.

Examples:
  whorl gui
  WHORL_USER="analyst-2a" WHORL_ROLE=level2 whorl gui inspection.db
  whorl gui --desk calibration --theme light --size 1366x768
  whorl gui scans/R03C017.csv scans/R03C018.csv`,
		setFlags: func(fs *flag.FlagSet) {
			fs.String("desk", "review", "desk to show first: review, calibration, model or report")
			fs.String("theme", "dark", "colour theme: dark or light")
			fs.String("size", "1366x768", "window size in device-independent pixels, WIDTHxHEIGHT")
			fs.String("report-dir", "", "folder offered for report export (default: ./whorl-report)")
			fs.String("demo-dir", "", "folder of the generated demo inspection (default: the user cache folder)")
		},
		run: runGUI,
	})
}

// parseGUI reads and checks the command line and environment; it touches
// neither the display nor the inspection.
func parseGUI(e *env, fs *flag.FlagSet, args []string) (*guiConfig, error) {
	c := &guiConfig{paths: args, desk: flagString(fs, "desk"), theme: flagString(fs, "theme"),
		reportDir: flagString(fs, "report-dir"), demoDir: flagString(fs, "demo-dir")}
	switch c.desk {
	case "review", "calibration", "model", "report":
	default:
		return nil, usagef("--desk %q: expected review, calibration, model or report", c.desk)
	}
	if c.theme != "dark" && c.theme != "light" {
		return nil, usagef("--theme %q: expected dark or light", c.theme)
	}
	size := flagString(fs, "size")
	w, h, ok := strings.Cut(strings.ToLower(size), "x")
	wf, err1 := strconv.ParseFloat(w, 32)
	hf, err2 := strconv.ParseFloat(h, 32)
	if !ok || err1 != nil || err2 != nil || wf < 640 || hf < 480 || wf > 10000 || hf > 10000 {
		return nil, usagef("--size %q: expected WIDTHxHEIGHT of at least 640x480, e.g. 1366x768", size)
	}
	c.width, c.height = float32(wf), float32(hf)
	for _, p := range args {
		st, err := os.Stat(p)
		if err != nil {
			return nil, dataError(fmt.Errorf("open %s: %w", p, err))
		}
		if st.IsDir() {
			return nil, dataError(fmt.Errorf("open %s: is a folder; expected an inspection database or scan files", p))
		}
	}
	if len(args) > 1 {
		for _, p := range args {
			if strings.EqualFold(filepath.Ext(p), ".db") {
				return nil, usagef("%s: give one inspection database, or scan files only", p)
			}
		}
	}
	name, role := strings.TrimSpace(e.getenv("WHORL_USER")), strings.TrimSpace(e.getenv("WHORL_ROLE"))
	if name == "" || role == "" {
		c.signIn = true
	} else {
		r, err := viewmodel.ParseRole(role)
		if err != nil {
			return nil, usagef("WHORL_ROLE: %v", err)
		}
		c.actor = viewmodel.Actor{Name: name, Role: r}
	}
	if c.reportDir == "" {
		c.reportDir = "whorl-report"
	}
	if abs, err := filepath.Abs(c.reportDir); err == nil {
		c.reportDir = abs
	}
	if c.demoDir == "" {
		base, err := os.UserCacheDir()
		if err != nil {
			base = os.TempDir()
		}
		c.demoDir = filepath.Join(base, "whorl", "demo")
	}
	return c, nil
}

func runGUI(ctx context.Context, e *env, fs *flag.FlagSet, args []string) error {
	c, err := parseGUI(e, fs, args)
	if err != nil {
		return err
	}
	return startGUI(ctx, e, c)
}
