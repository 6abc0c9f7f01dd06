package ival

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"
)

const randomCases = 20000

type binop struct {
	name string
	f    func(x, y Interval) Interval
	// bracket of the exact a op b (ok false: undefined, skip)
	exact func(a, b float64) (lo, hi *big.Float, ok bool)
}

var binops = []binop{
	{"Add", Add, func(a, b float64) (*big.Float, *big.Float, bool) {
		z := new(big.Float).Add(bf(a), bf(b)) // exact at exactPrec
		return z, z, true
	}},
	{"Sub", Sub, func(a, b float64) (*big.Float, *big.Float, bool) {
		z := new(big.Float).Sub(bf(a), bf(b))
		return z, z, true
	}},
	{"Mul", Mul, func(a, b float64) (*big.Float, *big.Float, bool) {
		z := new(big.Float).Mul(bf(a), bf(b)) // 106 bits needed, exact
		return z, z, true
	}},
	{"Div", Div, func(a, b float64) (*big.Float, *big.Float, bool) {
		if b == 0 {
			return nil, nil, false
		}
		lo, hi := bigBracket(200, func(z *big.Float) *big.Float { return z.Quo(bf(a), bf(b)) })
		return lo, hi, true
	}},
}

// TestPointOpsContainExact checks the inclusion property of the four
// operations on point intervals against exact (or directed-rounded) math/big
// results, over random operands in all binades, and that the result is at
// most two ulps wide (one outward step per end; common practice for
// enclosures built on correctly rounded operations).
func TestPointOpsContainExact(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, op := range binops {
		for range randomCases {
			a, b := randFloat(rng), randFloat(rng)
			zLo, zHi, ok := op.exact(a, b)
			if !ok {
				continue
			}
			got := op.f(Point(a), Point(b))
			requireIn(t, op.name+"("+Point(a).String()+", "+Point(b).String()+")", got, zLo, zHi)
			if got.IsBounded() && math.Abs(got.Lo) >= 0x1p-1000 && got.Hi > math.Nextafter(math.Nextafter(got.Lo, math.Inf(1)), math.Inf(1)) {
				t.Fatalf("%s(%g, %g) = %v: wider than two ulps", op.name, a, b, got)
			}
		}
	}
}

// TestIntervalOpsContainPoints checks the inclusion property on intervals:
// for random a in x and b in y, the exact a op b lies in op(x, y).
func TestIntervalOpsContainPoints(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for _, op := range binops {
		for range randomCases {
			x, y := randInterval(rng), randInterval(rng)
			got := op.f(x, y)
			for range 4 {
				a, b := randIn(rng, x), randIn(rng, y)
				zLo, zHi, ok := op.exact(a, b)
				if !ok {
					continue
				}
				requireIn(t, op.name+"("+x.String()+", "+y.String()+") at ("+Point(a).String()+", "+Point(b).String()+")", got, zLo, zHi)
			}
		}
	}
}

// TestExactResultsStayExact: results that are float64 values stay points
// (exact identities of binary arithmetic).
func TestExactResultsStayExact(t *testing.T) {
	cases := []struct {
		name string
		got  Interval
		want float64
	}{
		{"1+2", Add(Point(1), Point(2)), 3},
		{"0.5+0.25", Add(Point(0.5), Point(0.25)), 0.75},
		{"1-1", Sub(Point(1), Point(1)), 0},
		{"3*5", Mul(Point(3), Point(5)), 15},
		{"-0.5*4", Mul(Point(-0.5), Point(4)), -2},
		{"1/4", Div(Point(1), Point(4)), 0.25},
		{"-9/3", Div(Point(-9), Point(3)), -3},
		{"sqrt(4)", Sqrt(Point(4)), 2},
		{"sqrt(2^-1072)", Sqrt(Point(4 * math.SmallestNonzeroFloat64)), 0x1p-536},
		{"1*tiny", Mul(Point(1), Point(math.SmallestNonzeroFloat64)), math.SmallestNonzeroFloat64},
		{"2^-600*2^-474", Mul(Point(0x1p-600), Point(0x1p-474)), math.SmallestNonzeroFloat64},
		{"tiny+tiny", Add(Point(math.SmallestNonzeroFloat64), Point(math.SmallestNonzeroFloat64)), 2 * math.SmallestNonzeroFloat64},
		{"1.5^3", PowInt(Point(1.5), 3), 3.375},
		{"2^-3", PowInt(Point(2), -3), 0.125},
		{"(-2)^5", PowInt(Point(-2), 5), -32},
		{"sqr(-3)", Sqr(Point(-3)), 9},
		{"scale", Scale(Point(7), 0.5), 3.5},
	}
	for _, c := range cases {
		if c.got.Lo != c.want || c.got.Hi != c.want {
			t.Errorf("%s = %v, want the point %g (exact in binary64)", c.name, c.got, c.want)
		}
	}
}

// TestInexactResultsAreOneUlp: 1/3, 0.1+0.2 and sqrt(2) are not float64
// values; the enclosure is the two neighbouring float64 values around them
// (exact identity: the exact value is strictly between two adjacent floats).
func TestInexactResultsAreOneUlp(t *testing.T) {
	for name, x := range map[string]Interval{
		"1/3":       Div(Point(1), Point(3)),
		"0.1+0.2":   Add(Point(0.1), Point(0.2)),
		"sqrt(2)":   Sqrt(Point(2)),
		"0.1*0.1":   Mul(Point(0.1), Point(0.1)),
		"1e300*1.1": Mul(Point(1e300), Point(1.1)),
	} {
		if x.Lo >= x.Hi || math.Nextafter(x.Lo, math.Inf(1)) != x.Hi {
			t.Errorf("%s = %v, want two adjacent float64 values", name, x)
		}
	}
}

// TestOverflowUnderflow: finite exact results beyond the float64 range are
// bounded by MaxFloat64 and ±Inf; products that underflow by 0 and the
// smallest subnormal (exact identities of IEEE 754 rounding).
func TestOverflowUnderflow(t *testing.T) {
	inf := math.Inf(1)
	tiny := math.SmallestNonzeroFloat64
	cases := []struct {
		name   string
		got    Interval
		lo, hi float64
	}{
		{"max+max", Add(Point(math.MaxFloat64), Point(math.MaxFloat64)), math.MaxFloat64, inf},
		{"-max-max", Sub(Point(-math.MaxFloat64), Point(math.MaxFloat64)), -inf, -math.MaxFloat64},
		{"max*2", Mul(Point(math.MaxFloat64), Point(2)), math.MaxFloat64, inf},
		{"max/0.5", Div(Point(math.MaxFloat64), Point(-0.5)), -inf, -math.MaxFloat64},
		// TwoSum's step s - a overflows here, so the side of the rounding is
		// unknown and both ends move one step from s = -1.5979494532109474e308
		// (found by FuzzDirectedRounding; the exact -1.5979494532109472850e308
		// is inside).
		{"sub near max", Sub(Point(1.9974368165136842e+307), Point(math.MaxFloat64)),
			math.Nextafter(-1.5979494532109474e+308, -inf), math.Nextafter(-1.5979494532109474e+308, 0)},
		{"tiny*0.25", Mul(Point(tiny), Point(0.25)), 0, tiny},
		{"-tiny*0.25", Mul(Point(-tiny), Point(0.25)), -tiny, 0},
		{"tiny/4", Div(Point(tiny), Point(4)), 0, tiny},
		// 1.5*tiny rounds (ties to even) to 2*tiny with a residual RN(-tiny/2)
		// = 0 that proves nothing: both ends move one step (the fallback).
		{"3*tiny*0.5", Mul(Point(3*tiny), Point(0.5)), tiny, 3 * tiny},
	}
	for _, c := range cases {
		if c.got.Lo != c.lo || c.got.Hi != c.hi {
			t.Errorf("%s = %v, want [%g, %g]", c.name, c.got, c.lo, c.hi)
		}
	}
}

// TestUnboundedAndSpecial covers zeros against infinite ends and division
// by intervals holding zero (the documented special cases).
func TestUnboundedAndSpecial(t *testing.T) {
	inf := math.Inf(1)
	eq := func(name string, got, want Interval) {
		t.Helper()
		if got != want && !(got.IsEmpty() && want.IsEmpty()) {
			t.Errorf("%s = %v, want %v", name, got, want)
		}
	}
	eq("0*Entire", Mul(Point(0), Entire()), Point(0))
	eq("[0,1]*[1,Inf]", Mul(New(0, 1), New(1, inf)), New(0, inf))
	eq("[-1,2]*Entire", Mul(New(-1, 2), Entire()), Entire())
	eq("1/[0,1]", Div(Point(1), New(0, 1)), Entire())
	eq("1/[0,0]", Div(Point(1), Point(0)), Entire())
	eq("[1,Inf]/[1,Inf]", Div(New(1, inf), New(1, inf)), New(0, inf))
	eq("[-Inf,-1]/[2,Inf]", Div(New(-inf, -1), New(2, inf)), New(-inf, 0))
	eq("Entire+Entire", Add(Entire(), Entire()), Entire())
	eq("Entire-Entire", Sub(Entire(), Entire()), Entire())
	eq("sqrt([-1,4])", Sqrt(New(-1, 4)), Empty())
	eq("sqrt([0,Inf])", Sqrt(New(0, inf)), New(0, inf))
	eq("empty+1", Add(Empty(), Point(1)), Empty())
	eq("1*empty", Mul(Point(1), Empty()), Empty())
	eq("sqr([-1,2])", Sqr(New(-1, 2)), New(0, 4))
	eq("[-1,2]^2", PowInt(New(-1, 2), 2), New(0, 4))
	eq("[-1,2]^3", PowInt(New(-1, 2), 3), New(-1, 8))
	eq("[-3,-2]^2", PowInt(New(-3, -2), 2), New(4, 9))
	eq("[-2,1]^-1", PowInt(New(-2, 1), -1), Entire())
	eq("x^0", PowInt(New(-2, 1), 0), Point(1))
	eq("neg", Neg(New(-1, inf)), New(-inf, 1))
	eq("scale NaN", Scale(Point(1), math.NaN()), Empty())
}

// TestPowIntContainsExact checks PowInt (and Sqr for n = 2) against math/big
// powers of random points of random intervals.
func TestPowIntContainsExact(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for range randomCases {
		x := randInterval(rng)
		n := rng.IntN(17) - 8
		got := PowInt(x, n)
		if n == 2 {
			if s := Sqr(x); s != got {
				t.Fatalf("Sqr(%v) = %v, PowInt(.., 2) = %v", x, s, got)
			}
		}
		for range 4 {
			a := randIn(rng, x)
			if n < 0 && a == 0 {
				continue
			}
			lo, hi := bigBracket(200, func(z *big.Float) *big.Float {
				p := new(big.Float).SetPrec(200 * 20).SetFloat64(1) // exact: 16*53 bits
				for range abs(n) {
					p.Mul(p, bf(a))
				}
				if n < 0 {
					return z.Quo(new(big.Float).SetFloat64(1), p)
				}
				return z.Set(p)
			})
			requireIn(t, "PowInt("+x.String()+", n) at "+Point(a).String(), got, lo, hi)
		}
	}
}

func abs(n int) int {
	if n < 0 {
		return -n
	}
	return n
}

// TestSqrtContainsExact checks Sqrt against math/big square roots with
// directed rounding at random points of random intervals.
func TestSqrtContainsExact(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	for range randomCases {
		x := randInterval(rng)
		if x.Lo < 0 {
			x.Lo = math.Abs(randFloat(rng)) * 0 // [0, Hi] or skip
			if x.Hi < 0 {
				continue
			}
		}
		got := Sqrt(x)
		for range 4 {
			a := randIn(rng, x)
			lo, hi := bigBracket(200, func(z *big.Float) *big.Float { return z.Sqrt(bf(a)) })
			requireIn(t, "Sqrt("+x.String()+") at "+Point(a).String(), got, lo, hi)
		}
	}
}

// TestArithmeticDoesNotAllocate: the basic operations are hot-loop code
// (interval Taylor coefficients) and must not allocate.
func TestArithmeticDoesNotAllocate(t *testing.T) {
	x, y := New(1.25, 1.5), New(-0.3, 0.7)
	var sink Interval
	allocs := testing.AllocsPerRun(100, func() {
		sink = Add(Mul(x, y), Div(x, Sqr(y)))
		sink = Hull(sink, Sub(Sqrt(x), PowInt(y, 3)))
		sink = Scale(sink, 0.5)
		_ = sink.Width() + sink.Mid() + sink.Rad()
	})
	if allocs != 0 {
		t.Errorf("basic arithmetic allocates %v times per run, want 0", allocs)
	}
}

// TestFastPathsDoNotAllocate: the elementary functions on moderate
// arguments take the float64 fast paths, which must not allocate (the
// 128-bit kernels, for huge arguments and fall-backs, do).
func TestFastPathsDoNotAllocate(t *testing.T) {
	x, y := New(0.75, 0.7500001), New(1.5, 1.6)
	fastConsts() // the one-time constant set-up allocates
	var sink Interval
	allocs := testing.AllocsPerRun(100, func() {
		sink = Add(Sin(x), Cos(y))
		sink = Add(sink, Add(Exp(x), Log(x)))
		sink = Add(sink, Add(Atan(x), Atan2(x, y)))
		sink = Add(sink, Add(Sinh(x), Cosh(x)))
		sink = Add(sink, Add(Tan(x), Tanh(x)))
	})
	if allocs != 0 {
		t.Errorf("fast paths allocate %v times per run, want 0", allocs)
	}
	_ = sink
}
