package viewmodel_test

import (
	"fmt"

	"whorl/gui/viewmodel"
)

// A 12-sample trace 1 mm apart reduced to 3 pixel columns keeps the
// minimum and maximum of each column, so the spike at 5 mm survives.
func ExampleDecimate() {
	z := make([]complex128, 12)
	axis := make([]float64, 12)
	for i := range z {
		axis[i] = float64(i) * 1e-3
	}
	z[5] = complex(0, 2.5) // a 2.5 V spike on Y
	z[9] = complex(0, -1)
	cols := viewmodel.Decimate(nil, z, axis, viewmodel.PartY, 0, 12, 0, 11e-3, 3)
	for i, c := range cols {
		fmt.Printf("column %d: %.1f … %.1f V\n", i, c.Min, c.Max)
	}
	// Output:
	// column 0: 0.0 … 0.0 V
	// column 1: 0.0 … 2.5 V
	// column 2: -1.0 … 0.0 V
}

// An analysis window moved past the end of the scan stays inside it.
func ExampleChart_MoveWindow() {
	axis := make([]float64, 1001) // 0 … 1 m in 1 mm steps
	for i := range axis {
		axis[i] = float64(i) * 1e-3
	}
	c := viewmodel.NewChart(axis, len(axis), "position", "m", 40)
	c.MoveWindow(2)
	w := c.Samples()
	fmt.Printf("window %.3f–%.3f m, samples %d–%d\n", c.WinFrom, c.WinTo, w.Lo, w.Hi)
	// Output:
	// window 0.960–1.000 m, samples 960–1001
}
