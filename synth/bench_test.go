package synth

import (
	"io"
	"testing"

	"whorl/acquire"
)

func benchTubes(b *testing.B, c Config, write bool) {
	g, err := New(c)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		s, _, err := g.Tube(i % g.Tubes())
		if err != nil {
			b.Fatal(err)
		}
		if write {
			if err := acquire.WriteScan(io.Discard, s); err != nil {
				b.Fatal(err)
			}
		}
		i++
	}
}

// BenchmarkTube measures generating one demo tube (5.2 m, 8 channels,
// 6,142 samples per channel).
func BenchmarkTube(b *testing.B) { benchTubes(b, Demo(), false) }

// BenchmarkTube20m measures generating one 20 m tube of the demo set
// (23,622 samples per channel, the typical size of FIELD.md §8).
func BenchmarkTube20m(b *testing.B) { benchTubes(b, Demo().WithLength(20), false) }

// BenchmarkTubeWrite measures generating one demo tube and formatting it
// as a Whorl scan CSV (acquire.WriteScan to io.Discard).
func BenchmarkTubeWrite(b *testing.B) { benchTubes(b, Demo(), true) }

// BenchmarkCalibrationScan measures one scan of the standard.
func BenchmarkCalibrationScan(b *testing.B) {
	g, err := New(Demo())
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := g.CalibrationScan(3, true); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkRaw measures the first raw recording of the demo (60,000
// samples at 1 MHz, four simultaneous tones, with reference).
func BenchmarkRaw(b *testing.B) {
	g, err := New(Demo())
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		if _, _, err := g.Raw(0); err != nil {
			b.Fatal(err)
		}
	}
}
