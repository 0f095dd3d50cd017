// Package acquire reads and writes eddy-current scan files: demodulated
// multi-channel scans and raw coil-voltage recordings, in Whorl's own CSV
// layout and in foreign CSV layouts described by a column-mapping file.
//
// Conventions: samples are complex, X + jY in volts, X in-phase and Y
// quadrature with the excitation (time dependence e^{+jωt}, the dsp
// package's convention). Time is in seconds from the first sample,
// position in metres along the component. Units in files are converted to
// SI on import and back on export; nothing else changes a sample.
//
// # Files
//
// A Whorl scan file starts "# whorl-scan 1" and a raw record "# whorl-raw
// 1" (Sniff tells them apart); metadata follow as "# key: value" lines,
// then one header row naming each column with its unit in brackets
// ("time [s]", "position [m]", "400k-diff X [V]"), then one row per
// sample. docs/csv-format.md describes the layouts and docs/column-map.md
// the column maps (LoadColumnMap, ReadMapped) for files written by other
// equipment.
//
// Writers print each number in the shortest form that reads back to the
// same float64, so WriteScan followed by ReadScan gives bit-identical
// samples. WriteScanFile and WriteRawFile write a temporary file in the
// target's folder, sync it and rename it, so a file is never left half
// written; CreateScanFile also refuses to replace an existing file.
//
// # Reading
//
// Readers stream line by line through a 1 MiB buffer and never hold a
// file's text; for files of known size they size the sample slices once,
// so memory is about that of the decoded samples. They accept comma,
// semicolon and tab delimiters (detected from the header row), a decimal
// comma with semicolon or tab delimiters, a UTF-8 byte-order mark, CRLF
// line ends, RFC 4180 quoted fields, and blank and comment lines anywhere.
// They refuse empty fields (unless a column map sets a fill policy), NaN,
// infinity, time that does not increase and position that does not move
// in one direction (unless a column map asks for sorting), rows with the
// wrong number of fields, a last row without a line end (a sign of
// truncation), missing, duplicate and unknown columns, and units of the
// wrong kind.
//
// Every reading error is a *ParseError naming the file, the 1-based line,
// the 1-based field index within the row (0 for a whole line), the column
// header or metadata key, what was found and what was expected; it wraps
// one of the Err... sentinels for errors.Is.
//
// Numbers are converted without allocation: plain decimals within the
// exact limits of Clinger's fast path in this package, the rest by
// strconv.ParseFloat, both giving the correctly rounded float64.
//
// # Screening
//
// Inspect and InspectRaw list problems an analyst should know about
// (non-finite values, gaps, axes that do not advance, rates or speeds that
// disagree with the metadata, constant and clipped channels); their
// thresholds are screening values, not acceptance criteria.
package acquire
