package reports

import (
	"bytes"
	"fmt"
	"io"
	"sort"
	"strconv"
	"strings"
	"time"

	"codeberg.org/go-fonts/liberation/liberationsansbold"
	"codeberg.org/go-fonts/liberation/liberationsansregular"
	"codeberg.org/go-pdf/fpdf"
	"gonum.org/v1/plot"

	"whorl/internal/version"
	"whorl/store"
)

// Caution is the safety caution every report carries.
const Caution = "Results in this report are to be reviewed by qualified, certified personnel " +
	"under a written procedure before any decision is taken on the equipment. The governing code, " +
	"local regulations and licensed practice take precedence over this report and over the software " +
	"that produced it. Results relate only to the items examined and the data recorded."

// Page geometry in millimetres (A4 portrait).
const (
	pageW      = 210.0
	pageH      = 297.0
	marginL    = 15.0
	marginTop  = 20.0
	marginBot  = 20.0
	bodyW      = pageW - 2*marginL
	maxCellLns = 12 // a table cell shows at most this many lines
)

type pdfw struct {
	f  *fpdf.Fpdf
	in *pdfInput
	id string // report ID as printed
}

// pdfInput is what the PDF draws: the head of the record, the reportable
// indications, and counts of the rest of the indications and of the
// events.
type pdfInput struct {
	*Inspection               // the head; its Indications and Events are not read
	reportable  []*Indication // in order of recording
	total       int           // indications recorded
	rejected    int           // indications whose current call is rejected
	excluded    map[string]int
	kinds       map[string]int // events by item kind
	signed      map[string]int // events by actor
	// window loads a reportable indication's signal window when its
	// figures are drawn; nil uses Indication.Window.
	window func(d *Indication) (*Window, error)
}

// pdfFromInspection counts and selects what the PDF draws from in.
func pdfFromInspection(in *Inspection) *pdfInput {
	pi := &pdfInput{Inspection: in, total: len(in.Indications), excluded: map[string]int{}, kinds: map[string]int{}, signed: map[string]int{}}
	for i := range in.Indications {
		d := &in.Indications[i]
		switch {
		case d.Status == store.CallRejected:
			pi.rejected++
		case !d.Reportable():
			pi.excluded[d.Excluded]++
		default:
			pi.reportable = append(pi.reportable, d)
		}
	}
	for _, e := range in.Events {
		pi.kinds[e.ItemKind]++
		pi.signed[e.Actor]++
	}
	return pi
}

// WritePDF writes the inspection report as PDF. The creation date is the
// input's Generated time, so the same input gives the same text.
func WritePDF(w io.Writer, in *Inspection) error { return writePDF(w, pdfFromInspection(in)) }

func writePDF(w io.Writer, in *pdfInput) error {
	f := fpdf.New("P", "mm", "A4", "")
	p := &pdfw{f: f, in: in, id: pdfText(in.ReportID, false)}
	f.SetCreationDate(in.Generated)
	f.SetModificationDate(in.Generated)
	f.SetCatalogSort(true)
	f.AddUTF8FontFromBytes("sans", "", liberationsansregular.TTF)
	f.AddUTF8FontFromBytes("sans", "B", liberationsansbold.TTF)
	f.SetTitle("Inspection report "+p.id, true)
	f.SetAuthor(version.Name+" "+version.String(), true)
	f.SetCreator(version.Name+" "+version.String(), true)
	f.AliasNbPages("{nb}")
	f.SetMargins(marginL, marginTop, marginL)
	f.SetAutoPageBreak(true, marginBot)
	f.SetHeaderFunc(p.header)
	f.SetFooterFunc(p.footer)
	f.AddPage()
	p.build()
	if err := f.Error(); err != nil {
		return fmt.Errorf("write PDF: %w", err)
	}
	var b bytes.Buffer
	if err := f.Output(&b); err != nil {
		return fmt.Errorf("write PDF: %w", err)
	}
	_, err := w.Write(b.Bytes())
	return err
}

func (p *pdfw) font(style string, size float64) { p.f.SetFont("sans", style, size) }

// fitLine prints s on one line of width w, shrinking the font from size
// down to 4.5 pt if needed, and wrapping at 4.5 pt if it still does not fit.
func (p *pdfw) fitLine(s string, w, h float64, style string, size float64, align string) {
	for sz := size; ; sz -= 0.5 {
		p.font(style, sz)
		if p.f.GetStringWidth(s) <= w-2 || sz <= 4.5 {
			break
		}
	}
	if p.f.GetStringWidth(s) <= w-2 {
		p.f.CellFormat(w, h, s, "", 1, align, false, 0, "")
		return
	}
	p.f.MultiCell(w, 2.2, s, "", align, false)
}

func (p *pdfw) header() {
	p.f.SetXY(marginL, 8)
	p.font("", 8)
	p.f.SetTextColor(80, 80, 80)
	title := version.Name + " eddy-current inspection report"
	id := "Report " + p.id
	if p.f.GetStringWidth(title)+p.f.GetStringWidth(id)+6 <= bodyW {
		p.f.CellFormat(bodyW/2, 4, title, "", 0, "L", false, 0, "")
		p.f.CellFormat(bodyW/2, 4, id, "", 1, "R", false, 0, "")
	} else {
		p.fitLine(id, bodyW, 4, "", 8, "R")
	}
	y := p.f.GetY() + 1
	p.f.SetDrawColor(150, 150, 150)
	p.f.Line(marginL, y, marginL+bodyW, y)
	p.f.SetTextColor(0, 0, 0)
	p.f.SetDrawColor(0, 0, 0)
	p.f.SetY(marginTop)
}

func (p *pdfw) footer() {
	p.f.SetXY(marginL, pageH-14)
	p.f.SetTextColor(80, 80, 80)
	s := fmt.Sprintf("Report %s  -  page %d of {nb}", p.id, p.f.PageNo())
	if p.in.Draft {
		s += "  -  DRAFT, not released"
	}
	p.fitLine(s, bodyW, 4, "", 8, "C")
	p.f.SetTextColor(0, 0, 0)
}

// ensure starts a new page unless h millimetres fit above the bottom margin.
func (p *pdfw) ensure(h float64) {
	if p.f.GetY()+h > pageH-marginBot {
		p.f.AddPage()
	}
}

func (p *pdfw) heading(title string) {
	p.ensure(20)
	p.f.Ln(3)
	p.font("B", 12)
	p.f.CellFormat(bodyW, 7, title, "B", 1, "L", false, 0, "")
	p.f.Ln(1.5)
}

func (p *pdfw) para(s string, style string, size float64) {
	p.font(style, size)
	p.f.MultiCell(bodyW, size*0.45, pdfText(s, true), "", "L", false)
}

// kv prints label/value rows; values wrap.
func (p *pdfw) kv(rows [][2]string) {
	const lw = 48.0
	for _, r := range rows {
		p.font("", 9)
		lines := clipLines(p.f.SplitText(pdfText(r[1], false), bodyW-lw), maxCellLns)
		if len(lines) == 0 {
			lines = []string{""}
		}
		p.ensure(float64(len(lines)) * 4.6)
		y := p.f.GetY()
		p.font("B", 9)
		p.f.SetXY(marginL, y)
		p.f.CellFormat(lw, 4.6, r[0], "", 0, "L", false, 0, "")
		p.font("", 9)
		for i, l := range lines {
			p.f.SetXY(marginL+lw, y+float64(i)*4.6)
			p.f.CellFormat(bodyW-lw, 4.6, l, "", 0, "L", false, 0, "")
		}
		p.f.SetXY(marginL, y+float64(len(lines))*4.6)
	}
}

// clipLines keeps at most n lines, the last of them "…" when lines were
// cut. The exports keep the complete text.
func clipLines(lines []string, n int) []string {
	if len(lines) <= n {
		return lines
	}
	return append(lines[:n-1:n-1], "…")
}

// clipText keeps at most n runes of s, ending in "…" when cut.
func clipText(s string, n int) string {
	i := 0
	for j := range s {
		if i == n {
			return s[:j] + "…"
		}
		i++
	}
	return s
}

type column struct {
	title string
	w     float64
	align string
}

// table prints a table with a shaded header repeated on each page. Cell
// text wraps within its column (at most maxCellLns lines; the rest is cut
// with "…" and stays complete in the CSV and JSON exports).
func (p *pdfw) table(cols []column, rows [][]string) {
	const lh, size = 3.6, 7.5
	// split wraps each cell of r in its column: the lines and the row height.
	split := func(r []string, clean bool) ([][]string, float64) {
		cells := make([][]string, len(cols))
		n := 1
		for i, c := range cols {
			txt := ""
			if i < len(r) {
				txt = r[i]
			}
			if clean {
				txt = pdfText(txt, true)
			}
			cells[i] = clipLines(p.f.SplitText(txt, c.w), maxCellLns)
			n = max(n, len(cells[i]))
		}
		return cells, float64(n)*lh + 1.2
	}
	draw := func(cells [][]string, h float64, style string) {
		x, y := marginL, p.f.GetY()
		for i, c := range cols {
			p.f.Rect(x, y, c.w, h, style)
			for j, l := range cells[i] {
				p.f.SetXY(x, y+0.6+float64(j)*lh)
				p.f.CellFormat(c.w, lh, l, "", 0, c.align, false, 0, "")
			}
			x += c.w
		}
		p.f.SetXY(marginL, y+h)
	}
	titles := make([]string, len(cols))
	for i, c := range cols {
		titles[i] = c.title
	}
	drawHeader := func() {
		p.font("B", size)
		p.f.SetFillColor(225, 230, 238)
		cells, h := split(titles, false)
		draw(cells, h, "FD")
		p.font("", size)
	}
	p.ensure(3 * lh * 2)
	drawHeader()
	for _, r := range rows {
		cells, h := split(r, true)
		if p.f.GetY()+h > pageH-marginBot {
			p.f.AddPage()
			drawHeader()
		}
		draw(cells, h, "D")
	}
	p.f.Ln(2)
}

func fmtDate(t time.Time) string {
	if t.IsZero() {
		return ""
	}
	return t.UTC().Format("2006-01-02 15:04:05") + " UTC"
}

func (p *pdfw) build() {
	in := p.in
	p.font("B", 16)
	p.f.CellFormat(bodyW, 9, "Eddy-current inspection report", "", 1, "L", false, 0, "")
	p.f.Ln(1)
	status := "DRAFT: not released by QA. Not for use as the final record."
	for _, r := range in.Releases {
		if r.ReportID == in.ReportID {
			status = fmt.Sprintf("Released by %s (QA) on %s", r.By, fmtDate(r.At))
			if r.Note != "" {
				status += ": " + r.Note
			}
		}
	}
	verified := "does not verify"
	if in.Chain.OK {
		verified = "verified when this report was generated"
	}
	p.kv([][2]string{
		{"Report ID", in.ReportID},
		{"Status", status},
		{"Generated", fmtDate(in.Generated)},
		{"Record", fmt.Sprintf("%d events, chain head %s (%s)", in.Chain.Events, in.Chain.HeadHash, verified)},
	})
	p.f.Ln(3)
	p.font("B", 9)
	p.f.SetFillColor(255, 244, 214)
	p.f.MultiCell(bodyW, 4.4, "Caution. "+Caution, "1", "L", true)

	p.heading("1  Identification")
	r := in.Record
	p.kv([][2]string{
		{"Site", r.Site},
		{"Component", r.Component},
		{"Inspection", r.ID},
		{"Procedure", strings.TrimSpace(r.Procedure + " rev. " + r.ProcedureRev)},
		{"Code edition", r.CodeEdition},
		{"Equipment", r.Equipment},
		{"Probe", r.Probe},
		{"Reference standard", r.ReferenceSerial},
		{"Software", r.Software + " " + r.SoftwareVersion},
		{"Record opened", fmtDate(r.Created) + " by " + r.CreatedBy},
	})

	p.heading("2  People and roles")
	var rows [][]string
	for _, pe := range in.People {
		rows = append(rows, []string{pe.Name, roleName(pe.Role), pe.CertLevel, pe.CertExpiry, strconv.Itoa(p.signedCount(pe.Name))})
	}
	p.table([]column{{"Name", 50, "L"}, {"Role", 34, "L"}, {"Certification", 50, "L"}, {"Valid until", 26, "L"}, {"Events signed", 20, "R"}}, rows)

	p.calibrationSection()
	p.scopeSection()
	p.indicationSection()
	p.figureSection()
	p.recordSection()

	p.ensure(14)
	p.f.Ln(6)
	p.font("B", 11)
	p.f.MultiCell(bodyW, 6, "End of report "+p.id, "TB", "C", false)
}

func roleName(r store.Role) string {
	switch r {
	case store.RoleLevel1:
		return "Level I (acquisition)"
	case store.RoleLevel2:
		return "Level II (analyst)"
	case store.RoleLevel3:
		return "Level III"
	case store.RoleQA:
		return "QA (records)"
	}
	return string(r)
}

func (p *pdfw) signedCount(name string) int { return p.in.signed[name] }

func short(h string, n int) string {
	if len(h) > n {
		return h[:n]
	}
	return h
}

func (p *pdfw) calibrationSection() {
	in := p.in
	p.heading("3  Calibration")
	var rows [][]string
	for _, c := range in.Calibrations {
		appr := ""
		if c.Status == store.CalApproved {
			appr = c.Approver + "\n" + fmtDate(c.Approved)
		}
		rows = append(rows, []string{fmt.Sprintf("%s v%d", c.ID, c.Version), c.Note, c.Standard,
			c.Builder + "\n" + fmtDate(c.Built), appr, string(c.Status), short(c.SHA256, 16)})
	}
	if len(rows) == 0 {
		p.para("No calibration is recorded.", "", 9)
	} else {
		p.table([]column{{"Calibration", 22, "L"}, {"Description", 38, "L"}, {"Standard", 18, "L"}, {"Built by", 30, "L"},
			{"Approved by", 30, "L"}, {"Status", 16, "L"}, {"SHA-256 (first 16)", 26, "L"}}, rows)
	}
	// Curve plots, two to a row.
	const fw, fh = 88.0, 62.0
	col := 0
	for i := range in.Calibrations {
		c := &in.Calibrations[i]
		if len(c.Points) == 0 {
			continue
		}
		fig, err := curveFigure(c)
		if col == 0 {
			p.ensure(fh + 8)
		}
		x, y := marginL+float64(col)*(fw+4), p.f.GetY()
		p.font("", 8)
		p.f.SetXY(x, y)
		p.f.CellFormat(fw, 4, pdfText(fmt.Sprintf("%s v%d (%s)", c.ID, c.Version, c.Status), false), "", 0, "L", false, 0, "")
		if err != nil {
			p.f.SetXY(x, y+5)
			p.f.MultiCell(fw, 4, pdfText("Curve not drawn: "+err.Error(), false), "", "L", false)
		} else {
			p.drawFigure(fig, x, y+4.5, fw, fh)
		}
		col++
		if col == 2 {
			col = 0
			p.f.SetXY(marginL, y+fh+6)
		} else {
			p.f.SetXY(marginL, y)
		}
	}
	if col == 1 {
		p.f.SetXY(marginL, p.f.GetY()+fh+6)
	}

	p.font("B", 10)
	p.ensure(12)
	p.f.CellFormat(bodyW, 6, "Calibration-group checks", "", 1, "L", false, 0, "")
	rows = nil
	for _, g := range in.Groups {
		var checks []string
		for _, c := range g.Checks {
			pass := "fail"
			if c.Pass {
				pass = "pass"
			}
			checks = append(checks, fmt.Sprintf("%s %s: %s %s (expected %s ± %s) %s", c.Reference, c.Quantity,
				fmtNum(c.Measured), c.Unit, fmtNum(c.Expected), fmtNum(c.Tolerance), pass))
		}
		result := "valid"
		if !g.Valid {
			result = "INVALID"
		}
		if g.Reason != "" {
			result += "\n" + g.Reason
		}
		retest := strings.Join(g.Retest, ", ")
		if !g.Valid && retest == "" {
			retest = "none examined"
		}
		rows = append(rows, []string{g.Group, strconv.Itoa(g.Check), fmt.Sprintf("%s v%d", g.CalibrationID, g.CalibrationVersion),
			result, strings.Join(checks, "\n"), retest, g.By + "\n" + fmtDate(g.At)})
	}
	if len(rows) == 0 {
		p.para("No calibration-group check is recorded.", "", 9)
		return
	}
	p.table([]column{{"Group", 14, "L"}, {"Check", 11, "R"}, {"Calibration", 20, "L"}, {"Result", 27, "L"},
		{"Reference checks", 52, "L"}, {"Re-test", 28, "L"}, {"Recorded by", 28, "L"}}, rows)
}

func fmtNum(v float64) string { return strconv.FormatFloat(v, 'g', 6, 64) }

func statusText(s store.ComponentStatus) string {
	switch s {
	case store.StatusExamined:
		return "examined"
	case store.StatusNotExamined:
		return "not examined"
	case store.StatusInvalidGroup:
		return "invalid group: re-test"
	case store.StatusPending:
		return "no result recorded"
	}
	return string(s)
}

func (p *pdfw) scopeSection() {
	in := p.in
	p.heading("4  Scope")
	counts := map[store.ComponentStatus]int{}
	var examined []string
	var rows [][]string
	for _, c := range in.Components {
		counts[c.Status]++
		if c.Status == store.StatusExamined {
			examined = append(examined, c.ID)
			continue
		}
		rows = append(rows, []string{c.ID, statusText(c.Status), c.Reason, c.StatusBy})
	}
	p.para(fmt.Sprintf("%d components registered: %d examined, %d not examined, %d in an invalid calibration group (to be re-tested), %d with no result recorded.",
		len(in.Components), counts[store.StatusExamined], counts[store.StatusNotExamined], counts[store.StatusInvalidGroup],
		counts[store.StatusPending]), "", 9)
	p.f.Ln(2)
	if len(rows) > 0 {
		p.table([]column{{"Component", 26, "L"}, {"Status", 34, "L"}, {"Reason", 86, "L"}, {"Recorded by", 34, "L"}}, rows)
	}
	if len(examined) > 0 {
		p.para("Examined: "+strings.Join(examined, ", "), "", 8)
		p.f.Ln(2)
	}
	rows = nil
	for _, s := range in.Scans {
		rows = append(rows, []string{s.ID, s.Component, s.CalGroup, s.Path, strconv.FormatInt(s.SizeBytes, 10), s.SHA256})
	}
	if len(rows) > 0 {
		p.font("B", 10)
		p.ensure(12)
		p.f.CellFormat(bodyW, 6, "Raw data files", "", 1, "L", false, 0, "")
		p.table([]column{{"Scan", 24, "L"}, {"Component", 18, "L"}, {"Group", 14, "L"}, {"File", 46, "L"},
			{"Bytes", 16, "R"}, {"SHA-256", 62, "L"}}, rows)
	}
}

func depthText(d *Indication) string {
	if d.DepthPct == nil {
		return "not sized"
	}
	s := strconv.FormatFloat(*d.DepthPct, 'f', 0, 64)
	if d.Uncertainty != nil {
		s += " ± " + strconv.FormatFloat(*d.Uncertainty, 'f', 0, 64)
	}
	return s
}

func curveText(d *Indication) string {
	if d.CurveID == "" {
		return ""
	}
	return fmt.Sprintf("%s v%d", d.CurveID, d.CurveVersion)
}

func (p *pdfw) indicationSection() {
	in := p.in
	p.heading("5  Indications")
	var rows [][]string
	rejected, excluded := in.rejected, in.excluded
	for _, d := range in.reportable {
		rows = append(rows, []string{d.ID, d.Component, d.Location, d.Channel, strconv.FormatFloat(d.VppV, 'f', 2, 64),
			strconv.FormatFloat(degrees(d.PhaseRad), 'f', 0, 64), depthText(d), d.Class, d.Method, curveText(d), callLabel(d)})
	}
	p.para(fmt.Sprintf("%d indications recorded; %d reportable (listed below); %d rejected by analysts. "+
		"Location is from the named landmark; phase in degrees; depth in %%TW with its uncertainty.", in.total, len(rows), rejected), "", 8.5)
	if len(excluded) > 0 {
		reasons := make([]string, 0, len(excluded))
		for r := range excluded {
			reasons = append(reasons, r)
		}
		sort.Strings(reasons)
		for i, r := range reasons {
			reasons[i] = fmt.Sprintf("%d %s", excluded[r], r)
		}
		p.para("Not listed (kept in the record and in the CSV and JSON exports): "+strings.Join(reasons, "; ")+".", "", 8.5)
	}
	p.f.Ln(1.5)
	if len(rows) == 0 {
		return
	}
	p.table([]column{{"Indication", 20, "L"}, {"Tube", 13, "L"}, {"Location", 24, "L"}, {"Channel", 14, "L"},
		{"Vpp (V)", 11, "R"}, {"Phase (°)", 11, "R"}, {"%TW", 14, "R"}, {"Class", 20, "L"}, {"Method", 17, "L"},
		{"Curve", 14, "L"}, {"Analyst call", 22, "L"}}, rows)
}

func (p *pdfw) figureSection() {
	rep := p.in.reportable
	if len(rep) == 0 {
		return
	}
	p.heading("6  Indication signals")
	p.para("For each reportable indication: the impedance plane (Y against X, equal scales; the measurement window in dark blue) "+
		"and the strip chart (X and Y against sample; the measurement window between the dotted lines), with the call history.", "", 8.5)
	p.f.Ln(1)
	const fw, fh = 88.0, 64.0
	for _, d := range rep {
		if p.in.window != nil {
			// Loaded for this indication only, and dropped once drawn.
			w, err := p.in.window(d)
			if err != nil {
				p.f.SetError(err)
				return
			}
			dd := *d
			dd.Window = w
			d = &dd
		}
		var hist []string
		for _, c := range d.Calls {
			s := fmt.Sprintf("v%d %s: %s, class %s, by %s (%s) %s", c.Version, c.Kind, c.Status, c.Class, c.By, c.Role, fmtDate(c.At))
			if c.Reason != "" {
				s += "; reason: " + c.Reason
			}
			if c.Comment != "" {
				s += "; comment: " + c.Comment
			}
			hist = append(hist, clipText(s, 600))
		}
		p.font("", 7.5)
		histLines := 0
		for _, h := range hist {
			histLines += max(1, len(p.f.SplitText(pdfText(h, false), bodyW)))
		}
		need := 6 + float64(histLines)*3.4 + 2
		if d.Window != nil {
			need += fh + 2
		} else {
			need += 5
		}
		p.ensure(min(need, pageH-marginTop-marginBot))
		p.font("B", 9)
		title := fmt.Sprintf("%s  -  tube %s, %s, %s: %.2f V, %.0f°, %s %%TW", d.ID, d.Component, d.Location, d.Channel,
			d.VppV, degrees(d.PhaseRad), depthText(d))
		p.f.MultiCell(bodyW, 4.5, pdfText(clipText(title, 400), false), "", "L", false)
		p.font("", 7.5)
		for _, h := range hist {
			p.f.MultiCell(bodyW, 3.4, pdfText(h, false), "", "L", false)
		}
		if d.Window == nil || len(d.Window.X) == 0 {
			msg := "Signal window not supplied to the report: figures not drawn."
			if d.Window != nil && d.Window.Note != "" {
				msg = "Figures not drawn: " + d.Window.Note
			}
			p.font("", 8)
			p.f.MultiCell(bodyW, 4, pdfText(clipText(msg, 400), false), "", "L", false)
			p.f.Ln(2)
			continue
		}
		if d.Window.Note != "" {
			p.font("", 7.5)
			p.f.MultiCell(bodyW, 3.4, pdfText(clipText("Signal: "+d.Window.Note, 300), false), "", "L", false)
		}
		y := p.f.GetY() + 1
		for j, figure := range []func(*Indication) (*plot.Plot, error){lissajousFigure, stripFigure} {
			x := marginL + float64(j)*(fw+4)
			fig, err := figure(d)
			if err != nil {
				p.f.SetXY(x, y)
				p.font("", 8)
				p.f.MultiCell(fw, 4, pdfText("Figure not drawn: "+err.Error(), false), "1", "L", false)
				continue
			}
			p.drawFigure(fig, x, y, fw, fh)
		}
		p.f.SetXY(marginL, y+fh+3)
	}
}

func (p *pdfw) recordSection() {
	in := p.in
	p.heading("7  Record")
	kinds := in.kinds
	var names []string
	for k := range kinds {
		names = append(names, k)
	}
	sort.Strings(names)
	var parts []string
	for _, k := range names {
		parts = append(parts, fmt.Sprintf("%s %d", k, kinds[k]))
	}
	p.kv([][2]string{
		{"Event log", fmt.Sprintf("%d events (%s)", in.Chain.Events, strings.Join(parts, ", "))},
		{"Chain head", fmt.Sprintf("event %d, %s", in.Chain.HeadSeq, in.Chain.HeadHash)},
		{"Check the record", fmt.Sprintf("whorl records verify --anchor %d:%s RECORD", in.Chain.HeadSeq, in.Chain.HeadHash)},
		{"Processing chains", docList(in.Chains)},
		{"Reference standards", docList(in.Standards)},
	})
	var rows [][]string
	for _, r := range in.Releases {
		rows = append(rows, []string{r.ReportID, r.By, fmtDate(r.At), fmt.Sprintf("%d, %s", r.HeadSeq, short(r.HeadHash, 16)), r.Note})
	}
	if len(rows) > 0 {
		p.f.Ln(2)
		p.table([]column{{"Released report", 44, "L"}, {"Released by", 30, "L"}, {"At", 30, "L"}, {"Covers events to", 34, "L"}, {"Note", 42, "L"}}, rows)
	}
	p.para("The event log records every change with who, when, what before, what after and why; each event holds the hash of the one before. "+
		"'whorl records verify' recomputes the chain from the record file; with --anchor it also checks that the record still holds the "+
		"chain head above, so that events removed from its end are noticed.", "", 8)
}

func docList(ds []store.Document) string {
	if len(ds) == 0 {
		return "none recorded"
	}
	var s []string
	for _, d := range ds {
		s = append(s, d.ID+" (SHA-256 "+short(d.SHA256, 16)+")")
	}
	return strings.Join(s, "; ")
}
