// Package dd is double-double arithmetic: a number is an unevaluated sum
// Hi + Lo of two float64 values with |Lo| <= ulp(Hi)/2, giving about 106
// bits (32 decimal digits) of precision at a few times the cost of float64.
//
// The basic operations are the error-free transformations TwoSum (Knuth)
// and TwoProd (an exact product through math.FMA), combined as in Joldes,
// Muller and Popescu (2017), whose proven relative error bounds, with
// u = 2^-53, are
//
//	Add, Sub  3u² + 13u³  (about 3.7e-32)   Algorithm 6 (AccurateDWPlusDW)
//	Mul       5u²         (about 6.2e-32)   Algorithm 12 (DWTimesDW3)
//	Div       15u² + 56u³ (about 1.9e-31)   Algorithm 17 (DWDivDW2)
//	Sqrt      one Newton step from math.Sqrt; measured below 4u² in the tests
//
// The elementary functions (Exp, Log, Sin, Cos, Tan, Atan, Atan2, Sinh,
// Cosh, Tanh, Pow) are built on these operations by argument reduction and
// Taylor series or one Newton step from the float64 function; their accuracy
// is documented at each and measured against math/big in the tests (a few
// times 1e-32 relative in their main ranges).
//
// math.FMA is used on purpose (it is exact on every architecture, in hardware
// or software), so results are bit-identical on amd64 and arm64.
//
// References:
//
//	T. J. Dekker, A floating-point technique for extending the available
//	  precision, Numer. Math. 18 (1971) 224–242.
//	D. H. Bailey, Y. Hida, X. S. Li, Algorithms for quad-double precision
//	  floating point arithmetic, Proc. 15th IEEE Symposium on Computer
//	  Arithmetic (2001) 155–162 (the QD library's double-double methods).
//	M. Joldes, J.-M. Muller, V. Popescu, Tight and rigorous error bounds for
//	  basic building blocks of double-word arithmetic, ACM Trans. Math.
//	  Software 44 (2017) 15:1–15:27.
package dd

import (
	"math"
	"math/big"
)

// Float is a double-double number Hi + Lo.
type Float struct {
	Hi, Lo float64
}

// From returns the double-double equal to x.
func From(x float64) Float { return Float{x, 0} }

// Float64 returns Hi + Lo rounded to float64 (which is Hi for a normalized
// value).
func (x Float) Float64() float64 { return x.Hi + x.Lo }

// Big returns x exactly as a big.Float of 106 bits of mantissa at least.
func (x Float) Big() *big.Float {
	z := new(big.Float).SetPrec(2200).SetFloat64(x.Hi)
	if x.Lo != 0 && !math.IsInf(x.Hi, 0) && !math.IsNaN(x.Hi) {
		z.Add(z, new(big.Float).SetFloat64(x.Lo))
	}
	return z
}

// FromBig returns the double-double nearest to z (Hi is z rounded to
// float64, Lo the rest rounded to float64).
func FromBig(z *big.Float) Float {
	hi, _ := z.Float64()
	if math.IsInf(hi, 0) {
		return Float{hi, 0}
	}
	r := new(big.Float).SetPrec(z.Prec()+64).Sub(z, new(big.Float).SetFloat64(hi))
	lo, _ := r.Float64()
	return Float{hi, lo}
}

// twoSum returns s, e with s = fl(a+b) and s + e = a + b exactly (Knuth).
func twoSum(a, b float64) (s, e float64) {
	s = a + b
	bb := s - a
	e = (a - (s - bb)) + (b - bb)
	return
}

// fastTwoSum is twoSum for |a| >= |b| (Dekker).
func fastTwoSum(a, b float64) (s, e float64) {
	s = a + b
	e = b - (s - a)
	return
}

// twoProd returns p, e with p = fl(a*b) and p + e = a*b exactly.
func twoProd(a, b float64) (p, e float64) {
	p = float64(a * b) // a conversion: p must not be fused into a later add
	e = math.FMA(a, b, -p)
	return
}

// Add returns x + y (Joldes, Muller, Popescu 2017, Algorithm 6; relative
// error below 3u² + 13u³).
func Add(x, y Float) Float {
	sh, sl := twoSum(x.Hi, y.Hi)
	th, tl := twoSum(x.Lo, y.Lo)
	c := sl + th
	vh, vl := fastTwoSum(sh, c)
	w := tl + vl
	zh, zl := fastTwoSum(vh, w)
	if math.IsInf(zh, 0) || math.IsNaN(zh) {
		return Float{x.Hi + y.Hi, 0}
	}
	return Float{zh, zl}
}

// Neg returns -x.
func Neg(x Float) Float { return Float{-x.Hi, -x.Lo} }

// Sub returns x - y, as Add(x, -y).
func Sub(x, y Float) Float { return Add(x, Neg(y)) }

// Mul returns x*y (Joldes, Muller, Popescu 2017, Algorithm 12; relative
// error below 5u²).
func Mul(x, y Float) Float {
	ch, cl1 := twoProd(x.Hi, y.Hi)
	tl0 := x.Lo * y.Lo
	tl1 := math.FMA(x.Hi, y.Lo, tl0)
	cl2 := math.FMA(x.Lo, y.Hi, tl1)
	cl3 := cl1 + cl2
	zh, zl := fastTwoSum(ch, cl3)
	if math.IsInf(zh, 0) || math.IsNaN(zh) || math.IsInf(ch, 0) {
		return Float{x.Hi * y.Hi, 0}
	}
	return Float{zh, zl}
}

// MulFloat returns x*y for a float64 y (Algorithm 9; relative error below 2u²).
func MulFloat(x Float, y float64) Float {
	ch, cl1 := twoProd(x.Hi, y)
	cl3 := math.FMA(x.Lo, y, cl1)
	zh, zl := fastTwoSum(ch, cl3)
	if math.IsInf(zh, 0) || math.IsNaN(zh) || math.IsInf(ch, 0) {
		return Float{x.Hi * y, 0}
	}
	return Float{zh, zl}
}

// Div returns x/y (Joldes, Muller, Popescu 2017, Algorithm 17; relative
// error below 15u² + 56u³).
//
// Special cases follow float64 division of the high parts: x/0 = ±Inf,
// 0/0 = NaN.
func Div(x, y Float) Float {
	th := x.Hi / y.Hi
	if math.IsInf(th, 0) || math.IsNaN(th) || y.Hi == 0 || math.IsInf(y.Hi, 0) {
		return Float{th, 0}
	}
	r := MulFloat(y, th)
	ph := x.Hi - r.Hi
	dl := x.Lo - r.Lo
	d := ph + dl
	tl := d / y.Hi
	zh, zl := fastTwoSum(th, tl)
	return Float{zh, zl}
}

// Sqrt returns the square root of x by one Newton step from math.Sqrt(Hi)
// (Bailey, Hida, Li 2001): q = sqrt(Hi); q + (x - q²)/(2q), with q² exact
// through TwoProd.
//
// Special cases: Sqrt(0) = 0, Sqrt(x < 0) = NaN, Sqrt(+Inf) = +Inf.
func Sqrt(x Float) Float {
	if x.Hi <= 0 || math.IsInf(x.Hi, 0) || math.IsNaN(x.Hi) {
		return Float{math.Sqrt(x.Hi), 0}
	}
	q := math.Sqrt(x.Hi)
	ph, pl := twoProd(q, q)
	r := ((x.Hi - ph) - pl + x.Lo) / (2 * q)
	zh, zl := fastTwoSum(q, r)
	return Float{zh, zl}
}

// Abs returns |x|.
func Abs(x Float) Float {
	if x.Hi < 0 || (x.Hi == 0 && x.Lo < 0) {
		return Neg(x)
	}
	return x
}

// Cmp returns -1, 0 or 1 as x < y, x == y or x > y (0 if either is NaN).
func Cmp(x, y Float) int {
	switch {
	case x.Hi < y.Hi || (x.Hi == y.Hi && x.Lo < y.Lo):
		return -1
	case x.Hi > y.Hi || (x.Hi == y.Hi && x.Lo > y.Lo):
		return 1
	}
	return 0
}

// IsFinite reports whether x is neither infinite nor NaN.
func (x Float) IsFinite() bool { return !math.IsInf(x.Hi, 0) && !math.IsNaN(x.Hi) }

// ldexp returns x·2^k exactly (barring overflow and underflow).
func ldexp(x Float, k int) Float { return Float{math.Ldexp(x.Hi, k), math.Ldexp(x.Lo, k)} }
