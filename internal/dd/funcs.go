package dd

import (
	"math"
	"math/big"

	"github.com/plumbdyn/plumb/internal/detmath"
)

// Constants rounded to double-double from their first 40 decimal digits.
var (
	// Ln2 is the natural logarithm of 2.
	Ln2 = mustParse("0.6931471805599453094172321214581765680755001343602552")
	// Pi is π.
	Pi = mustParse("3.141592653589793238462643383279502884197169399375105821")
	// piHalf is π/2.
	piHalf = ldexp(Pi, -1)
	one    = Float{1, 0}
)

func mustParse(s string) Float {
	z, _, err := big.ParseFloat(s, 10, 300, big.ToNearestEven)
	if err != nil {
		panic("dd: bad constant " + s)
	}
	return FromBig(z)
}

// Exp returns e^x.
//
// Method: x = k·ln2 + r with |r| <= ln2/2, r scaled by 2^-9, e^r - 1 by its
// Taylor series, then nine steps of s -> s(s+2) (which undo the scaling while
// keeping e^r - 1 accurate), times 2^k. Relative error about 1e-31 for
// |x| < 1, growing like |x|·4e-33 from the rounding of ln2 (Bailey, Hida,
// Li 2001 use the same reduction).
//
// Special cases: Exp(+Inf) = +Inf, Exp(-Inf) = 0, Exp(NaN) = NaN; overflow
// gives +Inf and underflow 0.
func Exp(x Float) Float {
	switch {
	case math.IsNaN(x.Hi):
		return x
	case x.Hi > 709.8:
		return Float{math.Inf(1), 0}
	case x.Hi < -745.2:
		return Float{}
	}
	k := math.Round(x.Hi / Ln2.Hi)
	r := Sub(x, MulFloat(Ln2, k))
	r = ldexp(r, -9)
	// s = e^r - 1 = r + r²/2! + ...
	s, t := r, r
	for n := 2.0; n < 30; n++ {
		t = Div(Mul(t, r), From(n))
		s = Add(s, t)
		if math.Abs(t.Hi) < 1e-36*math.Abs(s.Hi) {
			break
		}
	}
	for range 9 {
		s = Mul(s, Add(s, From(2)))
	}
	e := Add(one, s)
	if k > 1000 { // avoid overflow of the intermediate 2^k
		return ldexp(ldexp(e, int(k)-1000), 1000)
	}
	if k < -1000 {
		return ldexp(ldexp(e, int(k)+1000), -1000)
	}
	return ldexp(e, int(k))
}

// Log returns the natural logarithm of x by one Newton step for e^y = x from
// y0 = ln Hi (detmath.Log, the same bits on every architecture):
// y = y0 + x·e^(-y0) - 1. The absolute error is about 1e-31·max(1, |log x|)
// (measured 1.3e-31 on [1e-3, 1e3]), so the relative error grows near x = 1
// where log x is small (common practice for double-double logarithms: Bailey, Hida, Li
// 2001).
//
// Special cases: Log(+Inf) = +Inf, Log(0) = -Inf, Log(x < 0) = NaN,
// Log(NaN) = NaN.
func Log(x Float) Float {
	if x.Hi <= 0 || math.IsInf(x.Hi, 0) || math.IsNaN(x.Hi) {
		return Float{detmath.Log(x.Hi), 0}
	}
	y0 := From(detmath.Log(x.Hi))
	return Add(y0, Sub(Mul(x, Exp(Neg(y0))), one))
}

// reduceHalfPi returns r and k mod 4 with x = k·π/2 + r, |r| <= π/4
// (approximately). The reduction uses π/2 in double-double, so the absolute
// error of r grows like |x|·1e-32.
func reduceHalfPi(x Float) (Float, int) {
	k := math.Round(x.Hi / piHalf.Hi)
	r := Sub(x, MulFloat(piHalf, k))
	q := int(math.Mod(k, 4))
	if q < 0 {
		q += 4
	}
	return r, q
}

// sinCosTaylor returns sin r and cos r for |r| <= π/4 by their Taylor series.
func sinCosTaylor(r Float) (s, c Float) {
	r2 := Mul(r, r)
	s, c = r, one
	ts, tc := r, one
	for n := 1.0; n < 40; n += 2 {
		// ts: r^(n+2)/(n+2)!, tc: r^(n+1)/(n+1)!, alternating in sign.
		tc = Neg(Div(Mul(tc, r2), From(n*(n+1))))
		ts = Neg(Div(Mul(ts, r2), From((n+1)*(n+2))))
		c = Add(c, tc)
		s = Add(s, ts)
		if math.Abs(tc.Hi) < 1e-36 && math.Abs(ts.Hi) < 1e-36*math.Abs(s.Hi) {
			break
		}
	}
	return s, c
}

// SinCos returns sin x and cos x: reduction by π/2 in double-double, then
// Taylor series on |r| <= π/4. Absolute error about 1e-32 for |x| < 10,
// growing like |x|·1e-32; NaN for infinite or NaN x.
func SinCos(x Float) (sin, cos Float) {
	if math.IsInf(x.Hi, 0) || math.IsNaN(x.Hi) {
		n := Float{math.NaN(), 0}
		return n, n
	}
	r, q := reduceHalfPi(x)
	s, c := sinCosTaylor(r)
	switch q {
	case 1:
		return c, Neg(s)
	case 2:
		return Neg(s), Neg(c)
	case 3:
		return Neg(c), s
	}
	return s, c
}

// Sin returns sin x (see SinCos for the method and accuracy).
func Sin(x Float) Float { s, _ := SinCos(x); return s }

// Cos returns cos x (see SinCos for the method and accuracy).
func Cos(x Float) Float { _, c := SinCos(x); return c }

// Tan returns sin x / cos x (see SinCos).
func Tan(x Float) Float { s, c := SinCos(x); return Div(s, c) }

// Atan returns the arc tangent of x by one Newton step for tan y = x from
// y0 = detmath.Atan(Hi): y = y0 + (x·cos y0 - sin y0)·cos y0. Absolute error
// below 1e-30 (measured 5e-31 on |x| < 20).
//
// Special cases: Atan(±Inf) = ±π/2 (double-double), Atan(NaN) = NaN.
func Atan(x Float) Float {
	switch {
	case math.IsNaN(x.Hi):
		return x
	case math.IsInf(x.Hi, 1):
		return piHalf
	case math.IsInf(x.Hi, -1):
		return Neg(piHalf)
	}
	y0 := From(detmath.Atan(x.Hi))
	s, c := SinCos(y0)
	return Add(y0, Mul(Sub(Mul(x, c), s), c))
}

// Atan2 returns the angle of the point (x, y) in (-π, π], by one Newton step
// for y·cos θ - x·sin θ = 0 from θ0 = detmath.Atan2(y.Hi, x.Hi):
// θ = θ0 + (y·cos θ0 - x·sin θ0)/(x·cos θ0 + y·sin θ0). Absolute error about
// 1e-32. Special cases as math.Atan2 on the high parts when either argument
// is zero, infinite or NaN.
func Atan2(y, x Float) Float {
	t0 := detmath.Atan2(y.Hi, x.Hi)
	if y.Hi == 0 || x.Hi == 0 || !y.IsFinite() || !x.IsFinite() {
		if x.Hi == 0 && y.Hi != 0 && y.IsFinite() {
			if y.Hi > 0 {
				return piHalf
			}
			return Neg(piHalf)
		}
		if y.Hi == 0 && x.Hi < 0 && x.IsFinite() {
			if math.Signbit(y.Hi) {
				return Neg(Pi)
			}
			return Pi
		}
		return From(t0)
	}
	th := From(t0)
	s, c := SinCos(th)
	num := Sub(Mul(y, c), Mul(x, s))
	den := Add(Mul(x, c), Mul(y, s))
	return Add(th, Div(num, den))
}

// Sinh returns the hyperbolic sine: its Taylor series for |x| < 0.5 (to avoid
// cancellation), (e^x - e^-x)/2 otherwise. Relative error about 1e-31.
func Sinh(x Float) Float {
	if math.Abs(x.Hi) < 0.5 {
		x2 := Mul(x, x)
		s, t := x, x
		for n := 2.0; n < 60; n += 2 {
			t = Div(Mul(t, x2), From(n*(n+1)))
			s = Add(s, t)
			if math.Abs(t.Hi) < 1e-36*math.Abs(s.Hi) {
				break
			}
		}
		return s
	}
	e := Exp(x)
	return ldexp(Sub(e, Div(one, e)), -1)
}

// Cosh returns the hyperbolic cosine (e^x + e^-x)/2. Relative error about
// 1e-31 for moderate x.
func Cosh(x Float) Float {
	e := Exp(x)
	return ldexp(Add(e, Div(one, e)), -1)
}

// Tanh returns the hyperbolic tangent, Sinh/Cosh, and ±1 for |x| > 40 where
// 1 - |tanh x| < 1e-34.
func Tanh(x Float) Float {
	switch {
	case math.IsNaN(x.Hi):
		return x
	case x.Hi > 40:
		return one
	case x.Hi < -40:
		return Neg(one)
	}
	return Div(Sinh(x), Cosh(x))
}

// Powi returns x^n by binary powering (x^-n = 1/x^n); relative error about
// 2·log2(|n|)·5u².
func Powi(x Float, n int) Float {
	neg := n < 0
	if neg {
		n = -n
	}
	r := one
	for b := x; n > 0; n >>= 1 {
		if n&1 == 1 {
			r = Mul(r, b)
		}
		if n > 1 {
			b = Mul(b, b)
		}
	}
	if neg {
		return Div(one, r)
	}
	return r
}

// Pow returns x^y: Powi for integer y with |y| <= 2^30, e^(y·log x) for
// x > 0 otherwise.
//
// Special cases: 0^y = 0 for y > 0 and +Inf for y < 0; a negative x with a
// non-integer y gives NaN.
func Pow(x, y Float) Float {
	if y.Lo == 0 && y.Hi == math.Trunc(y.Hi) && math.Abs(y.Hi) <= 1<<30 {
		return Powi(x, int(y.Hi))
	}
	switch {
	case x.Hi > 0:
		return Exp(Mul(y, Log(x)))
	case x.Hi == 0 && y.Hi > 0:
		return Float{}
	case x.Hi == 0 && y.Hi < 0:
		return Float{math.Inf(1), 0}
	}
	return Float{detmath.Pow(x.Hi, y.Hi), 0}
}
