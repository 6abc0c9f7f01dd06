package ival

import "math"

// Add returns an enclosure of {a+b : a in x, b in y}.
func Add(x, y Interval) Interval {
	if x.IsEmpty() || y.IsEmpty() {
		return Empty()
	}
	return Interval{addDown(x.Lo, y.Lo), addUp(x.Hi, y.Hi)}
}

// Sub returns an enclosure of {a-b : a in x, b in y}.
func Sub(x, y Interval) Interval {
	if x.IsEmpty() || y.IsEmpty() {
		return Empty()
	}
	return Interval{subDown(x.Lo, y.Hi), subUp(x.Hi, y.Lo)}
}

// Neg returns {-a : a in x} (exact).
func Neg(x Interval) Interval {
	if x.IsEmpty() {
		return Empty()
	}
	return Interval{-x.Hi, -x.Lo}
}

// Mul returns an enclosure of {a*b : a in x, b in y}. A zero factor
// annihilates an unbounded one: Mul(Point(0), Entire()) = [0, 0].
func Mul(x, y Interval) Interval {
	if x.IsEmpty() || y.IsEmpty() {
		return Empty()
	}
	switch {
	case x.Lo >= 0: // x >= 0
		switch {
		case y.Lo >= 0:
			return Interval{mulDown(x.Lo, y.Lo), mulUp(x.Hi, y.Hi)}
		case y.Hi <= 0:
			return Interval{mulDown(x.Hi, y.Lo), mulUp(x.Lo, y.Hi)}
		}
		return Interval{mulDown(x.Hi, y.Lo), mulUp(x.Hi, y.Hi)}
	case x.Hi <= 0: // x <= 0
		switch {
		case y.Lo >= 0:
			return Interval{mulDown(x.Lo, y.Hi), mulUp(x.Hi, y.Lo)}
		case y.Hi <= 0:
			return Interval{mulDown(x.Hi, y.Hi), mulUp(x.Lo, y.Lo)}
		}
		return Interval{mulDown(x.Lo, y.Hi), mulUp(x.Lo, y.Lo)}
	}
	// x straddles 0.
	switch {
	case y.Lo >= 0:
		return Interval{mulDown(x.Lo, y.Hi), mulUp(x.Hi, y.Hi)}
	case y.Hi <= 0:
		return Interval{mulDown(x.Hi, y.Lo), mulUp(x.Lo, y.Lo)}
	}
	return Interval{
		math.Min(mulDown(x.Lo, y.Hi), mulDown(x.Hi, y.Lo)),
		math.Max(mulUp(x.Lo, y.Lo), mulUp(x.Hi, y.Hi)),
	}
}

// Div returns an enclosure of {a/b : a in x, b in y}.
//
// Special cases:
//
//	Div(x, y) = Entire()   if y contains 0 (also for y = [0, 0]; the
//	                       quotient is unbounded or undefined, and an
//	                       unbounded result fails every enclosure test)
//	Div(Empty, y) = Div(x, Empty) = Empty()
func Div(x, y Interval) Interval {
	if x.IsEmpty() || y.IsEmpty() {
		return Empty()
	}
	switch {
	case y.Lo > 0:
		switch {
		case x.Lo >= 0:
			return Interval{divDown(x.Lo, y.Hi), divUp(x.Hi, y.Lo)}
		case x.Hi <= 0:
			return Interval{divDown(x.Lo, y.Lo), divUp(x.Hi, y.Hi)}
		}
		return Interval{divDown(x.Lo, y.Lo), divUp(x.Hi, y.Lo)}
	case y.Hi < 0:
		switch {
		case x.Lo >= 0:
			return Interval{divDown(x.Hi, y.Hi), divUp(x.Lo, y.Lo)}
		case x.Hi <= 0:
			return Interval{divDown(x.Hi, y.Lo), divUp(x.Lo, y.Hi)}
		}
		return Interval{divDown(x.Hi, y.Hi), divUp(x.Lo, y.Hi)}
	}
	return Entire()
}

// Recip returns an enclosure of {1/b : b in y}; Entire() if y contains 0.
func Recip(y Interval) Interval { return Div(Point(1), y) }

// Scale returns an enclosure of {c*a : a in x}.
//
// Special cases:
//
//	Scale(x, NaN) = Scale(x, ±Inf) = Empty()   (c is not a real number)
func Scale(x Interval, c float64) Interval { return Mul(x, Point(c)) }

// Sqr returns an enclosure of {a*a : a in x}. Unlike Mul(x, x), which treats
// the two factors as independent, it is never negative: Sqr([-1, 2]) =
// [0, 4] where Mul gives [-2, 4].
func Sqr(x Interval) Interval {
	switch {
	case x.IsEmpty():
		return Empty()
	case x.Lo >= 0:
		return Interval{mulDown(x.Lo, x.Lo), mulUp(x.Hi, x.Hi)}
	case x.Hi <= 0:
		return Interval{mulDown(x.Hi, x.Hi), mulUp(x.Lo, x.Lo)}
	}
	return Interval{0, math.Max(mulUp(x.Lo, x.Lo), mulUp(x.Hi, x.Hi))}
}

// powDown returns a float64 <= a^n and powUp one >= a^n, for a >= 0 and n >=
// 1, by n-1 directed multiplications (each factor is nonnegative, so a
// lower (upper) bound of every partial product gives a lower (upper) bound
// of the next). Binary powering keeps the count at O(log n).
func powDown(a float64, n int) float64 {
	r := 1.0
	for b := a; ; {
		if n&1 == 1 {
			r = mulDown(r, b)
		}
		n >>= 1
		if n == 0 {
			return r
		}
		b = mulDown(b, b)
	}
}

func powUp(a float64, n int) float64 {
	r := 1.0
	for b := a; ; {
		if n&1 == 1 {
			r = mulUp(r, b)
		}
		n >>= 1
		if n == 0 {
			return r
		}
		b = mulUp(b, b)
	}
}

// PowInt returns an enclosure of {a^n : a in x} for an integer n, using the
// monotonicity of a^n on each side of 0 (so PowInt([-2, 1], 2) = [0, 4]).
//
// Special cases:
//
//	PowInt(x, 0) = [1, 1]                  (also for x containing 0: 0^0 = 1)
//	PowInt(x, n) = Recip(PowInt(x, -n))    for n < 0 (Entire if x contains 0)
func PowInt(x Interval, n int) Interval {
	switch {
	case x.IsEmpty():
		return Empty()
	case n == 0:
		return Point(1)
	case n < 0:
		if n == math.MinInt { // -n overflows; x^n = (x^(n/2))^2
			return Recip(Sqr(PowInt(x, -(n / 2))))
		}
		return Recip(PowInt(x, -n))
	case n == 1:
		return x
	}
	if n%2 == 1 { // increasing on the whole line: a^n = -(|a|^n) for a < 0
		lo := powDown(x.Lo, n)
		if x.Lo < 0 {
			lo = -powUp(-x.Lo, n)
		}
		hi := powUp(x.Hi, n)
		if x.Hi < 0 {
			hi = -powDown(-x.Hi, n)
		}
		return Interval{lo, hi}
	}
	switch {
	case x.Lo >= 0:
		return Interval{powDown(x.Lo, n), powUp(x.Hi, n)}
	case x.Hi <= 0:
		return Interval{powDown(-x.Hi, n), powUp(-x.Lo, n)}
	}
	return Interval{0, powUp(math.Max(-x.Lo, x.Hi), n)}
}

// Sqrt returns an enclosure of {sqrt(a) : a in x}.
//
// Special cases:
//
//	Sqrt(x) = Empty()   if x.Lo < 0 (x not inside the domain [0, +Inf])
func Sqrt(x Interval) Interval {
	if x.IsEmpty() || x.Lo < 0 {
		return Empty()
	}
	return Interval{sqrtDown(x.Lo), sqrtUp(x.Hi)}
}
