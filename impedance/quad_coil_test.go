package impedance

import (
	"bufio"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"
)

// TestIntegralJ0 checks ∫0^x J0 against the mpmath table written by
// testdata/impedance/gen_intj0.py (mpmath 1.2.1, hypergeometric form
// cross-checked by quadrature) on both sides of the switch to the Struve
// asymptotic form at x = 40, to 2e-15 absolute (the values are O(1)), and
// the cumulative evaluation used by the models against the direct one.
func TestIntegralJ0(t *testing.T) {
	t.Parallel()
	f, err := os.Open("../testdata/impedance/intj0_ref.txt")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	n := 0
	for sc.Scan() {
		s := sc.Text()
		if strings.HasPrefix(s, "#") {
			continue
		}
		fs := strings.Fields(s)
		x, err1 := strconv.ParseFloat(fs[0], 64)
		want, err2 := strconv.ParseFloat(fs[1], 64)
		if err1 != nil || err2 != nil || len(fs) != 2 {
			t.Fatalf("intj0_ref.txt: bad line %q", s)
		}
		if got := IntegralJ0(x); math.Abs(got-want) > 2e-15 {
			t.Errorf("IntegralJ0(%g) = %.17g, want %.17g (mpmath), |err| %.2g", x, got, want, math.Abs(got-want))
		}
		if got := IntegralJ0(-x); math.Abs(got+want) > 2e-15 {
			t.Errorf("IntegralJ0(−%g) = %.17g, want %.17g (odd)", x, got, -want)
		}
		n++
	}
	if n < 10 {
		t.Fatalf("only %d reference values", n)
	}
	// The accumulator used by the coil integral agrees with coilF.
	acc := fAccumulator{r: 1}
	for x := 0.01; x < 60; x += 0.37 {
		if got, want := acc.next(x), coilF(x); math.Abs(got-want) > 1e-13 {
			t.Errorf("cumulative F(%g) = %.16g, direct %.16g", x, got, want)
		}
	}
}
