package synth

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"

	"whorl/calibrate"
)

// truthHeader is the header row of a truth file; units are in the names.
var truthHeader = []string{"component", "kind", "axial_position_m", "length_m", "depth_pct", "origin", "support"}

// knownKinds lists the Kind… values a truth file may hold.
var knownKinds = map[string]bool{
	KindODPit: true, KindSupportWear: true, KindIDCrack: true, KindODCrack: true,
	KindDent: true, KindDing: true, KindDeposit: true, KindBurnish: true,
}

// WriteTruth writes t as CSV: the header row
// component,kind,axial_position_m,length_m,depth_pct,origin,support and one
// row per condition (positions and lengths in metres to 0.1 µm, depth in
// %TW, origin OD, ID or empty, support index or −1). See
// docs/demo-scenario.md.
func WriteTruth(w io.Writer, t []Truth) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(truthHeader); err != nil {
		return err
	}
	for _, x := range t {
		rec := []string{x.Component, x.Kind,
			strconv.FormatFloat(x.AxialPositionM, 'f', 7, 64),
			strconv.FormatFloat(x.LengthM, 'f', 7, 64),
			strconv.FormatFloat(x.DepthPct, 'f', -1, 64),
			string(x.Origin), strconv.Itoa(x.Support)}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// TruthError is a problem at one place in a truth file.
type TruthError struct {
	File   string // file name, or empty for a stream
	Line   int    // 1-based line number
	Column int    // 1-based index of the field in its row, 0 when the whole row is at fault
	Field  string // column name, when known
	Err    error
}

// Error formats the error as "FILE: line L column C (FIELD): problem",
// leaving out what is unknown ("truth line …" for a stream).
func (e *TruthError) Error() string {
	where := "truth"
	if e.File != "" {
		where = e.File + ":"
	}
	if e.Column == 0 {
		return fmt.Sprintf("%s line %d: %v", where, e.Line, e.Err)
	}
	return fmt.Sprintf("%s line %d column %d (%s): %v", where, e.Line, e.Column, e.Field, e.Err)
}

// Unwrap returns the underlying problem.
func (e *TruthError) Unwrap() error { return e.Err }

// ReadTruth reads a truth file written by WriteTruth. Errors are
// *TruthError values naming the line and column.
func ReadTruth(r io.Reader) ([]Truth, error) {
	cr := csv.NewReader(r)
	cr.FieldsPerRecord = -1
	cr.ReuseRecord = true
	var out []Truth
	header := true
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			if header {
				return nil, &TruthError{Line: 1, Err: errors.New("empty file: expected the header row")}
			}
			return out, nil
		}
		if err != nil {
			var pe *csv.ParseError
			if errors.As(err, &pe) {
				return nil, &TruthError{Line: pe.Line, Err: fmt.Errorf("byte %d: %w", pe.Column, pe.Err)}
			}
			return nil, err
		}
		line, _ := cr.FieldPos(0)
		if header {
			if err := checkHeader(rec); err != nil {
				return nil, &TruthError{Line: line, Err: err}
			}
			header = false
			continue
		}
		if len(rec) != len(truthHeader) {
			return nil, &TruthError{Line: line, Err: fmt.Errorf("%d fields: expected %d", len(rec), len(truthHeader))}
		}
		t, err := parseTruth(rec, cr)
		if err != nil {
			return nil, err
		}
		out = append(out, t)
	}
}

// ReadTruthFile reads the truth file at path; errors name the file.
func ReadTruthFile(path string) ([]Truth, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	t, err := ReadTruth(f)
	var te *TruthError
	if errors.As(err, &te) {
		te.File = path
	}
	return t, err
}

func checkHeader(rec []string) error {
	if len(rec) > 0 {
		rec[0] = strings.TrimPrefix(rec[0], "\ufeff")
	}
	if len(rec) != len(truthHeader) {
		return fmt.Errorf("header has %d columns: expected %s", len(rec), strings.Join(truthHeader, ","))
	}
	for i, h := range truthHeader {
		if strings.TrimSpace(rec[i]) != h {
			return fmt.Errorf("header column %d is %q: expected %q", i+1, rec[i], h)
		}
	}
	return nil
}

func parseTruth(rec []string, cr *csv.Reader) (Truth, error) {
	bad := func(col int, format string, a ...any) error {
		line, _ := cr.FieldPos(col)
		return &TruthError{Line: line, Column: col + 1, Field: truthHeader[col], Err: fmt.Errorf(format, a...)}
	}
	num := func(col int, what string) (float64, error) {
		s := strings.TrimSpace(rec[col])
		v, err := strconv.ParseFloat(s, 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return 0, bad(col, "%q: expected %s", s, what)
		}
		return v, nil
	}
	var t Truth
	t.Component = strings.TrimSpace(rec[0])
	if t.Component == "" {
		return t, bad(0, "empty: expected a tube identifier")
	}
	t.Kind = strings.TrimSpace(rec[1])
	if !knownKinds[t.Kind] {
		return t, bad(1, "%q: expected one of od-pit, support-wear, id-crack, od-crack, dent, ding, deposit, burnish", t.Kind)
	}
	var err error
	if t.AxialPositionM, err = num(2, "a position in metres"); err != nil {
		return t, err
	}
	if t.LengthM, err = num(3, "a length in metres"); err != nil {
		return t, err
	}
	if t.LengthM < 0 {
		return t, bad(3, "%v: expected a length of 0 or more", t.LengthM)
	}
	if t.DepthPct, err = num(4, "a depth in %TW"); err != nil {
		return t, err
	}
	if t.DepthPct < 0 || t.DepthPct > 100 {
		return t, bad(4, "%v: expected a depth from 0 to 100 %%TW", t.DepthPct)
	}
	switch o := calibrate.Origin(strings.TrimSpace(rec[5])); o {
	case "", calibrate.OD, calibrate.ID:
		t.Origin = o
	default:
		return t, bad(5, "%q: expected OD, ID or empty", rec[5])
	}
	s := strings.TrimSpace(rec[6])
	n, err := strconv.Atoi(s)
	if err != nil || n < -1 {
		return t, bad(6, "%q: expected a support index (0 or more) or -1", s)
	}
	t.Support = n
	return t, nil
}
