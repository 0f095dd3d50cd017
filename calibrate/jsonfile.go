package calibrate

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
)

// FileError is a problem with a standard, procedure or calibration file:
// the file, the line and column where the JSON decoder stopped (0 when the
// problem is with a value rather than the syntax), the field path (for
// example "flaws[2].as_built_depth_pct") and what was wrong.
type FileError struct {
	File   string
	Line   int
	Column int
	Field  string
	Err    error
}

// Error formats the problem as file:line:column: field: problem.
func (e *FileError) Error() string {
	var b bytes.Buffer
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d:%d", e.Line, e.Column)
	}
	if e.Field != "" {
		fmt.Fprintf(&b, ": %s", e.Field)
	}
	fmt.Fprintf(&b, ": %v", e.Err)
	return b.String()
}

// Unwrap returns the underlying problem.
func (e *FileError) Unwrap() error { return e.Err }

// lineCol returns the 1-based line and column of byte offset off in data.
func lineCol(data []byte, off int64) (int, int) {
	if off > int64(len(data)) {
		off = int64(len(data))
	}
	line, col := 1, 1
	for _, c := range data[:off] {
		if c == '\n' {
			line++
			col = 1
		} else {
			col++
		}
	}
	return line, col
}

// decodeStrict decodes one JSON value from data into v, refusing unknown
// fields and trailing data, and turns decoder errors into *FileError with
// the line and column.
func decodeStrict(file string, data []byte, v any) error {
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	if err := dec.Decode(v); err != nil {
		fe := &FileError{File: file}
		var se *json.SyntaxError
		var te *json.UnmarshalTypeError
		switch {
		case errors.As(err, &se):
			fe.Line, fe.Column = lineCol(data, se.Offset)
			fe.Err = fmt.Errorf("malformed JSON: %v", se)
		case errors.As(err, &te):
			fe.Line, fe.Column = lineCol(data, te.Offset)
			fe.Field = te.Field
			fe.Err = fmt.Errorf("got JSON %s, expected %v", te.Value, te.Type)
		case errors.Is(err, io.EOF):
			fe.Err = errors.New("empty file: expected a JSON object")
		case errors.Is(err, io.ErrUnexpectedEOF):
			fe.Line, fe.Column = lineCol(data, int64(len(data)))
			fe.Err = errors.New("truncated JSON: the file ends inside a value")
		default:
			fe.Line, fe.Column = lineCol(data, dec.InputOffset())
			fe.Err = err
		}
		return fe
	}
	if dec.More() {
		l, c := lineCol(data, dec.InputOffset())
		return &FileError{File: file, Line: l, Column: c, Err: errors.New("unexpected data after the JSON object")}
	}
	return nil
}

// readFile reads a whole file, wrapping the error with its name.
func readFile(path string) ([]byte, error) {
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("read %w", err)
	}
	return b, nil
}

// writeFileJSON writes v as indented JSON to path (mode 0644).
func writeFileJSON(path string, v any) error {
	b, err := json.MarshalIndent(v, "", "  ")
	if err != nil {
		return fmt.Errorf("encode %s: %w", path, err)
	}
	b = append(b, '\n')
	if err := os.WriteFile(path, b, 0o644); err != nil {
		return fmt.Errorf("write %w", err)
	}
	return nil
}

// fieldErr builds a value-level *FileError.
func fieldErr(file, field, format string, a ...any) *FileError {
	return &FileError{File: file, Field: field, Err: fmt.Errorf(format, a...)}
}

// decodeLoose decodes data into v allowing unknown fields (used for a
// second look at a file that decodeStrict has already accepted).
func decodeLoose(file string, data []byte, v any) error {
	if err := json.Unmarshal(data, v); err != nil {
		return &FileError{File: file, Err: err}
	}
	return nil
}
