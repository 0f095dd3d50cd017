package impedance

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// TestKronrodRule checks the computed 21-point Gauss–Kronrod rule: the
// outermost node and the centre weight against the QUADPACK qk21 table
// (Piessens et al., QUADPACK, Springer 1983, routine QK21, values from
// memory), positivity, and exactness for monomials up to degree 3n+1 = 31
// (closed form ∫x^k dx over [−1, 1] = 2/(k+1) for even k, 0 for odd).
func TestKronrodRule(t *testing.T) {
	t.Parallel()
	r := gk21
	if len(r.x) != 21 {
		t.Fatalf("len(nodes) = %d, want 21", len(r.x))
	}
	// QK21 xgk(1) = 0.995657163025808080735527280689003 (from memory).
	if got, want := r.x[20], 0.995657163025808080735527280689003; !scalar.EqualWithinAbs(got, want, 1e-15) {
		t.Errorf("outer node = %.17g, want %.17g", got, want)
	}
	// QK21 wgk(11) = 0.149445554002916905664936468389821 (from memory).
	if got, want := r.wK[10], 0.149445554002916905664936468389821; !scalar.EqualWithinAbs(got, want, 1e-15) {
		t.Errorf("centre Kronrod weight = %.17g, want %.17g", got, want)
	}
	for i, w := range r.wK {
		if !(w > 0) {
			t.Errorf("Kronrod weight %d = %g, want > 0", i, w)
		}
	}
	for k := 0; k <= 31; k++ {
		want := 0.0
		if k%2 == 0 {
			want = 2 / float64(k+1)
		}
		var gotK, gotG float64
		for i, x := range r.x {
			gotK += r.wK[i] * math.Pow(x, float64(k))
			gotG += r.wG[i] * math.Pow(x, float64(k))
		}
		if !scalar.EqualWithinAbs(gotK, want, 1e-14) {
			t.Errorf("Kronrod ∫x^%d = %.17g, want %.17g", k, gotK, want)
		}
		if k <= 19 && !scalar.EqualWithinAbs(gotG, want, 1e-14) {
			t.Errorf("Gauss ∫x^%d = %.17g, want %.17g", k, gotG, want)
		}
	}
}
