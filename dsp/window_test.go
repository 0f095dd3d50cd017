package dsp

import (
	"strings"
	"testing"

	"whorl/acquire"
)

func windowScan() *acquire.Scan {
	s := &acquire.Scan{}
	for i := range 50 {
		s.PositionM = append(s.PositionM, 1+float64(i)*0.01)
		s.TimeS = append(s.TimeS, float64(i)*0.002)
	}
	s.Channels = []acquire.Channel{{Name: "a", FreqHz: 1, Samples: make([]complex128, 50)}}
	return s
}

func TestParseWindows(t *testing.T) {
	t.Parallel()
	s := windowScan()
	for _, c := range []struct {
		spec string
		want [][2]int
		err  string
	}{
		{"3:9", [][2]int{{3, 9}}, ""},
		{"3:9,20:30", [][2]int{{3, 9}, {20, 30}}, ""},
		{"1.1m:1.2m", [][2]int{{10, 21}}, ""},
		{"1095mm:1205mm", [][2]int{{10, 21}}, ""},
		{"0.01s:0.02s", [][2]int{{5, 11}}, ""},
		{"9:3", nil, "9:3"},
		{"3-9", nil, "START:END"},
		{"0:51", nil, "≤ 50"},
		{"5m:6m", nil, "fewer than two"},
		{"1.1m:2kg", nil, "length unit"},
	} {
		got, err := ParseWindows(c.spec, s)
		if c.err != "" {
			if err == nil || !strings.Contains(err.Error(), c.err) {
				t.Errorf("%q: error %v, want one containing %q", c.spec, err, c.err)
			}
			continue
		}
		if err != nil || len(got) != len(c.want) {
			t.Errorf("%q: %v, %v; want %v", c.spec, got, err, c.want)
			continue
		}
		for i := range got {
			if got[i] != c.want[i] {
				t.Errorf("%q: %v, want %v", c.spec, got, c.want)
			}
		}
	}
}

func FuzzParseWindows(f *testing.F) {
	for _, s := range []string{"3:9", "3:9,20:30", "1.1m:1.2m", "0.01s:0.02s", "9:3", "1e3:2", ":", "1.1m:1.2s", ",,"} {
		f.Add(s)
	}
	s := windowScan()
	f.Fuzz(func(t *testing.T, spec string) {
		ws, err := ParseWindows(spec, s)
		if err != nil {
			return
		}
		// Oracle: every accepted window is a non-empty range inside the scan.
		for _, w := range ws {
			if w[0] < 0 || w[1] > s.Len() || w[0] >= w[1] {
				t.Fatalf("%q gave window %v for %d samples", spec, w, s.Len())
			}
		}
	})
}
