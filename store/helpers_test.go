package store_test

import (
	"math"
	"strconv"
)

func nan() float64 { return math.NaN() }

func negZero() float64 { return math.Copysign(0, -1) }

func itoa(n int64) string { return strconv.FormatInt(n, 10) }
