package impedance

import (
	"context"
	"fmt"
	"runtime"
	"sync"
)

// PlanarPoint is one evaluation of a PlanarModel: frequency, lift-off and
// layer stack (top first).
type PlanarPoint struct {
	FreqHz   float64
	LiftoffM float64
	Layers   []Layer
}

// SweepPlanar evaluates m at every point concurrently on workers goroutines
// (workers ≤ 0 means runtime.GOMAXPROCS(0)) and returns the results in the
// order of points. It stops early and returns ctx.Err() when ctx is
// cancelled, and returns the first point's error (wrapped with its index)
// if any point is invalid; no partial results are returned then.
func SweepPlanar(ctx context.Context, m *PlanarModel, points []PlanarPoint, workers int) ([]Result, error) {
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	if workers > len(points) {
		workers = len(points)
	}
	out := make([]Result, len(points))
	errs := make([]error, len(points))
	var wg sync.WaitGroup
	next := make(chan int)
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				p := points[i]
				out[i], errs[i] = m.Impedance(p.FreqHz, p.LiftoffM, p.Layers)
			}
		}()
	}
	var ctxErr error
feed:
	for i := range points {
		select {
		case <-ctx.Done():
			ctxErr = ctx.Err()
			break feed
		case next <- i:
		}
	}
	close(next)
	wg.Wait()
	if ctxErr != nil {
		return nil, ctxErr
	}
	for i, err := range errs {
		if err != nil {
			return nil, fmt.Errorf("point %d: %w", i, err)
		}
	}
	return out, nil
}
