package demodata

import (
	"testing"

	"whorl/calibrate"
	"whorl/synth"
)

// Each set's procedure names only channels that the set's generator writes.
func TestProceduresMatchGenerators(t *testing.T) {
	t.Parallel()
	for _, set := range Sets {
		proc, err := Procedure(set)
		if err != nil {
			t.Fatalf("%s: %v", set, err)
		}
		cfg, err := Config(set)
		if err != nil {
			t.Fatal(err)
		}
		g, err := synth.New(cfg)
		if err != nil {
			t.Fatal(err)
		}
		s, err := g.CalibrationScan(0, false)
		if err != nil {
			t.Fatal(err)
		}
		if err := calibrate.CheckScanChannels(proc, s); err != nil {
			t.Errorf("%s: procedure does not fit the generated scans: %v", set, err)
		}
	}
	if _, err := Procedure("nonesuch"); err == nil {
		t.Error(`Procedure("nonesuch") gave no error`)
	}
}
