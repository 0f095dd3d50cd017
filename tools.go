//go:build tools

// Package tools pins the modules that Whorl's packages depend on, so that
// `go mod tidy` keeps them while packages are being written.
package tools

import (
	_ "codeberg.org/go-pdf/fpdf"
	_ "fyne.io/fyne/v2/app"
	_ "fyne.io/fyne/v2/test"
	_ "github.com/mjibson/go-dsp/spectral"
	_ "gonum.org/v1/gonum/mat"
	_ "gonum.org/v1/plot"
	_ "modernc.org/sqlite"
)
