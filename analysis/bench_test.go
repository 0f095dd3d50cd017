package analysis_test

import (
	"context"
	"testing"
	"time"

	"whorl/acquire"
	"whorl/analysis"
	"whorl/calibrate"
	"whorl/synth"
)

// BenchmarkAnalyze20m analyses one 20 m demo tube (8 channels at 30
// samples per inch, 23,622 samples; supports every 1.05 m): the unit of
// the throughput target of 1,000 tubes a minute on two cores.
func BenchmarkAnalyze20m(b *testing.B) {
	cal, proc, scan := bench20m(b)
	a, err := analysis.NewAnalyzer(cal, proc)
	if err != nil {
		b.Fatal(err)
	}
	ctx := context.Background()
	b.ReportAllocs()
	b.SetBytes(int64(scan.Len() * len(scan.Channels) * 16))
	for b.Loop() {
		if _, _, err := a.Analyze(ctx, scan); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkAnalyze20mParallel runs one analyser per goroutine on all
// GOMAXPROCS cores: ns/op is the wall time per tube at full load, so
// 60e9/(ns/op) is tubes per minute.
func BenchmarkAnalyze20mParallel(b *testing.B) {
	cal, proc, scan := bench20m(b)
	ctx := context.Background()
	b.ReportAllocs()
	b.RunParallel(func(pb *testing.PB) {
		a, err := analysis.NewAnalyzer(cal, proc)
		if err != nil {
			b.Error(err)
			return
		}
		for pb.Next() {
			if _, _, err := a.Analyze(ctx, scan); err != nil {
				b.Error(err)
				return
			}
		}
	})
}

func bench20m(b *testing.B) (*calibrate.Calibration, *calibrate.Procedure, *acquire.Scan) {
	b.Helper()
	cfg := synth.Demo()
	cfg.LengthM = 20
	cfg.SupportsM = nil
	for z := 1.05; z < 19; z += 1.05 {
		cfg.SupportsM = append(cfg.SupportsM, z)
	}
	cfg.Tubes, cfg.Groups, cfg.DriftedGroup = 4, 1, -1
	g, err := synth.New(cfg)
	if err != nil {
		b.Fatal(err)
	}
	std := g.Standard()
	proc, err := calibrate.LoadProcedure("../internal/demodata/demo-procedure.json")
	if err != nil {
		b.Fatal(err)
	}
	cs, err := g.CalibrationScan(0, false)
	if err != nil {
		b.Fatal(err)
	}
	cal, err := calibrate.Build(&std, proc, cs, calibrate.BuildOptions{Builder: "bench", At: time.Date(2026, 10, 14, 6, 0, 0, 0, time.UTC)})
	if err != nil {
		b.Fatal(err)
	}
	scan, _, err := g.Tube(1)
	if err != nil {
		b.Fatal(err)
	}
	return cal, proc, scan
}
