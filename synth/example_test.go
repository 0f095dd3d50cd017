package synth_test

import (
	"fmt"
	"math"
	"math/cmplx"
	"strings"

	"whorl/impedance"
	"whorl/synth"
)

// Example generates one tube of the demo inspection.
func Example() {
	g, err := synth.New(synth.Demo())
	if err != nil {
		fmt.Println(err)
		return
	}
	var names []string
	for _, c := range g.Channels() {
		names = append(names, c.Name)
	}
	fmt.Println(strings.Join(names, " "))
	s, truth, err := g.Tube(0)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s: %d samples of %.2f mm, group %s, %d conditions\n", s.Meta.Component, s.Len(), s.AxialStepM*1e3, s.Meta.CalGroup, len(truth))
	// Output:
	// 400k-diff 400k-abs 200k-diff 200k-abs 100k-diff 100k-abs 20k-diff 20k-abs
	// R01C009: 6142 samples of 0.85 mm, group CG01, 1 conditions
}

// ExampleLayerResponse shows the phase rotation of OD flaw responses with
// depth in 1.09 mm Alloy 690 tube at 400 kHz: relative to the through-wall
// hole, a shallow OD flaw is turned by nearly the full round-trip lag of
// the wall.
func ExampleLayerResponse() {
	const wallM = 1.09e-3
	delta := impedance.SkinDepthM(400e3, 1/115e-8, 1)
	twh := synth.LayerResponse(0, wallM, delta)
	for _, depth := range []float64{80, 60, 40, 20} {
		r := synth.LayerResponse(wallM*(1-depth/100), wallM, delta)
		fmt.Printf("%2.0f %%TW OD: %5.1f° from the through-wall hole\n", depth, -cmplx.Phase(r/twh)*180/math.Pi)
	}
	// Output:
	// 80 %TW OD:  25.4° from the through-wall hole
	// 60 %TW OD:  48.6° from the through-wall hole
	// 40 %TW OD:  69.4° from the through-wall hole
	// 20 %TW OD:  87.8° from the through-wall hole
}
