package acquire

import (
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// TestReadScanLayouts reads the same two samples written in each text
// layout the reader accepts and checks they give the same values.
func TestReadScanLayouts(t *testing.T) {
	t.Parallel()
	const head = "# whorl-scan 1\n# channel: c1; 100 kHz; absolute\n"
	want := []complex128{complex(1.5, -2.25), complex(0.125, 3)}
	wantT := []float64{0, 0.001}
	cases := []struct {
		name, text string
	}{
		{"comma", head + "time [s],c1 X [V],c1 Y [V]\n0,1.5,-2.25\n0.001,0.125,3\n"},
		{"semicolon", head + "time [s];c1 X [V];c1 Y [V]\n0;1.5;-2.25\n0.001;0.125;3\n"},
		{"tab", head + "time [s]\tc1 X [V]\tc1 Y [V]\n0\t1.5\t-2.25\n0.001\t0.125\t3\n"},
		{"semicolon decimal comma", head + "time [s];c1 X [V];c1 Y [V]\n0;1,5;-2,25\n0,001;0,125;3\n"},
		{"tab decimal comma", head + "time [s]\tc1 X [V]\tc1 Y [V]\n0\t1,5\t-2,25\n0,001\t0,125\t3\n"},
		{"byte-order mark", "\uFEFF" + head + "time [s],c1 X [V],c1 Y [V]\n0,1.5,-2.25\n0.001,0.125,3\n"},
		{"CRLF", strings.ReplaceAll(head+"time [s],c1 X [V],c1 Y [V]\n0,1.5,-2.25\n0.001,0.125,3\n", "\n", "\r\n")},
		{"quoted fields", head + `"time [s]","c1 X [V]", "c1 Y [V]"` + "\n\"0\",\"1.5\",-2.25\n0.001,\"0.125\" ,3\n"},
		{"blank and comment lines anywhere", "# whorl-scan 1\n\n# a free comment\n# channel: c1; 100 kHz; absolute\n   \n" +
			"time [s],c1 X [V],c1 Y [V]\n\n# between rows\n0,1.5,-2.25\n  # indented comment\n0.001,0.125,3\n\n"},
		{"millivolts and milliseconds", head + "time [ms],c1 X [mV],c1 Y [mV]\n0,1500,-2250\n1,125,3000\n"},
		{"microvolts (micro sign)", head + "time [s],c1 X [µV],c1 Y [uV]\n0,1500000,-2250000\n0.001,125000,3000000\n"},
		{"columns in another order", head + "c1 Y [V],time [s],c1 X [V]\n-2.25,0,1.5\n3,0.001,0.125\n"},
		{"spaces around fields", head + "time [s] , c1 X [V] , c1 Y [V]\n 0 , 1.5 , -2.25 \n0.001,0.125,3\n"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			s, err := ReadScan(strings.NewReader(c.text), "layout.csv")
			if err != nil {
				t.Fatalf("ReadScan(%q): %v", c.text, err)
			}
			got := s.Channels[0].Samples
			for i := range want {
				// Tolerance: unit factors such as 1e-3 and 1e-6 are not exact in binary; 1e-15 relative covers one rounding.
				if !scalar.EqualWithinAbsOrRel(real(got[i]), real(want[i]), 0, 1e-15) || !scalar.EqualWithinAbsOrRel(imag(got[i]), imag(want[i]), 0, 1e-15) ||
					!scalar.EqualWithinAbsOrRel(s.TimeS[i], wantT[i], 0, 1e-15) {
					t.Errorf("sample %d: got t=%v %v, want t=%v %v (rel tol 1e-15)", i, s.TimeS[i], got[i], wantT[i], want[i])
				}
			}
		})
	}
}

// TestQuotedHeaderWithDoubledQuotes checks RFC 4180 doubled quotes in a
// channel name written in a header cell and in a metadata value.
func TestQuotedFields(t *testing.T) {
	t.Parallel()
	text := "# whorl-scan 1\n# component: \"tube \\\"A\\\" \"\n# channel: c1; 100 kHz; differential\n" +
		"\"time [s]\",\"c1 X [V]\",\"c1 Y [V]\"\n\"0\",\"1e-3\",\"2E+2\"\n"
	s, err := ReadScan(strings.NewReader(text), "q.csv")
	if err != nil {
		t.Fatal(err)
	}
	if s.Meta.Component != `tube "A" ` {
		t.Errorf("component %q, want %q", s.Meta.Component, `tube "A" `)
	}
	if got := s.Channels[0].Samples[0]; got != complex(1e-3, 200) {
		t.Errorf("sample %v, want (0.001+200i)", got)
	}
	var sp splitter
	sp.delim = ';'
	f, serr := sp.split([]byte(`"a ""b"" c";"x;y";plain`))
	if serr != nil || len(f) != 3 || string(f[0]) != `a "b" c` || string(f[1]) != "x;y" || string(f[2]) != "plain" {
		t.Errorf("split: got %q %v, want [a \"b\" c, x;y, plain]", f, serr)
	}
}

// TestUnitConversions checks the factors applied to file units against
// exact definitions.
func TestUnitConversions(t *testing.T) {
	t.Parallel()
	const head = "# whorl-scan 1\n# channel: c1; 100 kHz; absolute\n"
	cases := []struct {
		name, unit string
		value      string
		wantM      float64
		source     string
	}{
		// 1 in = 25.4 mm exactly: international yard and pound agreement (1959).
		{"inch", "in", "1", 0.0254, "1959 international yard and pound agreement"},
		{"ten inches", "in", "10", 0.254, "1959 international yard and pound agreement"},
		// SI prefix milli = 10⁻³ (BIPM SI Brochure, 9th edition, table 7).
		{"millimetre", "mm", "25.4", 0.0254, "SI Brochure table 7"},
		{"metre", "m", "0.0254", 0.0254, "SI base unit"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			text := head + "position [" + c.unit + "],c1 X [V],c1 Y [V]\n" + c.value + ",0,0\n"
			s, err := ReadScan(strings.NewReader(text), "u.csv")
			if err != nil {
				t.Fatal(err)
			}
			// Tolerance: one rounding of the product in float64 (source: %s).
			if got := s.PositionM[0]; !scalar.EqualWithinAbsOrRel(got, c.wantM, 0, 2e-16) {
				t.Errorf("%s %s: got %v m, want %v m (%s), rel tol 2e-16", c.value, c.unit, got, c.wantM, c.source)
			}
		})
	}
	// Voltage and time prefixes: micro = 10⁻⁶, milli = 10⁻³ (SI Brochure, table 7).
	text := head + "time [ms],c1 X [µV],c1 Y [mV]\n2,7,3\n"
	s, err := ReadScan(strings.NewReader(text), "u.csv")
	if err != nil {
		t.Fatal(err)
	}
	if got := s.TimeS[0]; !scalar.EqualWithinAbsOrRel(got, 0.002, 0, 2e-16) {
		t.Errorf("2 ms: got %v s, want 0.002 s", got)
	}
	if got := s.Channels[0].Samples[0]; !scalar.EqualWithinAbsOrRel(real(got), 7e-6, 0, 2e-16) || !scalar.EqualWithinAbsOrRel(imag(got), 3e-3, 0, 2e-16) {
		t.Errorf("7 µV, 3 mV: got %v, want (7e-06+0.003i)", got)
	}
}

func mustMap(t *testing.T, src string) *ColumnMap {
	t.Helper()
	m, err := ParseColumnMap([]byte(src), "map.json")
	if err != nil {
		t.Fatalf("ParseColumnMap: %v", err)
	}
	return m
}

func TestFillPolicies(t *testing.T) {
	t.Parallel()
	in := "t;x;y\n0;1;10\n1;;\n2;;\n3;4;40\n"
	cases := []struct {
		policy string
		wantX  []float64
	}{
		{"previous", []float64{1e-3, 1e-3, 1e-3, 4e-3}},
		// Linear in sample index between 1 mV (row 0) and 4 mV (row 3).
		{"linear", []float64{1e-3, 2e-3, 3e-3, 4e-3}},
	}
	for _, c := range cases {
		t.Run(c.policy, func(t *testing.T) {
			t.Parallel()
			m := mustMap(t, mapBase+`, "missing": "`+c.policy+`"}`)
			s, err := ReadMapped(strings.NewReader(in), "fill.csv", m)
			if err != nil {
				t.Fatal(err)
			}
			for i, w := range c.wantX {
				got := s.Channels[0].Samples[i]
				if !scalar.EqualWithinAbsOrRel(real(got), w, 0, 1e-15) || !scalar.EqualWithinAbsOrRel(imag(got), 10*w, 0, 1e-15) {
					t.Errorf("row %d: got %v, want (%v+%vi), rel tol 1e-15", i, got, w, 10*w)
				}
			}
		})
	}
}

func TestSortPolicy(t *testing.T) {
	t.Parallel()
	m := mustMap(t, mapBase+`, "non_monotonic": "sort"}`)
	s, err := ReadMapped(strings.NewReader("t;x;y\n2;20;0\n0;0;0\n1;10;0\n"), "sort.csv", m)
	if err != nil {
		t.Fatal(err)
	}
	for i := range 3 {
		if s.TimeS[i] != float64(i)*1e-3 || real(s.Channels[0].Samples[i]) != float64(i)*10e-3 {
			t.Errorf("row %d after sorting: t=%v x=%v, want t=%v x=%v", i, s.TimeS[i], real(s.Channels[0].Samples[i]), float64(i)*1e-3, float64(i)*10e-3)
		}
	}
	// The default rejects the same file.
	if _, err := ReadMapped(strings.NewReader("t;x;y\n2;20;0\n0;0;0\n"), "sort.csv", mustMap(t, mapOK)); err == nil {
		t.Error("default policy accepted decreasing time")
	}
}

// TestForeignExample reads the invented bench-logger export shipped in
// testdata with its map and checks values against the generator script
// testdata/acquire/make_foreign.py.
func TestForeignExample(t *testing.T) {
	t.Parallel()
	dir := filepath.Join("..", "testdata", "acquire")
	m, err := LoadColumnMap(filepath.Join(dir, "bench-logger.map.json"))
	if err != nil {
		t.Fatal(err)
	}
	f, err := os.Open(filepath.Join(dir, "R03C017_pull_20260314.csv"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	s, err := ReadMapped(f, "R03C017_pull_20260314.csv", m)
	if err != nil {
		t.Fatal(err)
	}
	if s.Len() != 40 || s.Meta.Component != "R03C017" || s.Meta.Direction != "pull" || s.Meta.ProbeSpeedMPS != 0.25 ||
		s.SampleRateHz != 500 || s.AxialStepM != 0.0005 || s.Meta.Extra["source"] != "bench logger export" {
		t.Fatalf("scan: %d samples, meta %+v, %v Hz, %v m", s.Len(), s.Meta, s.SampleRateHz, s.AxialStepM)
	}
	d, a := s.Channel("300k-diff"), s.Channel("300k-abs")
	if d == nil || a == nil || d.Mode != Differential || a.Mode != Absolute || d.FreqHz != 300e3 {
		t.Fatalf("channels %+v", s.Channels)
	}
	// Row i (0-based): position 12.5 + 0.5 i mm, time 2 i ms, absolute X
	// = 40 exp(-u²) + 1.25 mV with u = (pos - 22)/2 (make_foreign.py),
	// printed with 3 decimals: row 0 gives 1.250 mV, row 19 (pos 22 mm,
	// u = 0) gives 41.250 mV.
	checks := []struct {
		name      string
		got, want float64
	}{
		{"position[0]", s.PositionM[0], 0.0125},
		{"position[39]", s.PositionM[39], 0.032},
		{"time[39]", s.TimeS[39], 0.078},
		{"abs X[0]", real(a.Samples[0]), 1.25e-3},
		{"abs X[19]", real(a.Samples[19]), 41.25e-3},
		{"abs Y[19]", imag(a.Samples[19]), 94.25e-3},
		{"diff X[19]", real(d.Samples[19]), 0},
	}
	for _, c := range checks {
		// Tolerance: decimal text times a unit factor, one or two roundings.
		if !scalar.EqualWithinAbsOrRel(c.got, c.want, 1e-18, 1e-15) {
			t.Errorf("%s: got %v, want %v (abs 1e-18, rel 1e-15)", c.name, c.got, c.want)
		}
	}
	// The differential channel is antisymmetric about the flaw at 22 mm
	// (row 19): X(19+k) = -X(19-k) by construction.
	for k := 1; k <= 10; k++ {
		if p, q := real(d.Samples[19+k]), real(d.Samples[19-k]); !scalar.EqualWithinAbsOrRel(p, -q, 1e-12, 0) {
			t.Errorf("diff X at ±%d rows: %v and %v, want opposite", k, p, q)
		}
	}
	if err := s.Validate(); err != nil {
		t.Error(err)
	}
	if math.IsNaN(real(d.Samples[0])) {
		t.Error("NaN sample")
	}
}

func TestNoHeaderMap(t *testing.T) {
	t.Parallel()
	m := mustMap(t, `{"format": "whorl-column-map 1", "no_header": true, "delimiter": "tab", "decimal": ",",
 "position": {"column": 3, "unit": "in"},
 "channels": [{"name": "c", "frequency": "50 kHz", "mode": "differential", "x": {"column": 1, "unit": "V", "scale": 0.5}, "y": {"column": 2, "unit": "V", "scale": 0.5}}]}`)
	s, err := ReadMapped(strings.NewReader("2\t4\t1\n6\t8\t2,5\n"), "nh.csv", m)
	if err != nil {
		t.Fatal(err)
	}
	// 2.5 in = 0.0635 m (1 in = 25.4 mm exactly, 1959 international yard and pound agreement).
	if s.Len() != 2 || s.Channels[0].Samples[1] != complex(3, 4) || !scalar.EqualWithinAbsOrRel(s.PositionM[1], 0.0635, 0, 2e-16) {
		t.Errorf("got %d samples %v at %v m, want 2 samples ending (3+4i) at 0.0635 m", s.Len(), s.Channels[0].Samples, s.PositionM)
	}
}

func TestUnterminatedLastRowAllowed(t *testing.T) {
	t.Parallel()
	m := mustMap(t, mapBase+`, "allow_unterminated_last_row": true}`)
	s, err := ReadMapped(strings.NewReader("t;x;y\n0;1;2\n1;3;4"), "u.csv", m)
	if err != nil || s.Len() != 2 {
		t.Fatalf("got %v, %v; want 2 samples", s, err)
	}
}

// TestLinesLongerThanTheBuffer reads lines longer than the 1 MiB read
// buffer: a long metadata value, a long comment between rows and a long
// last row cut off without a line end.
func TestLinesLongerThanTheBuffer(t *testing.T) {
	t.Parallel()
	long := strings.Repeat("n", 3<<20)
	text := "# whorl-scan 1\n# x-note: " + long + "\n# channel: c1; 100 kHz; absolute\ntime [s],c1 X [V],c1 Y [V]\n" +
		"0,1,2\n# " + long + "\n0.001,3,4\n"
	// Hide Len so that the reader uses its full-size streaming buffer.
	s, err := ReadScan(struct{ io.Reader }{strings.NewReader(text)}, "long.csv")
	if err != nil {
		t.Fatal(err)
	}
	if s.Meta.Extra["note"] != long || s.Len() != 2 || s.Channels[0].Samples[1] != complex(3, 4) {
		t.Fatalf("got note of %d bytes, %d samples %v", len(s.Meta.Extra["note"]), s.Len(), s.Channels[0].Samples)
	}
	cut := "# whorl-scan 1\n# channel: c1; 100 kHz; absolute\ntime [s],c1 X [V],c1 Y [V]\n0,1,2\n0.001,3," + strings.Repeat("9", 2<<20)
	_, err = ReadScan(struct{ io.Reader }{strings.NewReader(cut)}, "cut.csv")
	var pe *ParseError
	if !errors.As(err, &pe) || pe.Line != 5 || pe.Column != 3 || !errors.Is(err, ErrTruncated) {
		t.Fatalf("got %v, want a truncation error at 5:3", err)
	}
}
