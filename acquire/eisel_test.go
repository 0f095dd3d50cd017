package acquire

import (
	"math"
	"math/rand/v2"
	"strconv"
	"testing"
)

// TestEiselLemire checks eiselLemire against strconv.ParseFloat (the
// independent reference) on significands and exponents across the whole
// float64 range, including every decimal exponent of the table.
func TestEiselLemire(t *testing.T) {
	t.Parallel()
	check := func(w uint64, q int) {
		got, ok := eiselLemire(w, q, false)
		if !ok {
			return
		}
		s := strconv.FormatUint(w, 10) + "e" + strconv.Itoa(q)
		want, err := strconv.ParseFloat(s, 64)
		if err != nil || math.Float64bits(got) != math.Float64bits(want) {
			t.Fatalf("eiselLemire(%d, %d) = %v (%#x); strconv.ParseFloat(%q) = %v (%#x), %v", w, q, got, math.Float64bits(got), s, want, math.Float64bits(want), err)
		}
	}
	rng := rand.New(rand.NewPCG(8, 9))
	decided := 0
	for q := pow5MinQ; q <= pow5MaxQ; q++ {
		for _, w := range []uint64{1, 9, 10, 12345678901234567, 1 << 53, 1<<53 + 1, 9999999999999999999, 1<<63 + 1} {
			check(w, q)
		}
		for range 300 {
			w := rng.Uint64N(10_000_000_000_000_000_000-1) + 1
			check(w, q)
			if _, ok := eiselLemire(w, q, false); ok {
				decided++
			}
		}
	}
	// The method must decide nearly every case; fall-backs are rare.
	if total := (pow5MaxQ - pow5MinQ + 1) * 300; decided < total*9/10 {
		t.Errorf("eiselLemire decided %d of %d random cases, want at least 90%%", decided, total)
	}
	// Shortest forms of random doubles, as WriteScan prints them.
	for range 300000 {
		v := math.Float64frombits(rng.Uint64() &^ (1 << 63))
		if math.IsNaN(v) || math.IsInf(v, 0) || v == 0 {
			continue
		}
		s := strconv.FormatFloat(v, 'e', -1, 64)
		p := numberParser{}
		got, st := p.parse([]byte(s))
		if st != numOK || math.Float64bits(got) != math.Float64bits(v) {
			t.Fatalf("parse(%q) = %v, %v; want %v", s, got, st, v)
		}
	}
	// Exact ties between doubles: 2^53+1 lies halfway between 2^53 and
	// 2^53+2; round-half-even gives 2^53.
	check(9007199254740993, 0)
	check(9007199254740995, 0)
}
