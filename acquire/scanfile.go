package acquire

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"time"
	"unicode"
	"unicode/utf8"

	"whorl/units"
)

// Kind is the kind of a Whorl CSV file, given by its first line.
type Kind int

const (
	// KindUnknown is returned with an error when a file is not a Whorl file.
	KindUnknown Kind = iota
	// KindScan is a demodulated scan: first line "# whorl-scan 1".
	KindScan
	// KindRaw is a raw coil-voltage record: first line "# whorl-raw 1".
	KindRaw
)

// String returns "scan", "raw" or "unknown".
func (k Kind) String() string {
	switch k {
	case KindScan:
		return "scan"
	case KindRaw:
		return "raw"
	}
	return "unknown"
}

// Format words and the version this package reads and writes.
const (
	scanMagic     = "whorl-scan"
	rawMagic      = "whorl-raw"
	formatVersion = 1
)

// Sniff reads the first line of the file at path and returns its kind.
// A file that does not start with a Whorl format line, or has a version
// this package does not read, gives KindUnknown and a *ParseError.
func Sniff(path string) (Kind, error) {
	f, err := os.Open(path)
	if err != nil {
		return KindUnknown, err
	}
	defer f.Close()
	lr := newLineReader(bufio.NewReaderSize(f, 4096), filepath.Base(path))
	line, ok, err := lr.next()
	if err != nil {
		return KindUnknown, err
	}
	if !ok {
		return KindUnknown, &ParseError{File: lr.name, Err: kerr(ErrFormat, "empty file"), Expected: `a first line "# whorl-scan 1" or "# whorl-raw 1"`}
	}
	for _, k := range []Kind{KindScan, KindRaw} {
		f := strings.Fields(strings.TrimPrefix(strings.TrimSpace(string(line)), "#"))
		if strings.HasPrefix(strings.TrimSpace(string(line)), "#") && len(f) >= 1 && f[0] == magicOf(k) {
			if err := checkFormatLine(lr.name, line, k); err != nil {
				return KindUnknown, err
			}
			return k, nil
		}
	}
	return KindUnknown, &ParseError{File: lr.name, Line: 1, Err: kerr(ErrFormat, fmt.Sprintf("first line is %q", clip(string(line)))),
		Expected: `"# whorl-scan 1" or "# whorl-raw 1" (a file in another layout needs a column map)`}
}

func magicOf(k Kind) string {
	if k == KindRaw {
		return rawMagic
	}
	return scanMagic
}

// checkFormatLine checks "# whorl-scan 1" (or whorl-raw).
func checkFormatLine(name string, line []byte, k Kind) error {
	magic := magicOf(k)
	s := strings.TrimSpace(string(line))
	want := fmt.Sprintf("%q", fmt.Sprintf("# %s %d", magic, formatVersion))
	rest, ok := strings.CutPrefix(s, "#")
	if !ok {
		return &ParseError{File: name, Line: 1, Err: kerr(ErrFormat, fmt.Sprintf("first line is %q", clip(s))), Expected: want}
	}
	f := strings.Fields(rest)
	if len(f) != 2 || f[0] != magic {
		return &ParseError{File: name, Line: 1, Err: kerr(ErrFormat, fmt.Sprintf("first line is %q", clip(s))), Expected: want}
	}
	v, err := strconv.Atoi(f[1])
	if err != nil || v != formatVersion {
		return &ParseError{File: name, Line: 1, Err: kerr(ErrFormat, fmt.Sprintf("format version %q is not supported", f[1])), Expected: want}
	}
	return nil
}

func clip(s string) string {
	if len(s) > 60 {
		return s[:60] + "..."
	}
	return s
}

// metaLine is one "# key: value" line.
type metaLine struct {
	key, value string
	line       int
}

// readPreamble checks the format line, hands each metadata line to apply
// as it is read, and returns the header row (a copy) and its line number.
func readPreamble(lr *lineReader, k Kind, apply func(metaLine) error) ([]byte, int, error) {
	first, ok, err := lr.next()
	if err != nil {
		return nil, 0, err
	}
	if !ok {
		return nil, 0, &ParseError{File: lr.name, Err: kerr(ErrTruncated, "empty file"), Expected: fmt.Sprintf("a first line %q", fmt.Sprintf("# %s %d", magicOf(k), formatVersion))}
	}
	if err := checkFormatLine(lr.name, first, k); err != nil {
		return nil, 0, err
	}
	for {
		line, ok, err := lr.next()
		if err != nil {
			return nil, 0, err
		}
		if !ok {
			return nil, 0, &ParseError{File: lr.name, Line: lr.line, Err: kerr(ErrTruncated, "file ends before the header row"), Expected: "a header row naming each column with its unit"}
		}
		if isBlank(line) {
			continue
		}
		if isComment(line, []byte("#")) {
			body := strings.TrimSpace(strings.TrimPrefix(strings.TrimLeft(string(line), " \t"), "#"))
			key, value, isMeta := cutMetaKey(body)
			if !isMeta {
				continue // free comment
			}
			if strings.HasPrefix(value, `"`) {
				u, err := strconv.Unquote(value)
				if err != nil {
					return nil, 0, &ParseError{File: lr.name, Line: lr.line, Field: key, Err: kerr(ErrFormat, fmt.Sprintf("bad quoted value %s", clip(value))), Expected: "a value in double quotes with Go/C escapes"}
				}
				value = u
			}
			if err := apply(metaLine{key, value, lr.line}); err != nil {
				return nil, 0, err
			}
			continue
		}
		return bytes.Clone(line), lr.line, nil
	}
}

// cutMetaKey splits "key: value" where key is lower-case letters, digits
// and '-' starting with a letter, or "x-" followed by any key of Extra.
func cutMetaKey(body string) (key, value string, ok bool) {
	i := strings.Index(body, ":")
	if i <= 0 {
		return "", "", false
	}
	key = body[:i]
	if strings.HasPrefix(key, "x-") {
		if !validExtraKey(key[2:]) {
			return "", "", false
		}
	} else {
		for j, c := range key {
			if !(c >= 'a' && c <= 'z' || j > 0 && (c >= '0' && c <= '9' || c == '-')) {
				return "", "", false
			}
		}
	}
	return key, strings.TrimSpace(body[i+1:]), true
}

// validExtraKey reports whether k may be a key of Meta.Extra: non-empty,
// letters, digits, '-', '_' and '.'.
func validExtraKey(k string) bool {
	if k == "" {
		return false
	}
	for _, c := range k {
		if !(c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= '0' && c <= '9' || c == '-' || c == '_' || c == '.') {
			return false
		}
	}
	return true
}

// metaSink collects metadata lines into a Meta and reports unknown,
// repeated and malformed keys.
type metaSink struct {
	name string
	seen map[string]int
}

func (ms *metaSink) errf(m metaLine, kind error, expected, format string, a ...any) error {
	return &ParseError{File: ms.name, Line: m.line, Field: m.key, Err: kerr(kind, fmt.Sprintf(format, a...)), Expected: expected}
}

func (ms *metaSink) once(m metaLine) error {
	if ms.seen == nil {
		ms.seen = map[string]int{}
	}
	if l, dup := ms.seen[m.key]; dup {
		return ms.errf(m, ErrFormat, "each metadata key once", "repeats the key given on line %d", l)
	}
	ms.seen[m.key] = m.line
	return nil
}

func (ms *metaSink) quantity(m metaLine, k units.Kind, positive bool) (float64, error) {
	v, err := units.Parse(k, m.value)
	if err != nil {
		return 0, ms.errf(m, ErrUnit, fmt.Sprintf("a %s with its unit (%s)", k, strings.Join(units.Names(k), ", ")), "%v", err)
	}
	if positive && !(v > 0) || v < 0 {
		return 0, ms.errf(m, ErrFormat, fmt.Sprintf("a positive %s", k), "%s is not positive", m.value)
	}
	return v, nil
}

// common applies a key shared by scans and raw records. It reports false
// when the key is not a common one.
func (ms *metaSink) common(meta *Meta, m metaLine) (bool, error) {
	switch m.key {
	case "component", "probe-id", "probe-type", "direction", "cal-group", "procedure", "probe-speed", "start":
	default:
		if extra, ok := strings.CutPrefix(m.key, "x-"); ok {
			if err := ms.once(m); err != nil {
				return true, err
			}
			if meta.Extra == nil {
				meta.Extra = map[string]string{}
			}
			meta.Extra[extra] = m.value
			return true, nil
		}
		return false, nil
	}
	if err := ms.once(m); err != nil {
		return true, err
	}
	switch m.key {
	case "component":
		meta.Component = m.value
	case "probe-id":
		meta.ProbeID = m.value
	case "probe-type":
		meta.ProbeType = m.value
	case "direction":
		meta.Direction = m.value
	case "cal-group":
		meta.CalGroup = m.value
	case "procedure":
		meta.Procedure = m.value
	case "probe-speed":
		v, err := ms.quantity(m, units.Speed, false)
		if err != nil {
			return true, err
		}
		meta.ProbeSpeedMPS = v
	case "start":
		t, err := time.Parse(time.RFC3339Nano, m.value)
		if err != nil {
			return true, ms.errf(m, ErrFormat, "an RFC 3339 date and time such as 2026-03-14T08:30:00Z", "%q is not a date and time", m.value)
		}
		meta.Start = t
	}
	return true, nil
}

const commonKeys = "component, probe-id, probe-type, probe-speed, direction, start, cal-group, procedure, x-NAME"

// header is a parsed header cell "name [unit]".
type header struct {
	base, unit string
}

func parseHeaderCell(s string) (header, bool) {
	s = strings.TrimSpace(s)
	if !strings.HasSuffix(s, "]") {
		return header{base: s}, false
	}
	i := strings.LastIndex(s, "[")
	if i < 0 {
		return header{base: s}, false
	}
	return header{base: strings.TrimSpace(s[:i]), unit: strings.TrimSpace(s[i+1 : len(s)-1])}, true
}

// unitColumn fills the factor and expected text of a column from its unit.
func unitColumn(c *column, k units.Kind, unit string, scale float64) bool {
	f, ok := units.Factor(k, unit)
	if !ok {
		return false
	}
	c.factor = f * scale
	if inv := math.Round(1 / f); scale == 1 && f < 1 && 1/inv == f {
		c.div = inv
	}
	c.expected = "a decimal number in " + unit
	if scale == 1 {
		c.unit = unit
	}
	return true
}

func unitList(k units.Kind) string { return strings.Join(units.Names(k), ", ") }

// ReadScan reads a Whorl scan CSV (first line "# whorl-scan 1") from r.
// name is the file name used in errors. Any problem gives a *ParseError
// naming the line and column. See docs/csv-format.md for the layout.
func ReadScan(r io.Reader, name string) (*Scan, error) {
	lr := newLineReader(r, name)
	s := &Scan{}
	ms := &metaSink{name: name}
	declLine := map[string]int{}
	hdr, hdrLine, err := readPreamble(lr, KindScan, func(m metaLine) error {
		ok, err := ms.common(&s.Meta, m)
		if err != nil || ok {
			return err
		}
		switch m.key {
		case "sample-rate":
			if err := ms.once(m); err != nil {
				return err
			}
			s.SampleRateHz, err = ms.quantity(m, units.Frequency, true)
			return err
		case "axial-step":
			if err := ms.once(m); err != nil {
				return err
			}
			s.AxialStepM, err = ms.quantity(m, units.Length, true)
			return err
		case "channel":
			c, err := parseChannelDecl(m.value)
			if err != nil {
				return ms.errf(m, ErrFormat, "NAME; FREQUENCY Hz; absolute|differential", "%v", err)
			}
			if l, dup := declLine[c.Name]; dup {
				return ms.errf(m, ErrFormat, "each channel declared once", "channel %q was declared on line %d", c.Name, l)
			}
			declLine[c.Name] = m.line
			s.Channels = append(s.Channels, c)
			return nil
		}
		return ms.errf(m, ErrFormat, "one of the keys "+commonKeys+", sample-rate, axial-step, channel", "unknown metadata key")
	})
	if err != nil {
		return nil, err
	}
	t := &table{lr: lr, comment: []byte("#"), nch: len(s.Channels)}
	err = t.readHeader(name, hdr, hdrLine, "time [s]", func(c *column, h header) (units.Kind, *cellError) {
		switch {
		case strings.EqualFold(h.base, "time"):
			c.role = roleTime
			return units.Time, nil
		case strings.EqualFold(h.base, "position"):
			c.role = rolePos
			return units.Length, nil
		case strings.HasSuffix(h.base, " X") || strings.HasSuffix(h.base, " Y"):
			chName := strings.TrimSpace(h.base[:len(h.base)-2])
			c.role = roleX
			if strings.HasSuffix(h.base, " Y") {
				c.role = roleY
			}
			c.ch = -1
			for k := range s.Channels {
				if s.Channels[k].Name == chName {
					c.ch = k
				}
			}
			if c.ch < 0 {
				return 0, &cellError{ErrColumns, `a channel declared on a "# channel:" line before the header`, fmt.Sprintf("no channel %q is declared", chName)}
			}
			return units.Voltage, nil
		}
		return 0, &cellError{ErrColumns, `"time", "position" or "CHANNEL X" / "CHANNEL Y", each followed by its unit`, fmt.Sprintf("unknown column %q", h.base)}
	})
	if err != nil {
		return nil, err
	}
	if t.indexOf(roleTime, 0) < 0 && t.indexOf(rolePos, 0) < 0 {
		return nil, &ParseError{File: name, Line: hdrLine, Err: kerr(ErrColumns, "no time or position column"), Expected: `a column "time [s]" or "position [m]" (or both)`}
	}
	for k, c := range s.Channels {
		for _, r := range []role{roleX, roleY} {
			if t.indexOf(r, k) < 0 {
				xy := map[role]string{roleX: "X", roleY: "Y"}[r]
				return nil, &ParseError{File: name, Line: hdrLine, Err: kerr(ErrColumns, fmt.Sprintf("no %s column for channel %q", xy, c.Name)),
					Expected: fmt.Sprintf("a column %q (the channel is declared on line %d)", c.Name+" "+xy+" [V]", declLine[c.Name])}
			}
		}
	}
	if err := t.readRows(); err != nil {
		return nil, err
	}
	s.TimeS, s.PositionM = t.timeS, t.posM
	for k := range s.Channels {
		s.Channels[k].Samples = t.chans[k]
	}
	return s, nil
}

// cellError is a problem with one header cell.
type cellError struct {
	kind          error
	expected, msg string
}

// readHeader splits the header row, detecting the delimiter, and sets up
// one column per cell: classify sets the column's role (and channel) from
// the cell's name and returns the unit kind the cell's unit must have.
// Each role and channel may have one column.
func (t *table) readHeader(name string, hdr []byte, hdrLine int, example string, classify func(*column, header) (units.Kind, *cellError)) error {
	t.sp.delim = detectDelimiter(hdr)
	t.num.allowComma = t.sp.delim != ','
	cells, serr := t.sp.split(hdr)
	if serr != nil {
		return &ParseError{File: name, Line: hdrLine, Column: serr.field, Err: kerr(ErrSyntax, serr.msg), Expected: "a header row of column names"}
	}
	t.cols = make([]column, len(cells))
	first := map[[2]int]int{}
	for i, cell := range cells {
		c := &t.cols[i]
		c.header = strings.TrimSpace(string(cell))
		perr := func(ce *cellError) error {
			return &ParseError{File: name, Line: hdrLine, Column: i + 1, Field: c.header, Err: kerr(ce.kind, ce.msg), Expected: ce.expected}
		}
		h, ok := parseHeaderCell(c.header)
		if !ok {
			return perr(&cellError{ErrUnit, fmt.Sprintf("a column name followed by its unit in brackets, such as %q", example), "no unit in brackets"})
		}
		kind, ce := classify(c, h)
		if ce != nil {
			return perr(ce)
		}
		if !unitColumn(c, kind, h.unit, 1) {
			return perr(&cellError{ErrUnit, fmt.Sprintf("a %s unit (%s)", kind, unitList(kind)), fmt.Sprintf("unit %q is not a %s unit", h.unit, kind)})
		}
		key := [2]int{int(c.role), c.ch}
		if j, dup := first[key]; dup {
			return perr(&cellError{ErrColumns, "each column once", fmt.Sprintf("duplicate of column %d %q", j+1, t.cols[j].header)})
		}
		first[key] = i
	}
	return nil
}

// parseChannelDecl reads "NAME; FREQUENCY; MODE".
func parseChannelDecl(v string) (Channel, error) {
	parts := strings.Split(v, ";")
	if len(parts) != 3 {
		return Channel{}, fmt.Errorf("%q has %d parts separated by ';'", v, len(parts))
	}
	name := strings.TrimSpace(parts[0])
	if err := checkChannelName(name); err != nil {
		return Channel{}, err
	}
	f, err := units.Parse(units.Frequency, parts[1])
	if err != nil {
		return Channel{}, err
	}
	if !(f > 0) {
		return Channel{}, fmt.Errorf("frequency %s is not positive", strings.TrimSpace(parts[1]))
	}
	mode, err := ParseCoilMode(parts[2])
	if err != nil {
		return Channel{}, err
	}
	return Channel{Name: name, FreqHz: f, Mode: mode}, nil
}

// checkChannelName reports a channel name that cannot be written in a
// header cell: empty, with leading or trailing space, or holding a control
// character or one of , ; " [ ] #.
func checkChannelName(name string) error {
	if name == "" {
		return errors.New("empty channel name")
	}
	if name != strings.TrimSpace(name) {
		return fmt.Errorf("channel name %q has leading or trailing space", name)
	}
	if !utf8.ValidString(name) {
		return fmt.Errorf("channel name %q is not valid UTF-8", name)
	}
	for _, c := range name {
		if unicode.IsControl(c) || strings.ContainsRune(",;\"[]#", c) {
			return fmt.Errorf("channel name %q holds %q (names may not hold control characters or , ; \" [ ] #)", name, c)
		}
	}
	return nil
}

// metaWriter writes "# key: value" lines, quoting values that would not
// read back as written.
type metaWriter struct {
	w   *bufio.Writer
	buf []byte
}

func needsQuote(v string) bool {
	if v != strings.TrimSpace(v) || strings.HasPrefix(v, `"`) || !utf8.ValidString(v) || v == "" {
		return true
	}
	for _, c := range v {
		if !unicode.IsPrint(c) && c != ' ' {
			return true
		}
	}
	return false
}

func (mw *metaWriter) put(key, value string) {
	if needsQuote(value) {
		value = strconv.Quote(value)
	}
	mw.w.WriteString("# ")
	mw.w.WriteString(key)
	mw.w.WriteString(": ")
	mw.w.WriteString(value)
	mw.w.WriteByte('\n')
}

func (mw *metaWriter) putQ(key string, v float64, unit string) {
	mw.put(key, fmtG(v)+" "+unit)
}

func isFinite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

func checkFinite(what string, v float64) error {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return fmt.Errorf("%s is %v: expected a finite number", what, v)
	}
	return nil
}

// writeMeta writes the metadata shared by scans and raw records.
func (mw *metaWriter) writeMeta(m *Meta) error {
	str := []struct{ k, v string }{
		{"component", m.Component}, {"probe-id", m.ProbeID}, {"probe-type", m.ProbeType},
	}
	for _, kv := range str {
		if kv.v != "" {
			mw.put(kv.k, kv.v)
		}
	}
	if m.ProbeSpeedMPS != 0 {
		if err := checkFinite("probe speed", m.ProbeSpeedMPS); err != nil {
			return err
		}
		if m.ProbeSpeedMPS < 0 {
			return fmt.Errorf("probe speed %v m/s: expected a speed of zero or more", m.ProbeSpeedMPS)
		}
		mw.putQ("probe-speed", m.ProbeSpeedMPS, "m/s")
	}
	if m.Direction != "" {
		mw.put("direction", m.Direction)
	}
	if !m.Start.IsZero() {
		mw.put("start", m.Start.Format(time.RFC3339Nano))
	}
	if m.CalGroup != "" {
		mw.put("cal-group", m.CalGroup)
	}
	if m.Procedure != "" {
		mw.put("procedure", m.Procedure)
	}
	keys := make([]string, 0, len(m.Extra))
	for k := range m.Extra {
		if !validExtraKey(k) {
			return fmt.Errorf("metadata key %q: expected letters, digits, '-', '_' or '.'", k)
		}
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		mw.put("x-"+k, m.Extra[k])
	}
	return nil
}

// WriteScan writes s to w in the Whorl scan CSV layout (docs/csv-format.md):
// comma-separated, decimal point, values in SI units printed in the
// shortest form that reads back to the same float64. It returns an error,
// before writing anything, if s fails Validate, holds a NaN or infinite
// value, a channel without a coil mode, a channel name that cannot be
// written, or an Extra key that cannot be written.
func WriteScan(w io.Writer, s *Scan) error {
	if err := s.Validate(); err != nil {
		return err
	}
	for _, c := range s.Channels {
		if err := checkChannelName(c.Name); err != nil {
			return fmt.Errorf("scan %q: %w", s.Meta.Component, err)
		}
		if c.Mode != Absolute && c.Mode != Differential {
			return fmt.Errorf("scan %q: channel %q has no coil mode: expected absolute or differential", s.Meta.Component, c.Name)
		}
		if err := checkFinite(fmt.Sprintf("scan %q: channel %q frequency", s.Meta.Component, c.Name), c.FreqHz); err != nil {
			return err
		}
		for i, v := range c.Samples {
			if !isFinite(real(v)) || !isFinite(imag(v)) {
				return fmt.Errorf("scan %q: channel %q sample %d is %v: expected finite X and Y", s.Meta.Component, c.Name, i, v)
			}
		}
	}
	for _, ax := range []struct {
		name string
		v    []float64
	}{{"time", s.TimeS}, {"position", s.PositionM}} {
		for i, v := range ax.v {
			if !isFinite(v) {
				return fmt.Errorf("scan %q: %s %d is %v: expected a finite number", s.Meta.Component, ax.name, i, v)
			}
		}
	}
	for _, q := range []struct {
		name string
		v    float64
	}{{"sample rate", s.SampleRateHz}, {"axial step", s.AxialStepM}} {
		if err := checkFinite(fmt.Sprintf("scan %q: %s", s.Meta.Component, q.name), q.v); err != nil {
			return err
		}
		if q.v < 0 {
			return fmt.Errorf("scan %q: %s %v: expected zero (none) or a positive value", s.Meta.Component, q.name, q.v)
		}
	}
	if s.Len() == 0 {
		return fmt.Errorf("scan %q: no samples", s.Meta.Component)
	}
	for i := 1; i < len(s.TimeS); i++ {
		if !(s.TimeS[i] > s.TimeS[i-1]) {
			return fmt.Errorf("scan %q: time %d (%v s) is not after %v s: expected increasing time", s.Meta.Component, i, s.TimeS[i], s.TimeS[i-1])
		}
	}
	if err := checkMonotonic(s.PositionM); err != nil {
		return fmt.Errorf("scan %q: %w", s.Meta.Component, err)
	}
	bw := bufio.NewWriterSize(w, 1<<16)
	mw := &metaWriter{w: bw}
	fmt.Fprintf(bw, "# %s %d\n", scanMagic, formatVersion)
	if err := mw.writeMeta(&s.Meta); err != nil {
		return err
	}
	if s.SampleRateHz > 0 {
		mw.putQ("sample-rate", s.SampleRateHz, "Hz")
	}
	if s.AxialStepM > 0 {
		mw.putQ("axial-step", s.AxialStepM, "m")
	}
	for _, c := range s.Channels {
		mw.put("channel", fmt.Sprintf("%s; %s Hz; %s", c.Name, fmtG(c.FreqHz), c.Mode))
	}
	var hdr []string
	if s.TimeS != nil {
		hdr = append(hdr, "time [s]")
	}
	if s.PositionM != nil {
		hdr = append(hdr, "position [m]")
	}
	for _, c := range s.Channels {
		hdr = append(hdr, c.Name+" X [V]", c.Name+" Y [V]")
	}
	bw.WriteString(strings.Join(hdr, ","))
	bw.WriteByte('\n')
	buf := make([]byte, 0, 64*(len(hdr)+1))
	for i := range s.Len() {
		buf = buf[:0]
		if s.TimeS != nil {
			buf = strconv.AppendFloat(buf, s.TimeS[i], 'g', -1, 64)
			buf = append(buf, ',')
		}
		if s.PositionM != nil {
			buf = strconv.AppendFloat(buf, s.PositionM[i], 'g', -1, 64)
			buf = append(buf, ',')
		}
		for _, c := range s.Channels {
			buf = strconv.AppendFloat(buf, real(c.Samples[i]), 'g', -1, 64)
			buf = append(buf, ',')
			buf = strconv.AppendFloat(buf, imag(c.Samples[i]), 'g', -1, 64)
			buf = append(buf, ',')
		}
		buf[len(buf)-1] = '\n'
		if _, err := bw.Write(buf); err != nil {
			return err
		}
	}
	return bw.Flush()
}

// ReadRaw reads a Whorl raw coil-voltage record (first line
// "# whorl-raw 1") from r. name is the file name used in errors.
func ReadRaw(r io.Reader, name string) (*RawRecord, error) {
	lr := newLineReader(r, name)
	rec := &RawRecord{}
	ms := &metaSink{name: name}
	hdr, hdrLine, err := readPreamble(lr, KindRaw, func(m metaLine) error {
		ok, err := ms.common(&rec.Meta, m)
		if err != nil || ok {
			return err
		}
		switch m.key {
		case "coil", "mode", "sample-rate", "slot", "excitation":
		default:
			return ms.errf(m, ErrFormat, "one of the keys "+commonKeys+", coil, mode, sample-rate, excitation, slot", "unknown metadata key")
		}
		if err := ms.once(m); err != nil {
			return err
		}
		switch m.key {
		case "coil":
			rec.Coil = m.value
		case "mode":
			mode, err := ParseCoilMode(m.value)
			if err != nil {
				return ms.errf(m, ErrFormat, "absolute or differential", "%q is not a coil mode", m.value)
			}
			rec.Mode = mode
		case "sample-rate":
			rec.SampleRateHz, err = ms.quantity(m, units.Frequency, true)
		case "slot":
			rec.SlotS, err = ms.quantity(m, units.Time, false)
		case "excitation":
			for _, p := range strings.Split(m.value, ";") {
				f, err := units.Parse(units.Frequency, p)
				if err != nil || !(f > 0) {
					return ms.errf(m, ErrUnit, "positive frequencies with units separated by ';', such as 100000 Hz; 400000 Hz", "%q is not a positive frequency", strings.TrimSpace(p))
				}
				rec.ExcitationHz = append(rec.ExcitationHz, f)
			}
		}
		return err
	})
	if err != nil {
		return nil, err
	}
	for _, req := range []struct{ key, what string }{{"sample-rate", "the ADC sample rate"}, {"excitation", "the excitation frequencies"}} {
		if _, ok := ms.seen[req.key]; !ok {
			return nil, &ParseError{File: name, Line: hdrLine, Field: req.key, Err: kerr(ErrFormat, "missing metadata line before the header"), Expected: fmt.Sprintf("a line \"# %s: ...\" giving %s", req.key, req.what)}
		}
	}
	t := &table{lr: lr, comment: []byte("#"), rawTimeHz: rec.SampleRateHz, dropTime: true}
	err = t.readHeader(name, hdr, hdrLine, "voltage [V]", func(c *column, h header) (units.Kind, *cellError) {
		switch strings.ToLower(h.base) {
		case "time":
			c.role = roleTime
			return units.Time, nil
		case "voltage":
			c.role = roleVoltage
			return units.Voltage, nil
		case "reference":
			c.role = roleReference
			return units.Voltage, nil
		case "position":
			c.role = rolePos
			return units.Length, nil
		}
		return 0, &cellError{ErrColumns, `"time", "voltage", "reference" or "position", each followed by its unit`, fmt.Sprintf("unknown column %q", h.base)}
	})
	if err != nil {
		return nil, err
	}
	for _, req := range []struct {
		r    role
		want string
	}{{roleTime, "time [s]"}, {roleVoltage, "voltage [V]"}} {
		if t.indexOf(req.r, 0) < 0 {
			return nil, &ParseError{File: name, Line: hdrLine, Err: kerr(ErrColumns, fmt.Sprintf("no %s column", strings.Fields(req.want)[0])), Expected: fmt.Sprintf("a column %q", req.want)}
		}
	}
	if err := t.readRows(); err != nil {
		return nil, err
	}
	rec.VoltageV, rec.ReferenceV, rec.PositionM = t.volt, t.ref, t.posM
	return rec, nil
}

// WriteRaw writes rec to w in the Whorl raw CSV layout
// (docs/csv-format.md): a time column i/SampleRateHz, the voltage, and the
// reference and position when present. It returns an error, before
// writing anything, for a non-positive sample rate, no excitation
// frequency, columns of different lengths, no samples or a NaN or
// infinite value.
func WriteRaw(w io.Writer, rec *RawRecord) error {
	n := len(rec.VoltageV)
	if !(rec.SampleRateHz > 0) || math.IsInf(rec.SampleRateHz, 0) {
		return fmt.Errorf("raw record %q: sample rate %v Hz: expected a positive finite rate", rec.Meta.Component, rec.SampleRateHz)
	}
	if len(rec.ExcitationHz) == 0 {
		return fmt.Errorf("raw record %q: no excitation frequency", rec.Meta.Component)
	}
	for _, f := range rec.ExcitationHz {
		if !(f > 0) || math.IsInf(f, 0) {
			return fmt.Errorf("raw record %q: excitation %v Hz: expected a positive finite frequency", rec.Meta.Component, f)
		}
	}
	if n == 0 {
		return fmt.Errorf("raw record %q: no samples", rec.Meta.Component)
	}
	if rec.ReferenceV != nil && len(rec.ReferenceV) != n || rec.PositionM != nil && len(rec.PositionM) != n {
		return fmt.Errorf("raw record %q: %d voltages, %d reference values, %d positions: expected equal lengths", rec.Meta.Component, n, len(rec.ReferenceV), len(rec.PositionM))
	}
	if err := checkFinite("slot length", rec.SlotS); err != nil || rec.SlotS < 0 {
		return fmt.Errorf("raw record %q: slot %v s: expected zero or a positive finite time", rec.Meta.Component, rec.SlotS)
	}
	for _, col := range [][]float64{rec.VoltageV, rec.ReferenceV, rec.PositionM} {
		for i, v := range col {
			if !isFinite(v) {
				return fmt.Errorf("raw record %q: sample %d is %v: expected a finite number", rec.Meta.Component, i, v)
			}
		}
	}
	if rec.PositionM != nil {
		if err := checkMonotonic(rec.PositionM); err != nil {
			return fmt.Errorf("raw record %q: %w", rec.Meta.Component, err)
		}
	}
	if rec.Mode != 0 && rec.Mode != Absolute && rec.Mode != Differential {
		return fmt.Errorf("raw record %q: coil mode %v: expected absolute or differential", rec.Meta.Component, rec.Mode)
	}
	bw := bufio.NewWriterSize(w, 1<<16)
	mw := &metaWriter{w: bw}
	fmt.Fprintf(bw, "# %s %d\n", rawMagic, formatVersion)
	if err := mw.writeMeta(&rec.Meta); err != nil {
		return err
	}
	if rec.Coil != "" {
		mw.put("coil", rec.Coil)
	}
	if rec.Mode != 0 {
		mw.put("mode", rec.Mode.String())
	}
	mw.putQ("sample-rate", rec.SampleRateHz, "Hz")
	ex := make([]string, len(rec.ExcitationHz))
	for i, f := range rec.ExcitationHz {
		ex[i] = fmtG(f) + " Hz"
	}
	mw.put("excitation", strings.Join(ex, "; "))
	if rec.SlotS > 0 {
		mw.putQ("slot", rec.SlotS, "s")
	}
	bw.WriteString("time [s],voltage [V]")
	if rec.ReferenceV != nil {
		bw.WriteString(",reference [V]")
	}
	if rec.PositionM != nil {
		bw.WriteString(",position [m]")
	}
	bw.WriteByte('\n')
	buf := make([]byte, 0, 128)
	for i := range n {
		buf = strconv.AppendFloat(buf[:0], float64(i)/rec.SampleRateHz, 'g', -1, 64)
		buf = append(buf, ',')
		buf = strconv.AppendFloat(buf, rec.VoltageV[i], 'g', -1, 64)
		if rec.ReferenceV != nil {
			buf = append(buf, ',')
			buf = strconv.AppendFloat(buf, rec.ReferenceV[i], 'g', -1, 64)
		}
		if rec.PositionM != nil {
			buf = append(buf, ',')
			buf = strconv.AppendFloat(buf, rec.PositionM[i], 'g', -1, 64)
		}
		buf = append(buf, '\n')
		if _, err := bw.Write(buf); err != nil {
			return err
		}
	}
	return bw.Flush()
}

// checkMonotonic reports positions that do not move strictly in one
// direction (the readers reject them).
func checkMonotonic(p []float64) error {
	dir := 0.0
	for i := 1; i < len(p); i++ {
		d := p[i] - p[i-1]
		if dir == 0 && d != 0 {
			dir = math.Copysign(1, d)
		}
		if d == 0 || d*dir < 0 {
			return fmt.Errorf("position %d (%v m) does not continue from %v m: expected positions moving in one direction", i, p[i], p[i-1])
		}
	}
	return nil
}

// writeFileAtomic writes through fn to a temporary file in the folder of
// path, syncs it and renames it over path, so that path never holds a
// half-written file.
func writeFileAtomic(path string, fn func(io.Writer) error) error {
	return writeFileSafely(path, false, fn)
}

// writeFileSafely is writeFileAtomic; with noClobber it fails, wrapping
// fs.ErrExist, when path exists, without a window in which another
// writer's file could be replaced (the temporary file is hard-linked to
// path, which fails if path exists).
func writeFileSafely(path string, noClobber bool, fn func(io.Writer) error) (err error) {
	dir := filepath.Dir(path)
	f, err := os.CreateTemp(dir, "."+filepath.Base(path)+".*.tmp")
	if err != nil {
		return err
	}
	tmp := f.Name()
	defer func() {
		if err != nil {
			f.Close()
			os.Remove(tmp)
		}
	}()
	if err = fn(f); err != nil {
		return err
	}
	if err = f.Sync(); err != nil {
		return err
	}
	if err = f.Close(); err != nil {
		return err
	}
	if err = os.Chmod(tmp, 0o644); err != nil {
		return err
	}
	if !noClobber {
		if err = os.Rename(tmp, path); err != nil {
			return err
		}
		syncDir(dir)
		return nil
	}
	defer os.Remove(tmp)
	if err = os.Link(tmp, path); err == nil || errors.Is(err, fs.ErrExist) {
		if err == nil {
			syncDir(dir)
		}
		return err
	}
	// The file system has no hard links: check, then rename.
	if _, serr := os.Lstat(path); serr == nil {
		return &fs.PathError{Op: "create", Path: path, Err: fs.ErrExist}
	}
	if err = os.Rename(tmp, path); err != nil {
		return err
	}
	syncDir(dir)
	return nil
}

// syncDir flushes a folder's entry list so that a rename survives a crash.
// Systems that cannot sync a folder (Windows) are left as they are: the
// rename itself is still atomic there.
func syncDir(dir string) {
	if d, err := os.Open(dir); err == nil {
		d.Sync()
		d.Close()
	}
}

// CreateScanFile writes s to a new file at path like WriteScanFile, but
// fails with an error wrapping fs.ErrExist if path already exists.
func CreateScanFile(path string, s *Scan) error {
	return writeFileSafely(path, true, func(w io.Writer) error { return WriteScan(w, s) })
}

// WriteScanFile writes s to path with WriteScan. It writes a temporary
// file in the same folder, syncs it and renames it to path, so path never
// holds a half-written file; an existing file at path is replaced.
func WriteScanFile(path string, s *Scan) error {
	return writeFileAtomic(path, func(w io.Writer) error { return WriteScan(w, s) })
}

// WriteRawFile writes rec to path with WriteRaw, atomically like
// WriteScanFile.
func WriteRawFile(path string, rec *RawRecord) error {
	return writeFileAtomic(path, func(w io.Writer) error { return WriteRaw(w, rec) })
}

// ReadScanFile reads the Whorl scan CSV at path; errors name the file by
// its base name.
func ReadScanFile(path string) (*Scan, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return ReadScan(f, filepath.Base(path))
}

// ReadRawFile reads the Whorl raw CSV at path; errors name the file by its
// base name.
func ReadRawFile(path string) (*RawRecord, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return ReadRaw(f, filepath.Base(path))
}
