package acquire

import (
	"math"
	"math/rand/v2"
	"sort"
	"testing"
)

// cleanScan is 100 samples at 1 kHz moving 0.3 mm a sample (0.3 m/s)
// with a smooth signal: Inspect finds nothing.
func cleanScan() *Scan {
	s := &Scan{SampleRateHz: 1000, AxialStepM: 3e-4, Meta: Meta{ProbeSpeedMPS: 0.3},
		Channels: []Channel{{Name: "c", FreqHz: 1e5, Mode: Differential}}}
	for i := range 100 {
		s.TimeS = append(s.TimeS, float64(i)*1e-3)
		s.PositionM = append(s.PositionM, float64(i)*3e-4)
		s.Channels[0].Samples = append(s.Channels[0].Samples, complex(math.Sin(float64(i)/7), math.Cos(float64(i)/5)))
	}
	return s
}

func TestInspect(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name  string
		edit  func(s *Scan)
		kind  string
		index int
		count int
	}{
		{"clean", func(s *Scan) {}, "", 0, 0},
		{"NaN sample", func(s *Scan) { s.Channels[0].Samples[7] = complex(math.NaN(), 0) }, ProblemNonFinite, 7, 0},
		{"time repeats", func(s *Scan) { s.TimeS[50] = s.TimeS[49] }, ProblemNonMonotonic, 50, 0},
		{"gap in time", func(s *Scan) {
			for i := 60; i < 100; i++ {
				s.TimeS[i] += 5e-3
			}
		}, ProblemGap, 60, 1},
		{"rate disagrees", func(s *Scan) { s.SampleRateHz, s.AxialStepM = 1100, 0 }, ProblemRate, -1, 0},
		// On a position grid the time steps follow the probe's speed: a
		// sample rate 5 % off the median step is the speed's variation,
		// 20 % off is not.
		{"position grid, rate 5 % off", func(s *Scan) { s.SampleRateHz = 1050 }, "", 0, 0},
		{"position grid, rate 20 % off", func(s *Scan) { s.SampleRateHz = 1250 }, ProblemRate, -1, 0},
		{"step disagrees", func(s *Scan) { s.AxialStepM = 2e-4 }, ProblemStep, -1, 0},
		{"speed disagrees", func(s *Scan) { s.Meta.ProbeSpeedMPS = 0.5 }, ProblemSpeed, -1, 0},
		{"constant channel", func(s *Scan) {
			for i := range s.Channels[0].Samples {
				s.Channels[0].Samples[i] = 1
			}
		}, ProblemConstant, -1, 100},
		{"clipped at the top", func(s *Scan) {
			for i := 20; i < 25; i++ {
				s.Channels[0].Samples[i] = complex(2, imag(s.Channels[0].Samples[i]))
			}
		}, ProblemClipped, 20, 5},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			s := cleanScan()
			c.edit(s)
			got := Inspect(s)
			if c.kind == "" {
				if len(got) != 0 {
					t.Fatalf("got %+v, want no problems", got)
				}
				return
			}
			if len(got) != 1 || got[0].Kind != c.kind || got[0].Index != c.index || got[0].Count != c.count {
				t.Fatalf("got %+v, want one %s at %d count %d", got, c.kind, c.index, c.count)
			}
		})
	}
}

func TestInspectRaw(t *testing.T) {
	t.Parallel()
	// A quiet baseline at the minimum is not clipping.
	if got := InspectRaw(&RawRecord{VoltageV: []float64{0, 0, 0, 0, 0.5, 1, 0.5, 0, 0}}); len(got) != 0 {
		t.Fatalf("baseline: got %+v, want no problems", got)
	}
	r := &RawRecord{SampleRateHz: 1e6, ExcitationHz: []float64{1e5}, VoltageV: []float64{0, 0.1, -0.1, 0.2, 1, 1, 1, 0.3, -0.2, 0, -1}}
	got := InspectRaw(r)
	if len(got) != 1 || got[0].Kind != ProblemClipped || got[0].Index != 4 || got[0].Count != 3 {
		t.Fatalf("got %+v, want one clipped run of 3 from sample 4", got)
	}
}

// TestMedian checks the selection-based median against sorting.
func TestMedian(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(1, 2))
	for n := 1; n < 200; n++ {
		for rep := range 5 {
			a := make([]float64, n)
			for i := range a {
				switch rep {
				case 0:
					a[i] = rng.NormFloat64()
				case 1:
					a[i] = float64(rng.IntN(3)) // many repeats
				case 2:
					a[i] = float64(i) // sorted
				case 3:
					a[i] = float64(n - i) // reversed
				default:
					a[i] = 1 // constant
				}
			}
			s := append([]float64(nil), a...)
			sort.Float64s(s)
			want := s[n/2]
			if n%2 == 0 {
				want = (s[n/2-1] + s[n/2]) / 2
			}
			if got := median(append([]float64(nil), a...)); got != want {
				t.Fatalf("median of %v = %v, want %v (sorting)", a, got, want)
			}
			for k := range n {
				if got := kth(append([]float64(nil), a...), k); got != s[k] {
					t.Fatalf("kth(%v, %d) = %v, want %v", a, k, got, s[k])
				}
			}
		}
	}
}
