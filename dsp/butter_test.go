package dsp

import (
	"encoding/json"
	"fmt"
	"math"
	"math/cmplx"
	"os"
	"sort"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// butterTable is testdata/dsp/butter_sos.json, written by
// testdata/dsp/gen_butter.py (SciPy signal.butter / sosfreqz; the SciPy
// version is in the file's "tool" field).
type butterTable struct {
	Tool  string `json:"tool"`
	Cases []struct {
		Kind  string      `json:"kind"`
		Order int         `json:"order"`
		LowHz float64     `json:"low_hz"`
		FsHz  float64     `json:"fs_hz"`
		Call  string      `json:"call"`
		SOS   [][]float64 `json:"sos"`
	} `json:"cases"`
	Bandpass []struct {
		Order  int       `json:"order"`
		LowHz  float64   `json:"low_hz"`
		HighHz float64   `json:"high_hz"`
		FsHz   float64   `json:"fs_hz"`
		Call   string    `json:"call"`
		FreqHz []float64 `json:"freq_hz"`
		Re     []float64 `json:"re"`
		Im     []float64 `json:"im"`
	} `json:"bandpass"`
}

func readJSON(t *testing.T, path string, v any) {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("reading reference table: %v", err)
	}
	if err := json.Unmarshal(b, v); err != nil {
		t.Fatalf("%s: %v", path, err)
	}
}

// TestPrototypePolesHandbook compares the quadratic factors
// s² + b·s + 1 of the normalised Butterworth polynomials (orders 1–8) with
// the table printed in filter handbooks (for example Williams & Taylor,
// Electronic Filter Design Handbook, table of normalised Butterworth
// polynomials; values to four decimals, from memory). An odd order also has
// the factor (s + 1).
func TestPrototypePolesHandbook(t *testing.T) {
	t.Parallel()
	table := map[int][]float64{
		1: {},
		2: {1.4142},
		3: {1.0000},
		4: {0.7654, 1.8478},
		5: {0.6180, 1.6180},
		6: {0.5176, 1.4142, 1.9319},
		7: {0.4450, 1.2470, 1.8019},
		8: {0.3902, 1.1111, 1.6629, 1.9616},
	}
	for n := 1; n <= 8; n++ {
		t.Run(fmt.Sprintf("order%d", n), func(t *testing.T) {
			t.Parallel()
			var b []float64
			realPoles := 0
			for _, p := range ButterworthPrototypePoles(n) {
				if !scalar.EqualWithinAbs(cmplx.Abs(p), 1, 1e-14) || real(p) >= 0 {
					t.Errorf("pole %v: want |p| = 1 in the left half plane", p)
				}
				switch {
				case math.Abs(imag(p)) < 1e-12:
					realPoles++
					if !scalar.EqualWithinAbs(real(p), -1, 1e-14) {
						t.Errorf("real pole %v, want -1", p)
					}
				case imag(p) > 0:
					b = append(b, -2*real(p))
				}
			}
			sort.Float64s(b)
			want := table[n]
			if len(b) != len(want) || realPoles != n%2 {
				t.Fatalf("order %d: %d quadratic factors and %d real poles, want %d and %d", n, len(b), realPoles, len(want), n%2)
			}
			for i := range b {
				// Tolerance: the handbook table is rounded to 4 decimals.
				if !scalar.EqualWithinAbs(b[i], want[i], 5.1e-5) {
					t.Errorf("order %d factor %d: b = %.6f, want %.4f (±5e-5)", n, i, b[i], want[i])
				}
			}
		})
	}
}

func TestButterworthCutoffGain(t *testing.T) {
	t.Parallel()
	// Closed form: a Butterworth filter has |H| = 1/√2 at its −3 dB edge,
	// kept exact in the digital filter by pre-warping.
	want := 1 / math.Sqrt2
	for order := 1; order <= 8; order++ {
		for _, fc := range []float64{3, 100, 420} {
			lp, err := ButterworthLowpass(order, fc, 1000)
			if err != nil {
				t.Fatal(err)
			}
			hp, err := ButterworthHighpass(order, fc, 1000)
			if err != nil {
				t.Fatal(err)
			}
			bp, err := ButterworthBandpass(order, fc/2, fc, 1000)
			if err != nil {
				t.Fatal(err)
			}
			for _, c := range []struct {
				name string
				got  float64
			}{
				{"lowpass", cmplx.Abs(lp.Response(fc, 1000))},
				{"highpass", cmplx.Abs(hp.Response(fc, 1000))},
				{"bandpass upper", cmplx.Abs(bp.Response(fc, 1000))},
				{"bandpass lower", cmplx.Abs(bp.Response(fc/2, 1000))},
			} {
				// Tolerance: poles within 2e-2 of z = 1 for fc = 3 Hz lose ~3 digits.
				if !scalar.EqualWithinAbsOrRel(c.got, want, 1e-11, 1e-11) {
					t.Errorf("%s order %d fc %v Hz: |H(fc)| = %.15f, want 1/√2 = %.15f (1e-12)", c.name, order, fc, c.got, want)
				}
			}
			if g := cmplx.Abs(lp.Response(0, 1000)); !scalar.EqualWithinAbs(g, 1, 1e-12) {
				t.Errorf("lowpass order %d: |H(0)| = %v, want 1", order, g)
			}
		}
	}
}

func TestButterworthAgainstSciPy(t *testing.T) {
	t.Parallel()
	var tab butterTable
	readJSON(t, "../testdata/dsp/butter_sos.json", &tab)
	if len(tab.Cases) == 0 {
		t.Fatal("empty reference table")
	}
	for _, c := range tab.Cases {
		t.Run(c.Call, func(t *testing.T) {
			var sos SOS
			var err error
			switch c.Kind {
			case "lowpass":
				sos, err = ButterworthLowpass(c.Order, c.LowHz, c.FsHz)
			case "highpass":
				sos, err = ButterworthHighpass(c.Order, c.LowHz, c.FsHz)
			}
			if err != nil {
				t.Fatal(err)
			}
			if len(sos) != len(c.SOS) {
				t.Fatalf("%d sections, want %d (%s)", len(sos), len(c.SOS), tab.Tool)
			}
			for k, row := range c.SOS {
				got := append(sos[k].B[:], sos[k].A[:]...)
				for i := range row {
					// Tolerance: both are double-precision evaluations of the
					// same closed forms by different routes.
					if !scalar.EqualWithinAbsOrRel(got[i], row[i], 1e-12, 1e-10) {
						t.Errorf("section %d coef %d: got %.17g, want %.17g (%s, 1e-10 rel)", k, i, got[i], row[i], tab.Tool)
					}
				}
			}
		})
	}
	for _, c := range tab.Bandpass {
		sos, err := ButterworthBandpass(c.Order, c.LowHz, c.HighHz, c.FsHz)
		if err != nil {
			t.Fatal(err)
		}
		for i, f := range c.FreqHz {
			got := sos.Response(f, c.FsHz)
			want := complex(c.Re[i], c.Im[i])
			if cmplx.Abs(got-want) > 1e-10*math.Max(1e-3, cmplx.Abs(want)) {
				t.Errorf("%s at %v Hz: H = %v, want %v (%s)", c.Call, f, got, want, tab.Tool)
			}
		}
	}
}

func TestButterworthErrors(t *testing.T) {
	t.Parallel()
	for _, c := range []struct {
		name      string
		order     int
		lo, hi, f float64
	}{
		{"order zero", 0, 10, 20, 100},
		{"cutoff at nyquist", 2, 50, 60, 100},
		{"negative cutoff", 2, -1, 20, 100},
		{"nan rate", 2, 10, 20, math.NaN()},
		{"edges reversed", 2, 30, 20, 100},
	} {
		_, e1 := ButterworthLowpass(c.order, c.lo, c.f)
		_, e2 := ButterworthBandpass(c.order, c.lo, c.hi, c.f)
		if e2 == nil || (c.name != "edges reversed" && e1 == nil) {
			t.Errorf("%s: errors %v, %v; want errors", c.name, e1, e2)
		}
	}
}

type filtfiltTable struct {
	Tool  string `json:"tool"`
	Cases []struct {
		Kind     string    `json:"kind"`
		Order    int       `json:"order"`
		CutoffHz float64   `json:"cutoff_hz"`
		FsHz     float64   `json:"fs_hz"`
		N        int       `json:"n"`
		Call     string    `json:"call"`
		Re       []float64 `json:"re"`
		Im       []float64 `json:"im"`
	} `json:"cases"`
}

// ffInput rebuilds the closed-form input of gen_butter.py's test_input.
func ffInput(n int) []complex128 {
	x := make([]complex128, n)
	for i := range x {
		fi := float64(i)
		re := math.Sin(2*math.Pi*0.01*fi) + 0.5*math.Cos(2*math.Pi*0.23*fi+0.3) + 0.002*fi + 0.7
		im := 0.3*math.Cos(2*math.Pi*0.003*fi) - 0.001*fi
		x[i] = complex(re, im)
	}
	return x
}

func TestFiltFiltAgainstSciPy(t *testing.T) {
	t.Parallel()
	var tab filtfiltTable
	readJSON(t, "../testdata/dsp/sosfiltfilt.json", &tab)
	for _, c := range tab.Cases {
		t.Run(c.Call, func(t *testing.T) {
			t.Parallel()
			var sos SOS
			var err error
			if c.Kind == "lowpass" {
				sos, err = ButterworthLowpass(c.Order, c.CutoffHz, c.FsHz)
			} else {
				sos, err = ButterworthHighpass(c.Order, c.CutoffHz, c.FsHz)
			}
			if err != nil {
				t.Fatal(err)
			}
			x := ffInput(c.N)
			orig := append([]complex128(nil), x...)
			y, err := sos.FiltFilt(nil, x)
			if err != nil {
				t.Fatal(err)
			}
			for i := range x {
				if x[i] != orig[i] {
					t.Fatalf("input changed at %d", i)
				}
			}
			for i := range y {
				want := complex(c.Re[i], c.Im[i])
				// Tolerance: round-off of two recursive passes over a few hundred samples.
				if cmplx.Abs(y[i]-want) > 1e-11*math.Max(1, cmplx.Abs(want)) {
					t.Fatalf("sample %d: got %v, want %v (%s sosfiltfilt, 1e-11)", i, y[i], want, tab.Tool)
				}
			}
		})
	}
}

// TestFiltFiltZeroPhase: a passband complex exponential comes out with zero
// phase shift and gain |H(f)|² (the forward–backward identity
// H(f)·conj(H(f)) = |H(f)|²; Oppenheim & Schafer §5.1 problem on
// zero-phase filtering).
func TestFiltFiltZeroPhase(t *testing.T) {
	t.Parallel()
	const fs = 1000.0
	for _, c := range []struct {
		order int
		fc, f float64
	}{{4, 100, 20}, {4, 100, 90}, {6, 50, 49}, {2, 200, 120}} {
		sos, err := ButterworthLowpass(c.order, c.fc, fs)
		if err != nil {
			t.Fatal(err)
		}
		n := 8000
		x := make([]complex128, n)
		for i := range x {
			x[i] = cmplx.Exp(complex(0, 2*math.Pi*c.f*float64(i)/fs+0.4))
		}
		y, err := sos.FiltFilt(nil, x)
		if err != nil {
			t.Fatal(err)
		}
		h := cmplx.Abs(sos.Response(c.f, fs))
		want := h * h
		for i := n / 4; i < 3*n/4; i++ {
			r := y[i] / x[i]
			if !scalar.EqualWithinAbs(real(r), want, 1e-9) || math.Abs(imag(r)) > 1e-9 {
				t.Fatalf("order %d fc %v f %v sample %d: y/x = %v, want %v + 0j (1e-9)", c.order, c.fc, c.f, i, r, want)
			}
		}
	}
}

func TestFiltFiltTooShort(t *testing.T) {
	t.Parallel()
	sos, _ := ButterworthLowpass(4, 10, 100)
	if _, err := sos.FiltFilt(nil, make([]complex128, sos.PadLen())); err == nil {
		t.Errorf("FiltFilt of %d samples: no error", sos.PadLen())
	}
}
