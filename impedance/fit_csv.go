package impedance

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"
)

// FileError reports a problem at a place in a conductivity or coating
// file: Line and Column are 1-based (0 when the problem concerns the whole
// file or line), Field is the column header concerned.
type FileError struct {
	File     string
	Line     int
	Column   int
	Field    string
	Expected string
	Err      error
}

// Error formats the error as "file:line:column (column "header"): what was
// found; expected what".
func (e *FileError) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
		if e.Column > 0 {
			fmt.Fprintf(&b, ":%d", e.Column)
		}
	}
	if e.Field != "" {
		fmt.Fprintf(&b, " (column %q)", e.Field)
	}
	if e.Err != nil {
		b.WriteString(": ")
		b.WriteString(e.Err.Error())
	}
	if e.Expected != "" {
		b.WriteString("; expected ")
		b.WriteString(e.Expected)
	}
	return b.String()
}

// Unwrap returns the underlying error.
func (e *FileError) Unwrap() error { return e.Err }

// ErrFileFormat is wrapped by every FileError.
var ErrFileFormat = errors.New("bad file")

// RefBlock is a certified conductivity reference block.
type RefBlock struct {
	ID                 string  `json:"id"`
	ConductivitySPerM  float64 `json:"conductivity_s_per_m"`
	UConductivitySPerM float64 `json:"u_conductivity_s_per_m"` // standard uncertainty
	ThicknessM         float64 `json:"thickness_m,omitempty"`  // 0 = thick (half-space)
	Material           string  `json:"material,omitempty"`
	Certificate        string  `json:"certificate,omitempty"`
}

// Shim is a certified non-conducting shim (foil) laid on a bare surface.
type Shim struct {
	ID          string  `json:"id"`
	ThicknessM  float64 `json:"thickness_m"`
	UThicknessM float64 `json:"u_thickness_m"` // standard uncertainty
	Certificate string  `json:"certificate,omitempty"`
}

// CalReading is one calibration reading: the probe on a block (or in air,
// Block "air"), bare or under a shim, at one frequency.
type CalReading struct {
	Block  string
	Shim   string
	FreqHz float64
	V      complex128
	Line   int // line in the file, for messages
}

// SpotReading is one reading at a measurement spot. Several rows of one
// spot at different frequencies form a multi-frequency reading.
type SpotReading struct {
	Spot       string
	FreqHz     float64
	V          complex128
	TempC      float64 // NaN when not given
	ThicknessM float64 // 0 when not given
	Material   string
	Line       int
}

// column describes one accepted column: its header spellings and the
// factor from the header's unit to SI.
type column struct {
	names    map[string]float64 // lower-case header → factor to SI (0 for text)
	required bool
	expected string // what a cell should hold
}

// table reads a CSV file with a header row. Lines starting with '#' are
// comments; headers are matched case-insensitively.
type table struct {
	file string
	r    *csv.Reader
	idx  []int // column index of each wanted column, −1 if absent
	fac  []float64
	hdr  []string // header of each wanted column as written
	cols []column
}

func newTable(rd io.Reader, file string, cols []column) (*table, error) {
	r := csv.NewReader(rd)
	r.Comment = '#'
	r.FieldsPerRecord = -1
	r.TrimLeadingSpace = true
	t := &table{file: file, r: r, cols: cols, idx: make([]int, len(cols)), fac: make([]float64, len(cols)), hdr: make([]string, len(cols))}
	head, err := r.Read()
	if err == io.EOF {
		return nil, &FileError{File: file, Err: fmt.Errorf("%w: empty file", ErrFileFormat), Expected: "a header row"}
	}
	if err != nil {
		return nil, t.csvError(err)
	}
	line, _ := r.FieldPos(0)
	for i := range t.idx {
		t.idx[i] = -1
	}
	for j, h := range head {
		key := strings.ToLower(strings.TrimSpace(strings.TrimPrefix(h, "\ufeff")))
		matched := false
		for i, c := range cols {
			if f, ok := c.names[key]; ok {
				if t.idx[i] >= 0 {
					return nil, &FileError{File: file, Line: line, Column: j + 1, Field: h, Err: fmt.Errorf("%w: duplicate column", ErrFileFormat), Expected: "each quantity in one column"}
				}
				t.idx[i], t.fac[i], t.hdr[i] = j, f, h
				matched = true
			}
		}
		if !matched {
			return nil, &FileError{File: file, Line: line, Column: j + 1, Field: h, Err: fmt.Errorf("%w: unknown column", ErrFileFormat), Expected: "one of " + allNames(cols)}
		}
	}
	for i, c := range cols {
		if c.required && t.idx[i] < 0 {
			return nil, &FileError{File: file, Line: line, Err: fmt.Errorf("%w: missing column", ErrFileFormat), Expected: "a column " + oneOf(c.names)}
		}
	}
	return t, nil
}

func oneOf(m map[string]float64) string {
	var s []string
	for k := range m {
		s = append(s, strconv.Quote(k))
	}
	sort.Strings(s)
	return strings.Join(s, " or ")
}

func allNames(cols []column) string {
	var s []string
	for _, c := range cols {
		for k := range c.names {
			s = append(s, k)
		}
	}
	sort.Strings(s)
	return strings.Join(s, ", ")
}

func (t *table) csvError(err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return &FileError{File: t.file, Line: pe.Line, Column: pe.Column, Err: fmt.Errorf("%w: %v", ErrFileFormat, pe.Err), Expected: "comma-separated fields"}
	}
	return &FileError{File: t.file, Err: err}
}

// row is one data row.
type row struct {
	t    *table
	rec  []string
	line int
}

// next returns the next row, or io.EOF.
func (t *table) next() (row, error) {
	rec, err := t.r.Read()
	if err == io.EOF {
		return row{}, io.EOF
	}
	if err != nil {
		return row{}, t.csvError(err)
	}
	line, _ := t.r.FieldPos(0)
	rw := row{t: t, rec: rec, line: line}
	if len(rec) != len(t.nonNeg()) {
		return row{}, &FileError{File: t.file, Line: line, Err: fmt.Errorf("%w: %d fields", ErrFileFormat, len(rec)), Expected: fmt.Sprintf("%d fields, one per header column", len(t.nonNeg()))}
	}
	return rw, nil
}

func (t *table) nonNeg() []int {
	var out []int
	for _, i := range t.idx {
		if i >= 0 {
			out = append(out, i)
		}
	}
	return out
}

func (rw row) has(i int) bool {
	j := rw.t.idx[i]
	return j >= 0 && strings.TrimSpace(rw.rec[j]) != ""
}

func (rw row) text(i int) string {
	j := rw.t.idx[i]
	if j < 0 {
		return ""
	}
	return strings.TrimSpace(rw.rec[j])
}

func (rw row) errAt(i int, err error) error {
	j := rw.t.idx[i]
	return &FileError{File: rw.t.file, Line: rw.line, Column: j + 1, Field: rw.t.hdr[i], Err: err, Expected: rw.t.cols[i].expected}
}

// num returns the value of column i in SI. An absent or empty optional
// column gives def; "inf" is accepted when allowInf is set.
func (rw row) num(i int, def float64, allowInf bool) (float64, error) {
	if !rw.has(i) {
		if rw.t.cols[i].required {
			j := rw.t.idx[i]
			return 0, &FileError{File: rw.t.file, Line: rw.line, Column: j + 1, Field: rw.t.hdr[i], Err: fmt.Errorf("%w: empty field", ErrFileFormat), Expected: rw.t.cols[i].expected}
		}
		return def, nil
	}
	s := rw.text(i)
	if allowInf && strings.EqualFold(s, "inf") {
		return math.Inf(1), nil
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, rw.errAt(i, fmt.Errorf("%w: %q is not a finite number", ErrFileFormat, s))
	}
	f := rw.t.fac[i]
	// A power-of-ten unit is applied to the decimal text, so that 50.8 µm
	// reads exactly as 50.8e-6 m.
	if k := math.Round(math.Log10(f)); math.Pow(10, k) == f && !strings.ContainsAny(s, "eExXpP") {
		if w, err := strconv.ParseFloat(s+"e"+strconv.Itoa(int(k)), 64); err == nil && !math.IsInf(w, 0) {
			return w, nil
		}
	}
	v *= f
	if math.IsInf(v, 0) {
		return 0, rw.errAt(i, fmt.Errorf("%w: %q is too large", ErrFileFormat, s))
	}
	return v, nil
}

func textCol(required bool, expected string, names ...string) column {
	m := map[string]float64{}
	for _, n := range names {
		m[n] = 0
	}
	return column{names: m, required: required, expected: expected}
}

func numCol(required bool, expected string, names map[string]float64) column {
	return column{names: names, required: required, expected: expected}
}

var (
	condUnits   = map[string]float64{"conductivity_pct_iacs": 58e4, "conductivity_ms_per_m": 1e6, "conductivity_s_per_m": 1}
	uCondUnits  = map[string]float64{"u_conductivity_pct_iacs": 58e4, "u_conductivity_ms_per_m": 1e6, "u_conductivity_s_per_m": 1}
	thickUnits  = map[string]float64{"thickness_mm": 1e-3, "thickness_um": 1e-6, "thickness_in": 0.0254, "thickness_m": 1}
	uThickUnits = map[string]float64{"u_thickness_mm": 1e-3, "u_thickness_um": 1e-6, "u_thickness_in": 0.0254, "u_thickness_m": 1}
	freqUnits   = map[string]float64{"freq_hz": 1, "freq_khz": 1e3, "freq_mhz": 1e6}
	xUnits      = map[string]float64{"x_v": 1, "x_mv": 1e-3}
	yUnits      = map[string]float64{"y_v": 1, "y_mv": 1e-3}
	tempUnits   = map[string]float64{"temperature_c": 1}
)

// id returns the identifier in column i, which must be non-empty and,
// when seen is not nil, not yet used (what names the kind of thing).
func (rw row) id(i int, seen map[string]int, what string) (string, error) {
	v := rw.text(i)
	if v == "" {
		return "", rw.errAt(i, fmt.Errorf("%w: empty field", ErrFileFormat))
	}
	if seen != nil {
		if l, dup := seen[v]; dup {
			return "", rw.errAt(i, fmt.Errorf("%w: %s %q already defined on line %d", ErrFileFormat, what, v, l))
		}
		seen[v] = rw.line
	}
	return v, nil
}

// positive returns the required positive value of column i in SI.
func (rw row) positive(i int) (float64, error) {
	v, err := rw.num(i, 0, false)
	if err != nil {
		return 0, err
	}
	if !(v > 0) {
		return 0, rw.errAt(i, fmt.Errorf("%w: %s is not positive", ErrFileFormat, rw.text(i)))
	}
	return v, nil
}

// uncertainty returns the optional non-negative value of column i (0 when
// absent).
func (rw row) uncertainty(i int) (float64, error) {
	v, err := rw.num(i, 0, false)
	if err != nil {
		return 0, err
	}
	if v < 0 {
		return 0, rw.errAt(i, fmt.Errorf("%w: negative uncertainty", ErrFileFormat))
	}
	return v, nil
}

// thickness returns the optional thickness of column i: 0 when absent or,
// with allowInf, "inf"; otherwise a positive value.
func (rw row) thickness(i int, allowInf bool) (float64, error) {
	v, err := rw.num(i, 0, allowInf)
	if err != nil {
		return 0, err
	}
	if v < 0 || (rw.has(i) && v == 0) {
		return 0, rw.errAt(i, fmt.Errorf("%w: thickness %s is not positive", ErrFileFormat, rw.text(i)))
	}
	if math.IsInf(v, 1) {
		v = 0
	}
	return v, nil
}

// reading returns the frequency and the reading X + jY of a row.
func (rw row) reading(cF, cX, cY int) (float64, complex128, error) {
	f, err := rw.positive(cF)
	if err != nil {
		return 0, 0, err
	}
	x, err := rw.num(cX, 0, false)
	if err != nil {
		return 0, 0, err
	}
	y, err := rw.num(cY, 0, false)
	if err != nil {
		return 0, 0, err
	}
	return f, complex(x, y), nil
}

// rows calls fn for every data row and reports a file without any as
// holding no "what".
func (t *table) rows(what string, fn func(row) error) error {
	n := 0
	for {
		rw, err := t.next()
		if err == io.EOF {
			break
		}
		if err != nil {
			return err
		}
		if err := fn(rw); err != nil {
			return err
		}
		n++
	}
	if n == 0 {
		return &FileError{File: t.file, Err: fmt.Errorf("%w: no %s", ErrFileFormat, what), Expected: "at least one data row"}
	}
	return nil
}

// ReadBlocks reads a reference-block file (see docs/conductivity.md):
// header block_id, conductivity_pct_iacs (or conductivity_ms_per_m,
// conductivity_s_per_m), optional u_conductivity_… in the same choice of
// units, thickness_mm (empty or "inf" for a thick block), material,
// certificate. name is used in error messages.
func ReadBlocks(r io.Reader, name string) ([]RefBlock, error) {
	const (
		cID = iota
		cSigma
		cU
		cT
		cMat
		cCert
	)
	t, err := newTable(r, name, []column{
		textCol(true, "a block identifier", "block_id"),
		numCol(true, "a conductivity > 0", condUnits),
		numCol(false, "a standard uncertainty ≥ 0", uCondUnits),
		numCol(false, "a thickness > 0, or empty or inf for a thick block", thickUnits),
		textCol(false, "", "material"),
		textCol(false, "", "certificate"),
	})
	if err != nil {
		return nil, err
	}
	var out []RefBlock
	seen := map[string]int{}
	err = t.rows("blocks", func(rw row) error {
		b := RefBlock{Material: rw.text(cMat), Certificate: rw.text(cCert)}
		var err error
		if b.ID, err = rw.id(cID, seen, "block"); err != nil {
			return err
		}
		if b.ConductivitySPerM, err = rw.positive(cSigma); err != nil {
			return err
		}
		if b.UConductivitySPerM, err = rw.uncertainty(cU); err != nil {
			return err
		}
		if b.ThicknessM, err = rw.thickness(cT, true); err != nil {
			return err
		}
		out = append(out, b)
		return nil
	})
	if err != nil {
		return nil, err
	}
	return out, nil
}

// ReadShims reads a shim file: header shim_id, thickness_um (or
// thickness_mm, thickness_in, thickness_m), optional u_thickness_… and
// certificate.
func ReadShims(r io.Reader, name string) ([]Shim, error) {
	const (
		cID = iota
		cT
		cU
		cCert
	)
	t, err := newTable(r, name, []column{
		textCol(true, "a shim identifier", "shim_id"),
		numCol(true, "a thickness > 0", thickUnits),
		numCol(false, "a standard uncertainty ≥ 0", uThickUnits),
		textCol(false, "", "certificate"),
	})
	if err != nil {
		return nil, err
	}
	var out []Shim
	seen := map[string]int{}
	err = t.rows("shims", func(rw row) error {
		s := Shim{Certificate: rw.text(cCert)}
		var err error
		if s.ID, err = rw.id(cID, seen, "shim"); err != nil {
			return err
		}
		if s.ThicknessM, err = rw.positive(cT); err != nil {
			return err
		}
		if s.UThicknessM, err = rw.uncertainty(cU); err != nil {
			return err
		}
		out = append(out, s)
		return nil
	})
	if err != nil {
		return nil, err
	}
	return out, nil
}

// ReadCalReadings reads a calibration-readings file: header block_id,
// shim_id (optional; empty for the bare block), freq_hz (or freq_khz,
// freq_mhz), x_v, y_v (or x_mv, y_mv).
func ReadCalReadings(r io.Reader, name string) ([]CalReading, error) {
	const (
		cB = iota
		cS
		cF
		cX
		cY
	)
	t, err := newTable(r, name, []column{
		textCol(true, "a block identifier, or air", "block_id"),
		textCol(false, "a shim identifier or empty", "shim_id"),
		numCol(true, "a frequency > 0", freqUnits),
		numCol(true, "a finite number", xUnits),
		numCol(true, "a finite number", yUnits),
	})
	if err != nil {
		return nil, err
	}
	var out []CalReading
	err = t.rows("readings", func(rw row) error {
		c := CalReading{Shim: rw.text(cS), Line: rw.line}
		var err error
		if c.Block, err = rw.id(cB, nil, ""); err != nil {
			return err
		}
		if c.FreqHz, c.V, err = rw.reading(cF, cX, cY); err != nil {
			return err
		}
		out = append(out, c)
		return nil
	})
	if err != nil {
		return nil, err
	}
	return out, nil
}

// ReadSpotReadings reads a measurement file: header spot, freq_hz (or
// freq_khz, freq_mhz), x_v, y_v (or x_mv, y_mv), and optionally
// temperature_c, thickness_mm (or _um, _in, _m) and material.
func ReadSpotReadings(r io.Reader, name string) ([]SpotReading, error) {
	const (
		cSpot = iota
		cF
		cX
		cY
		cTemp
		cT
		cMat
	)
	t, err := newTable(r, name, []column{
		textCol(true, "a spot identifier", "spot"),
		numCol(true, "a frequency > 0", freqUnits),
		numCol(true, "a finite number", xUnits),
		numCol(true, "a finite number", yUnits),
		numCol(false, "a temperature in °C", tempUnits),
		numCol(false, "a part thickness > 0", thickUnits),
		textCol(false, "", "material"),
	})
	if err != nil {
		return nil, err
	}
	var out []SpotReading
	type key struct {
		spot string
		f    float64
	}
	seen := map[key]int{}
	err = t.rows("readings", func(rw row) error {
		s := SpotReading{Material: rw.text(cMat), Line: rw.line}
		var err error
		if s.Spot, err = rw.id(cSpot, nil, ""); err != nil {
			return err
		}
		if s.FreqHz, s.V, err = rw.reading(cF, cX, cY); err != nil {
			return err
		}
		if l, dup := seen[key{s.Spot, s.FreqHz}]; dup {
			return rw.errAt(cF, fmt.Errorf("%w: spot %q already has a reading at this frequency on line %d", ErrFileFormat, s.Spot, l))
		}
		seen[key{s.Spot, s.FreqHz}] = rw.line
		if s.TempC, err = rw.num(cTemp, math.NaN(), false); err != nil {
			return err
		}
		if rw.has(cTemp) && (s.TempC < -273.15 || s.TempC > 1000) {
			return rw.errAt(cTemp, fmt.Errorf("%w: temperature %s °C is out of range", ErrFileFormat, rw.text(cTemp)))
		}
		if s.ThicknessM, err = rw.thickness(cT, false); err != nil {
			return err
		}
		out = append(out, s)
		return nil
	})
	if err != nil {
		return nil, err
	}
	return out, nil
}

// Spot is the readings of one measurement spot, in file order.
type Spot struct {
	ID       string
	Readings []SpotReading
}

// GroupSpots groups readings by spot in order of first appearance.
func GroupSpots(rs []SpotReading) []Spot {
	var out []Spot
	at := map[string]int{}
	for _, r := range rs {
		i, ok := at[r.Spot]
		if !ok {
			i = len(out)
			at[r.Spot] = i
			out = append(out, Spot{ID: r.Spot})
		}
		out[i].Readings = append(out[i].Readings, r)
	}
	return out
}

// CalPointsFrom joins calibration readings with the certified blocks and
// shims they name. The block "air" (any case) is the probe in air. file is
// the readings file name, for messages naming the line of an unknown block
// or shim.
func CalPointsFrom(blocks []RefBlock, shims []Shim, rs []CalReading, file string) ([]CalPoint, error) {
	bm := map[string]RefBlock{}
	for _, b := range blocks {
		bm[b.ID] = b
	}
	sm := map[string]Shim{}
	for _, s := range shims {
		sm[s.ID] = s
	}
	out := make([]CalPoint, 0, len(rs))
	for _, r := range rs {
		p := CalPoint{Block: r.Block, Shim: r.Shim, FreqHz: r.FreqHz, ReadingV: r.V}
		if !strings.EqualFold(r.Block, "air") {
			b, ok := bm[r.Block]
			if !ok {
				return nil, &FileError{File: file, Line: r.Line, Field: "block_id", Err: fmt.Errorf("%w: unknown block %q", ErrFileFormat, r.Block), Expected: "a block listed in the blocks file, or air"}
			}
			p.Specimen = Specimen{ConductivitySPerM: b.ConductivitySPerM, ThicknessM: b.ThicknessM}
			p.UConductivitySPerM = b.UConductivitySPerM
		} else if r.Shim != "" {
			return nil, &FileError{File: file, Line: r.Line, Field: "shim_id", Err: fmt.Errorf("%w: a shim on air", ErrFileFormat), Expected: "no shim for an air reading"}
		}
		if r.Shim != "" {
			s, ok := sm[r.Shim]
			if !ok {
				return nil, &FileError{File: file, Line: r.Line, Field: "shim_id", Err: fmt.Errorf("%w: unknown shim %q", ErrFileFormat, r.Shim), Expected: "a shim listed in the shims file, or empty"}
			}
			p.ExtraLiftoffM, p.UExtraLiftoffM = s.ThicknessM, s.UThicknessM
		}
		out = append(out, p)
	}
	return out, nil
}
