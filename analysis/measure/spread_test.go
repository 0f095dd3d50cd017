package measure

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestSpreadAgainstDefinition compares Spread with the bounding box
// computed directly over each window, and checks the bounds it promises
// against the exact Vpp: Vpp ≤ Spread ≤ √2·Vpp.
func TestSpreadAgainstDefinition(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(5, 6))
	for _, c := range []struct{ n, w int }{{1, 1}, {10, 1}, {10, 3}, {50, 7}, {50, 8}, {200, 31}, {20, 64}} {
		z := make([]complex128, c.n)
		for k := range z {
			z[k] = complex(rng.NormFloat64(), rng.NormFloat64())
		}
		got := Spread(nil, z, c.w)
		for i := range z {
			lo, hi := max(i-c.w/2, 0), min(i-c.w/2+c.w, c.n)
			x0, x1, y0, y1 := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
			for _, v := range z[lo:hi] {
				x0, x1 = math.Min(x0, real(v)), math.Max(x1, real(v))
				y0, y1 = math.Min(y0, imag(v)), math.Max(y1, imag(v))
			}
			want := math.Hypot(x1-x0, y1-y0)
			if got[i] != want {
				t.Fatalf("n=%d w=%d i=%d: spread %g, box diagonal %g", c.n, c.w, i, got[i], want)
			}
			vpp := Vpp(z[lo:hi]).Vpp
			if vpp > got[i]*(1+1e-12) || got[i] > math.Sqrt2*vpp*(1+1e-12) {
				t.Fatalf("n=%d w=%d i=%d: spread %g outside [Vpp, √2 Vpp] = [%g, %g]", c.n, c.w, i, got[i], vpp, math.Sqrt2*vpp)
			}
		}
	}
}

func BenchmarkSpread(b *testing.B) {
	rng := rand.New(rand.NewPCG(7, 8))
	z := make([]complex128, 23622) // 20 m at 30 samples/in
	for k := range z {
		z[k] = complex(rng.NormFloat64(), rng.NormFloat64())
	}
	dst := make([]float64, len(z))
	b.ReportAllocs()
	for b.Loop() {
		dst = Spread(dst, z, 36)
	}
}

func TestPeaks(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name   string
		sp     []float64
		thr    float64
		radius int
		want   []int
	}{
		{"single", []float64{0, 1, 3, 1, 0}, 2, 1, []int{2}},
		{"below threshold", []float64{0, 1, 3, 1, 0}, 4, 1, nil},
		{"plateau middle", []float64{0, 2, 2, 2, 2, 2, 0}, 1, 1, []int{3}},
		{"two apart", []float64{0, 5, 0, 0, 0, 4, 0}, 1, 2, []int{1, 5}},
		{"suppressed within radius", []float64{0, 5, 0, 4, 0}, 1, 2, []int{1}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			got := Peaks(nil, c.sp, c.thr, c.radius)
			if len(got) != len(c.want) {
				t.Fatalf("Peaks(%v, %g, %d) = %v, want %v", c.sp, c.thr, c.radius, got, c.want)
			}
			for i := range got {
				if got[i] != c.want[i] {
					t.Fatalf("Peaks(%v, %g, %d) = %v, want %v", c.sp, c.thr, c.radius, got, c.want)
				}
			}
		})
	}
}
