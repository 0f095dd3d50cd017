package gui

import (
	"image/color"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
)

// labels is the set of text objects a plot renderer places over its
// raster; the objects are pooled between refreshes.
type labels struct {
	texts []fyne.CanvasObject
	pool  []*canvas.Text
	used  int
}

// reset empties the set, keeping the pool.
func (l *labels) reset() { l.texts, l.used = l.texts[:0], 0 }

// text places s at (x, y) (top of the text) aligned left of x (align −1),
// centred on x (0) or right of x (+1), and returns its width.
func (l *labels) text(s string, x, y float32, align int, col color.Color, size float32, bold bool) float32 {
	var t *canvas.Text
	if l.used < len(l.pool) {
		t = l.pool[l.used]
	} else {
		t = canvas.NewText("", col)
		l.pool = append(l.pool, t)
	}
	l.used++
	t.Text, t.Color, t.TextSize, t.TextStyle = s, col, size, fyne.TextStyle{Bold: bold}
	ms := t.MinSize()
	switch align {
	case 0:
		x -= ms.Width / 2
	case 1:
		x -= ms.Width
	}
	t.Move(fyne.NewPos(x, y))
	t.Resize(ms)
	l.texts = append(l.texts, t)
	return ms.Width
}
