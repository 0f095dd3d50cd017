package acquire

import (
	"errors"
	"strings"
	"testing"
)

// Building blocks of the malformed-file table.
const (
	scanHead = "# whorl-scan 1\n# channel: c1; 100 kHz; absolute\n"
	scanHdr  = scanHead + "time [s],c1 X [V],c1 Y [V]\n" // header on line 3
	scanHdrS = scanHead + "time [s];c1 X [V];c1 Y [V]\n"
	rawHead  = "# whorl-raw 1\n# sample-rate: 1 kHz\n# excitation: 100 kHz\n"
	mapBase  = `{"format": "whorl-column-map 1", "time": {"column": "t", "unit": "ms"},
 "channels": [{"name": "a", "frequency": "1 kHz", "mode": "abs", "x": {"column": "x", "unit": "mV"}, "y": {"column": "y", "unit": "mV"}}]`
	mapOK = mapBase + "}\n"
)

// malformedCase is one bad input and the exact error it must give.
type malformedCase struct {
	name   string
	kind   string // "scan", "raw", "mapped" (input read with mapJSON), "map" (input is the map)
	input  string
	mapSrc string // for "mapped"; mapOK when empty
	line   int
	col    int
	is     error
	msg    string
}

var malformedCases = []malformedCase{
	{"empty file", "scan", "", "", 0, 0, ErrTruncated,
		`bad.csv: empty file; expected a first line "# whorl-scan 1"`},
	{"foreign first line", "scan", "time,x\n1,2\n", "", 1, 0, ErrFormat,
		`bad.csv:1: first line is "time,x"; expected "# whorl-scan 1"`},
	{"unsupported version", "scan", "# whorl-scan 2\n", "", 1, 0, ErrFormat,
		`bad.csv:1: format version "2" is not supported; expected "# whorl-scan 1"`},
	{"unknown metadata key", "scan", "# whorl-scan 1\n# sample-rte: 2 kHz\n", "", 2, 0, ErrFormat,
		`bad.csv:2 (key "sample-rte"): unknown metadata key; expected one of the keys component, probe-id, probe-type, probe-speed, direction, start, cal-group, procedure, x-NAME, sample-rate, axial-step, channel`},
	{"repeated metadata key", "scan", "# whorl-scan 1\n# component: A\n\n# component: B\n", "", 4, 0, ErrFormat,
		`bad.csv:4 (key "component"): repeats the key given on line 2; expected each metadata key once`},
	{"sample rate in kg", "scan", "# whorl-scan 1\n# sample-rate: 2 kg\n", "", 2, 0, ErrUnit,
		`bad.csv:2 (key "sample-rate"): "2 kg": unknown frequency unit "kg" (expected one of hz, khz, mhz); expected a frequency with its unit (hz, khz, mhz)`},
	{"channel line with two parts", "scan", "# whorl-scan 1\n# channel: c1; 100 kHz\n", "", 2, 0, ErrFormat,
		`bad.csv:2 (key "channel"): "c1; 100 kHz" has 2 parts separated by ';'; expected NAME; FREQUENCY Hz; absolute|differential`},
	{"bad start time", "scan", "# whorl-scan 1\n# start: 14.03.2026\n", "", 2, 0, ErrFormat,
		`bad.csv:2 (key "start"): "14.03.2026" is not a date and time; expected an RFC 3339 date and time such as 2026-03-14T08:30:00Z`},
	{"header without unit", "scan", scanHead + "time,c1 X [V],c1 Y [V]\n0,1,2\n", "", 3, 1, ErrUnit,
		`bad.csv:3:1 (column "time"): no unit in brackets; expected a column name followed by its unit in brackets, such as "time [s]"`},
	{"voltage in kg", "scan", scanHead + "time [s],c1 X [kg],c1 Y [V]\n", "", 3, 2, ErrUnit,
		`bad.csv:3:2 (column "c1 X [kg]"): unit "kg" is not a voltage unit; expected a voltage unit (mv, uv, v, µv, μv)`},
	{"undeclared channel", "scan", scanHead + "time [s],c1 X [V],c1 Y [V],c2 X [V]\n", "", 3, 4, ErrColumns,
		`bad.csv:3:4 (column "c2 X [V]"): no channel "c2" is declared; expected a channel declared on a "# channel:" line before the header`},
	{"duplicate column", "scan", scanHead + "time [s],c1 X [V],c1 Y [V],c1 X [mV]\n", "", 3, 4, ErrColumns,
		`bad.csv:3:4 (column "c1 X [mV]"): duplicate of column 2 "c1 X [V]"; expected each column once`},
	{"missing Y column", "scan", scanHead + "time [s],c1 X [V]\n", "", 3, 0, ErrColumns,
		`bad.csv:3: no Y column for channel "c1"; expected a column "c1 Y [V]" (the channel is declared on line 2)`},
	{"no axis column", "scan", scanHead + "c1 X [V],c1 Y [V]\n", "", 3, 0, ErrColumns,
		`bad.csv:3: no time or position column; expected a column "time [s]" or "position [m]" (or both)`},
	{"unknown column", "scan", scanHead + "time [s],speed [m/s],c1 X [V],c1 Y [V]\n", "", 3, 2, ErrColumns,
		`bad.csv:3:2 (column "speed [m/s]"): unknown column "speed"; expected "time", "position" or "CHANNEL X" / "CHANNEL Y", each followed by its unit`},
	{"number cut by decimal comma", "scan", scanHdrS + "0;1,2e;3\n", "", 4, 2, ErrSyntax,
		`bad.csv:4:2 (column "c1 X [V]"): "1,2e" is not a number; expected a decimal number in V`},
	{"hexadecimal float", "scan", scanHdr + "0,0x1p3,3\n", "", 4, 2, ErrSyntax,
		`bad.csv:4:2 (column "c1 X [V]"): "0x1p3" is not a number; expected a decimal number in V`},
	{"empty field", "scan", scanHdr + "0,1,2\n0.001,,2\n", "", 5, 2, ErrMissingValue,
		`bad.csv:5:2 (column "c1 X [V]"): empty field; expected a decimal number in V`},
	{"NaN", "scan", scanHdr + "0,NaN,2\n", "", 4, 2, ErrNonFinite,
		`bad.csv:4:2 (column "c1 X [V]"): "NaN" is not a finite number; expected a decimal number in V`},
	{"infinity", "scan", scanHdr + "0,1,-Inf\n", "", 4, 3, ErrNonFinite,
		`bad.csv:4:3 (column "c1 Y [V]"): "-Inf" is not a finite number; expected a decimal number in V`},
	{"overflow", "scan", scanHdr + "0,1e999,2\n", "", 4, 2, ErrNonFinite,
		`bad.csv:4:2 (column "c1 X [V]"): "1e999" is not a finite number; expected a decimal number in V`},
	{"time goes back", "scan", scanHdr + "0,1,2\n0.002,1,2\n0.001,1,2\n", "", 6, 1, ErrNotMonotonic,
		`bad.csv:6:1 (column "time [s]"): time 0.001 s is not after 0.002 s on line 5; expected time increasing from row to row`},
	{"time repeats", "scan", scanHdr + "0,1,2\n# note\n0,1,2\n", "", 6, 1, ErrNotMonotonic,
		`bad.csv:6:1 (column "time [s]"): time 0 s is not after 0 s on line 4; expected time increasing from row to row`},
	{"position reverses", "scan", scanHead + "position [mm],c1 X [V],c1 Y [V]\n5,1,2\n4,1,2\n4.5,1,2\n", "", 6, 1, ErrNotMonotonic,
		`bad.csv:6:1 (column "position [mm]"): position 4.5 mm does not continue from 4 mm on line 5; expected position changing in the same direction from row to row`},
	{"too few fields", "scan", scanHdr + "0,1\n", "", 4, 3, ErrSyntax,
		`bad.csv:4:3 (column "c1 Y [V]"): row has 2 fields; expected 3 fields as in the header row`},
	{"too many fields", "scan", scanHdr + "0,1,2,3\n", "", 4, 4, ErrSyntax,
		`bad.csv:4:4: row has 4 fields; expected 3 fields as in the header row`},
	{"truncated in a row", "scan", scanHdr + "0,1,2\n0.001,1", "", 5, 2, ErrTruncated,
		`bad.csv:5:2 (column "c1 X [V]"): file ends in the middle of a row (2 of 3 fields, no line end); expected 3 fields as in the header row`},
	{"truncated in the last number", "scan", scanHdr + "0,1,2\n0.001,1,2.5", "", 5, 3, ErrTruncated,
		`bad.csv:5:3 (column "c1 Y [V]"): last row has no line end; the file may be truncated; expected every row to end with a line end`},
	{"unclosed quote", "scan", scanHdr + "0,\"1,2\n", "", 4, 2, ErrSyntax,
		`bad.csv:4:2 (column "c1 X [V]"): quoted field not closed before the end of the line; expected fields separated by commas, quoted fields closed with a double quote`},
	{"quote inside a field", "scan", scanHdr + "0,1\"5,2\n", "", 4, 2, ErrSyntax,
		`bad.csv:4:2 (column "c1 X [V]"): quote inside an unquoted field; expected fields separated by commas, quoted fields closed with a double quote`},
	// Found by FuzzFastDecimal: a form feed is not a space.
	{"form feed before a number", "scan", scanHdr + "0,\f1,2\n", "", 4, 2, ErrSyntax,
		`bad.csv:4:2 (column "c1 X [V]"): "\f1" is not a number; expected a decimal number in V`},
	{"lines ended by CR alone", "scan", "# whorl-scan 1\r# channel: c1; 100 kHz; absolute\rtime [s],c1 X [V],c1 Y [V]\r0,1,2\r", "", 1, 0, ErrSyntax,
		`bad.csv:1: carriage return inside the first line (lines ended by CR alone?); expected lines ending in LF or CRLF`},
	{"text after closing quote", "scan", scanHdr + "0,\"1\"x,2\n", "", 4, 2, ErrSyntax,
		`bad.csv:4:2 (column "c1 X [V]"): 'x' after a closing quote; expected fields separated by commas, quoted fields closed with a double quote`},
	{"mixed decimal marks", "scan", scanHdrS + "0;1,5;2\n0,001;1.5;2\n", "", 5, 2, ErrSyntax,
		`bad.csv:5:2 (column "c1 X [V]"): "1.5" uses a different decimal mark; expected the decimal mark ',' used earlier in the file`},
	{"no sample rows", "scan", scanHdr + "\n# end\n", "", 5, 0, ErrTruncated,
		`bad.csv:5: no rows of samples after the header row; expected at least one row of samples`},
	{"no header row", "scan", scanHead + "# only comments\n", "", 3, 0, ErrTruncated,
		`bad.csv:3: file ends before the header row; expected a header row naming each column with its unit`},
	{"raw without sample rate", "raw", "# whorl-raw 1\n# excitation: 100 kHz\ntime [s],voltage [V]\n0,1\n", "", 3, 0, ErrFormat,
		`bad.csv:3 (key "sample-rate"): missing metadata line before the header; expected a line "# sample-rate: ..." giving the ADC sample rate`},
	{"raw time off the clock", "raw", rawHead + "time [s],voltage [V]\n0,1\n0.001,1\n0.0025,1\n", "", 7, 1, ErrSyntax,
		`bad.csv:7:1 (column "time [s]"): time 0.0025 s is off the sample clock; expected time 0.002 s (first time plus row index over the sample rate 1000 Hz)`},
	{"raw without voltage", "raw", rawHead + "time [s],reference [V]\n0,1\n", "", 4, 0, ErrColumns,
		`bad.csv:4: no voltage column; expected a column "voltage [V]"`},
	{"raw excitation without unit", "raw", "# whorl-raw 1\n# excitation: 100 kHz; fast\n", "", 2, 0, ErrUnit,
		`bad.csv:2 (key "excitation"): "fast" is not a positive frequency; expected positive frequencies with units separated by ';', such as 100000 Hz; 400000 Hz`},
	{"mapped column not found", "mapped", "t;x;z\n0;1;2\n", "", 1, 0, ErrColumns,
		`bad.csv:1: no column named "y"; expected a column named "y" in the header row (column map map.json line 2, channels[0].y.column)`},
	{"mapped empty with linear fill at end", "mapped", "t;x;y\n0;1;2\n1;1;\n", mapBase + `, "missing": "linear"}`, 3, 3, ErrMissingValue,
		`bad.csv:3:3 (column "y"): empty field with no value after it; expected a decimal number in mV (linear fill needs a value in a later row)`},
	{"mapped sort with repeated time", "mapped", "t;x;y\n2;1;2\n1;1;2\n2;1;2\n", mapBase + `, "non_monotonic": "sort"}`, 4, 1, ErrNotMonotonic,
		`bad.csv:4:1 (column "t"): time 0.002 s repeats the value on line 2; expected each time to appear once`},
	{"mapped meta column changes", "mapped", "t;x;y;tube\n0;1;2;A1\n1;1;2;A2\n", mapBase + `, "meta_from_column": {"component": "tube"}}`, 3, 4, ErrSyntax,
		`bad.csv:3:4 (column "tube"): "A2" differs from the first row; expected "A1" as on line 2 (the column gives the component of the whole scan)`},
	{"mapped file name does not match", "mapped", "t;x;y\n0;1;2\n", mapBase + `, "meta_from_file_name": {"component": "^(R\\d+C\\d+)_"}}`, 0, 0, ErrFormat,
		`bad.csv (key "component"): file name "bad.csv" does not match "^(R\\d+C\\d+)_"; expected a file name matching the map's meta_from_file_name.component`},
	{"mapped index beyond the row", "mapped", "0;1;2\n", `{"format": "whorl-column-map 1", "no_header": true, "time": {"column": 1, "unit": "ms"},
 "channels": [{"name": "a", "frequency": "1 kHz", "mode": "abs", "x": {"column": 2, "unit": "mV"}, "y": {"column": 4, "unit": "mV"}}]}`, 0, 0, ErrColumns,
		`bad.csv: column 4 does not exist; the row has 3 fields; expected a column index from 1 to 3 (column map map.json line 2, channels[0].y.column)`},
	{"map with unknown member", "map", `{"format": "whorl-column-map 1",` + "\n" + ` "delimeter": ";"}`, "", 2, 0, ErrFormat,
		`map.json:2 (key "delimeter"): unknown member; expected one of the members listed in docs/column-map.md`},
	{"map with wrong format", "map", `{"format": "csv"}`, "", 1, 0, ErrFormat,
		`map.json:1 (key "format"): format is "csv"; expected "whorl-column-map 1"`},
	{"map with voltage in kg", "map", strings.Replace(mapOK, `"x": {"column": "x", "unit": "mV"}`, `"x": {"column": "x", "unit": "kg"}`, 1), "", 2, 0, ErrFormat,
		`map.json:2 (key "channels[0].x.unit"): unit "kg" is not a voltage unit; expected a voltage unit (mv, uv, v, µv, μv)`},
	{"map with zero scale", "map", strings.Replace(mapOK, `"unit": "ms"}`, `"unit": "ms", "scale": 0}`, 1), "", 1, 0, ErrFormat,
		`map.json:1 (key "time.scale"): scale 0; expected a finite non-zero factor`},
	{"map syntax error", "map", "{\"format\": \"whorl-column-map 1\",\n\"time\": }", "", 2, 0, ErrFormat,
		`map.json:2: invalid character '}' looking for beginning of value; expected a JSON object (see docs/column-map.md)`},
	{"map column index zero", "map", strings.Replace(mapOK, `"column": "t"`, `"column": 0`, 1), "", 1, 0, ErrFormat,
		`map.json:1 (key "time.column"): column 0; expected a header name in quotes or a whole number from 1`},
	{"map column name empty", "map", strings.Replace(mapOK, `"column": "x"`, `"column": " "`, 1), "", 2, 0, ErrFormat,
		`map.json:2 (key "channels[0].x.column"): empty column name; expected a header name or a 1-based index`},
	{"map truncated", "map", mapOK[:40], "", 1, 0, ErrFormat,
		`map.json:1: column map ends early; expected a complete JSON object`},
}

// readCase runs the reader a case names.
func readCase(c malformedCase) error {
	switch c.kind {
	case "scan":
		_, err := ReadScan(strings.NewReader(c.input), "bad.csv")
		return err
	case "raw":
		_, err := ReadRaw(strings.NewReader(c.input), "bad.csv")
		return err
	case "map":
		_, err := ParseColumnMap([]byte(c.input), "map.json")
		return err
	}
	src := c.mapSrc
	if src == "" {
		src = mapOK
	}
	m, err := ParseColumnMap([]byte(src), "map.json")
	if err != nil {
		return err
	}
	_, err = ReadMapped(strings.NewReader(c.input), "bad.csv", m)
	return err
}

func TestMalformedFiles(t *testing.T) {
	t.Parallel()
	if len(malformedCases) < 25 {
		t.Fatalf("only %d malformed cases", len(malformedCases))
	}
	for _, c := range malformedCases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			err := readCase(c)
			if err == nil {
				t.Fatalf("input %q: no error, want %q", c.input, c.msg)
			}
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("input %q: error %T %v, want *ParseError", c.input, err, err)
			}
			if pe.Line != c.line || pe.Column != c.col {
				t.Errorf("input %q: position %d:%d, want %d:%d", c.input, pe.Line, pe.Column, c.line, c.col)
			}
			if !errors.Is(err, c.is) {
				t.Errorf("input %q: error %v does not wrap %v", c.input, err, c.is)
			}
			if err.Error() != c.msg {
				t.Errorf("input %q:\n got %s\nwant %s", c.input, err.Error(), c.msg)
			}
		})
	}
}
