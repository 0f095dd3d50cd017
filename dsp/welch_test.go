package dsp

import (
	"math"
	"math/rand/v2"
	"sync"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/stat"
)

func welchInput(n int) []float64 {
	x := make([]float64, n)
	for i := range x {
		fi := float64(i)
		x[i] = 0.8*math.Sin(2*math.Pi*0.05*fi) + 0.3*math.Cos(2*math.Pi*0.173*fi+1) + 0.05*float64((i*7919)%101-50)/50 + 0.2
	}
	return x
}

func TestWelchAgainstSciPy(t *testing.T) {
	t.Parallel()
	var tab struct {
		Tool  string `json:"tool"`
		Cases []struct {
			N, Segment, Overlap int
			FsHz                float64   `json:"fs_hz"`
			Call                string    `json:"call"`
			FreqHz              []float64 `json:"freq_hz"`
			PSD                 []float64 `json:"psd"`
		} `json:"cases"`
	}
	readJSON(t, "../testdata/dsp/welch.json", &tab)
	for _, c := range tab.Cases {
		opt := WelchOptions{SegmentLen: c.Segment, Overlap: c.Overlap, NoOverlap: c.Overlap == 0}
		x := welchInput(c.N)
		f, p, err := WelchPSD(x, c.FsHz, opt)
		if err != nil {
			t.Fatal(err)
		}
		f2, p2, err := AveragedPeriodogram(x, c.FsHz, opt)
		if err != nil {
			t.Fatal(err)
		}
		if len(p) != len(c.PSD) || len(p2) != len(c.PSD) {
			t.Fatalf("%s: %d and %d bins, want %d", c.Call, len(p), len(p2), len(c.PSD))
		}
		peak := 0.0
		for _, v := range c.PSD {
			peak = math.Max(peak, v)
		}
		for k := range p {
			// Tolerance: double-precision FFTs of different libraries; bins far
			// below the peak are compared absolutely against 1e-11 of it.
			if !scalar.EqualWithinAbsOrRel(p[k], c.PSD[k], 1e-11*peak, 1e-9) || f[k] != c.FreqHz[k] {
				t.Errorf("%s bin %d (%v Hz): go-dsp %v, want %v (%s)", c.Call, k, f[k], p[k], c.PSD[k], tab.Tool)
			}
			if !scalar.EqualWithinAbsOrRel(p2[k], c.PSD[k], 1e-11*peak, 1e-9) || f2[k] != c.FreqHz[k] {
				t.Errorf("%s bin %d: averaged periodogram %v, want %v (%s)", c.Call, k, p2[k], c.PSD[k], tab.Tool)
			}
		}
	}
}

// TestWelchParseval: the integral of a one-sided PSD is the mean power of
// the windowed segments divided by the mean square window (Parseval's
// theorem per segment, exact), and for stationary white noise this is the
// variance (to statistical accuracy).
func TestWelchParseval(t *testing.T) {
	t.Parallel()
	rnd := rand.New(rand.NewPCG(7, 11))
	const fs = 2000.0
	const sigma = 0.3
	x := make([]float64, 1<<16)
	for i := range x {
		x[i] = sigma * rnd.NormFloat64()
	}
	for _, seg := range []int{256, 300} {
		opt := WelchOptions{SegmentLen: seg}
		f, p, err := WelchPSD(x, fs, opt)
		if err != nil {
			t.Fatal(err)
		}
		df := f[1] - f[0]
		var integral float64
		for _, v := range p {
			integral += v * df
		}
		// Exact identity.
		w := make([]float64, seg)
		var u float64
		for i := range w {
			w[i] = 0.5 * (1 - math.Cos(2*math.Pi*float64(i)/float64(seg-1)))
			u += w[i] * w[i]
		}
		var exact float64
		nseg := 0
		for s := 0; s+seg <= len(x); s += seg / 2 {
			for i := range w {
				v := w[i] * x[s+i]
				exact += v * v
			}
			nseg++
		}
		exact /= float64(nseg) * u
		if !scalar.EqualWithinRel(integral, exact, 1e-12) {
			t.Errorf("segment %d: ∫PSD = %v, Parseval %v (1e-12)", seg, integral, exact)
		}
		// Statistical: variance of 65536 samples, relative standard error ≈ 0.6 %.
		if v := stat.Variance(x, nil); !scalar.EqualWithinRel(integral, v, 0.03) {
			t.Errorf("segment %d: ∫PSD = %v, variance %v (3 %%)", seg, integral, v)
		}
	}
}

func TestWelchConcurrent(t *testing.T) {
	t.Parallel()
	x := welchInput(5000)
	_, want, _ := WelchPSD(x, 100, WelchOptions{SegmentLen: 250})
	var wg sync.WaitGroup
	for g := range 8 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			seg := []int{250, 256, 128, 200}[g%4]
			_, p, err := WelchPSD(x, 100, WelchOptions{SegmentLen: seg})
			if err != nil {
				t.Error(err)
				return
			}
			if seg == 250 {
				for k := range p {
					if p[k] != want[k] {
						t.Errorf("concurrent call differs at bin %d", k)
						return
					}
				}
			}
		}()
	}
	wg.Wait()
}

func TestWelchErrors(t *testing.T) {
	t.Parallel()
	x := welchInput(100)
	for _, c := range []struct {
		name string
		opt  WelchOptions
		fs   float64
	}{
		{"odd segment", WelchOptions{SegmentLen: 31}, 1},
		{"segment longer than signal", WelchOptions{SegmentLen: 128}, 1},
		{"overlap too big", WelchOptions{SegmentLen: 32, Overlap: 32}, 1},
		{"zero rate", WelchOptions{}, 0},
	} {
		if _, _, err := WelchPSD(x, c.fs, c.opt); err == nil {
			t.Errorf("%s: no error", c.name)
		}
	}
	x[3] = math.NaN()
	if _, _, err := WelchPSD(x, 1, WelchOptions{SegmentLen: 32}); err == nil {
		t.Error("NaN sample: no error")
	}
}

func TestSNR(t *testing.T) {
	t.Parallel()
	z := make([]complex128, 100)
	z[10], z[11] = 2, -2       // signal Vpp 4
	z[60], z[61] = 0.1i, -0.1i // noise Vpp 0.2
	got, err := SNR(z, [2]int{0, 50}, [2]int{50, 100})
	if err != nil || !scalar.EqualWithinRel(got, 20, 1e-14) {
		t.Errorf("SNR = %v, %v; want 20 (4 V / 0.2 V)", got, err)
	}
}
