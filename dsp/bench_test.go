package dsp

import (
	"testing"

	"whorl/acquire"
	"whorl/dsp/dsptest"
)

const benchSamples = 10_000_000

// benchRecord is a 10 s record at 1 MHz with two simultaneous tones
// (400 kHz and 100 kHz), the work load of bench/dsp_pipeline.py.
func benchRecord() *acquire.RawRecord {
	tones := []dsptest.Tone{{FreqHz: 400e3, AmplitudeV: 1, PhaseRad: 0.3}, {FreqHz: 100e3, AmplitudeV: 0.5, PhaseRad: -1}}
	return &acquire.RawRecord{Coil: "diff", Mode: acquire.Differential, SampleRateHz: 1e6,
		ExcitationHz: []float64{400e3, 100e3}, VoltageV: dsptest.MultiTone(benchSamples, 1e6, tones)}
}

// BenchmarkDemodulate10M: lock-in of two tones (mixing, B-spline
// decimation by 50, zero-phase order-4 Butterworth at 400 Hz on 20 kHz, decimation
// to 2 kHz) over 10 million raw samples.
func BenchmarkDemodulate10M(b *testing.B) {
	rec := benchRecord()
	for _, workers := range []int{1, 2} {
		b.Run(map[int]string{1: "workers1", 2: "workers2"}[workers], func(b *testing.B) {
			b.ReportAllocs()
			b.SetBytes(8 * benchSamples)
			cpu0 := processCPUSeconds()
			for b.Loop() {
				if _, _, err := Demodulate(rec, DemodOptions{OutputRateHz: 2000, Workers: workers}); err != nil {
					b.Fatal(err)
				}
			}
			reportRates(b, cpu0)
		})
	}
}

// BenchmarkMemcopy10M copies the same 10 million float64 samples: the
// memory-bandwidth limit of any pass over the record.
func BenchmarkMemcopy10M(b *testing.B) {
	src := benchRecord().VoltageV
	dst := make([]float64, len(src))
	b.ReportAllocs()
	b.SetBytes(8 * benchSamples)
	cpu0 := processCPUSeconds()
	for b.Loop() {
		copy(dst, src)
	}
	reportRates(b, cpu0)
}

// reportRates adds the throughput in Msamples/s of wall time and the CPU
// milliseconds per operation (user + system, all threads), which stays
// meaningful when other processes share the machine.
func reportRates(b *testing.B, cpu0 float64) {
	b.ReportMetric(float64(benchSamples)*float64(b.N)/b.Elapsed().Seconds()/1e6, "Msamples/s")
	if cpu := processCPUSeconds() - cpu0; cpu > 0 {
		b.ReportMetric(1e3*cpu/float64(b.N), "cpu-ms/op")
	}
}

// BenchmarkFiltFilt1M: zero-phase order-4 Butterworth (400 Hz at 20 kHz) over one million
// complex samples.
func BenchmarkFiltFilt1M(b *testing.B) {
	sos, _ := ButterworthLowpass(4, 400, 20000)
	x := make([]complex128, 1_000_000)
	for i := range x {
		x[i] = complex(float64(i%97), float64(i%13))
	}
	y := make([]complex128, len(x))
	f := NewFiltFilter(sos)
	b.ReportAllocs()
	for b.Loop() {
		if err := f.Run(y, x); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkWelch64k: Welch PSD of 65536 samples, segments of 256 and of 250
// (a non-power of two).
func BenchmarkWelch64k(b *testing.B) {
	x := welchInputBench(1 << 16)
	for _, seg := range []int{256, 250} {
		b.Run(map[int]string{256: "seg256", 250: "seg250"}[seg], func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, _, err := WelchPSD(x, 1000, WelchOptions{SegmentLen: seg}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func welchInputBench(n int) []float64 {
	x := make([]float64, n)
	for i := range x {
		x[i] = float64((i*7919)%101-50) / 50
	}
	return x
}
