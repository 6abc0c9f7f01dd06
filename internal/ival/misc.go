package ival

import "math"

// Abs returns {|a| : a in x} (exact).
func Abs(x Interval) Interval {
	switch {
	case x.IsEmpty():
		return Empty()
	case x.Lo >= 0:
		return Interval{math.Abs(x.Lo), x.Hi}
	case x.Hi <= 0:
		return Neg(x)
	}
	return Interval{0, math.Max(-x.Lo, x.Hi)}
}

// Min returns {min(a, b) : a in x, b in y} (exact).
func Min(x, y Interval) Interval {
	if x.IsEmpty() || y.IsEmpty() {
		return Empty()
	}
	return Interval{math.Min(x.Lo, y.Lo), math.Min(x.Hi, y.Hi)}
}

// Max returns {max(a, b) : a in x, b in y} (exact).
func Max(x, y Interval) Interval {
	if x.IsEmpty() || y.IsEmpty() {
		return Empty()
	}
	return Interval{math.Max(x.Lo, y.Lo), math.Max(x.Hi, y.Hi)}
}

// Sign returns the set-valued sign of x: [1, 1] for x > 0, [-1, -1] for
// x < 0, and for any x that holds 0 the hull of the jump, [-1, 1] (also for
// x = [0, 0]). Taking the whole jump at 0 makes the enclosure valid for
// every value a right-hand side may take there (the float evaluator's
// sign(0) = 0, or either one-sided limit), as in set-valued treatments of
// discontinuous differential equations.
func Sign(x Interval) Interval {
	switch {
	case x.IsEmpty():
		return Empty()
	case x.Lo > 0:
		return Point(1)
	case x.Hi < 0:
		return Point(-1)
	}
	return Interval{-1, 1}
}

// Step returns the set-valued unit step of x: [1, 1] for x > 0, [0, 0] for
// x < 0, and [0, 1], the hull of the jump, for any x that holds 0 (which
// contains the float evaluator's step(0) = 1).
func Step(x Interval) Interval {
	switch {
	case x.IsEmpty():
		return Empty()
	case x.Lo > 0:
		return Point(1)
	case x.Hi < 0:
		return Point(0)
	}
	return Interval{0, 1}
}

// maxPowInt bounds the integer exponents Pow hands to PowInt: every float64
// of larger magnitude is an even integer, for which |a|^y = a^y.
const maxPowInt = 1 << 53

// powK returns a float64 enclosure of a^b for finite a > 0 and finite b:
// e^(b log a) with log a enclosed by the log kernel at 160 bits, the
// product in interval arithmetic, and exp (increasing) applied to its ends.
func powK(a, b float64) Interval {
	w := uint(kprec + 32)
	l := logK(bigOf(a), w).mul(bf64(b, w), w)
	return Interval{expDown(l.lo), expUp(l.hi)}
}

// Pow returns an enclosure of {a^b : a in x, b in y}.
//
// A point y holding an integer n with |n| <= 2^53 gives PowInt(x, n), defined
// for negative a too. Otherwise a^b = e^(b log a) is defined for a > 0; it is
// monotone in each argument, so on a bounded box its extremes are at the
// corners, each enclosed by the log and exp kernels at 160 bits. Unbounded
// boxes use Exp(Mul(y, Log(x))).
//
// Special cases:
//
//	Pow(x, y) = Empty()   if x.Lo < 0 and y is not an integer point
//	                      (a^b is not real for a < 0 and non-integer b)
//	Pow(x, y) = Empty()   if x holds 0 and y.Lo < 0 (0^b is not finite)
//	0^b = 0 for b > 0, and 0^0 = 1 (as PowInt)
func Pow(x, y Interval) Interval {
	if x.IsEmpty() || y.IsEmpty() {
		return Empty()
	}
	if y.Lo == y.Hi && y.Lo == math.Trunc(y.Lo) {
		if math.Abs(y.Lo) <= maxPowInt {
			return PowInt(x, int(y.Lo))
		}
		x = Abs(x) // y even: a^y = |a|^y
	}
	switch {
	case x.Lo < 0:
		return Empty()
	case x.Lo == 0 && y.Lo < 0:
		return Empty()
	case x.Hi == 0: // x = [0, 0], y >= 0 not a point: 0^0 = 1, 0^b = 0
		if y.Lo == 0 {
			return Interval{0, 1}
		}
		return Point(0)
	}
	if !x.IsBounded() || !y.IsBounded() {
		r := Exp(Mul(y, Log(Interval{math.Max(x.Lo, math.SmallestNonzeroFloat64), x.Hi})))
		if x.Lo == 0 {
			r = Hull(r, Point(0))
			if y.Lo == 0 {
				r = Hull(r, Point(1))
			}
		}
		return r
	}
	if x.Lo == 0 { // y >= 0: increasing in a; 0^b is 0 (b > 0) or 1 (b = 0)
		r := Hull(powK(x.Hi, y.Lo), powK(x.Hi, y.Hi))
		r = Hull(r, Point(0))
		if y.Lo == 0 {
			r = Hull(r, Point(1))
		}
		return r
	}
	r := powK(x.Lo, y.Lo)
	for _, c := range [3][2]float64{{x.Lo, y.Hi}, {x.Hi, y.Lo}, {x.Hi, y.Hi}} {
		r = Hull(r, powK(c[0], c[1]))
	}
	return r
}
