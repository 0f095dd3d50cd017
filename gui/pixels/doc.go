// Package pixels rasterises the workstation's plots (strip charts,
// impedance plane, curves) into RGBA images without any toolkit, so that
// the drawing code can be benchmarked and tested on its own. Text labels
// are not drawn here: the views place them over the images.
//
// Conventions: pixel (0, 0) is the top-left corner; values grow upwards on
// the vertical axis; colours are non-premultiplied color.NRGBA and blended
// with their alpha over what is already drawn.
package pixels
