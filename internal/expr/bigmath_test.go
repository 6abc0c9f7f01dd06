package expr

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"
)

// TestBigMathFloat64 compares the big.Float functions at 53 bits with the
// math package (reference: Go's math, correctly rounded to within 1 ulp for
// these functions).
func TestBigMathFloat64(t *testing.T) {
	// math's functions are within 1 ulp; ours rounded to 53 bits within
	// 1/2 ulp; 4e-16 relative covers both.
	const tol = 4e-16
	rng := rand.New(rand.NewPCG(3, 4))
	type f1 struct {
		name string
		big  func(z, x *big.Float) *big.Float
		f    func(float64) float64
		lo   float64
		hi   float64
	}
	cases := []f1{
		{"exp", BigExp, math.Exp, -50, 50},
		{"log", BigLog, math.Log, 1e-3, 1e3},
		{"sin", BigSin, math.Sin, -20, 20},
		{"cos", BigCos, math.Cos, -20, 20},
		{"tan", BigTan, math.Tan, -1.5, 1.5},
		{"atan", BigAtan, math.Atan, -30, 30},
		{"sinh", BigSinh, math.Sinh, -5, 5},
		{"cosh", BigCosh, math.Cosh, -5, 5},
		{"tanh", BigTanh, math.Tanh, -5, 5},
	}
	for _, c := range cases {
		for range 200 {
			x := c.lo + (c.hi-c.lo)*rng.Float64()
			got, _ := c.big(new(big.Float).SetPrec(53), big.NewFloat(x)).Float64()
			want := c.f(x)
			if d := math.Abs(got - want); d > tol*math.Abs(want) {
				t.Errorf("%s(%v) = %v, math gives %v (rel diff %g)", c.name, x, got, want, d/math.Abs(want))
			}
		}
	}
	// Huge arguments: Go's math reduces them with Payne–Hanek, a reference
	// for our exact big.Float reduction; its result can be a few ulps off
	// (cos(-3.5e250) is 3.5 ulps away from the value our 100- to 400-bit
	// runs agree on), hence 1e-15.
	const tolHuge = 1e-15
	for _, x := range []float64{1e22, 1e100, 1e300, -3.5e250} {
		for _, c := range cases[2:4] {
			got, _ := c.big(new(big.Float).SetPrec(53), big.NewFloat(x)).Float64()
			if want := c.f(x); math.Abs(got-want) > tolHuge*math.Abs(want) {
				t.Errorf("%s(%v) = %v, math gives %v", c.name, x, got, want)
			}
		}
	}
	for range 200 {
		y, x := rng.NormFloat64(), rng.NormFloat64()
		got, _ := BigAtan2(new(big.Float).SetPrec(53), big.NewFloat(y), big.NewFloat(x)).Float64()
		if want := math.Atan2(y, x); math.Abs(got-want) > tol*math.Abs(want) {
			t.Errorf("atan2(%v, %v) = %v, math gives %v", y, x, got, want)
		}
	}
}

// TestBigIdentities checks exact identities at 300 bits: exp(log x) = x,
// sin² + cos² = 1, tan(atan x) = x, 4·atan(1) = π, and π against its
// published first 60 digits.
func TestBigIdentities(t *testing.T) {
	const prec = 300
	// 2^-290: a few ulps of 300 bits, the functions' documented accuracy.
	tol := new(big.Float).SetMantExp(big.NewFloat(1), -290)
	rel := func(a, b *big.Float) *big.Float {
		d := new(big.Float).SetPrec(prec).Sub(a, b)
		d.Abs(d)
		if b.Sign() != 0 {
			d.Quo(d, new(big.Float).Abs(b))
		}
		return d
	}
	check := func(what string, got, want *big.Float) {
		t.Helper()
		if r := rel(got, want); r.Cmp(tol) > 0 {
			t.Errorf("%s: relative error %.3g", what, r)
		}
	}
	// π to 60 digits: any table of π (e.g. Abramowitz & Stegun, Table 1.1).
	pi, _, _ := big.ParseFloat("3.14159265358979323846264338327950288419716939937510582097494", 10, prec, big.ToNearestEven)
	tol60 := new(big.Float).SetFloat64(1e-59)
	if r := rel(BigPi(prec), pi); r.Cmp(tol60) > 0 {
		t.Errorf("pi: relative error %.3g against 60 digits", r)
	}
	// ln 2 to 50 digits (Abramowitz & Stegun, Table 4.1 lists ln 2).
	ln2, _, _ := big.ParseFloat("0.69314718055994530941723212145817656807550013436026", 10, prec, big.ToNearestEven)
	if r := rel(BigLn2(prec), ln2); r.Cmp(new(big.Float).SetFloat64(1e-49)) > 0 {
		t.Errorf("ln2: relative error %.3g against 50 digits", r)
	}
	four := new(big.Float).SetPrec(prec).SetInt64(4)
	one := new(big.Float).SetPrec(prec).SetInt64(1)
	check("4·atan(1) = π", new(big.Float).SetPrec(prec).Mul(four, BigAtan(new(big.Float).SetPrec(prec), one)), BigPi(prec))
	rng := rand.New(rand.NewPCG(5, 6))
	for range 30 {
		x := new(big.Float).SetPrec(prec).SetFloat64(rng.ExpFloat64() * 10)
		l := BigLog(new(big.Float).SetPrec(prec), x)
		check("exp(log x) = x", BigExp(new(big.Float).SetPrec(prec), l), x)
		s := BigSin(new(big.Float).SetPrec(prec), x)
		c := BigCos(new(big.Float).SetPrec(prec), x)
		s.Mul(s, s)
		c.Mul(c, c)
		check("sin² + cos² = 1", s.Add(s, c), one)
		a := BigAtan(new(big.Float).SetPrec(prec), x)
		check("tan(atan x) = x", BigTan(new(big.Float).SetPrec(prec), a), x)
	}
}

// TestBigReduceBound: sin, cos and tan reduce exactly up to 2^4096 (past
// float64's range, so sin(1e300) above keeps its exact reduction) and
// refuse beyond it with nil instead of computing π to as many bits as the
// exponent (exact identity of the documented bound, maxReduceExp).
func TestBigReduceBound(t *testing.T) {
	in := new(big.Float).SetMantExp(big.NewFloat(0.75), maxReduceExp)
	if BigSin(new(big.Float).SetPrec(80), in) == nil || BigCos(new(big.Float).SetPrec(80), in) == nil {
		t.Errorf("sin or cos of 0.75·2^%d refused; it is inside the bound", maxReduceExp)
	}
	out := new(big.Float).SetMantExp(big.NewFloat(0.75), maxReduceExp+1)
	for name, f := range map[string]func(z, x *big.Float) *big.Float{"sin": BigSin, "cos": BigCos, "tan": BigTan} {
		if got := f(new(big.Float).SetPrec(80), out); got != nil {
			t.Errorf("%s(0.75·2^%d) = %v, want nil (beyond the bound)", name, maxReduceExp+1, got)
		}
	}
}
