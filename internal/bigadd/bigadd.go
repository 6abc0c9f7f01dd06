// Package bigadd adds and subtracts big.Float values whose exponents lie
// far apart without the cost math/big pays for them.
//
// big.Float.Add and Sub align the operands' mantissas exactly before they
// round, so adding 1 and 2^-600000000 shifts a mantissa by 600 million
// bits (75 MB, seconds of work) to produce 1 again. Taylor recurrences of
// formulas such as x^2^-x^8 meet such pairs. Add and Sub here first
// replace the operand that lies far below the other by a stand-in of the
// same sign, a power of two below every bit either operand or the result
// can hold: both then act only as the sticky bit of the rounding, so the
// result is bit for bit what big.Float gives (for every rounding mode) at
// a cost bounded by the precisions.
package bigadd

import "math/big"

// Add sets z = x + y, rounded as z.Add(x, y) rounds it, and returns z.
func Add(z, x, y *big.Float) *big.Float {
	var t big.Float
	x, y = standIn(&t, z, x, y)
	return z.Add(x, y)
}

// Sub sets z = x - y, rounded as z.Sub(x, y) rounds it, and returns z.
func Sub(z, x, y *big.Float) *big.Float {
	var t big.Float
	x, y = standIn(&t, z, x, y)
	return z.Sub(x, y)
}

// standIn returns x and y, the one far below the other (more than every
// precision involved, plus guard bits) replaced by t, set to a power of
// two of its sign still below it.
//
// Why the result is unchanged: let |x| lie in [2^(ex-1), 2^ex) and
// |y| < 2^(ex-gap) with gap above the precisions of x, y and z. The
// rounding boundaries of z's precision near x (its representable values
// and the midpoints between them) are at least 2^(ex-gap+2) apart and x
// is one of the representable values of its own precision, so x + y and
// x + t lie strictly between x and the nearest boundary on the same side
// whenever y and t have the same sign and both are below 2^(ex-gap):
// every rounding mode maps them to the same value.
func standIn(t, z, x, y *big.Float) (*big.Float, *big.Float) {
	if x.Sign() == 0 || y.Sign() == 0 || x.IsInf() || y.IsInf() {
		return x, y
	}
	p := z.Prec()
	if p == 0 {
		p = max(x.Prec(), y.Prec())
	}
	gap := int64(max(p, x.Prec(), y.Prec())) + guard
	ex, ey := int64(x.MantExp(nil)), int64(y.MantExp(nil))
	switch {
	case ex-ey > gap:
		return x, power(t, y.Sign(), ex-gap-1)
	case ey-ex > gap:
		return power(t, x.Sign(), ey-gap-1), y
	}
	return x, y
}

// guard is the number of binary places kept between the stand-in and the
// last bit any operand holds (two would do, see standIn; four for margin).
const guard = 4

// power sets t to sign·2^(e-1), the largest power of two below 2^e (or
// the smallest big.Float holds, when e is below its range), and returns t.
func power(t *big.Float, sign int, e int64) *big.Float {
	if e < big.MinExp {
		e = big.MinExp
	}
	t.SetPrec(1).SetInt64(int64(sign))
	return t.SetMantExp(t, int(e-1))
}
