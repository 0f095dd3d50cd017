package impedance

import (
	"context"
	"errors"
	"math"
	"testing"
)

// TestSweepPlanar checks that the concurrent sweep returns, in order, the
// same results as single evaluations, reports a bad point with its index,
// and honours cancellation.
func TestSweepPlanar(t *testing.T) {
	t.Parallel()
	m := mustModel(t, coilC9)
	var pts []PlanarPoint
	for i := 0; i < 40; i++ {
		pts = append(pts, PlanarPoint{FreqHz: 1e3 * float64(i+1), LiftoffM: 1e-3, Layers: halfSpace(16.45e6, 1)})
	}
	got, err := SweepPlanar(context.Background(), m, pts, 3)
	if err != nil {
		t.Fatal(err)
	}
	for i, p := range pts {
		want, _ := m.Impedance(p.FreqHz, p.LiftoffM, p.Layers)
		if got[i] != want {
			t.Errorf("point %d: %+v, want %+v", i, got[i], want)
		}
	}
	bad := append([]PlanarPoint(nil), pts...)
	bad[7].FreqHz = math.NaN()
	if _, err := SweepPlanar(context.Background(), m, bad, 2); err == nil || !errors.Is(err, ErrBadFrequency) {
		t.Errorf("NaN frequency: err = %v, want one wrapping ErrBadFrequency", err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := SweepPlanar(ctx, m, pts, 2); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: err = %v, want context.Canceled", err)
	}
}
