package analysis_test

import (
	"fmt"

	"whorl/analysis"
)

// Scoring two calls against two known conditions: one pit found and sized
// 4 %TW deep of the truth, one call on a dent (a false call).
func ExampleScore() {
	d := 64.0
	ind := []analysis.Indication{
		{Component: "R01C001", PositionM: 1.001, Class: analysis.ClassFlaw, Reportable: true, DepthPct: &d},
		{Component: "R01C001", PositionM: 3.0, Class: analysis.ClassReview, Reportable: true},
	}
	truth := []analysis.Truth{
		{Component: "R01C001", Kind: "od-pit", AxialPositionM: 1.0, LengthM: 0.002, DepthPct: 60, Origin: "OD", Flaw: true},
		{Component: "R01C001", Kind: "dent", AxialPositionM: 3.0, LengthM: 0.01},
	}
	a := analysis.Score(ind, truth, analysis.ScoreOptions{Tubes: 10})
	fmt.Printf("found %d of %d, MAE %.1f %%TW, %.1f false calls per 10 tubes\n", a.Detected, a.ToDetect, a.MAEPct, a.FalseCallsPer10)
	// Output: found 1 of 1, MAE 4.0 %TW, 1.0 false calls per 10 tubes
}
