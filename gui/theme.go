package gui

import (
	"image/color"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/theme"

	"whorl/gui/pixels"
)

// Okabe–Ito palette (Okabe & Ito 2008; see the package documentation),
// as sRGB values.
var (
	okabeOrange     = color.NRGBA{0xE6, 0x9F, 0x00, 0xFF}
	okabeSkyBlue    = color.NRGBA{0x56, 0xB4, 0xE9, 0xFF}
	okabeGreen      = color.NRGBA{0x00, 0x9E, 0x73, 0xFF}
	okabeYellow     = color.NRGBA{0xF0, 0xE4, 0x42, 0xFF}
	okabeBlue       = color.NRGBA{0x00, 0x72, 0xB2, 0xFF}
	okabeVermillion = color.NRGBA{0xD5, 0x5E, 0x00, 0xFF}
	okabePurple     = color.NRGBA{0xCC, 0x79, 0xA7, 0xFF}
	okabeBlack      = color.NRGBA{0x00, 0x00, 0x00, 0xFF}
)

// Variant selects the workstation's dark or light colours.
type Variant int

// Theme variants.
const (
	Dark Variant = iota
	Light
)

// Theme is Whorl's own theme: a low-glare dark variant for long shifts and
// a light one for bright rooms. It implements fyne.Theme.
type Theme struct {
	Variant Variant
}

var _ fyne.Theme = (*Theme)(nil)

type palette struct {
	bg, panel, fg, dim, primary, onPrimary, input, hover, sel, sep, grid, axis, window, winEdge, landmark, chord color.NRGBA
	channels                                                                                                     []color.NRGBA
}

// Dark: a blue-grey slate with warm sand accents. Light: warm paper with
// deep ochre accents. Traces use Okabe–Ito colours ordered for contrast
// against each background.
var palettes = map[Variant]palette{
	Dark: {
		bg: rgb(0x1C, 0x21, 0x26), panel: rgb(0x23, 0x29, 0x30), fg: rgb(0xDC, 0xE1, 0xE6), dim: rgb(0x8A, 0x94, 0x9E),
		primary: rgb(0xD9, 0xA4, 0x41), onPrimary: rgb(0x1C, 0x21, 0x26), input: rgb(0x2A, 0x31, 0x39),
		hover: color.NRGBA{0xFF, 0xFF, 0xFF, 0x14}, sel: color.NRGBA{0xD9, 0xA4, 0x41, 0x40}, sep: rgb(0x33, 0x3B, 0x44),
		grid: rgb(0x35, 0x3E, 0x48), axis: rgb(0x5E, 0x6A, 0x76), window: color.NRGBA{0xD9, 0xA4, 0x41, 0x26},
		winEdge: rgb(0xD9, 0xA4, 0x41), landmark: rgb(0x9A, 0xA6, 0xB2), chord: rgb(0xF4, 0xF4, 0xF0),
		channels: []color.NRGBA{okabeSkyBlue, okabeOrange, okabeGreen, okabePurple, okabeYellow, okabeVermillion, okabeBlue, rgb(0xC8, 0xC8, 0xC8)},
	},
	Light: {
		bg: rgb(0xF3, 0xF1, 0xEC), panel: rgb(0xFB, 0xFA, 0xF7), fg: rgb(0x1F, 0x23, 0x28), dim: rgb(0x5F, 0x66, 0x6E),
		primary: rgb(0x8A, 0x5A, 0x00), onPrimary: rgb(0xFF, 0xFF, 0xFF), input: rgb(0xFF, 0xFF, 0xFF),
		hover: color.NRGBA{0x00, 0x00, 0x00, 0x10}, sel: color.NRGBA{0x8A, 0x5A, 0x00, 0x33}, sep: rgb(0xD6, 0xD2, 0xC8),
		grid: rgb(0xE0, 0xDC, 0xD2), axis: rgb(0xA8, 0xA2, 0x96), window: color.NRGBA{0x8A, 0x5A, 0x00, 0x1E},
		winEdge: rgb(0x8A, 0x5A, 0x00), landmark: rgb(0x6E, 0x74, 0x7A), chord: okabeBlack,
		channels: []color.NRGBA{okabeBlue, okabeVermillion, okabeGreen, okabePurple, okabeOrange, okabeSkyBlue, okabeBlack, rgb(0x5A, 0x5A, 0x5A)},
	},
}

func rgb(r, g, b uint8) color.NRGBA { return color.NRGBA{r, g, b, 0xFF} }

func (t *Theme) pal() palette { return palettes[t.Variant] }

// Color returns the theme colour of name; the variant argument is ignored
// because the workstation chooses its own variant.
func (t *Theme) Color(name fyne.ThemeColorName, _ fyne.ThemeVariant) color.Color {
	p := t.pal()
	switch name {
	case theme.ColorNameBackground:
		return p.bg
	case theme.ColorNameForeground:
		return p.fg
	case theme.ColorNamePrimary, theme.ColorNameFocus, theme.ColorNameHyperlink:
		return p.primary
	case theme.ColorNameForegroundOnPrimary:
		return p.onPrimary
	case theme.ColorNameButton:
		return p.input
	case theme.ColorNameInputBackground, theme.ColorNameMenuBackground, theme.ColorNameOverlayBackground:
		return p.input
	case theme.ColorNameHeaderBackground:
		return p.panel
	case theme.ColorNameInputBorder, theme.ColorNameSeparator:
		return p.sep
	case theme.ColorNameHover:
		return p.hover
	case theme.ColorNameSelection, theme.ColorNamePressed:
		return p.sel
	case theme.ColorNamePlaceHolder, theme.ColorNameDisabled:
		return p.dim
	case theme.ColorNameDisabledButton:
		return p.panel
	case theme.ColorNameError:
		return okabeVermillion
	case theme.ColorNameWarning:
		if t.Variant == Light {
			return rgb(0x9A, 0x52, 0x00) // Okabe–Ito orange darkened for contrast on paper
		}
		return okabeOrange
	case theme.ColorNameSuccess:
		return okabeGreen
	}
	v := theme.VariantDark
	if t.Variant == Light {
		v = theme.VariantLight
	}
	return theme.DefaultTheme().Color(name, v)
}

// Font returns Fyne's bundled fonts.
func (t *Theme) Font(s fyne.TextStyle) fyne.Resource { return theme.DefaultTheme().Font(s) }

// Icon returns Fyne's bundled icons.
func (t *Theme) Icon(n fyne.ThemeIconName) fyne.Resource { return theme.DefaultTheme().Icon(n) }

// Size returns slightly tighter paddings than Fyne's default so that the
// review desk fits 1366×768.
func (t *Theme) Size(n fyne.ThemeSizeName) float32 {
	switch n {
	case theme.SizeNamePadding:
		return 3
	case theme.SizeNameInnerPadding:
		return 6
	case theme.SizeNameText:
		return 13
	case theme.SizeNameCaptionText:
		return 11
	case theme.SizeNameSubHeadingText:
		return 15
	}
	return theme.DefaultTheme().Size(n)
}

// PlotStyle returns the colours of the plots for this theme.
func (t *Theme) PlotStyle() pixels.Style {
	p := t.pal()
	return pixels.Style{Background: p.bg, Plot: p.panel, Grid: p.grid, Axis: p.axis, Window: p.window,
		WindowEdge: p.winEdge, Landmark: p.landmark, Chord: p.chord, Channels: p.channels}
}

// dim returns the secondary text colour.
func (t *Theme) dim() color.NRGBA { return t.pal().dim }

// fg returns the text colour.
func (t *Theme) fg() color.NRGBA { return t.pal().fg }
