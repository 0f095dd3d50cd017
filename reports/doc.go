// Package reports writes the inspection report (PDF) and the record
// exports (CSV and JSON) from a report input, [Inspection], which
// [FromStore] builds from a record store, or from a [Report], which
// [Open] builds for streaming: it keeps only the head of the record, the
// reportable indications and counts, and its writers read the
// indications and events from the store a batch at a time, so that memory
// does not grow with their number. Both write the same bytes.
//
// # Conventions
//
// The input holds SI values as the store does (volts, radians, metres).
// Conversion happens only in the outputs: the PDF shows phase in degrees,
// axial position in metres and depth in %TW; the CSV and JSON exports keep
// SI values at full precision except where a column name carries another
// unit (phase_deg). Column order and field order are fixed and documented
// in docs/report.md; with the same input (and so, with a fixed clock, the
// same record) every writer produces the same bytes, and the PDF the same
// text.
//
// Every string from the record is encoded for its format: CSV fields are
// quoted by encoding/csv, JSON strings escaped by encoding/json (invalid
// UTF-8 becomes U+FFFD), and PDF text is made printable (invalid UTF-8 and
// control and bidirectional-format characters are replaced) before it
// reaches the page, in an embedded Unicode font (Liberation Sans).
//
// Figures are gonum/plot plots drawn straight into the PDF as vector
// graphics by a vg.Canvas over fpdf (vgfpdf.go): vg's canvas space (points,
// origin at the figure's bottom-left corner, y up) is mapped onto the
// figure's rectangle on the page (millimetres, y down), and figure text is
// set in Liberation Sans so that gonum/plot's text measurement matches the
// glyphs on the page.
//
// Every page of the PDF carries the report ID and "page N of M"; the last
// line is "End of report <id>". The report carries the caution that
// results are to be reviewed by qualified, certified personnel under a
// written procedure, and that the governing code, local regulations and
// licensed practice take precedence.
package reports
