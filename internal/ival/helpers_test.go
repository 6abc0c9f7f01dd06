package ival

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"
)

// exactPrec holds every sum, difference or product of two float64 values
// exactly (exponents span 2^-1074 .. 2^1024, so 2200 bits suffice: an exact
// identity of binary floating point, not a tolerance).
const exactPrec = 2200

func bf(x float64) *big.Float { return new(big.Float).SetPrec(exactPrec).SetFloat64(x) }

// bigBracket returns lower and upper bounds of an exact real value computed
// by f at the given precision with rounding toward -Inf and +Inf.
func bigBracket(prec uint, f func(z *big.Float) *big.Float) (lo, hi *big.Float) {
	lo = f(new(big.Float).SetPrec(prec).SetMode(big.ToNegativeInf))
	hi = f(new(big.Float).SetPrec(prec).SetMode(big.ToPositiveInf))
	return lo, hi
}

// requireIn fails unless x.Lo <= zLo and zHi <= x.Hi, where [zLo, zHi] is a
// bracket of the exact value (so x contains the exact value).
func requireIn(t *testing.T, what string, x Interval, zLo, zHi *big.Float) {
	t.Helper()
	if x.IsEmpty() {
		t.Fatalf("%s = empty, want an interval holding [%s, %s]", what, zLo.Text('g', 20), zHi.Text('g', 20))
	}
	if bf(x.Lo).Cmp(zLo) > 0 || zHi.Cmp(bf(x.Hi)) > 0 {
		t.Fatalf("%s = %v does not contain the exact value in [%s, %s]", what, x, zLo.Text('g', 25), zHi.Text('g', 25))
	}
}

// randFloat draws float64 values spread over all binades (with sign),
// including subnormals, zeros and values near the overflow threshold.
func randFloat(rng *rand.Rand) float64 {
	switch rng.IntN(12) {
	case 0:
		return 0
	case 1:
		return math.Float64frombits(rng.Uint64() & 0x000fffffffffffff) // subnormal
	case 2:
		return math.MaxFloat64 * (1 - rng.Float64()*1e-3) * sign(rng)
	case 3:
		return float64(rng.IntN(200)-100) / 8 // small exact values
	case 4:
		return rng.NormFloat64()
	}
	for {
		x := math.Float64frombits(rng.Uint64())
		if !math.IsNaN(x) && !math.IsInf(x, 0) {
			return x
		}
	}
}

func sign(rng *rand.Rand) float64 {
	if rng.IntN(2) == 0 {
		return -1
	}
	return 1
}

// randInterval draws a nonempty interval, sometimes unbounded or a point.
func randInterval(rng *rand.Rand) Interval {
	a, b := randFloat(rng), randFloat(rng)
	if rng.IntN(4) == 0 { // narrow intervals around one value
		b = a + math.Abs(a)*rng.Float64()*1e-6
		if math.IsInf(b, 0) {
			b = a
		}
	}
	if a > b {
		a, b = b, a
	}
	switch rng.IntN(20) {
	case 0:
		a = math.Inf(-1)
	case 1:
		b = math.Inf(1)
	case 2:
		b = a
	}
	return Interval{a, b}
}

// randIn draws a point of the (nonempty) interval x: an end or an interior
// value; for an infinite end, a large finite value.
func randIn(rng *rand.Rand, x Interval) float64 {
	lo, hi := x.Lo, x.Hi
	if math.IsInf(lo, -1) {
		lo = -math.MaxFloat64
	}
	if math.IsInf(hi, 1) {
		hi = math.MaxFloat64
	}
	switch rng.IntN(4) {
	case 0:
		return lo
	case 1:
		return hi
	}
	v := lo + (hi-lo)*rng.Float64()
	if math.IsInf(hi-lo, 0) {
		v = 0.5*lo + 0.5*hi*rng.Float64()
	}
	return math.Min(math.Max(v, lo), hi)
}
