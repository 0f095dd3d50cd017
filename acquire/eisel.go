package acquire

import (
	"math"
	"math/big"
	"math/bits"
	"sync"
)

// The table of truncated powers of five used by eiselLemire, for decimal
// exponents q from pow5MinQ to pow5MaxQ. Entry q-pow5MinQ holds the 128
// most significant bits of 5^q (hi, lo) as T = floor(5^q · 2^(127-e5))
// with e5 = floor(log2 5^q), so that 2^127 ≤ T < 2^128. It is computed
// once, exactly, with math/big the first time it is needed.
const (
	pow5MinQ = -342
	pow5MaxQ = 308
)

type pow5Entry struct {
	hi, lo uint64
	e5     int
}

var (
	pow5Once  sync.Once
	pow5Table []pow5Entry
)

func pow5Init() {
	pow5Table = make([]pow5Entry, pow5MaxQ-pow5MinQ+1)
	five := big.NewInt(5)
	mask := new(big.Int).SetUint64(math.MaxUint64)
	for q := pow5MinQ; q <= pow5MaxQ; q++ {
		n := q
		if n < 0 {
			n = -n
		}
		p := new(big.Int).Exp(five, big.NewInt(int64(n)), nil) // 5^|q|
		var t *big.Int
		var e5 int
		if q >= 0 {
			e5 = p.BitLen() - 1 // floor(log2 5^q)
			if s := 127 - e5; s >= 0 {
				t = new(big.Int).Lsh(p, uint(s))
			} else {
				t = new(big.Int).Rsh(p, uint(-s))
			}
		} else {
			// 5^q = 1/5^n, and 5^n is not a power of two, so
			// floor(log2 5^q) = -ceil(log2 5^n) = -BitLen(5^n).
			e5 = -p.BitLen()
			num := new(big.Int).Lsh(big.NewInt(1), uint(127-e5))
			t = new(big.Int).Quo(num, p)
		}
		lo := new(big.Int).And(t, mask).Uint64()
		hi := new(big.Int).Rsh(t, 64).Uint64()
		pow5Table[q-pow5MinQ] = pow5Entry{hi: hi, lo: lo, e5: e5}
	}
}

// eiselLemire converts w·10^q (w > 0, at most 19 decimal digits) to the
// nearest float64, or reports ok = false when it cannot decide the
// rounding with certainty or the result is subnormal, zero or infinite;
// the caller then uses strconv.ParseFloat.
//
// The method multiplies the normalised significand by a 128-bit truncated
// power of five and keeps the top 54 bits, refining the product with the
// low half of the power when the kept bits could be affected by the
// truncation: D. Lemire, "Number parsing at a gigabyte per second",
// Software: Practice and Experience 51(8), 2021, section 5 (algorithm
// after M. Eisel). All products here are underestimates of the exact
// value, which is what the carry tests rely on.
func eiselLemire(w uint64, q int, neg bool) (float64, bool) {
	if w == 0 || q < pow5MinQ || q > pow5MaxQ {
		return 0, false
	}
	pow5Once.Do(pow5Init)
	p := &pow5Table[q-pow5MinQ]
	l := bits.LeadingZeros64(w)
	w <<= uint(l)
	hi, lo := bits.Mul64(w, p.hi)
	if hi&0x1FF == 0x1FF && lo+w < lo {
		// The part left out (< w in units of lo) could carry into the
		// kept bits: add the product with the low half of the power.
		hi2, lo2 := bits.Mul64(w, p.lo)
		var c uint64
		lo, c = bits.Add64(lo, hi2, 0)
		hi += c
		if hi&0x1FF == 0x1FF && lo == math.MaxUint64 && lo2+w < lo2 {
			return 0, false
		}
	}
	upper := int(hi >> 63)
	shift := uint(upper + 9)
	m := hi >> shift // 54 bits: 53 of significand and a rounding bit
	// A result exactly halfway between two doubles with an even lower
	// neighbour needs round-half-even, which the addition below does not
	// do; the truncated product cannot tell exact ties apart, so leave it.
	if lo == 0 && hi&(1<<shift-1) == 0 && m&3 == 1 {
		return 0, false
	}
	m += m & 1
	m >>= 1
	e := 54 + int(shift) + q + p.e5 - l
	if m == 1<<53 {
		m >>= 1
		e++
	}
	biased := e + 1023
	if biased < 1 || biased > 2046 {
		return 0, false
	}
	b := uint64(biased)<<52 | m&(1<<52-1)
	if neg {
		b |= 1 << 63
	}
	return math.Float64frombits(b), true
}
