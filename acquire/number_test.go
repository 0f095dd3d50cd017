package acquire

import (
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"
)

// checkAgainstStrconv reports a difference between fastDecimal and
// strconv.ParseFloat (the independent reference) on text s.
func checkAgainstStrconv(t *testing.T, s string) {
	t.Helper()
	// The full parser (fast path, long path and error cases) against strconv.
	p := numberParser{allowComma: true}
	if got, st := p.parse([]byte(s)); st == numOK {
		ref := strings.Replace(s, ",", ".", 1)
		want, err := strconv.ParseFloat(strings.Trim(ref, " "), 64)
		if err != nil || math.Float64bits(got) != math.Float64bits(want) {
			t.Fatalf("parse(%q) = %v; strconv.ParseFloat gives %v, %v", s, got, want, err)
		}
	} else if st == numSyntax {
		ref := strings.Replace(strings.Trim(s, " "), ",", ".", 1)
		if v, err := strconv.ParseFloat(ref, 64); err == nil && !strings.ContainsAny(ref, "_xXnNiI") && strings.Count(s, ",")+strings.Count(s, ".") <= 1 {
			t.Fatalf("parse(%q) rejected a number strconv reads as %v", s, v)
		}
	}
	v, mark, ok := fastDecimal([]byte(s))
	if !ok {
		return
	}
	ref := strings.Replace(s, ",", ".", 1)
	want, err := strconv.ParseFloat(ref, 64)
	if err != nil {
		t.Fatalf("fastDecimal(%q) = %v, but strconv.ParseFloat(%q) fails: %v", s, v, ref, err)
	}
	if math.Float64bits(v) != math.Float64bits(want) {
		t.Fatalf("fastDecimal(%q) = %v (%#x), strconv.ParseFloat gives %v (%#x)", s, v, math.Float64bits(v), want, math.Float64bits(want))
	}
	if strings.ContainsAny(s, ".,") != (mark != 0) {
		t.Fatalf("fastDecimal(%q): mark %q", s, mark)
	}
}

func TestFastDecimal(t *testing.T) {
	t.Parallel()
	fixed := []string{"0", "-0", "+0", "0.0", "1", "-1.5", "0.000123", "123456789012345678", "9007199254740992",
		"9007199254740993", "1e22", "1e23", "1e-22", "4.9406564584124654e-324", "1.7976931348623157e308",
		"0,5", "5.", ".5", "00012.50", "1E+3", "2e-0", "12345678901234567890", "0.1", "0.3", "2.2250738585072014e-308"}
	for _, s := range fixed {
		checkAgainstStrconv(t, s)
	}
	// Must use the fast path: these lie inside the exact limits.
	for _, s := range []string{"0.1", "-123.456", "1e22", "9007199254740992", "0,25", "1.5e-7"} {
		if _, _, ok := fastDecimal([]byte(s)); !ok {
			t.Errorf("fastDecimal(%q) fell back; want the exact fast path", s)
		}
	}
	rng := rand.New(rand.NewPCG(3, 4))
	for range 200000 {
		var s string
		switch rng.IntN(3) {
		case 0: // shortest form of a random double
			s = strconv.FormatFloat(math.Float64frombits(rng.Uint64()), 'g', -1, 64)
		case 1: // instrument-like fixed precision
			s = strconv.FormatFloat(rng.NormFloat64()*math.Pow(10, float64(rng.IntN(8)-4)), 'f', rng.IntN(10), 64)
		default: // random exponent form
			s = strconv.FormatFloat(rng.NormFloat64(), 'e', rng.IntN(18), 64)
			s = strings.Replace(s, "e", []string{"e", "E"}[rng.IntN(2)], 1)
		}
		checkAgainstStrconv(t, s)
	}
}

func FuzzFastDecimal(f *testing.F) {
	for _, s := range []string{"0", "-1.5", "1e22", "9007199254740993", "0,5", "1e-400", ".", "e5",
		"12345678901234567e-300", "1.7976931348623157e308", "4.9406564584124654e-324", "2.2250738585072014e-308", "-0.1234567890123456789"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		checkAgainstStrconv(t, s)
	})
}

func TestLongDecimalComma(t *testing.T) {
	t.Parallel()
	// 70 significant digits of 1/3 with a decimal comma: strconv rounds
	// to the double nearest 1/3.
	s := "0," + strings.Repeat("3", 70)
	p := numberParser{allowComma: true}
	got, st := p.parse([]byte(s))
	if want := 1.0 / 3; st != numOK || got != want {
		t.Errorf("parse(%q) = %v, %v; want %v", s, got, st, want)
	}
}
