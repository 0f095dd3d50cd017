package calibrate_test

import (
	"fmt"

	"whorl/calibrate"
)

// A phase-to-depth curve through four calibration holes: a reading between
// two holes is interpolated, a reading beyond the shallowest hole is
// flagged and bounded, never extrapolated.
func ExampleFitCurve() {
	spec := calibrate.CurveSpec{Name: "phase-od", Variable: calibrate.VarPhase, Type: calibrate.CurvePiecewiseLinear,
		Flaws: []string{"TWH", "FBH-80", "FBH-60", "FBH-20x4"}}
	pts := []calibrate.CurvePoint{
		{FlawID: "TWH", PhaseDeg: 40, DepthPct: 100},
		{FlawID: "FBH-80", PhaseDeg: 66, DepthPct: 80},
		{FlawID: "FBH-60", PhaseDeg: 90, DepthPct: 60},
		{FlawID: "FBH-20x4", PhaseDeg: 126, DepthPct: 20},
	}
	c, err := calibrate.FitCurve(spec, pts)
	if err != nil {
		fmt.Println(err)
		return
	}
	d, err := c.Depth(78, 0)
	fmt.Printf("78°: %.0f %%TW (%v)\n", d, err)
	d, err = c.Depth(140, 0)
	fmt.Printf("140°: %.0f %%TW (%v)\n", d, err)
	// Output:
	// 78°: 70 %TW (<nil>)
	// 140°: 20 %TW (outside the curve's calibrated range)
}
