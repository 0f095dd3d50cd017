package acquire

import (
	"errors"
	"strconv"
	"strings"
)

// Sentinel errors wrapped by every *ParseError, so that callers can branch
// on the kind of problem with errors.Is.
var (
	// ErrFormat marks a missing or unsupported format line, a malformed
	// metadata line or an unknown metadata key.
	ErrFormat = errors.New("format")
	// ErrSyntax marks a field that is not a number, a bad quoted field or a
	// row with the wrong number of fields.
	ErrSyntax = errors.New("syntax")
	// ErrColumns marks a missing, duplicate, unknown or ambiguous column.
	ErrColumns = errors.New("columns")
	// ErrUnit marks a unit that is missing, unknown or of the wrong kind.
	ErrUnit = errors.New("unit")
	// ErrMissingValue marks an empty field where a value is required.
	ErrMissingValue = errors.New("missing value")
	// ErrNonFinite marks NaN, infinity or a number too large for float64.
	ErrNonFinite = errors.New("non-finite value")
	// ErrNotMonotonic marks a time or position axis that does not advance.
	ErrNotMonotonic = errors.New("not monotonic")
	// ErrTruncated marks a file that ends in the middle of a row or before
	// its first sample.
	ErrTruncated = errors.New("truncated")
)

// ParseError reports a problem at a place in a file.
//
// Line is the 1-based line number in the file (a byte-order mark does not
// count; 0 when the problem concerns the whole file, such as an empty
// file). Column is the 1-based index of the field in its row, counting the
// delimiter-separated fields of the row (0 when the problem concerns the
// whole line, such as a metadata line or a row with too few fields).
// Field is the column header, or the metadata key, concerned (empty when
// none applies). Expected says what the reader expected to find there. Err
// describes what was found and wraps one of the Err... sentinels.
type ParseError struct {
	File     string
	Line     int
	Column   int
	Field    string
	Expected string
	Err      error
}

// Error formats the error as
//
//	file:line:column (column "header"): what was found; expected what
//
// leaving out the parts that are zero or empty. A metadata key is shown as
// (key "name").
func (e *ParseError) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		b.WriteByte(':')
		b.WriteString(strconv.Itoa(e.Line))
		if e.Column > 0 {
			b.WriteByte(':')
			b.WriteString(strconv.Itoa(e.Column))
		}
	}
	if e.Field != "" {
		if e.Column > 0 {
			b.WriteString(" (column ")
		} else {
			b.WriteString(" (key ")
		}
		b.WriteString(strconv.Quote(e.Field))
		b.WriteByte(')')
	}
	b.WriteString(": ")
	if e.Err != nil {
		b.WriteString(e.Err.Error())
	} else {
		b.WriteString("parse error")
	}
	if e.Expected != "" {
		b.WriteString("; expected ")
		b.WriteString(e.Expected)
	}
	return b.String()
}

// Unwrap returns the underlying error.
func (e *ParseError) Unwrap() error { return e.Err }

// kindError is a message that wraps one of the sentinel errors without
// repeating the sentinel's text.
type kindError struct {
	msg  string
	kind error
}

func (e *kindError) Error() string { return e.msg }
func (e *kindError) Unwrap() error { return e.kind }

func kerr(kind error, msg string) error { return &kindError{msg: msg, kind: kind} }
