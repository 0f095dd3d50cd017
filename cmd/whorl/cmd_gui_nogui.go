//go:build !cgo || nogui

package main

import (
	"context"
	"errors"
)

// startGUI reports that this build has no window: the Fyne desktop driver
// needs cgo and the OpenGL/X11 headers.
func startGUI(ctx context.Context, e *env, c *guiConfig) error {
	return errors.New("this whorl was built without the desktop window (CGO_ENABLED=0 or -tags nogui); " +
		"build it with cgo and the OpenGL/X11 development packages to use 'whorl gui'")
}
