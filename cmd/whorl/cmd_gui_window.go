//go:build cgo && !nogui

package main

import (
	"context"
	"errors"
	"fmt"
	"runtime"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/app"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/widget"

	"whorl/gui"
	"whorl/gui/source"
	"whorl/gui/viewmodel"
	"whorl/internal/version"
)

// startGUI opens the window, signs the person in when the environment did
// not name them, opens the inspection in the background and runs the
// window until it is closed or ctx is cancelled.
func startGUI(ctx context.Context, e *env, c *guiConfig) (err error) {
	if runtime.GOOS != "darwin" && runtime.GOOS != "windows" && e.getenv("DISPLAY") == "" && e.getenv("WAYLAND_DISPLAY") == "" {
		return errors.New("no display: set DISPLAY (X11) or WAYLAND_DISPLAY, or run under xvfb-run for a virtual one")
	}
	// The desktop driver panics when it cannot open the display: report
	// that as an error.
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("the desktop window could not start: %v", r)
		}
	}()
	a := app.NewWithID("org.whorl.workstation")
	variant := gui.Dark
	if c.theme == "light" {
		variant = gui.Light
	}
	a.Settings().SetTheme(&gui.Theme{Variant: variant})
	w := a.NewWindow(fmt.Sprintf("%s %s", version.Name, version.String()))
	w.Resize(fyne.NewSize(c.width, c.height))
	var (
		src   viewmodel.Source
		shell *gui.Shell
		fail  error
	)
	open := func(actor viewmodel.Actor) {
		what := "the demo inspection (built on first use, a few seconds)"
		if len(c.paths) > 0 {
			what = fmt.Sprint(c.paths)
		}
		w.SetContent(container.NewCenter(widget.NewLabel("opening " + what + " …")))
		go func() {
			s, err := source.Open(ctx, source.Options{Paths: c.paths, Actor: actor, DemoDir: c.demoDir, Now: e.now})
			fyne.Do(func() {
				if err != nil {
					fail = err
					msg := widget.NewLabel("Could not open the inspection:\n" + err.Error())
					msg.Wrapping = fyne.TextWrapWord
					msg.Importance = widget.DangerImportance
					w.SetContent(container.NewPadded(container.NewVBox(msg, widget.NewButton("close", w.Close))))
					return
				}
				src = s
				shell = gui.NewShell(w, s, gui.Options{Variant: variant, Desk: c.desk, ReportDir: c.reportDir,
					Model: source.NewCoilModel(), ModelParams: gui.DefaultModelParams()})
				if e.getenv("WHORL_GUI_ABOUT") != "" { // documentation screenshots
					shell.ShowAbout()
				}
			})
		}()
	}
	if c.signIn {
		gui.SignIn(w, open)
	} else {
		open(c.actor)
	}
	go func() {
		<-ctx.Done()
		fyne.Do(a.Quit)
	}()
	w.ShowAndRun()
	if shell != nil {
		shell.Close()
	}
	if src != nil {
		if err := src.Close(); err != nil && fail == nil {
			fail = err
		}
	}
	if fail != nil {
		return dataError(fail)
	}
	return ctx.Err()
}
