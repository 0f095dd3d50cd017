package acquire

import (
	"bytes"
	"fmt"
	"math"
	"slices"
	"sort"
	"strconv"
)

// FillPolicy says what a reader does with an empty field.
type FillPolicy int

const (
	// FillReject makes an empty field an error (the default).
	FillReject FillPolicy = iota
	// FillPrevious repeats the value of the row before. An empty field in
	// the first row is still an error.
	FillPrevious
	// FillLinear interpolates linearly, in sample index, between the
	// nearest rows before and after that have a value. An empty field in
	// the first or the last row is still an error.
	FillLinear
)

// OrderPolicy says what a reader does when the time or position axis does
// not advance from row to row.
type OrderPolicy int

const (
	// OrderReject makes a non-monotonic axis an error (the default). Time
	// must increase strictly; position must increase strictly or decrease
	// strictly throughout.
	OrderReject OrderPolicy = iota
	// OrderSort sorts the rows by time (by position when there is no time
	// column) into increasing order. Two rows with the same time (or
	// position) are still an error; the other axis is not checked.
	OrderSort
)

// role is what a column holds.
type role int

const (
	roleIgnore role = iota
	roleTime
	rolePos
	roleX
	roleY
	roleMeta
	roleVoltage
	roleReference
)

// column is how one field of each row is read.
type column struct {
	role   role
	ch     int     // channel index for roleX and roleY
	factor float64 // multiplies the parsed number to give SI
	// div, when non-zero, divides the parsed number instead: for units
	// such as mV and mm, whose factor 1/1000 is not exact in binary,
	// dividing by the exact 1000 gives the correctly rounded SI value.
	div      float64
	header   string // header text as written in the file, for errors
	expected string // what a field must hold, for errors
	metaKey  string // Meta key for roleMeta
	// unit is the file's unit for messages when the column has no scale
	// factor (empty: messages show SI values).
	unit string
}

// show formats a value of column c for a message: in the file's unit
// when the column is unscaled, else in SI with siUnit.
func (c *column) show(raw, si float64, siUnit string) string {
	if c.unit != "" {
		return fmtG(raw) + " " + c.unit
	}
	return fmtG(si) + " " + siUnit
}

// table is the row-reading engine shared by the Whorl and mapped readers.
type table struct {
	lr      *lineReader
	sp      splitter
	num     numberParser
	comment []byte
	cols    []column
	nch     int
	fill    FillPolicy
	order   OrderPolicy
	// allowUnterminated accepts a last row without a line end.
	allowUnterminated bool
	// rawTimeHz, when positive, checks that time advances by one sample
	// period per row (raw records keep no time array).
	rawTimeHz float64
	// dropTime checks the time column but does not keep it.
	dropTime bool

	// results
	timeS, posM []float64
	chans       [][]complex128
	volt, ref   []float64
	meta        map[string]string
	metaLine    map[string]int
	rows        int
}

func (t *table) errAt(line, col int, kind error, expected, msg string) *ParseError {
	e := &ParseError{File: t.lr.name, Line: line, Column: col, Expected: expected, Err: kerr(kind, msg)}
	if col >= 1 && col <= len(t.cols) {
		e.Field = t.cols[col-1].header
	}
	return e
}

// indexOf returns the column index with the given role (and channel), or -1.
func (t *table) indexOf(r role, ch int) int {
	for i, c := range t.cols {
		if c.role == r && (r != roleX && r != roleY || c.ch == ch) {
			return i
		}
	}
	return -1
}

// readRows reads every data row after the header.
func (t *table) readRows() error {
	n := len(t.cols)
	vals := make([]float64, n)
	raws := make([]float64, n)
	seen := make([]bool, n)
	runLine := make([]int, n)
	iTime, iPos := t.indexOf(roleTime, 0), t.indexOf(rolePos, 0)
	iVolt, iRef := t.indexOf(roleVoltage, 0), t.indexOf(roleReference, 0)
	xi := make([]int, t.nch)
	yi := make([]int, t.nch)
	for ch := range t.nch {
		xi[ch], yi[ch] = t.indexOf(roleX, ch), t.indexOf(roleY, ch)
	}
	if t.nch > 0 {
		t.chans = make([][]complex128, t.nch)
	}
	var lines []int32 // line of each row, kept only for OrderSort
	fill := t.fill != FillReject
	start := t.lr.consumed
	var (
		lastT, lastP         float64
		lastTRaw, lastPRaw   float64
		lastTLine, lastPLine int
		haveT, haveP         bool
		pDir                 float64
		t0                   float64
		needFill             bool
	)
	for {
		line, ok, err := t.lr.next()
		if err != nil {
			return err
		}
		if !ok {
			break
		}
		if isBlank(line) || isComment(line, t.comment) {
			continue
		}
		ln := t.lr.line
		fields, serr := t.sp.split(line)
		if serr != nil {
			return t.errAt(ln, serr.field, ErrSyntax, fmt.Sprintf("fields separated by %s, quoted fields closed with a double quote", delimName(t.sp.delim)), serr.msg)
		}
		if len(fields) < n {
			if !t.lr.terminated {
				return t.errAt(ln, len(fields), ErrTruncated, fmt.Sprintf("%d fields as in the header row", n),
					fmt.Sprintf("file ends in the middle of a row (%d of %d fields, no line end)", len(fields), n))
			}
			return t.errAt(ln, len(fields)+1, ErrSyntax, fmt.Sprintf("%d fields as in the header row", n),
				fmt.Sprintf("row has %d fields", len(fields)))
		}
		if len(fields) > n {
			e := t.errAt(ln, n+1, ErrSyntax, fmt.Sprintf("%d fields as in the header row", n),
				fmt.Sprintf("row has %d fields", len(fields)))
			return e
		}
		if !t.lr.terminated && !t.allowUnterminated {
			return t.errAt(ln, n, ErrTruncated, "every row to end with a line end",
				"last row has no line end; the file may be truncated")
		}
		for i := range t.cols {
			c := &t.cols[i]
			switch c.role {
			case roleIgnore:
				continue
			case roleMeta:
				if t.rows == 0 {
					t.meta[c.metaKey] = string(bytes.TrimSpace(fields[i]))
					t.metaLine[c.metaKey] = ln
				} else if string(bytes.TrimSpace(fields[i])) != t.meta[c.metaKey] {
					return t.errAt(ln, i+1, ErrSyntax, fmt.Sprintf("%q as on line %d (the column gives the %s of the whole scan)", t.meta[c.metaKey], t.metaLine[c.metaKey], c.metaKey),
						fmt.Sprintf("%q differs from the first row", bytes.TrimSpace(fields[i])))
				}
				continue
			}
			v, st := t.num.parse(fields[i])
			switch st {
			case numOK:
				raws[i] = v
				switch {
				case c.div != 0:
					v /= c.div
				case c.factor != 1:
					v *= c.factor
					if math.IsInf(v, 0) {
						return t.errAt(ln, i+1, ErrNonFinite, c.expected, fmt.Sprintf("%q overflows after unit conversion", fields[i]))
					}
				}
				vals[i] = v
				if fill {
					seen[i] = true
					runLine[i] = 0
				}
			case numEmpty:
				switch {
				case t.fill == FillReject:
					return t.errAt(ln, i+1, ErrMissingValue, c.expected, "empty field")
				case !seen[i]:
					return t.errAt(ln, i+1, ErrMissingValue, c.expected+" (the fill policy needs a value in the first row)", "empty field")
				case t.fill == FillLinear:
					vals[i] = math.NaN()
					needFill = true
					if runLine[i] == 0 {
						runLine[i] = ln
					}
				}
				// FillPrevious keeps vals[i] from the row before.
			case numNonFinite:
				return t.errAt(ln, i+1, ErrNonFinite, c.expected, fmt.Sprintf("%q is not a finite number", fields[i]))
			case numWrongMark:
				return t.errAt(ln, i+1, ErrSyntax, fmt.Sprintf("the decimal mark %q used earlier in the file", t.num.mark),
					fmt.Sprintf("%q uses a different decimal mark", fields[i]))
			default:
				return t.errAt(ln, i+1, ErrSyntax, c.expected, fmt.Sprintf("%q is not a number", fields[i]))
			}
		}
		if t.order == OrderSort {
			lines = append(lines, int32(ln))
		} else {
			if iTime >= 0 && !math.IsNaN(vals[iTime]) {
				v := vals[iTime]
				if haveT && !(v > lastT) {
					return t.errAt(ln, iTime+1, ErrNotMonotonic, "time increasing from row to row",
						fmt.Sprintf("time %s is not after %s on line %d", t.cols[iTime].show(raws[iTime], v, "s"), t.cols[iTime].show(lastTRaw, lastT, "s"), lastTLine))
				}
				if t.rawTimeHz > 0 {
					if !haveT {
						t0 = v
					} else {
						want := float64(t.rows) / t.rawTimeHz
						if d := (v - t0) - want; math.Abs(d) > 1e-3/t.rawTimeHz {
							return t.errAt(ln, iTime+1, ErrSyntax, fmt.Sprintf("time %s s (first time plus row index over the sample rate %s Hz)", fmtG(t0+want), fmtG(t.rawTimeHz)),
								fmt.Sprintf("time %s s is off the sample clock", fmtG(v)))
						}
					}
				}
				lastT, lastTRaw, lastTLine, haveT = v, raws[iTime], ln, true
			}
			if iPos >= 0 && !math.IsNaN(vals[iPos]) {
				v := vals[iPos]
				if haveP {
					d := v - lastP
					if pDir == 0 && d != 0 {
						pDir = math.Copysign(1, d)
					}
					if d == 0 || d*pDir < 0 {
						return t.errAt(ln, iPos+1, ErrNotMonotonic, "position changing in the same direction from row to row",
							fmt.Sprintf("position %s does not continue from %s on line %d", t.cols[iPos].show(raws[iPos], v, "m"), t.cols[iPos].show(lastPRaw, lastP, "m"), lastPLine))
					}
				}
				lastP, lastPRaw, lastPLine, haveP = v, raws[iPos], ln, true
			}
		}
		if iTime >= 0 && !t.dropTime {
			t.timeS = append(t.timeS, vals[iTime])
		}
		if iPos >= 0 {
			t.posM = append(t.posM, vals[iPos])
		}
		if iVolt >= 0 {
			t.volt = append(t.volt, vals[iVolt])
		}
		if iRef >= 0 {
			t.ref = append(t.ref, vals[iRef])
		}
		for ch := range t.nch {
			t.chans[ch] = append(t.chans[ch], complex(vals[xi[ch]], vals[yi[ch]]))
		}
		t.rows++
		if t.rows == reserveAfterRows && t.lr.sizeHint > 0 {
			t.reserve(t.lr.consumed - start)
		}
	}
	if t.rows == 0 {
		return &ParseError{File: t.lr.name, Line: t.lr.line, Err: kerr(ErrTruncated, "no rows of samples after the header row"), Expected: "at least one row of samples"}
	}
	if needFill {
		for i := range t.cols {
			if runLine[i] != 0 {
				return t.errAt(runLine[i], i+1, ErrMissingValue, t.cols[i].expected+" (linear fill needs a value in a later row)", "empty field with no value after it")
			}
		}
		t.fillLinear(iTime, iPos, iVolt, iRef)
	}
	if t.order == OrderSort {
		return t.sortRows(lines, iTime, iPos)
	}
	return nil
}

// reserveAfterRows is the number of rows read before the sample slices
// are sized for the whole input.
const reserveAfterRows = 64

// reserve sizes the sample slices for the rows the input is expected to
// hold, judged from its size and the bytes the first reserveAfterRows rows
// took, so that a large file is decoded without repeated growth. The
// reservation never exceeds the size of the input text in bytes.
func (t *table) reserve(usedBytes int64) {
	perRow := int64(16 * t.nch)
	for _, s := range [][]float64{t.timeS, t.posM, t.volt, t.ref} {
		if s != nil {
			perRow += 8
		}
	}
	if perRow == 0 || usedBytes <= 0 {
		return
	}
	remaining := t.lr.sizeHint - t.lr.consumed
	if remaining <= 0 {
		return
	}
	more := remaining*int64(reserveAfterRows)/usedBytes + 1
	more += more / 64
	if (int64(t.rows)+more)*perRow > t.lr.sizeHint {
		more = t.lr.sizeHint/perRow - int64(t.rows)
	}
	if more < 1 {
		return
	}
	n := int(more)
	for _, s := range []*[]float64{&t.timeS, &t.posM, &t.volt, &t.ref} {
		if *s != nil { // a column the input does not have stays nil
			*s = slices.Grow(*s, n)
		}
	}
	for k := range t.chans {
		t.chans[k] = slices.Grow(t.chans[k], n)
	}
}

// fillLinear replaces the NaN placeholders of empty fields by linear
// interpolation in sample index.
func (t *table) fillLinear(iTime, iPos, iVolt, iRef int) {
	fill := func(n int, get func(int) float64, set func(int, float64)) {
		last := -1
		for k := 0; k < n; k++ {
			if math.IsNaN(get(k)) {
				continue
			}
			if last >= 0 && k-last > 1 {
				a, b := get(last), get(k)
				for j := last + 1; j < k; j++ {
					f := float64(j-last) / float64(k-last)
					set(j, a+(b-a)*f)
				}
			}
			last = k
		}
	}
	fs := func(s []float64) {
		if s != nil {
			fill(len(s), func(k int) float64 { return s[k] }, func(k int, v float64) { s[k] = v })
		}
	}
	fs(t.timeS)
	fs(t.posM)
	fs(t.volt)
	fs(t.ref)
	for _, c := range t.chans {
		fill(len(c), func(k int) float64 { return real(c[k]) }, func(k int, v float64) { c[k] = complex(v, imag(c[k])) })
		fill(len(c), func(k int) float64 { return imag(c[k]) }, func(k int, v float64) { c[k] = complex(real(c[k]), v) })
	}
}

// sortRows orders the rows by time (or by position when there is no
// time) and rejects repeated axis values.
func (t *table) sortRows(lines []int32, iTime, iPos int) error {
	key, col, name, unit := t.timeS, iTime, "time", "s"
	if key == nil {
		key, col, name, unit = t.posM, iPos, "position", "m"
	}
	idx := make([]int, len(key))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return key[idx[a]] < key[idx[b]] })
	for k := 1; k < len(idx); k++ {
		if key[idx[k]] == key[idx[k-1]] {
			return t.errAt(int(lines[idx[k]]), col+1, ErrNotMonotonic, fmt.Sprintf("each %s to appear once", name),
				fmt.Sprintf("%s %s %s repeats the value on line %d", name, fmtG(key[idx[k]]), unit, lines[idx[k-1]]))
		}
	}
	permF := func(s []float64) {
		if s == nil {
			return
		}
		c := make([]float64, len(s))
		for k, i := range idx {
			c[k] = s[i]
		}
		copy(s, c)
	}
	permF(t.timeS)
	permF(t.posM)
	permF(t.volt)
	permF(t.ref)
	for _, s := range t.chans {
		c := make([]complex128, len(s))
		for k, i := range idx {
			c[k] = s[i]
		}
		copy(s, c)
	}
	return nil
}

func fmtG(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

func delimName(d byte) string {
	switch d {
	case '\t':
		return "tabs"
	case ';':
		return "semicolons"
	case ',':
		return "commas"
	}
	return strconv.QuoteRune(rune(d))
}
