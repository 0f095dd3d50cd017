package acquire

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"sort"
	"strconv"
	"strings"

	"whorl/units"
)

// ColumnMapFormat is the value of the "format" member of a column map.
const ColumnMapFormat = "whorl-column-map 1"

// ColumnMap describes how to read a CSV file written by other equipment:
// which columns hold time, position and the X and Y of each channel, in
// which units and with which scale factors, how the text is laid out and
// which metadata to attach. It is usually loaded from a JSON file with
// LoadColumnMap; docs/column-map.md describes every member with a full
// example.
type ColumnMap struct {
	// Format must be ColumnMapFormat.
	Format string `json:"format"`
	// Delimiter is ",", ";", "tab" (or "\t"); empty means detect it from
	// the header row.
	Delimiter string `json:"delimiter,omitempty"`
	// Decimal is "." or ","; empty means accept either (',' only when the
	// delimiter is not a comma), fixed by the first number that has one.
	Decimal string `json:"decimal,omitempty"`
	// HeaderRow is the 1-based line number of the header row; every line
	// before it is skipped whatever it holds. 0 means the first line that
	// is neither blank nor a comment.
	HeaderRow int `json:"header_row,omitempty"`
	// NoHeader says the file has no header row: columns are referred to by
	// index only and the first data row fixes the number of fields.
	NoHeader bool `json:"no_header,omitempty"`
	// SkipRows is the number of rows after the header row (blank and
	// comment lines not counted) to skip, such as a row of units.
	SkipRows int `json:"skip_rows,omitempty"`
	// CommentPrefix starts a comment line; nil means "#", "" means no
	// comment lines.
	CommentPrefix *string `json:"comment_prefix,omitempty"`
	// AllowUnterminatedLastRow accepts a last row with no line end, for
	// equipment that writes none. Without it such a row is taken as a sign
	// of truncation and is an error.
	AllowUnterminatedLastRow bool `json:"allow_unterminated_last_row,omitempty"`
	// Missing is the fill policy for empty fields: "reject" (default),
	// "previous" or "linear".
	Missing string `json:"missing,omitempty"`
	// NonMonotonic is the policy for an axis that does not advance:
	// "reject" (default) or "sort".
	NonMonotonic string `json:"non_monotonic,omitempty"`
	// Time is the time column, or nil.
	Time *ValueColumn `json:"time,omitempty"`
	// Position is the axial position column, or nil.
	Position *ValueColumn `json:"position,omitempty"`
	// Channels lists the channels to read, in order.
	Channels []ChannelColumns `json:"channels"`
	// Meta holds metadata in the keys of a Whorl scan file (component,
	// probe-id, probe-type, probe-speed, direction, start, cal-group,
	// procedure, sample-rate, axial-step, x-NAME), with units where the
	// key takes a quantity ("0.3 m/s", "2 kHz").
	Meta map[string]string `json:"meta,omitempty"`
	// MetaFromFileName takes metadata from the file name: each value is a
	// regular expression (Go RE2 syntax) with one capture group, matched
	// against the base name; the group is the value. It overrides Meta.
	MetaFromFileName map[string]string `json:"meta_from_file_name,omitempty"`
	// MetaFromColumn takes metadata from a column that holds the same text
	// on every row. It overrides MetaFromFileName and Meta.
	MetaFromColumn map[string]ColumnRef `json:"meta_from_column,omitempty"`

	// source is the map's file name, for errors.
	source string
	// data and paths locate members in the JSON text, for errors.
	data  []byte
	paths map[string]int64
}

// ValueColumn is one numeric column: where it is, its unit and a scale.
// The value in SI is number × Scale × (unit factor).
type ValueColumn struct {
	// Column is the header name or 1-based index.
	Column ColumnRef `json:"column"`
	// Unit is the unit of the number after scaling, such as "mV", "mm" or
	// "ms". Empty means take it from the header cell's brackets ("t [ms]").
	Unit string `json:"unit,omitempty"`
	// Scale multiplies the number before the unit is applied, for example
	// volts per count; nil means 1.
	Scale *float64 `json:"scale,omitempty"`
}

// ChannelColumns maps one channel.
type ChannelColumns struct {
	// Name is the channel name in Whorl (see docs/csv-format.md for the
	// characters allowed).
	Name string `json:"name"`
	// Frequency is the excitation frequency with its unit, "400 kHz".
	Frequency string `json:"frequency"`
	// Mode is "absolute" or "differential".
	Mode string `json:"mode"`
	// X and Y are the in-phase and quadrature columns.
	X ValueColumn `json:"x"`
	Y ValueColumn `json:"y"`
}

// ColumnRef names a column by header text (Name) or by 1-based index
// (Index); exactly one is set. In JSON it is a string or a positive whole
// number.
type ColumnRef struct {
	Name  string
	Index int
	// given records that the JSON held a value, so that an explicit 0 is
	// told apart from an absent member.
	given, quoted bool
}

// String returns the name in quotes or "#index".
func (c ColumnRef) String() string {
	if c.Index > 0 {
		return "#" + strconv.Itoa(c.Index)
	}
	return strconv.Quote(c.Name)
}

// UnmarshalJSON reads a string or a positive whole number.
func (c *ColumnRef) UnmarshalJSON(b []byte) error {
	b = bytes.TrimSpace(b)
	if len(b) > 0 && b[0] == '"' {
		var s string
		if err := json.Unmarshal(b, &s); err != nil {
			return err
		}
		*c = ColumnRef{Name: strings.TrimSpace(s), given: true, quoted: true}
		return nil
	}
	n, err := strconv.Atoi(string(b))
	if err != nil {
		return fmt.Errorf("column %s: expected a header name in quotes or a whole number from 1", b)
	}
	*c = ColumnRef{Index: n, given: true}
	return nil
}

// MarshalJSON writes a string or a number.
func (c ColumnRef) MarshalJSON() ([]byte, error) {
	if c.Index > 0 {
		return []byte(strconv.Itoa(c.Index)), nil
	}
	return json.Marshal(c.Name)
}

// LoadColumnMap reads and checks a column map from a JSON file. Errors are
// *ParseError values naming the map file, the line in it and the member
// (as a path such as "channels[0].x.unit").
func LoadColumnMap(path string) (*ColumnMap, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	return ParseColumnMap(data, filepath.Base(path))
}

// ParseColumnMap reads and checks a column map from JSON text; name is
// used in errors.
func ParseColumnMap(data []byte, name string) (*ColumnMap, error) {
	m := &ColumnMap{}
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	perr := func(off int64, field, expected string, err error) error {
		line, _ := lineCol(data, off)
		return &ParseError{File: name, Line: line, Field: field, Expected: expected, Err: kerr(ErrFormat, err.Error())}
	}
	if err := dec.Decode(m); err != nil {
		var se *json.SyntaxError
		var te *json.UnmarshalTypeError
		switch {
		case errors.As(err, &se):
			return nil, perr(se.Offset, "", "a JSON object (see docs/column-map.md)", err)
		case errors.As(err, &te):
			return nil, perr(te.Offset, te.Field, "a JSON "+te.Type.String(), fmt.Errorf("%s value", te.Value))
		case errors.Is(err, io.EOF):
			return nil, &ParseError{File: name, Err: kerr(ErrFormat, "empty column map"), Expected: "a JSON object (see docs/column-map.md)"}
		case errors.Is(err, io.ErrUnexpectedEOF):
			return nil, perr(int64(len(data)), "", "a complete JSON object", errors.New("column map ends early"))
		}
		msg := err.Error()
		off := int64(0)
		if f, ok := strings.CutPrefix(msg, "json: unknown field "); ok {
			if i := bytes.Index(data, []byte(f)); i >= 0 {
				off = int64(i)
			}
			uf, _ := strconv.Unquote(f)
			return nil, perr(off, uf, "one of the members listed in docs/column-map.md", errors.New("unknown member"))
		}
		return nil, perr(dec.InputOffset(), "", "a column map as in docs/column-map.md", err)
	}
	if dec.More() {
		return nil, perr(dec.InputOffset(), "", "one JSON object", errors.New("text after the column map"))
	}
	m.source, m.data, m.paths = name, data, jsonPaths(data)
	if _, err := m.compile(); err != nil {
		return nil, err
	}
	return m, nil
}

// compiledMap is a checked ColumnMap ready for reading.
type compiledMap struct {
	delim    byte
	decimal  byte
	comment  []byte
	fill     FillPolicy
	order    OrderPolicy
	channels []Channel
	meta     Meta
	srHz     float64
	stepM    float64
	fileRe   map[string]*regexp.Regexp
}

// errAt builds a map error located at a JSON path.
func (m *ColumnMap) errAt(path, expected, format string, a ...any) error {
	name := m.source
	if name == "" {
		name = "column map"
	}
	e := &ParseError{File: name, Field: path, Expected: expected, Err: kerr(ErrFormat, fmt.Sprintf(format, a...))}
	if off, ok := m.paths[path]; ok {
		e.Line, _ = lineCol(m.data, off)
	}
	return e
}

var metaKeyHelp = "one of component, probe-id, probe-type, probe-speed, direction, start, cal-group, procedure, sample-rate, axial-step, x-NAME"

// applyMeta sets one metadata key through the same rules as a scan file.
func applyMeta(meta *Meta, srHz, stepM *float64, key, value string, source string, line int) error {
	ms := &metaSink{name: source}
	ml := metaLine{key: key, value: value, line: line}
	ok, err := ms.common(meta, ml)
	if err != nil || ok {
		return err
	}
	switch key {
	case "sample-rate":
		*srHz, err = ms.quantity(ml, units.Frequency, true)
		return err
	case "axial-step":
		*stepM, err = ms.quantity(ml, units.Length, true)
		return err
	}
	return ms.errf(ml, ErrFormat, metaKeyHelp, "unknown metadata key")
}

func checkMetaKey(key string) bool {
	switch key {
	case "component", "probe-id", "probe-type", "probe-speed", "direction", "start", "cal-group", "procedure", "sample-rate", "axial-step":
		return true
	}
	x, ok := strings.CutPrefix(key, "x-")
	return ok && validExtraKey(x)
}

// compile checks the map and resolves everything that does not depend on
// the CSV file.
func (m *ColumnMap) compile() (*compiledMap, error) {
	cm := &compiledMap{comment: []byte("#")}
	if m.Format != ColumnMapFormat {
		return nil, m.errAt("format", strconv.Quote(ColumnMapFormat), "format is %q", m.Format)
	}
	switch m.Delimiter {
	case "":
	case ",", ";":
		cm.delim = m.Delimiter[0]
	case "tab", "\t":
		cm.delim = '\t'
	default:
		return nil, m.errAt("delimiter", `",", ";" or "tab"`, "delimiter %q is not supported", m.Delimiter)
	}
	switch m.Decimal {
	case "", ".", ",":
		if m.Decimal != "" {
			cm.decimal = m.Decimal[0]
		}
	default:
		return nil, m.errAt("decimal", `"." or ","`, "decimal mark %q is not supported", m.Decimal)
	}
	if cm.decimal == ',' && cm.delim == ',' {
		return nil, m.errAt("decimal", `"." with a comma delimiter`, "decimal comma with a comma delimiter is ambiguous")
	}
	if m.HeaderRow < 0 {
		return nil, m.errAt("header_row", "a line number from 1, or 0 for the first non-comment line", "header_row is %d", m.HeaderRow)
	}
	if m.NoHeader && m.HeaderRow > 0 {
		return nil, m.errAt("no_header", "either no_header or header_row", "no_header with header_row %d", m.HeaderRow)
	}
	if m.SkipRows < 0 {
		return nil, m.errAt("skip_rows", "zero or more rows", "skip_rows is %d", m.SkipRows)
	}
	if m.CommentPrefix != nil {
		cm.comment = []byte(*m.CommentPrefix)
	}
	switch m.Missing {
	case "", "reject":
		cm.fill = FillReject
	case "previous":
		cm.fill = FillPrevious
	case "linear":
		cm.fill = FillLinear
	default:
		return nil, m.errAt("missing", `"reject", "previous" or "linear"`, "missing policy %q", m.Missing)
	}
	switch m.NonMonotonic {
	case "", "reject":
		cm.order = OrderReject
	case "sort":
		cm.order = OrderSort
	default:
		return nil, m.errAt("non_monotonic", `"reject" or "sort"`, "non_monotonic policy %q", m.NonMonotonic)
	}
	if m.Time == nil && m.Position == nil {
		return nil, m.errAt("", `a "time" or a "position" member (or both)`, "no time or position column")
	}
	if len(m.Channels) == 0 {
		return nil, m.errAt("channels", "at least one channel", "no channels")
	}
	check := func(path string, vc *ValueColumn, k units.Kind) error {
		if err := checkRef(m, path+".column", vc.Column); err != nil {
			return err
		}
		if m.NoHeader && vc.Column.Index == 0 {
			return m.errAt(path+".column", "a 1-based index (the file has no header row)", "column %s given by name", vc.Column)
		}
		if vc.Unit != "" {
			if _, ok := units.Factor(k, vc.Unit); !ok {
				return m.errAt(path+".unit", fmt.Sprintf("a %s unit (%s)", k, unitList(k)), "unit %q is not a %s unit", vc.Unit, k)
			}
		}
		if vc.Scale != nil && (*vc.Scale == 0 || math.IsNaN(*vc.Scale) || math.IsInf(*vc.Scale, 0)) {
			return m.errAt(path+".scale", "a finite non-zero factor", "scale %v", *vc.Scale)
		}
		return nil
	}
	if m.Time != nil {
		if err := check("time", m.Time, units.Time); err != nil {
			return nil, err
		}
	}
	if m.Position != nil {
		if err := check("position", m.Position, units.Length); err != nil {
			return nil, err
		}
	}
	names := map[string]int{}
	for i, c := range m.Channels {
		p := fmt.Sprintf("channels[%d]", i)
		if err := checkChannelName(c.Name); err != nil {
			return nil, m.errAt(p+".name", "a channel name without control characters or , ; \" [ ] #", "%v", err)
		}
		if j, dup := names[c.Name]; dup {
			return nil, m.errAt(p+".name", "each channel name once", "channel %q is also channels[%d]", c.Name, j)
		}
		names[c.Name] = i
		f, err := units.Parse(units.Frequency, c.Frequency)
		if err != nil || !(f > 0) {
			return nil, m.errAt(p+".frequency", `a positive frequency with its unit, such as "400 kHz"`, "frequency %q", c.Frequency)
		}
		mode, err := ParseCoilMode(c.Mode)
		if err != nil {
			return nil, m.errAt(p+".mode", `"absolute" or "differential"`, "mode %q", c.Mode)
		}
		if err := check(p+".x", &m.Channels[i].X, units.Voltage); err != nil {
			return nil, err
		}
		if err := check(p+".y", &m.Channels[i].Y, units.Voltage); err != nil {
			return nil, err
		}
		cm.channels = append(cm.channels, Channel{Name: c.Name, FreqHz: f, Mode: mode})
	}
	for _, k := range sortedKeys(m.Meta) {
		line := 0
		if off, ok := m.paths["meta."+k]; ok {
			line, _ = lineCol(m.data, off)
		}
		if !checkMetaKey(k) {
			return nil, m.errAt("meta."+k, metaKeyHelp, "unknown metadata key")
		}
		if err := applyMeta(&cm.meta, &cm.srHz, &cm.stepM, k, m.Meta[k], m.sourceName(), line); err != nil {
			var pe *ParseError
			if errors.As(err, &pe) {
				pe.Field = "meta." + k
			}
			return nil, err
		}
	}
	for _, k := range sortedKeys(m.MetaFromFileName) {
		if !checkMetaKey(k) {
			return nil, m.errAt("meta_from_file_name."+k, metaKeyHelp, "unknown metadata key")
		}
		re, err := regexp.Compile(m.MetaFromFileName[k])
		if err != nil {
			return nil, m.errAt("meta_from_file_name."+k, "a regular expression with one capture group", "%v", err)
		}
		if re.NumSubexp() != 1 {
			return nil, m.errAt("meta_from_file_name."+k, "a regular expression with one capture group", "%d capture groups", re.NumSubexp())
		}
		if cm.fileRe == nil {
			cm.fileRe = map[string]*regexp.Regexp{}
		}
		cm.fileRe[k] = re
	}
	for _, k := range sortedKeys(m.MetaFromColumn) {
		if !checkMetaKey(k) {
			return nil, m.errAt("meta_from_column."+k, metaKeyHelp, "unknown metadata key")
		}
		if err := checkRef(m, "meta_from_column."+k, m.MetaFromColumn[k]); err != nil {
			return nil, err
		}
		if c := m.MetaFromColumn[k]; m.NoHeader && c.Index == 0 {
			return nil, m.errAt("meta_from_column."+k, "a 1-based index (the file has no header row)", "column %s given by name", c)
		}
	}
	return cm, nil
}

// checkRef reports a column reference that is absent, empty or below 1.
func checkRef(m *ColumnMap, path string, c ColumnRef) error {
	switch {
	case c.Name == "" && c.Index == 0 && !c.given:
		return m.errAt(path, "a header name or a 1-based index", "no column given")
	case c.Name == "" && c.quoted:
		return m.errAt(path, "a header name or a 1-based index", "empty column name")
	case c.Name == "" && c.Index < 1:
		return m.errAt(path, "a header name in quotes or a whole number from 1", "column %d", c.Index)
	case c.Name != "" && c.Index != 0:
		return m.errAt(path, "a header name or an index, not both", "column %q and index %d", c.Name, c.Index)
	}
	return nil
}

func (m *ColumnMap) sourceName() string {
	if m.source == "" {
		return "column map"
	}
	return m.source
}

func sortedKeys[V any](mp map[string]V) []string {
	keys := make([]string, 0, len(mp))
	for k := range mp {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return keys
}

// ReadMapped reads a foreign CSV file from r as described by m. name is
// the file name, used in errors and matched by m.MetaFromFileName. The
// result is checked with Scan.Validate.
func ReadMapped(r io.Reader, name string, m *ColumnMap) (*Scan, error) {
	cm, err := m.compile()
	if err != nil {
		return nil, err
	}
	lr := newLineReader(r, name)
	t := &table{lr: lr, comment: cm.comment, nch: len(cm.channels), fill: cm.fill, order: cm.order,
		allowUnterminated: m.AllowUnterminatedLastRow, meta: map[string]string{}, metaLine: map[string]int{}}
	if m.CommentPrefix != nil && *m.CommentPrefix == "" {
		t.comment = nil
	}
	// Find the header row, or with no header the first data row.
	var first []byte
	firstLine := 0
	for {
		line, ok, err := lr.next()
		if err != nil {
			return nil, err
		}
		if !ok {
			what := "a header row"
			if m.HeaderRow > 0 {
				what = fmt.Sprintf("a header row on line %d (map header_row)", m.HeaderRow)
			} else if m.NoHeader {
				what = "at least one row of samples"
			}
			return nil, &ParseError{File: name, Line: lr.line, Err: kerr(ErrTruncated, "file ends before the header row"), Expected: what}
		}
		if m.HeaderRow > 0 {
			if lr.line < m.HeaderRow {
				continue
			}
		} else if isBlank(line) || isComment(line, t.comment) {
			continue
		}
		first, firstLine = bytes.Clone(line), lr.line
		break
	}
	if cm.delim == 0 {
		cm.delim = detectDelimiter(first)
	}
	t.sp.delim = cm.delim
	t.num.allowComma = cm.delim != ','
	if cm.decimal != 0 {
		t.num.mark = cm.decimal
		t.num.allowComma = cm.decimal == ','
	}
	cells, serr := t.sp.split(first)
	if serr != nil {
		return nil, &ParseError{File: name, Line: firstLine, Column: serr.field, Err: kerr(ErrSyntax, serr.msg), Expected: "a row of fields separated by " + delimName(cm.delim)}
	}
	t.cols = make([]column, len(cells))
	for i, c := range cells {
		if !m.NoHeader {
			t.cols[i].header = strings.TrimSpace(string(c))
		} else {
			t.cols[i].header = "#" + strconv.Itoa(i+1)
		}
	}
	hdrLine := firstLine
	if m.NoHeader {
		lr.pushBack(first, firstLine)
		hdrLine = 0
	}
	mapErr := func(path string, kind error, expected, format string, a ...any) error {
		e := &ParseError{File: name, Line: hdrLine, Expected: expected, Err: kerr(kind, fmt.Sprintf(format, a...))}
		if off, ok := m.paths[path]; ok {
			l, _ := lineCol(m.data, off)
			e.Expected += fmt.Sprintf(" (column map %s line %d, %s)", m.sourceName(), l, path)
		} else {
			e.Expected += fmt.Sprintf(" (column map %s)", path)
		}
		return e
	}
	resolve := func(path string, ref ColumnRef) (int, error) {
		if ref.Index > 0 {
			if ref.Index > len(t.cols) {
				return 0, mapErr(path, ErrColumns, fmt.Sprintf("a column index from 1 to %d", len(t.cols)), "column %d does not exist; the row has %d fields", ref.Index, len(t.cols))
			}
			return ref.Index - 1, nil
		}
		found := -1
		for i := range t.cols {
			h := t.cols[i].header
			if h == ref.Name || stripUnit(h) == ref.Name {
				if found >= 0 {
					return 0, mapErr(path, ErrColumns, "a header name that occurs once", "columns %d and %d are both named %q", found+1, i+1, ref.Name)
				}
				found = i
			}
		}
		if found < 0 {
			return 0, mapErr(path, ErrColumns, fmt.Sprintf("a column named %s in the header row", ref), "no column named %s", ref)
		}
		return found, nil
	}
	used := map[int]string{}
	assign := func(path string, vc *ValueColumn, r role, ch int, k units.Kind) error {
		i, err := resolve(path+".column", vc.Column)
		if err != nil {
			return err
		}
		if prev, dup := used[i]; dup {
			return mapErr(path+".column", ErrColumns, "each column mapped once", "column %d %q is also mapped as %s", i+1, t.cols[i].header, prev)
		}
		used[i] = path
		c := &t.cols[i]
		c.role, c.ch = r, ch
		unit := vc.Unit
		if unit == "" {
			h, ok := parseHeaderCell(c.header)
			if !ok || m.NoHeader {
				return mapErr(path+".unit", ErrUnit, fmt.Sprintf("a %s unit in the map or in brackets in the header", k), "no unit for column %d %q", i+1, c.header)
			}
			unit = h.unit
		}
		scale := 1.0
		if vc.Scale != nil {
			scale = *vc.Scale
		}
		if !unitColumn(c, k, unit, scale) {
			e := mapErr(path+".unit", ErrUnit, fmt.Sprintf("a %s unit (%s)", k, unitList(k)), "unit %q is not a %s unit", unit, k)
			e.(*ParseError).Column, e.(*ParseError).Field = i+1, c.header
			return e
		}
		return nil
	}
	if m.Time != nil {
		if err := assign("time", m.Time, roleTime, 0, units.Time); err != nil {
			return nil, err
		}
	}
	if m.Position != nil {
		if err := assign("position", m.Position, rolePos, 0, units.Length); err != nil {
			return nil, err
		}
	}
	for k := range m.Channels {
		p := fmt.Sprintf("channels[%d]", k)
		if err := assign(p+".x", &m.Channels[k].X, roleX, k, units.Voltage); err != nil {
			return nil, err
		}
		if err := assign(p+".y", &m.Channels[k].Y, roleY, k, units.Voltage); err != nil {
			return nil, err
		}
	}
	for _, key := range sortedKeys(m.MetaFromColumn) {
		p := "meta_from_column." + key
		i, err := resolve(p, m.MetaFromColumn[key])
		if err != nil {
			return nil, err
		}
		if prev, dup := used[i]; dup {
			return nil, mapErr(p, ErrColumns, "each column mapped once", "column %d %q is also mapped as %s", i+1, t.cols[i].header, prev)
		}
		used[i] = p
		t.cols[i].role, t.cols[i].metaKey = roleMeta, key
	}
	// Skip rows after the header.
	for skipped := 0; skipped < m.SkipRows && !m.NoHeader; {
		line, ok, err := lr.next()
		if err != nil {
			return nil, err
		}
		if !ok {
			return nil, &ParseError{File: name, Line: lr.line, Err: kerr(ErrTruncated, "file ends in the rows to skip"), Expected: fmt.Sprintf("%d rows after the header (map skip_rows)", m.SkipRows)}
		}
		if !isBlank(line) && !isComment(line, t.comment) {
			skipped++
		}
	}
	if err := t.readRows(); err != nil {
		return nil, err
	}
	s := &Scan{Meta: cm.meta, SampleRateHz: cm.srHz, AxialStepM: cm.stepM, TimeS: t.timeS, PositionM: t.posM}
	if cm.meta.Extra != nil {
		s.Meta.Extra = make(map[string]string, len(cm.meta.Extra))
		for k, v := range cm.meta.Extra {
			s.Meta.Extra[k] = v
		}
	}
	base := filepath.Base(name)
	for _, key := range sortedKeys(cm.fileRe) {
		sm := cm.fileRe[key].FindStringSubmatch(base)
		if sm == nil {
			return nil, &ParseError{File: name, Field: key, Err: kerr(ErrFormat, fmt.Sprintf("file name %q does not match %q", base, cm.fileRe[key])),
				Expected: fmt.Sprintf("a file name matching the map's meta_from_file_name.%s", key)}
		}
		if err := applyMeta(&s.Meta, &s.SampleRateHz, &s.AxialStepM, key, sm[1], name, 0); err != nil {
			return nil, err
		}
	}
	for _, key := range sortedKeys(t.meta) {
		if err := applyMeta(&s.Meta, &s.SampleRateHz, &s.AxialStepM, key, t.meta[key], name, t.metaLine[key]); err != nil {
			return nil, err
		}
	}
	for k, c := range cm.channels {
		c.Samples = t.chans[k]
		s.Channels = append(s.Channels, c)
	}
	if err := s.Validate(); err != nil {
		return nil, &ParseError{File: name, Err: kerr(ErrFormat, err.Error()), Expected: "a complete scan"}
	}
	return s, nil
}

// stripUnit returns a header cell without its bracketed unit.
func stripUnit(h string) string {
	hc, _ := parseHeaderCell(h)
	return hc.base
}
