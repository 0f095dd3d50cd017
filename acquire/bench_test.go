package acquire

import (
	"bytes"
	"io"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"sync"
	"testing"
)

// benchScanText returns a Whorl scan CSV of about size bytes: time,
// position and four channels of normally distributed volts printed in
// shortest form (about 19 characters a field, as real data gives).
func benchScanText(size int, digits int) []byte {
	rng := rand.New(rand.NewPCG(2026, 12))
	s := &Scan{Meta: Meta{Component: "BENCH"}, SampleRateHz: 4000}
	for _, c := range []struct {
		name string
		f    float64
		m    CoilMode
	}{{"400k-diff", 400e3, Differential}, {"200k-diff", 200e3, Differential}, {"100k-abs", 100e3, Absolute}, {"mix", 200e3, Differential}} {
		s.Channels = append(s.Channels, Channel{Name: c.name, FreqHz: c.f, Mode: c.m})
	}
	// round keeps a value to the given significant digits (-1: all), as
	// an instrument with a limited resolution would print it.
	round := func(v float64, digits int) float64 {
		if digits < 0 {
			return v
		}
		r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'e', digits-1, 64), 64)
		return r
	}
	posDigits := digits
	if digits > 0 {
		posDigits = digits + 4 // enough to resolve the 75 µm step along 40 m
	}
	n := 1 << 30
	for i := 0; i < n; i++ {
		s.TimeS = append(s.TimeS, float64(i)/4000)
		s.PositionM = append(s.PositionM, round(1e-3*float64(i)*0.075, posDigits))
		for k := range s.Channels {
			s.Channels[k].Samples = append(s.Channels[k].Samples, complex(round(0.1*rng.NormFloat64(), digits), round(0.1*rng.NormFloat64(), digits)))
		}
		if i == 1023 { // size the file from its first 1024 rows
			var c countWriter
			WriteScan(&c, s)
			n = int(float64(size) / float64(c) * 1024)
		}
	}
	var buf bytes.Buffer
	if err := WriteScan(&buf, s); err != nil {
		panic(err)
	}
	return buf.Bytes()
}

type countWriter int

func (c *countWriter) Write(p []byte) (int, error) {
	*c += countWriter(len(p))
	return len(p), nil
}

var (
	benchOnce, benchOnce6 sync.Once
	benchText, benchText6 []byte
)

// BenchmarkReadScan measures import throughput on a generated 100 MB
// Whorl scan file with full-precision values (shortest exact form, 16-17
// significant digits: the hard case for number parsing).
func BenchmarkReadScan(b *testing.B) {
	benchOnce.Do(func() { benchText = benchScanText(100<<20, -1) })
	benchRead(b, benchText)
}

// BenchmarkReadScan6Digits reads a 100 MB file whose values carry six
// significant digits, as exported by instruments of limited resolution.
func BenchmarkReadScan6Digits(b *testing.B) {
	benchOnce6.Do(func() { benchText6 = benchScanText(100<<20, 6) })
	benchRead(b, benchText6)
}

// benchRead imports text from a file (served from the page cache after
// the first pass), as a user's import does.
func benchRead(b *testing.B, text []byte) {
	path := filepath.Join(b.TempDir(), "bench.csv")
	if err := os.WriteFile(path, text, 0o644); err != nil {
		b.Fatal(err)
	}
	b.SetBytes(int64(len(text)))
	b.ReportAllocs()
	b.ResetTimer()
	cpu0 := processCPUSeconds()
	for b.Loop() {
		if _, err := ReadScanFile(path); err != nil {
			b.Fatal(err)
		}
	}
	if cpu := processCPUSeconds() - cpu0; cpu > 0 {
		// Throughput per CPU second of the whole process (parser and
		// garbage collector), independent of other load on the machine.
		b.ReportMetric(float64(b.N)*float64(len(text))/1e6/cpu, "MB/cpu-s")
	}
}

// BenchmarkWriteScan measures export throughput for the same file.
func BenchmarkWriteScan(b *testing.B) {
	benchOnce.Do(func() { benchText = benchScanText(100<<20, -1) })
	s, err := ReadScan(bytes.NewReader(benchText), "bench.csv")
	if err != nil {
		b.Fatal(err)
	}
	b.SetBytes(int64(len(benchText)))
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		if err := WriteScan(io.Discard, s); err != nil {
			b.Fatal(err)
		}
	}
}

var (
	benchOnceSmall sync.Once
	benchTextSmall []byte
)

// BenchmarkReadScanSmall6Digits reads a 10 MB six-digit file from memory,
// a quicker probe of the per-field cost than the 100 MB benchmarks.
func BenchmarkReadScanSmall6Digits(b *testing.B) {
	benchOnceSmall.Do(func() { benchTextSmall = benchScanText(10<<20, 6) })
	b.SetBytes(int64(len(benchTextSmall)))
	b.ReportAllocs()
	cpu0 := processCPUSeconds()
	for b.Loop() {
		if _, err := ReadScan(bytes.NewReader(benchTextSmall), "small.csv"); err != nil {
			b.Fatal(err)
		}
	}
	if cpu := processCPUSeconds() - cpu0; cpu > 0 {
		b.ReportMetric(float64(b.N)*float64(len(benchTextSmall))/1e6/cpu, "MB/cpu-s")
	}
}
