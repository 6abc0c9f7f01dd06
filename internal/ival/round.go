package ival

import (
	"math"
	"math/bits"
)

// Directed rounding without touching the FPU's rounding mode.
//
// Each helper computes the round-to-nearest result r of one IEEE 754
// operation (correctly rounded on every platform Go supports) and then
// decides, from an exact error term where one is available, on which side of
// r the exact result lies:
//
//   - Addition: TwoSum gives the exact error e = (a+b) - r whenever r is
//     finite (Knuth 1969; it holds for subnormal operands too, because sums
//     of subnormals are exact).
//   - Multiplication, division, square root: math.FMA (exact on every
//     architecture, in hardware or software) computes RN(a*b - r),
//     RN(a - r*b), RN(x - r*r). Round-to-nearest is monotone and maps 0 to 0,
//     so a nonzero result has the sign of the exact residual, which says on
//     which side the exact value lies. A zero residual proves exactness only
//     where the residual is representable; that is checked separately.
//
// When the side is known, the bound on that side is r itself and the other
// is r moved one ulp outward; when it is not known (underflow, overflow), r
// is moved one ulp outward on both sides with math.Nextafter, which is
// rigorous because the error of a correctly rounded operation is at most half
// an ulp of r (also in the subnormal range, where the spacing is 2^-1074).
// Overflow is handled explicitly: a finite exact value whose rounding is ±Inf
// lies beyond ±MaxFloat64.

// lsbExp returns the exponent of the lowest set bit of a finite nonzero x:
// x = X * 2^lsbExp(x) with X an odd integer, |X| < 2^53.
func lsbExp(x float64) int {
	b := math.Float64bits(x)
	e := int(b >> 52 & 0x7ff)
	m := b & (1<<52 - 1)
	if e == 0 {
		e = 1 // subnormal: no implicit bit, same scale as the smallest normal
	} else {
		m |= 1 << 52
	}
	return e - 1075 + bits.TrailingZeros64(m)
}

// productErrExact reports whether a*b - RN(a*b) is a float64 for finite
// nonzero a, b, so that math.FMA(a, b, -p) computes it exactly. With a =
// A*2^i, b = B*2^j (A, B odd, below 2^53 in magnitude) and i+j >= -1074: a*b
// is a multiple of 2^(i+j) below 2^106*2^(i+j); either the float64 grid near
// a*b is no coarser than 2^(i+j), and then a*b (fewer than 53 significant
// bits above 2^(i+j), and 2^(i+j) >= 2^-1074) is itself a float64, or the
// grid is coarser, a power of two multiple of 2^(i+j), and the error is a
// multiple of 2^(i+j) of magnitude at most ulp(p)/2 <= 2^53*2^(i+j), hence a
// float64 (Dekker 1971 states the condition with the full significands).
func productErrExact(a, b float64) bool { return lsbExp(a)+lsbExp(b) >= -1074 }

func down(r float64) float64 { return math.Nextafter(r, math.Inf(-1)) }
func up(r float64) float64   { return math.Nextafter(r, math.Inf(1)) }

// twoSumErr returns the exact error (a+b) - s of s = RN(a+b) for finite a, b
// and finite s (Knuth's TwoSum), or a non-finite value when an intermediate
// overflowed (near ±MaxFloat64 s - a can round to ±Inf): TwoSum is exact
// when nothing overflows, and an overflow anywhere leaves ±Inf or NaN in
// the result, so a finite result is the exact error.
func twoSumErr(a, b, s float64) float64 {
	bb := s - a
	return (a - (s - bb)) + (b - bb)
}

// sumSide classifies a+b against s = RN(a+b) for finite a, b, s: +1 if
// a+b > s, -1 if a+b < s, 0 if equal, 2 if unknown (TwoSum overflowed).
func sumSide(a, b, s float64) int {
	e := twoSumErr(a, b, s)
	switch {
	case math.IsNaN(e) || math.IsInf(e, 0):
		return 2
	case e > 0:
		return 1
	case e < 0:
		return -1
	}
	return 0
}

// addDown returns a float64 <= a+b (a, b in [-Inf, +Inf], not both infinite
// of opposite signs).
func addDown(a, b float64) float64 {
	s := a + b
	if math.IsInf(a, 0) || math.IsInf(b, 0) {
		return s // exact in the extended reals
	}
	if math.IsInf(s, 0) { // overflow of a finite sum
		if s > 0 {
			return math.MaxFloat64
		}
		return s
	}
	switch sumSide(a, b, s) {
	case 0, 1:
		return s
	}
	return down(s)
}

// addUp returns a float64 >= a+b.
func addUp(a, b float64) float64 {
	s := a + b
	if math.IsInf(a, 0) || math.IsInf(b, 0) {
		return s
	}
	if math.IsInf(s, 0) {
		if s < 0 {
			return -math.MaxFloat64
		}
		return s
	}
	switch sumSide(a, b, s) {
	case 0, -1:
		return s
	}
	return up(s)
}

func subDown(a, b float64) float64 { return addDown(a, -b) }
func subUp(a, b float64) float64   { return addUp(a, -b) }

// mulSide classifies the exact product a*b against p = RN(a*b) for finite,
// nonzero a, b with finite, nonzero p: +1 if a*b > p, -1 if a*b < p, 0 if
// equal, 2 if unknown.
func mulSide(a, b, p float64) int {
	e := math.FMA(a, b, -p) // exact residual rounded once; math.FMA on purpose
	switch {
	case e > 0:
		return 1
	case e < 0:
		return -1
	case productErrExact(a, b):
		return 0
	}
	return 2
}

// mulDown returns a float64 <= a*b, with 0*(±Inf) taken as 0 (the product
// of the set {0} with anything is {0}).
func mulDown(a, b float64) float64 {
	if a == 0 || b == 0 {
		return 0
	}
	p := a * b
	if math.IsInf(a, 0) || math.IsInf(b, 0) {
		return p
	}
	switch {
	case math.IsInf(p, 1):
		return math.MaxFloat64
	case math.IsInf(p, -1):
		return p
	case p == 0: // underflow: the exact product is nonzero with p's sign
		if math.Signbit(p) {
			return -math.SmallestNonzeroFloat64
		}
		return 0
	}
	switch mulSide(a, b, p) {
	case 0, 1:
		return p
	}
	return down(p)
}

// mulUp returns a float64 >= a*b, with 0*(±Inf) taken as 0.
func mulUp(a, b float64) float64 {
	if a == 0 || b == 0 {
		return 0
	}
	p := a * b
	if math.IsInf(a, 0) || math.IsInf(b, 0) {
		return p
	}
	switch {
	case math.IsInf(p, -1):
		return -math.MaxFloat64
	case math.IsInf(p, 1):
		return p
	case p == 0:
		if math.Signbit(p) {
			return 0
		}
		return math.SmallestNonzeroFloat64
	}
	switch mulSide(a, b, p) {
	case 0, -1:
		return p
	}
	return up(p)
}

// divSide classifies the exact quotient a/b against q = RN(a/b) for finite
// nonzero a, b with finite nonzero q (as mulSide). The residual a - q*b has
// the sign of RN(a - q*b) when that is nonzero; a/b - q has that sign times
// the sign of b. A zero residual proves a == q*b only when q*b is itself
// exact (mulSide == 0) and equal to a.
func divSide(a, b, q float64) int {
	r := math.FMA(-q, b, a) // math.FMA on purpose: RN(a - q*b)
	if r != 0 {
		if (r > 0) == (b > 0) {
			return 1
		}
		return -1
	}
	if q*b == a && mulSide(q, b, q*b) == 0 {
		return 0
	}
	return 2
}

// divDown returns a float64 <= a/b for b != 0 (a/±Inf = ±0 and ±Inf/b =
// ±Inf are exact in the extended reals; both infinite is not allowed).
func divDown(a, b float64) float64 {
	q := a / b
	if a == 0 || math.IsInf(a, 0) || math.IsInf(b, 0) {
		return q
	}
	switch {
	case math.IsInf(q, 1):
		return math.MaxFloat64
	case math.IsInf(q, -1):
		return q
	case q == 0:
		if math.Signbit(q) {
			return -math.SmallestNonzeroFloat64
		}
		return 0
	}
	switch divSide(a, b, q) {
	case 0, 1:
		return q
	}
	return down(q)
}

// divUp returns a float64 >= a/b for b != 0.
func divUp(a, b float64) float64 {
	q := a / b
	if a == 0 || math.IsInf(a, 0) || math.IsInf(b, 0) {
		return q
	}
	switch {
	case math.IsInf(q, -1):
		return -math.MaxFloat64
	case math.IsInf(q, 1):
		return q
	case q == 0:
		if math.Signbit(q) {
			return 0
		}
		return math.SmallestNonzeroFloat64
	}
	switch divSide(a, b, q) {
	case 0, -1:
		return q
	}
	return up(q)
}

// sqrtSide classifies sqrt(x) against s = RN(sqrt(x)) for finite x > 0:
// the residual x - s*s has the sign of sqrt(x) - s.
func sqrtSide(x, s float64) int {
	r := math.FMA(-s, s, x) // math.FMA on purpose: RN(x - s*s)
	switch {
	case r > 0:
		return 1
	case r < 0:
		return -1
	}
	if s*s == x && mulSide(s, s, s*s) == 0 {
		return 0
	}
	return 2
}

// sqrtDown returns a float64 <= sqrt(x) for x >= 0 (x may be +Inf).
func sqrtDown(x float64) float64 {
	s := math.Sqrt(x)
	if x == 0 || math.IsInf(x, 1) {
		return s
	}
	switch sqrtSide(x, s) {
	case 0, 1:
		return s
	}
	return down(s)
}

// sqrtUp returns a float64 >= sqrt(x) for x >= 0.
func sqrtUp(x float64) float64 {
	s := math.Sqrt(x)
	if x == 0 || math.IsInf(x, 1) {
		return s
	}
	switch sqrtSide(x, s) {
	case 0, -1:
		return s
	}
	return up(s)
}
