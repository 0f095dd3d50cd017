// Package demodata holds the procedures written for the invented demo
// inspections of package synth, so that `whorl demo`, the desktop window
// and the tests all use the same files.
package demodata

import (
	_ "embed"
	"fmt"

	"whorl/calibrate"
	"whorl/synth"
)

var (
	//go:embed demo-procedure.json
	demoProcedure []byte
	//go:embed alternate-procedure.json
	alternateProcedure []byte
)

// Sets names the demo data sets: "demo" (synth.Demo) and "alternate"
// (synth.Alternate).
var Sets = []string{"demo", "alternate"}

// Config returns the generator configuration of a set.
func Config(set string) (synth.Config, error) {
	switch set {
	case "demo":
		return synth.Demo(), nil
	case "alternate":
		return synth.Alternate(), nil
	}
	return synth.Config{}, fmt.Errorf("demo set %q: expected demo or alternate", set)
}

// ProcedureJSON returns the procedure file of a set.
func ProcedureJSON(set string) ([]byte, error) {
	switch set {
	case "demo":
		return demoProcedure, nil
	case "alternate":
		return alternateProcedure, nil
	}
	return nil, fmt.Errorf("demo set %q: expected demo or alternate", set)
}

// Procedure returns the parsed procedure of a set.
func Procedure(set string) (*calibrate.Procedure, error) {
	b, err := ProcedureJSON(set)
	if err != nil {
		return nil, err
	}
	return calibrate.ParseProcedure(set+"-procedure.json", b)
}
