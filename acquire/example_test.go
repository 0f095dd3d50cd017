package acquire_test

import (
	"errors"
	"fmt"
	"os"
	"strings"

	"whorl/acquire"
)

// A Whorl scan: a 400 kHz differential channel sampled at 2 kHz while the
// probe is pulled at 0.3 m/s.
func ExampleWriteScan() {
	s := &acquire.Scan{
		Meta:         acquire.Meta{Component: "R12C034", ProbeType: "bobbin", ProbeSpeedMPS: 0.3},
		SampleRateHz: 2000,
		TimeS:        []float64{0, 0.0005, 0.001},
		PositionM:    []float64{0.5, 0.49985, 0.4997},
		Channels: []acquire.Channel{{Name: "400k-diff", FreqHz: 400e3, Mode: acquire.Differential,
			Samples: []complex128{0.012 - 0.003i, 0.25 + 0.41i, -0.125 + 0.0625i}}},
	}
	if err := acquire.WriteScan(os.Stdout, s); err != nil {
		fmt.Println(err)
	}
	// Output:
	// # whorl-scan 1
	// # component: R12C034
	// # probe-type: bobbin
	// # probe-speed: 0.3 m/s
	// # sample-rate: 2000 Hz
	// # channel: 400k-diff; 400000 Hz; differential
	// time [s],position [m],400k-diff X [V],400k-diff Y [V]
	// 0,0.5,0.012,-0.003
	// 0.0005,0.49985,0.25,0.41
	// 0.001,0.4997,-0.125,0.0625
}

// Reading converts the units of each column to SI: here milliseconds,
// millimetres and millivolts, with semicolons and decimal commas.
func ExampleReadScan() {
	text := `# whorl-scan 1
# component: R12C034
# channel: 100k-abs; 100 kHz; absolute
time [ms];position [mm];100k-abs X [mV];100k-abs Y [mV]
0;500;12,5;-3
0,5;499,85;250;410
`
	s, err := acquire.ReadScan(strings.NewReader(text), "R12C034.csv")
	if err != nil {
		fmt.Println(err)
		return
	}
	c := s.Channel("100k-abs")
	fmt.Printf("%s at %g kHz (%v): %d samples\n", c.Name, c.FreqHz/1e3, c.Mode, s.Len())
	fmt.Printf("t = %g s, z = %g m, X = %g V, Y = %g V\n", s.TimeS[1], s.PositionM[1], real(c.Samples[1]), imag(c.Samples[1]))
	// Output:
	// 100k-abs at 100 kHz (absolute): 2 samples
	// t = 0.0005 s, z = 0.49985 m, X = 0.25 V, Y = 0.41 V
}

// Every reading error names the file, line, column and what was expected.
func ExampleParseError() {
	text := "# whorl-scan 1\n# channel: c1; 100 kHz; absolute\ntime [s];c1 X [V];c1 Y [V]\n0;1,2e;3\n"
	_, err := acquire.ReadScan(strings.NewReader(text), "scan.csv")
	var pe *acquire.ParseError
	if errors.As(err, &pe) {
		fmt.Println(pe.Line, pe.Column, pe.Field, errors.Is(err, acquire.ErrSyntax))
	}
	fmt.Println(err)
	// Output:
	// 4 2 c1 X [V] true
	// scan.csv:4:2 (column "c1 X [V]"): "1,2e" is not a number; expected a decimal number in V
}

// A foreign export with its own column names, millivolts and a column
// holding the tube, read through a column map.
func ExampleReadMapped() {
	m, err := acquire.ParseColumnMap([]byte(`{
  "format": "whorl-column-map 1",
  "position": {"column": "Pos", "unit": "mm"},
  "channels": [{"name": "200k-diff", "frequency": "200 kHz", "mode": "differential",
                "x": {"column": "Ch1 X", "unit": "mV"}, "y": {"column": "Ch1 Y", "unit": "mV"}}],
  "meta": {"probe-type": "bobbin", "axial-step": "1 mm"},
  "meta_from_column": {"component": "Tube"}
}`), "logger.map.json")
	if err != nil {
		fmt.Println(err)
		return
	}
	text := "Tube,Ch1 Y,Pos,Ch1 X\nR07C001,40,10,-20\nR07C001,80,11,-35\n"
	s, err := acquire.ReadMapped(strings.NewReader(text), "R07C001.csv", m)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(s.Meta.Component, s.Meta.ProbeType, s.AxialStepM, s.PositionM, s.Channels[0].Samples)
	// Output:
	// R07C001 bobbin 0.001 [0.01 0.011] [(-0.02+0.04i) (-0.035+0.08i)]
}
