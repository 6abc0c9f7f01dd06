package ival

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"
)

// checkDirected verifies lo <= exact <= hi with exact math/big arithmetic
// (sums and products exactly at exactPrec; quotients and square roots by
// lo*b <= a, lo² <= x and so on, also exact), and that lo and hi are at
// most two float64 steps apart where the exact value is a normal float64
// (one outward step per inexact end; common practice for enclosures built
// on correctly rounded operations).
func checkDirected(t *testing.T, a, b float64) {
	t.Helper()
	A, B := bf(a), bf(b)
	in := func(name string, lo, hi float64, z *big.Float) {
		t.Helper()
		if bf(lo).Cmp(z) > 0 || z.Cmp(bf(hi)) > 0 {
			t.Fatalf("%s(%v, %v): [%v, %v] misses %s", name, a, b, lo, hi, z.Text('g', 30))
		}
		if f, _ := z.Float64(); math.Abs(f) >= 0x1p-1022 && !math.IsInf(f, 0) && !withinUlps(Interval{lo, hi}, 2) {
			t.Fatalf("%s(%v, %v): [%v, %v] wider than two steps", name, a, b, lo, hi)
		}
	}
	in("add", addDown(a, b), addUp(a, b), new(big.Float).SetPrec(exactPrec).Add(A, B))
	in("sub", subDown(a, b), subUp(a, b), new(big.Float).SetPrec(exactPrec).Sub(A, B))
	in("mul", mulDown(a, b), mulUp(a, b), new(big.Float).SetPrec(exactPrec).Mul(A, B))
	if b != 0 {
		lo, hi := divDown(a, b), divUp(a, b)
		// lo <= a/b <= hi  <=>  lo*b <= a <= hi*b for b > 0 (reversed for b < 0)
		lb := new(big.Float).SetPrec(exactPrec).Mul(bf(lo), B)
		hb := new(big.Float).SetPrec(exactPrec).Mul(bf(hi), B)
		if b < 0 {
			lb, hb = hb, lb
		}
		if !math.IsInf(lo, 0) && !math.IsInf(hi, 0) && (lb.Cmp(A) > 0 || A.Cmp(hb) > 0) {
			t.Fatalf("div(%v, %v): [%v, %v] misses the quotient", a, b, lo, hi)
		}
		q, _ := new(big.Float).SetPrec(200).Quo(A, B).Float64()
		if math.Abs(q) >= 0x1p-1022 && !math.IsInf(q, 0) && !withinUlps(Interval{lo, hi}, 2) {
			t.Fatalf("div(%v, %v): [%v, %v] wider than two steps", a, b, lo, hi)
		}
	}
	if a >= 0 {
		lo, hi := sqrtDown(a), sqrtUp(a)
		if new(big.Float).SetPrec(exactPrec).Mul(bf(lo), bf(lo)).Cmp(A) > 0 || new(big.Float).SetPrec(exactPrec).Mul(bf(hi), bf(hi)).Cmp(A) < 0 {
			t.Fatalf("sqrt(%v): [%v, %v] misses the root", a, lo, hi)
		}
	}
}

// FuzzDirectedRounding checks the directed-rounding helpers that every
// operation rests on, for any pair of finite float64 values.
func FuzzDirectedRounding(f *testing.F) {
	tiny := math.SmallestNonzeroFloat64
	for _, s := range [][2]float64{
		{1, 2}, {0.1, 0.2}, {1, 3}, {math.MaxFloat64, math.MaxFloat64}, {tiny, 0.5},
		{3 * tiny, 0.5}, {0x1p-600, 0x1p-474}, {1e308, 10}, {-1e-320, 1e10}, {2, 0},
		{1 + 0x1p-52, 1 - 0x1p-53}, {-0.0, 5}, {math.Sqrt2, math.Sqrt2},
	} {
		f.Add(s[0], s[1])
	}
	f.Fuzz(func(t *testing.T, a, b float64) {
		if math.IsNaN(a) || math.IsNaN(b) || math.IsInf(a, 0) || math.IsInf(b, 0) {
			return
		}
		checkDirected(t, a, b)
	})
}

// TestDirectedRoundingExtremes runs checkDirected on pairs drawn where the
// error-free transformations are fragile: both operands within a factor
// 2^8 of MaxFloat64 (TwoSum's intermediate steps can overflow), both in or
// near the subnormal range (residuals underflow), and one of each.
func TestDirectedRoundingExtremes(t *testing.T) {
	rng := rand.New(rand.NewPCG(25, 26))
	huge := func() float64 {
		if rng.IntN(4) == 0 { // the last few float64 values below overflow
			v := math.MaxFloat64
			for range rng.IntN(4) {
				v = math.Nextafter(v, 0)
			}
			return v * sign(rng)
		}
		return math.MaxFloat64 * math.Ldexp(rng.Float64(), -rng.IntN(8)) * sign(rng)
	}
	small := func() float64 {
		return math.Ldexp(rng.Float64()+0.5, -1020-rng.IntN(60)) * sign(rng)
	}
	gens := [][2]func() float64{{huge, huge}, {small, small}, {huge, small}, {small, huge}}
	for _, g := range gens {
		for range 20000 {
			checkDirected(t, g[0](), g[1]())
		}
	}
}
