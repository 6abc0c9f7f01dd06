package ival_test

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"

	"github.com/plumbdyn/plumb/internal/expr"
	"github.com/plumbdyn/plumb/internal/ival"
)

// TestIdentities checks exact identities that any enclosure must respect,
// at random points: sin² + cos² ∋ 1, exp(log a) ∋ a, log(exp a) ∋ a,
// atan(tan a) ∋ a on (-π/2, π/2), cosh² - sinh² ∋ 1, tanh = sinh/cosh.
func TestIdentities(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 16))
	for range 500 {
		a := (rng.Float64() - 0.5) * 40
		x := ival.Point(a)
		if s := ival.Add(ival.Sqr(ival.Sin(x)), ival.Sqr(ival.Cos(x))); !s.Contains(1) {
			t.Fatalf("sin²+cos² at %v = %v", a, s)
		}
		if e := ival.Log(ival.Exp(x)); !e.Contains(a) {
			t.Fatalf("log(exp(%v)) = %v", a, e)
		}
		if c := ival.Sub(ival.Sqr(ival.Cosh(x)), ival.Sqr(ival.Sinh(x))); !c.Contains(1) {
			t.Fatalf("cosh²-sinh² at %v = %v", a, c)
		}
		if th, q := ival.Tanh(x), ival.Div(ival.Sinh(x), ival.Cosh(x)); ival.Intersect(th, q).IsEmpty() {
			t.Fatalf("tanh(%v) = %v disjoint from sinh/cosh = %v", a, th, q)
		}
		b := math.Abs(a) * 1e10 * rng.Float64()
		if e := ival.Exp(ival.Log(ival.Point(b))); b > 0 && !e.Contains(b) {
			t.Fatalf("exp(log(%v)) = %v", b, e)
		}
		c := (rng.Float64() - 0.5) * 3.14
		if at := ival.Atan(ival.Tan(ival.Point(c))); !at.Contains(c) {
			t.Fatalf("atan(tan(%v)) = %v", c, at)
		}
	}
}

// TestExactPoints: values that are exact float64 numbers come back as
// points (exact identities).
func TestExactPoints(t *testing.T) {
	for name, c := range map[string]struct {
		got  ival.Interval
		want float64
	}{
		"exp 0":     {ival.Exp(ival.Point(0)), 1},
		"log 1":     {ival.Log(ival.Point(1)), 0},
		"sin 0":     {ival.Sin(ival.Point(0)), 0},
		"cos 0":     {ival.Cos(ival.Point(0)), 1},
		"tan 0":     {ival.Tan(ival.Point(0)), 0},
		"atan 0":    {ival.Atan(ival.Point(0)), 0},
		"sinh 0":    {ival.Sinh(ival.Point(0)), 0},
		"cosh 0":    {ival.Cosh(ival.Point(0)), 1},
		"tanh 0":    {ival.Tanh(ival.Point(0)), 0},
		"abs -3":    {ival.Abs(ival.Point(-3)), 3},
		"pow(2,10)": {ival.Pow(ival.Point(2), ival.Point(10)), 1024},
		"pow(-2,3)": {ival.Pow(ival.Point(-2), ival.Point(3)), -8},
		"pow(1,.5)": {ival.Pow(ival.Point(1), ival.Point(0.5)), 1},
	} {
		if c.got.Lo != c.want || c.got.Hi != c.want {
			t.Errorf("%s = %v, want the point %g", name, c.got, c.want)
		}
	}
}

// TestTurningPointsAndPoles checks the ranges over intervals holding the
// extremes of sin and cos and the poles of tan (exact identities: sin π/2 =
// 1, cos π = -1, tan unbounded at π/2).
func TestTurningPointsAndPoles(t *testing.T) {
	inf := math.Inf(1)
	check := func(name string, got ival.Interval, lo, hi float64) {
		t.Helper()
		if got.Lo != lo || got.Hi != hi {
			t.Errorf("%s = %v, want [%g, %g]", name, got, lo, hi)
		}
	}
	check("sin[1.5,1.6]", ival.Sin(ival.New(1.5, 1.6)), ival.Sin(ival.Point(1.5)).Lo, 1)
	check("sin[-1.6,-1.5]", ival.Sin(ival.New(-1.6, -1.5)), -1, ival.Sin(ival.Point(-1.5)).Hi)
	check("cos[3,3.2]", ival.Cos(ival.New(3, 3.2)), -1, ival.Cos(ival.Point(3)).Hi)
	check("cos[-0.1,0.2]", ival.Cos(ival.New(-0.1, 0.2)), ival.Cos(ival.Point(0.2)).Lo, 1)
	check("sin wide", ival.Sin(ival.New(0, 7)), -1, 1)
	check("cos unbounded", ival.Cos(ival.New(0, inf)), -1, 1)
	check("tan[1.5,1.6]", ival.Tan(ival.New(1.5, 1.6)), -inf, inf)
	check("tan[-1.6,-1.5]", ival.Tan(ival.New(-1.6, -1.5)), -inf, inf)
	// math.Pi/2 is below π/2, so tan at that float is a huge positive
	// number, not a pole (exact: the float64 nearest π/2 is not π/2).
	if x := ival.Tan(ival.Point(math.Pi / 2)); x.Lo < 1e16 || math.IsInf(x.Hi, 0) {
		t.Errorf("tan(float64 π/2) = %v, want about 1.633e16", x)
	}
	// sin at 2^1023 and a huge interval of width below 7 keeps the turning
	// points: the range must hold the reference at both ends.
	big1 := math.Ldexp(1, 1023)
	x := ival.New(big1, math.Nextafter(big1, inf))
	s := ival.Sin(x)
	for _, a := range []float64{x.Lo, x.Hi} {
		z := expr.BigSin(new(big.Float).SetPrec(refPrec), new(big.Float).SetFloat64(a))
		lo, hi, _ := widen(z)
		if !bigIn(s, lo, hi) {
			t.Errorf("sin over %v = %v misses sin(%g)", x, s, a)
		}
	}
}

// TestAtan2 checks Atan2 against the 300-bit reference at random points of
// random boxes (both signs, across the axes), and the special cases.
func TestAtan2(t *testing.T) {
	rng := rand.New(rand.NewPCG(17, 18))
	for range 1000 {
		x0, y0 := (rng.Float64()-0.5)*10, (rng.Float64()-0.5)*10
		x := ival.New(x0, x0+rng.Float64()*rng.Float64()*3)
		y := ival.New(y0, y0+rng.Float64()*rng.Float64()*3)
		got := ival.Atan2(y, x)
		for range 4 {
			a, b := x.Lo+(x.Hi-x.Lo)*rng.Float64(), y.Lo+(y.Hi-y.Lo)*rng.Float64()
			if rng.IntN(2) == 0 {
				a, b = []float64{x.Lo, x.Hi}[rng.IntN(2)], []float64{y.Lo, y.Hi}[rng.IntN(2)]
			}
			if a == 0 && b == 0 {
				continue
			}
			z := expr.BigAtan2(new(big.Float).SetPrec(refPrec), new(big.Float).SetFloat64(b), new(big.Float).SetFloat64(a+0)) // a+0: -0 is the real 0
			if b == 0 && a < 0 {
				z.Abs(z) // the real angle of (negative, 0) is +π; the reference may follow -0
			}
			lo, hi, _ := widen(z)
			if !bigIn(got, lo, hi) {
				t.Fatalf("Atan2(%v, %v) = %v misses atan2(%v, %v) = %s", y, x, got, b, a, z.Text('g', 20))
			}
		}
	}
	pi := ival.Atan2(ival.New(-1, 1), ival.New(-1, 1))
	if !pi.Contains(math.Pi) || !pi.Contains(-math.Pi) || pi.Hi > 3.2 {
		t.Errorf("Atan2 over a box holding the origin = %v, want [-π, π]", pi)
	}
	if a := ival.Atan2(ival.New(0, 1), ival.New(-2, -1)); a.Hi < math.Pi || a.Lo < 2 {
		t.Errorf("Atan2 over a box above the cut = %v, want [atan2(1,-1), π]", a)
	}
}

// TestPow checks Pow against the 300-bit reference at random points of
// random boxes with a > 0, the integer-exponent path for negative bases,
// and the documented domain cases.
func TestPow(t *testing.T) {
	rng := rand.New(rand.NewPCG(19, 20))
	for range 1000 {
		x0 := math.Ldexp(rng.Float64()+0.01, rng.IntN(40)-20)
		y0 := (rng.Float64() - 0.5) * 20
		x := ival.New(x0, x0*(1+rng.Float64()*rng.Float64()))
		y := ival.New(y0, y0+rng.Float64()*rng.Float64())
		got := ival.Pow(x, y)
		for range 4 {
			a, b := x.Lo+(x.Hi-x.Lo)*rng.Float64(), y.Lo+(y.Hi-y.Lo)*rng.Float64()
			if rng.IntN(2) == 0 {
				a, b = []float64{x.Lo, x.Hi}[rng.IntN(2)], []float64{y.Lo, y.Hi}[rng.IntN(2)]
			}
			if !x.Contains(a) || !y.Contains(b) {
				continue
			}
			z := expr.BigPow(new(big.Float).SetPrec(refPrec), new(big.Float).SetFloat64(a), new(big.Float).SetFloat64(b))
			lo, hi, _ := widen(z)
			if !bigIn(got, lo, hi) {
				t.Fatalf("Pow(%v, %v) = %v misses %v^%v = %s", x, y, got, a, b, z.Text('g', 20))
			}
		}
	}
	if p := ival.Pow(ival.New(-2, -1), ival.Point(3)); p != ival.New(-8, -1) {
		t.Errorf("Pow([-2,-1], 3) = %v, want [-8, -1]", p)
	}
	for name, p := range map[string]ival.Interval{
		"[-1,2]^0.5":   ival.Pow(ival.New(-1, 2), ival.Point(0.5)),
		"[0,2]^-0.5":   ival.Pow(ival.New(0, 2), ival.Point(-0.5)),
		"2^[1,2] of -": ival.Pow(ival.Point(-2), ival.New(1, 2)),
	} {
		if !p.IsEmpty() {
			t.Errorf("%s = %v, want empty (outside the domain)", name, p)
		}
	}
	if p := ival.Pow(ival.New(0, 4), ival.Point(0.5)); p.Lo != 0 || p.Hi < 2 || p.Hi > 2.0000001 {
		t.Errorf("Pow([0,4], 0.5) = %v, want [0, 2]", p)
	}
	if p := ival.Pow(ival.New(0, 2), ival.New(0, 1)); p.Lo != 0 || p.Hi < 2 {
		t.Errorf("Pow([0,2], [0,1]) = %v, want [0, 2] (0^0 = 1 inside)", p)
	}
}

// TestPiecewise checks Abs, Min, Max, Sign and Step against the float
// definitions at random points of random intervals (exact: these functions
// round nothing), and the set-valued jumps at 0.
func TestPiecewise(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	sign := func(a float64) float64 {
		switch {
		case a > 0:
			return 1
		case a < 0:
			return -1
		}
		return 0
	}
	step := func(a float64) float64 {
		if a >= 0 {
			return 1
		}
		return 0
	}
	for range 5000 {
		xl, yl := float64(rng.IntN(9)-4)/2, float64(rng.IntN(9)-4)/2
		x := ival.New(xl, xl+float64(rng.IntN(5))/2)
		y := ival.New(yl, yl+float64(rng.IntN(5))/2)
		a := x.Lo + (x.Hi-x.Lo)*float64(rng.IntN(3))/2
		b := y.Lo + (y.Hi-y.Lo)*float64(rng.IntN(3))/2
		for _, c := range []struct {
			name string
			got  ival.Interval
			want float64
		}{
			{"Abs", ival.Abs(x), math.Abs(a)},
			{"Min", ival.Min(x, y), math.Min(a, b)},
			{"Max", ival.Max(x, y), math.Max(a, b)},
			{"Sign", ival.Sign(x), sign(a)},
			{"Step", ival.Step(x), step(a)},
		} {
			if !c.got.Contains(c.want) {
				t.Fatalf("%s(%v, %v) = %v misses %g at (%g, %g)", c.name, x, y, c.got, c.want, a, b)
			}
		}
	}
	if s := ival.Sign(ival.Point(0)); s != ival.New(-1, 1) {
		t.Errorf("Sign([0,0]) = %v, want [-1, 1] (hull of the jump)", s)
	}
	if s := ival.Step(ival.New(0, 2)); s != ival.New(0, 1) {
		t.Errorf("Step([0,2]) = %v, want [0, 1]", s)
	}
	if s := ival.Abs(ival.New(-3, 2)); s != ival.New(0, 3) {
		t.Errorf("Abs([-3,2]) = %v", s)
	}
}
