package gui

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"sync"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/widget"

	"whorl/gui/viewmodel"
)

// Caution is shown in the about box and whenever a report is exported.
const Caution = "Results are to be reviewed by qualified, certified personnel under a written procedure. " +
	"The governing code, local regulations and licensed practice take precedence."

// ReportDesk exports the inspection report (PDF) and the CSV and JSON exports.
type ReportDesk struct {
	src viewmodel.Source
	win fyne.Window

	Content fyne.CanvasObject

	dir    *escEntry
	export *widget.Button
	result *widget.Label
	status func(string, bool)
	// post runs its argument on the UI thread (fyne.Do by default).
	post func(func())
	jobs sync.WaitGroup
	// done is called (on the UI thread) after an export finished; for tests.
	done func(paths []string, err error)
}

// NewReportDesk builds the report desk; dir is the suggested output folder.
func NewReportDesk(src viewmodel.Source, win fyne.Window, dir string, status func(string, bool)) *ReportDesk {
	d := &ReportDesk{src: src, win: win, status: status, post: fyne.Do}
	d.dir = newEscEntry()
	d.dir.SetText(dir)
	d.export = widget.NewButton("export report…", d.confirm)
	d.export.Importance = widget.HighImportance
	d.result = widget.NewLabel("")
	d.result.Wrapping = fyne.TextWrapWord
	info := src.Info()
	head := widget.NewLabel("Report of " + info.Title)
	head.TextStyle = fyne.TextStyle{Bold: true}
	scope := widget.NewLabel("Writes report.pdf, indications.csv, indications.json, record.csv and record.json, as `whorl report` does. The report holds the identification, the calibration summary with its curves and group checks, " +
		"the scope, every reportable indication with its figures, the people and their roles, and the record's chain head. " +
		"Results of invalid calibration groups are left out and listed for re-test.")
	scope.Wrapping = fyne.TextWrapWord
	caution := widget.NewLabel("Caution: " + Caution)
	caution.Wrapping = fyne.TextWrapWord
	caution.Importance = widget.WarningImportance
	caution.TextStyle = fyne.TextStyle{Bold: true}
	form := widget.NewForm(widget.NewFormItem("output folder", d.dir))
	d.Content = container.NewPadded(container.NewVBox(head, scope, form, caution, container.NewHBox(d.export), d.result))
	return d
}

// confirm shows the caution and exports on agreement.
func (d *ReportDesk) confirm() {
	if d.win == nil {
		d.Export()
		return
	}
	msg := widget.NewLabel("Caution: " + Caution + "\n\nExport the report of this inspection to\n" + d.dir.Text + " ?")
	msg.Wrapping = fyne.TextWrapWord
	dlg := dialog.NewCustomConfirm("Export report", "export", "cancel", container.NewGridWrap(fyne.NewSize(460, 150), msg), func(ok bool) {
		if ok {
			d.Export()
		}
	}, d.win)
	dlg.Show()
}

// Export writes the chosen formats into the folder in the background.
func (d *ReportDesk) Export() {
	dir := strings.TrimSpace(d.dir.Text)
	if dir == "" {
		d.result.SetText("choose an output folder")
		return
	}
	d.export.Disable()
	d.result.SetText("writing the report…")
	d.jobs.Add(1)
	go func() {
		defer d.jobs.Done()
		var paths []string
		err := os.MkdirAll(dir, 0o755)
		if err == nil {
			paths, err = d.src.Export(context.Background(), dir)
		}
		d.post(func() {
			d.export.Enable()
			if err != nil {
				d.result.SetText("export failed: " + err.Error())
				if d.status != nil {
					d.status("export failed: "+err.Error(), true)
				}
			} else {
				var b strings.Builder
				b.WriteString("written:\n")
				for _, p := range paths {
					b.WriteString("  " + filepath.Clean(p) + "\n")
				}
				b.WriteString("\nCaution: " + Caution)
				d.result.SetText(b.String())
				if d.status != nil {
					d.status("report exported to "+dir, false)
				}
			}
			if d.done != nil {
				d.done(paths, err)
			}
		})
	}()
}
