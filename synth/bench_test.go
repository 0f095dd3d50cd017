package synth

import (
	"io"
	"testing"

	"whorl/acquire"
)

// BenchmarkTube measures generating one demo tube (5.2 m, 8 channels,
// 6,141 samples per channel).
func BenchmarkTube(b *testing.B) {
	g, err := New(Demo())
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		if _, _, err := g.Tube(i % g.Tubes()); err != nil {
			b.Fatal(err)
		}
		i++
	}
}

// BenchmarkTubeWrite measures generating one demo tube and formatting it
// as a Whorl scan CSV (acquire.WriteScan to io.Discard).
func BenchmarkTubeWrite(b *testing.B) {
	g, err := New(Demo())
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
		if err := acquire.WriteScan(io.Discard, s); err != nil {
			b.Fatal(err)
		}
		i++
	}
}
