package gui

import (
	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/widget"
)

// escEntry is a one-line entry that gives the focus back to the window
// on Esc, so that the desk's single-key shortcuts work again.
type escEntry struct {
	widget.Entry
}

func newEscEntry() *escEntry {
	e := &escEntry{}
	e.ExtendBaseWidget(e)
	return e
}

// TypedKey unfocuses the entry on Esc and passes other keys on.
func (e *escEntry) TypedKey(ev *fyne.KeyEvent) {
	if ev.Name == fyne.KeyEscape {
		if c := fyne.CurrentApp().Driver().CanvasForObject(e); c != nil {
			c.Unfocus()
		}
		return
	}
	e.Entry.TypedKey(ev)
}
