package acquire

import (
	"bytes"
	"encoding/json"
	"math"
	"strings"
	"testing"
)

// validScanTexts are well-formed inputs added to the fuzz seed corpus.
var validScanTexts = []string{
	scanHdr + "0,1,2\n0.001,3,4\n",
	scanHdrS + "0;1,5;2\n0,001;3;4\n",
	"\uFEFF# whorl-scan 1\r\n# component: \"a\\tb\"\r\n# x-k: v\r\n# channel: c; 1 MHz; diff\r\n\"position [in]\"\t\"c X [mV]\"\tc Y [uV]\r\n1\t2\t3\r\n0.5\t1\t1\r\n",
}

var validRawTexts = []string{
	rawHead + "time [s],voltage [V]\n0,1\n0.001,2\n",
	"# whorl-raw 1\n# sample-rate: 2 Hz\n# excitation: 1 Hz; 3 Hz\n# slot: 1 s\n# mode: abs\ntime [ms];voltage [mV];reference [V];position [mm]\n0;1,5;2;3\n500;1;2;4\n",
}

// sameScanSamples reports whether two scans hold bit-identical axes and
// samples.
func sameScanSamples(a, b *Scan) bool {
	if sameBits(a.TimeS, b.TimeS) >= 0 || sameBits(a.PositionM, b.PositionM) >= 0 || len(a.Channels) != len(b.Channels) {
		return false
	}
	if (a.TimeS == nil) != (b.TimeS == nil) || (a.PositionM == nil) != (b.PositionM == nil) {
		return false
	}
	for k := range a.Channels {
		x, y := a.Channels[k].Samples, b.Channels[k].Samples
		if len(x) != len(y) || a.Channels[k].Name != b.Channels[k].Name || a.Channels[k].FreqHz != b.Channels[k].FreqHz {
			return false
		}
		for i := range x {
			if math.Float64bits(real(x[i])) != math.Float64bits(real(y[i])) || math.Float64bits(imag(x[i])) != math.Float64bits(imag(y[i])) {
				return false
			}
		}
	}
	return true
}

// rewriteScan checks that a scan read from fuzz input writes and reads
// back to identical samples.
func rewriteScan(t *testing.T, s *Scan, input string) {
	var buf bytes.Buffer
	if err := WriteScan(&buf, s); err != nil {
		t.Fatalf("input %q read but does not write back: %v", input, err)
	}
	s2, err := ReadScan(&buf, "rewrite.csv")
	if err != nil {
		t.Fatalf("input %q: written file does not read back: %v\n%s", input, err, buf.String())
	}
	if !sameScanSamples(s, s2) {
		t.Fatalf("input %q: samples differ after write and read", input)
	}
}

func FuzzReadScan(f *testing.F) {
	for _, c := range malformedCases {
		if c.kind == "scan" {
			f.Add(c.input)
		}
	}
	for _, s := range validScanTexts {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, input string) {
		s, err := ReadScan(strings.NewReader(input), "fuzz.csv")
		if err != nil {
			if _, ok := err.(*ParseError); !ok {
				t.Fatalf("input %q: error %T %v, want *ParseError", input, err, err)
			}
			return
		}
		rewriteScan(t, s, input)
	})
}

func FuzzReadRaw(f *testing.F) {
	for _, c := range malformedCases {
		if c.kind == "raw" {
			f.Add(c.input)
		}
	}
	for _, s := range validRawTexts {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, input string) {
		r, err := ReadRaw(strings.NewReader(input), "fuzz.csv")
		if err != nil {
			if _, ok := err.(*ParseError); !ok {
				t.Fatalf("input %q: error %T %v, want *ParseError", input, err, err)
			}
			return
		}
		var buf bytes.Buffer
		if err := WriteRaw(&buf, r); err != nil {
			t.Fatalf("input %q read but does not write back: %v", input, err)
		}
		r2, err := ReadRaw(&buf, "rewrite.csv")
		if err != nil {
			t.Fatalf("input %q: written file does not read back: %v\n%s", input, err, buf.String())
		}
		if sameBits(r.VoltageV, r2.VoltageV) >= 0 || sameBits(r.ReferenceV, r2.ReferenceV) >= 0 || sameBits(r.PositionM, r2.PositionM) >= 0 {
			t.Fatalf("input %q: samples differ after write and read", input)
		}
	})
}

// fuzzMaps are the maps FuzzReadMapped reads its inputs with.
var fuzzMaps = []string{
	mapOK,
	mapBase + `, "missing": "linear", "non_monotonic": "sort", "meta_from_column": {"component": "tube"}}`,
	mapBase + `, "missing": "previous", "allow_unterminated_last_row": true, "comment_prefix": ""}`,
	`{"format": "whorl-column-map 1", "no_header": true, "decimal": ",", "position": {"column": 1, "unit": "mm"},
 "channels": [{"name": "a", "frequency": "1 kHz", "mode": "diff", "x": {"column": 2, "unit": "V", "scale": 0.001}, "y": {"column": 3, "unit": "V"}}]}`,
	`{"format": "whorl-column-map 1", "header_row": 2, "skip_rows": 1, "delimiter": "tab", "time": {"column": "t"}, "position": {"column": "p [in]"},
 "channels": [{"name": "a", "frequency": "1 kHz", "mode": "abs", "x": {"column": "x [mV]"}, "y": {"column": 4, "unit": "uV"}}]}`,
}

func FuzzReadMapped(f *testing.F) {
	for _, c := range malformedCases {
		if c.kind == "mapped" {
			f.Add(c.input, uint8(0))
		}
	}
	f.Add("t;x;y;tube\n2;1;;A\n1;;3;A\n3;2;1;A\n", uint8(1))
	f.Add("t;x;y\n0;1;2\n1;;\n2;3;4", uint8(2))
	f.Add("1;2;3\n2,5;4;5\n", uint8(3))
	f.Add("pre\nt [ms]\tp [in]\tx [mV]\ty\nunits\n0\t1\t2\t3\n1\t2\t3\t4\n", uint8(4))
	maps := make([]*ColumnMap, len(fuzzMaps))
	for i, src := range fuzzMaps {
		m, err := ParseColumnMap([]byte(src), "map.json")
		if err != nil {
			f.Fatalf("map %d: %v", i, err)
		}
		maps[i] = m
	}
	f.Fuzz(func(t *testing.T, input string, which uint8) {
		m := maps[int(which)%len(maps)]
		s, err := ReadMapped(strings.NewReader(input), "fuzz.csv", m)
		if err != nil {
			if _, ok := err.(*ParseError); !ok {
				t.Fatalf("input %q: error %T %v, want *ParseError", input, err, err)
			}
			return
		}
		rewriteScan(t, s, input)
	})
}

func FuzzLoadColumnMap(f *testing.F) {
	for _, c := range malformedCases {
		if c.kind == "map" {
			f.Add(c.input)
		}
		if c.mapSrc != "" {
			f.Add(c.mapSrc)
		}
	}
	for _, m := range fuzzMaps {
		f.Add(m)
	}
	f.Fuzz(func(t *testing.T, input string) {
		m, err := ParseColumnMap([]byte(input), "fuzz.json")
		if err != nil {
			if _, ok := err.(*ParseError); !ok {
				t.Fatalf("input %q: error %T %v, want *ParseError", input, err, err)
			}
			return
		}
		// A map that loads marshals to JSON that loads again.
		out, err := json.Marshal(m)
		if err != nil {
			t.Fatalf("input %q: marshal: %v", input, err)
		}
		if _, err := ParseColumnMap(out, "again.json"); err != nil {
			t.Fatalf("input %q: re-marshalled map %s does not load: %v", input, out, err)
		}
		// Reading with it never panics.
		ReadMapped(strings.NewReader("t;x;y\n0;1;2\n"), "any.csv", m)
	})
}
