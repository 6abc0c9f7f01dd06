package ival

import (
	"math"
	"math/big"
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
