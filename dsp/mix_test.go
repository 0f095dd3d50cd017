package dsp

import (
	"encoding/json"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"whorl/dsp/dsptest"
)

// supportPair builds a 100 kHz support-ring signal (channel 2) and the
// primary channel as an exact linear image of it plus a flaw that appears
// only in the primary, on a 1 mm grid.
func supportPair(n int, a [2][2]float64, b [2]float64) (primary, other []complex128, pos []float64) {
	pos = make([]float64, n)
	for i := range pos {
		pos[i] = float64(i) * 1e-3
	}
	// Two overlapping responses of different phase trace a loop, as a
	// support ring does (a straight-line signal would leave X and Y
	// proportional and the affine design rank deficient).
	other = dsptest.Differential(pos, 0.25, 4e-3, 8e-3, cmplx.Rect(3, 1.2))
	edge := dsptest.Differential(pos, 0.262, 4e-3, 6e-3, cmplx.Rect(1.5, -0.6))
	for i := range other {
		other[i] += edge[i]
	}
	flaw := dsptest.Differential(pos, 0.6, 4e-3, 3e-3, cmplx.Rect(1, 2.4))
	primary = make([]complex128, n)
	for i, o := range other {
		x := a[0][0]*real(o) + a[0][1]*imag(o) + b[0]
		y := a[1][0]*real(o) + a[1][1]*imag(o) + b[1]
		primary[i] = complex(x, y) + flaw[i]
	}
	return primary, other, pos
}

func TestTrainMixExact(t *testing.T) {
	t.Parallel()
	// An affine image is removed exactly by the affine form; a rotation with
	// scaling (a conformal map) by both forms.
	affine := [2][2]float64{{0.8, -0.3}, {0.5, 1.7}}
	w := cmplx.Rect(1.6, -0.7)
	conformal := [2][2]float64{{real(w), -imag(w)}, {imag(w), real(w)}}
	for _, c := range []struct {
		name string
		form MixForm
		a    [2][2]float64
	}{
		{"affine map, affine form", MixAffine, affine},
		{"conformal map, affine form", MixAffine, conformal},
		{"conformal map, rotate-scale form", MixRotateScale, conformal},
	} {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			p, o, _ := supportPair(1000, c.a, [2]float64{0.02, -0.05})
			orig := append([]complex128(nil), p...)
			m, err := TrainMix(c.form, p, [][]complex128{o}, [][2]int{{200, 300}})
			if err != nil {
				t.Fatal(err)
			}
			for i := range p {
				if p[i] != orig[i] {
					t.Fatal("primary changed by TrainMix")
				}
			}
			// Exact linear map: the residual is rounding error (closed form).
			if m.ResidualRatio > 1e-12 {
				t.Errorf("residual ratio %.3g, want < 1e-12 (rounding)", m.ResidualRatio)
			}
			for i := range 2 {
				for j := range 2 {
					if math.Abs(m.Matrices[0][i][j]-c.a[i][j]) > 1e-12 {
						t.Errorf("A[%d][%d] = %v, want %v", i, j, m.Matrices[0][i][j], c.a[i][j])
					}
				}
			}
			out := m.Apply(nil, p, [][]complex128{o})
			// The flaw away from the support survives the mix unchanged.
			if v := Vpp(out[550:650]); math.Abs(v-Vpp(p[550:650])) > 1e-9 {
				t.Errorf("flaw Vpp after mix %v, want %v", v, Vpp(p[550:650]))
			}
			if !(m.ConditionNumber >= 1) || math.IsInf(m.ConditionNumber, 0) {
				t.Errorf("condition number %v", m.ConditionNumber)
			}
		})
	}
}

func TestMixReference(t *testing.T) {
	t.Parallel()
	p, o, _ := supportPair(1000, [2][2]float64{{0.8, -0.3}, {0.5, 1.7}}, [2]float64{})
	rnd := rand.New(rand.NewPCG(5, 6))
	dsptest.AddNoise(p, 0.01, rnd)
	others := [][]complex128{o}
	m, err := TrainMix(MixAffine, p, others, [][2]int{{200, 300}})
	if err != nil {
		t.Fatal(err)
	}
	if err := m.SetReference(p, others, [2]int{570, 630}); err != nil {
		t.Fatal(err)
	}
	// The flaw lies where the other channel is silent, so the mix passes it
	// unchanged (up to the fitted offset, which Vpp ignores).
	out := m.Apply(nil, p, others)
	want := m.Windows[0].ResidualVppV / Vpp(out[570:630])
	if m.Reference == nil || m.ReferenceRatio != want || m.ReferenceRatio > 0.2 {
		t.Errorf("reference ratio %v, want %v (< 0.2)", m.ReferenceRatio, want)
	}
	if err := m.SetReference(p, others, [2]int{990, 1001}); err == nil {
		t.Error("reference window past the end: no error")
	}
}

func TestTrainMixThreeInputs(t *testing.T) {
	t.Parallel()
	p, o1, pos := supportPair(1000, [2][2]float64{{1, 0}, {0, 1}}, [2]float64{})
	// A dent-like feature seen by a third channel, mapped into the primary.
	o2 := dsptest.Differential(pos, 0.8, 4e-3, 10e-3, cmplx.Rect(2, -0.4))
	o2b := dsptest.Differential(pos, 0.81, 4e-3, 7e-3, cmplx.Rect(1, 1.4))
	for i := range o2 {
		o2[i] += o2b[i]
	}
	w := cmplx.Rect(0.7, 0.9)
	for i := range p {
		p[i] += w * o2[i]
	}
	for _, form := range []MixForm{MixAffine, MixRotateScale} {
		m, err := TrainMix(form, p, [][]complex128{o1, o2}, [][2]int{{200, 300}, {750, 850}})
		if err != nil {
			t.Fatal(err)
		}
		if m.ResidualRatio > 1e-11 {
			t.Errorf("%v: residual ratio %.3g, want < 1e-11 (exact linear images)", form, m.ResidualRatio)
		}
	}
}

// TestTrainMixNoise: with white noise of standard deviation σ on each
// component of the primary, the least-squares residual over N training
// samples with p fitted parameters per component has expected mean square
// σ²(N−p)/N (the residual projects the noise onto N−p dimensions; e.g.
// Seber & Lee, Linear Regression Analysis, §3.3).
func TestTrainMixNoise(t *testing.T) {
	t.Parallel()
	const sigma = 0.01
	rnd := rand.New(rand.NewPCG(1, 2))
	p, o, _ := supportPair(4000, [2][2]float64{{0.8, -0.3}, {0.5, 1.7}}, [2]float64{})
	dsptest.AddNoise(p, sigma, rnd)
	win := [2]int{0, 580} // the support ring, clear of the flaw at 0.6 m
	m, err := TrainMix(MixAffine, p, [][]complex128{o}, [][2]int{win})
	if err != nil {
		t.Fatal(err)
	}
	out := m.Apply(nil, p, [][]complex128{o})
	var ss float64
	for _, z := range out[win[0]:win[1]] {
		ss += real(z)*real(z) + imag(z)*imag(z)
	}
	nw := float64(win[1] - win[0])
	got := math.Sqrt(ss / (2 * nw))
	want := sigma * math.Sqrt((nw-3)/nw)
	// Tolerance: the relative standard error of an RMS from 2·580 values is
	// 1/√(2·1160) ≈ 2.1 %; allow 7 % (3.3 standard errors).
	if math.Abs(got/want-1) > 0.07 {
		t.Errorf("residual RMS %.5f V, want %.5f V (σ√((N−p)/N), 7 %%)", got, want)
	}
}

func TestTrainMixErrors(t *testing.T) {
	t.Parallel()
	p, o, _ := supportPair(100, [2][2]float64{{1, 0}, {0, 1}}, [2]float64{})
	zero := make([]complex128, 100)
	for _, c := range []struct {
		name   string
		others [][]complex128
		win    [][2]int
	}{
		{"no others", nil, [][2]int{{0, 50}}},
		{"three others", [][]complex128{o, o, o}, [][2]int{{0, 50}}},
		{"window past end", [][]complex128{o}, [][2]int{{50, 101}}},
		{"empty window", [][]complex128{o}, [][2]int{{50, 50}}},
		{"no window", [][]complex128{o}, nil},
		{"too few samples", [][]complex128{o}, [][2]int{{20, 22}}},
		{"silent other", [][]complex128{zero}, [][2]int{{0, 50}}},
	} {
		if _, err := TrainMix(MixAffine, p, c.others, c.win); err == nil {
			t.Errorf("%s: no error", c.name)
		}
	}
}

func TestMixJSONRoundTrip(t *testing.T) {
	t.Parallel()
	p, o, _ := supportPair(500, [2][2]float64{{0.8, -0.3}, {0.5, 1.7}}, [2]float64{0.1, 0.2})
	m, err := TrainMix(MixAffine, p, [][]complex128{o}, [][2]int{{200, 300}})
	if err != nil {
		t.Fatal(err)
	}
	m.Primary, m.Others = "diff-400k", []string{"diff-100k"}
	b, err := json.Marshal(m)
	if err != nil {
		t.Fatal(err)
	}
	back, err := ParseMix(b)
	if err != nil {
		t.Fatal(err)
	}
	a := m.Apply(nil, p, [][]complex128{o})
	c := back.Apply(nil, p, [][]complex128{o})
	for i := range a {
		if a[i] != c[i] {
			t.Fatalf("sample %d: %v after round trip, want %v", i, c[i], a[i])
		}
	}
}

func TestVpp(t *testing.T) {
	t.Parallel()
	// A circle of radius 2 sampled at 7 points: the diameter is the largest
	// chord, 2·2·sin(3π/7) for an odd polygon (closed form).
	var z []complex128
	for k := range 7 {
		z = append(z, cmplx.Rect(2, 2*math.Pi*float64(k)/7)+complex(5, -1))
	}
	want := 4 * math.Sin(3*math.Pi/7)
	if got := Vpp(z); math.Abs(got-want) > 1e-12 {
		t.Errorf("Vpp of a 7-gon = %v, want %v", got, want)
	}
	if got := Vpp([]complex128{1, 1, 1}); got != 0 {
		t.Errorf("Vpp of repeated point = %v, want 0", got)
	}
	// Independent oracle: the all-pairs maximum distance (dsptest.Vpp).
	rnd := rand.New(rand.NewPCG(3, 4))
	for _, n := range []int{2, 3, 10, 500} {
		pts := make([]complex128, n)
		for i := range pts {
			pts[i] = complex(rnd.NormFloat64(), 0.3*rnd.NormFloat64())
		}
		if got, want := Vpp(pts), dsptest.Vpp(pts); got != want {
			t.Errorf("%d points: hull Vpp %v, all-pairs %v", len(pts), got, want)
		}
	}
}

func FuzzParseMix(f *testing.F) {
	f.Add([]byte(`{"form":"affine","matrices":[[[1,0],[0,1]]],"offset_v":[0,0],"windows":null,"residual_ratio":0,"condition_number":1,"training_samples":10}`))
	f.Add([]byte(`{"form":"rotate-scale","matrices":[[[1,-1],[1,1]],[[0,0],[0,0]]]}`))
	f.Add([]byte(`{"form":"affine","matrices":[]}`))
	f.Add([]byte(`{"form":"shear"}`))
	f.Add([]byte(`{"form":"affine","matrices":[[[1,0],[0,1]]],"extra":1}`))
	f.Add([]byte(`{`))
	f.Fuzz(func(t *testing.T, b []byte) {
		m, err := ParseMix(b)
		if err != nil {
			return
		}
		// Oracle: a parsed mix applies without panicking and round-trips.
		z := []complex128{1, 2i, -3}
		others := make([][]complex128, len(m.Matrices))
		for k := range others {
			others[k] = z
		}
		m.Apply(nil, z, others)
		b2, err := json.Marshal(m)
		if err != nil {
			t.Fatalf("marshal parsed mix: %v", err)
		}
		if _, err := ParseMix(b2); err != nil {
			t.Fatalf("re-parse: %v\n%s", err, b2)
		}
	})
}
