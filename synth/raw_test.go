package synth

import (
	"bytes"
	"fmt"
	"math"
	"math/cmplx"
	"testing"

	"whorl/acquire"
	"whorl/dsp"
)

// TestRawDemodulates demodulates each raw recording with the dsp package's
// lock-in (its convention: A cos(ω(t−t0)+θ) → A e^{jθ}, referred to a
// recorded reference) and compares every output sample with the coil
// phasor the generator drew, at the same position. Tolerance: 2 % of the
// channel's peak-to-peak plus 0.5 mV (ADC noise and resolution, and the
// low-pass's slight smoothing of the flaw signal); 8 % for the
// time-multiplexed recording.
func TestRawDemodulates(t *testing.T) {
	t.Parallel()
	for _, c := range []Config{Demo(), Alternate()} {
		c.Tubes = 40
		c.Groups, c.DriftedGroup = 2, -1
		testRawDemodulates(t, mustNew(t, c))
	}
}

func testRawDemodulates(t *testing.T, g *Generator) {
	for i := range g.RawCount() {
		t.Run(g.cfg.Component+"/"+g.RawName(i), func(t *testing.T) {
			t.Parallel()
			rec, _, ph := g.raw(i)
			var buf bytes.Buffer
			if err := acquire.WriteRaw(&buf, rec); err != nil {
				t.Fatal(err)
			}
			if buf.Len() > 6<<20 {
				t.Errorf("recording is %d bytes as CSV, want under 6 MB", buf.Len())
			}
			scan, _, err := dsp.Demodulate(rec, dsp.DemodOptions{})
			if err != nil {
				t.Fatal(err)
			}
			for fi, ch := range scan.Channels {
				want := ph.ch[fi].Samples
				var pp float64
				for a := 0; a < len(want); a += 50 {
					for b := a; b < len(want); b += 50 {
						pp = math.Max(pp, cmplx.Abs(want[b]-want[a]))
					}
				}
				tol := 0.02*pp + 5e-4
				if rec.SlotS > 0 {
					// one value per 1 ms cycle (0.5 mm of travel),
					// interpolated linearly between cycles
					tol = 0.08*pp + 5e-4
				}
				worst := 0.0
				for k, v := range ch.Samples {
					x := ph.speed * scan.TimeS[k] / ph.fine.stepM // fine-grid index
					j := int(x)
					fr := x - float64(j)
					w := want[j]*complex(1-fr, 0) + want[j+1]*complex(fr, 0)
					worst = math.Max(worst, cmplx.Abs(v-w))
				}
				if worst > tol {
					t.Errorf("%s: worst |demodulated − drawn| = %.5f V, tolerance %.5f V (pp %.4f V)", ch.Name, worst, tol, pp)
				}
			}
		})
	}
	kinds := ""
	for i := range g.RawCount() {
		rec, _, _ := g.Raw(i)
		kinds += fmt.Sprintf("%v/%v ", rec.SlotS > 0, rec.ReferenceV != nil)
	}
	if want := "false/true false/false true/true false/false "[:len(kinds)]; kinds != want {
		t.Errorf("multiplexed/reference of the recordings: %s", kinds)
	}
}
