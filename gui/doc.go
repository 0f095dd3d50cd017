// Package gui is the Whorl desktop workstation built with Fyne: the review
// desk (component list, strip charts, impedance plane, measurement and
// calls), the calibration desk, the coil-model explorer and the report
// desk. It holds views only; their state and behaviour live in package
// gui/viewmodel and the drawing of plots in package gui/pixels, and every
// result comes from the same packages the command line uses.
//
// The package does not import fyne.io/fyne/v2/app, so it builds and its
// tests run without cgo, OpenGL or a display (Fyne's test driver). The
// window itself is created by the command `whorl gui`.
//
// Long work runs in goroutines; results reach the widgets through fyne.Do.
//
// Channel colours follow the palette of M. Okabe and K. Ito, "Color
// Universal Design (CUD): How to make figures and presentations that are
// friendly to colorblind people" (J*Fly, 2008), chosen to stay distinct
// for the common forms of colour-vision deficiency.
package gui
