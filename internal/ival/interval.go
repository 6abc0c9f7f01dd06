package ival

import (
	"math"
	"strconv"
)

// Interval is the closed set [Lo, Hi] of real numbers, with -Inf <= Lo <= Hi
// <= +Inf, Lo < +Inf and Hi > -Inf (an infinite end means the set is
// unbounded on that side; the ends themselves are not members). Entire() is
// [-Inf, +Inf].
//
// The empty set is encoded as Lo = Hi = NaN (see Empty). Every function of
// this package returns Empty for an empty operand, and every predicate
// (Contains, Subset, Interior) is false when an operand is empty, so that an
// empty result can never pass an enclosure test by accident.
//
// The zero value is Point(0).
type Interval struct{ Lo, Hi float64 }

// Point returns the degenerate interval [x, x].
//
// Special cases:
//
//	Point(NaN) = Point(±Inf) = Empty()   (no real number)
func Point(x float64) Interval {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return Empty()
	}
	return Interval{x, x}
}

// New returns the interval [lo, hi]. It is meant for the programmer's own
// constants, not for validating user input: it never panics, and arguments
// that describe no set of reals give Empty.
//
// Special cases:
//
//	New(lo, hi) = Empty()   if lo > hi, either is NaN, lo = +Inf or hi = -Inf
func New(lo, hi float64) Interval {
	if !(lo <= hi) || math.IsInf(lo, 1) || math.IsInf(hi, -1) {
		return Empty()
	}
	return Interval{lo, hi}
}

// Entire returns [-Inf, +Inf], the whole real line.
func Entire() Interval { return Interval{math.Inf(-1), math.Inf(1)} }

// Empty returns the empty set, encoded as Lo = Hi = NaN. Functions return it
// where the operand is empty or where the operand is not entirely inside the
// function's domain (for example Sqrt of an interval with a negative part):
// a formula that is undefined somewhere in a box has no enclosure there.
func Empty() Interval { return Interval{math.NaN(), math.NaN()} }

// IsEmpty reports whether x is the empty set. A struct literal that breaks
// the invariant (ends not ordered, a NaN end, Lo = +Inf or Hi = -Inf)
// describes no set of reals and also counts as empty, so that every
// function returns Empty for it rather than a number.
func (x Interval) IsEmpty() bool {
	return !(x.Lo <= x.Hi) || math.IsInf(x.Lo, 1) || math.IsInf(x.Hi, -1)
}

// IsBounded reports whether both ends of a nonempty x are finite.
func (x Interval) IsBounded() bool {
	return !x.IsEmpty() && !math.IsInf(x.Lo, 0) && !math.IsInf(x.Hi, 0)
}

// Width returns an upper bound of Hi - Lo (rounded up).
//
// Special cases:
//
//	Width(Empty) = NaN
//	Width(x) = +Inf   if x is unbounded or Hi - Lo overflows
func (x Interval) Width() float64 {
	if x.IsEmpty() {
		return math.NaN()
	}
	return subUp(x.Hi, x.Lo)
}

// Mid returns a float64 inside x, close to (Lo+Hi)/2.
//
// Special cases:
//
//	Mid(Empty) = NaN
//	Mid(Entire) = 0
//	Mid([-Inf, b]) = -MaxFloat64   (b finite)
//	Mid([a, +Inf]) = +MaxFloat64   (a finite)
func (x Interval) Mid() float64 {
	switch {
	case x.IsEmpty():
		return math.NaN()
	case x.Lo == x.Hi:
		return x.Lo
	case math.IsInf(x.Lo, -1) && math.IsInf(x.Hi, 1):
		return 0
	case math.IsInf(x.Lo, -1):
		return -math.MaxFloat64 // <= every finite Hi
	case math.IsInf(x.Hi, 1):
		return math.MaxFloat64 // >= every finite Lo
	}
	// Halving first cannot overflow; round-to-nearest of a value in [Lo, Hi]
	// stays in [Lo, Hi] except for the halving of subnormals, hence the clamp.
	m := float64(0.5*x.Lo) + float64(0.5*x.Hi)
	return math.Min(math.Max(m, x.Lo), x.Hi)
}

// Rad returns an upper bound of the largest distance from Mid() to an end of
// x, so that x is inside [Mid-Rad, Mid+Rad].
//
// Special cases:
//
//	Rad(Empty) = NaN
//	Rad(x) = +Inf   if x is unbounded
func (x Interval) Rad() float64 {
	if x.IsEmpty() {
		return math.NaN()
	}
	m := x.Mid()
	return math.Max(subUp(m, x.Lo), subUp(x.Hi, m))
}

// Mag returns max |v| over v in x (exact: it is |Lo| or |Hi|).
//
// Special cases:
//
//	Mag(Empty) = NaN
func (x Interval) Mag() float64 {
	if x.IsEmpty() {
		return math.NaN()
	}
	return math.Max(math.Abs(x.Lo), math.Abs(x.Hi))
}

// Mig returns min |v| over v in x (exact: 0 if x holds 0, else the end
// nearer 0 in magnitude).
//
// Special cases:
//
//	Mig(Empty) = NaN
func (x Interval) Mig() float64 {
	switch {
	case x.IsEmpty():
		return math.NaN()
	case x.Lo > 0:
		return x.Lo
	case x.Hi < 0:
		return -x.Hi
	}
	return 0
}

// IsPoint reports whether x is a single real number (Lo == Hi).
func (x Interval) IsPoint() bool { return x.Lo == x.Hi && !math.IsInf(x.Lo, 0) }

// Inflate returns [Lo - r, Hi + r] rounded outward, for r >= 0: the
// widening step of an a-priori enclosure search (a box that fails the
// Interior test is inflated and tried again).
//
// Special cases:
//
//	Inflate(x, r) = x         for r <= 0
//	Inflate(x, NaN) = Empty()
func Inflate(x Interval, r float64) Interval {
	switch {
	case x.IsEmpty() || math.IsNaN(r):
		return Empty()
	case r <= 0:
		return x
	}
	return Interval{subDown(x.Lo, r), addUp(x.Hi, r)}
}

// Contains reports whether the real number v is in x (false for NaN, ±Inf
// and for an empty x).
func (x Interval) Contains(v float64) bool {
	return !math.IsInf(v, 0) && x.Lo <= v && v <= x.Hi
}

// Subset reports whether x is inside y. It is false when x or y is empty
// (deliberately, although the empty set is a subset of every set: an empty
// enclosure must not pass a containment test).
func (x Interval) Subset(y Interval) bool {
	if x.IsEmpty() || y.IsEmpty() {
		return false
	}
	return y.Lo <= x.Lo && x.Hi <= y.Hi
}

// Interior reports whether x is strictly inside y: y.Lo < x.Lo and x.Hi <
// y.Hi. An infinite end of y never holds an end of x strictly inside, so an
// unbounded x is never interior to anything; false when x or y is empty.
// This is the test of the a-priori enclosure (Picard) step: if the image of
// a box lies in its interior, the box encloses the solution.
func (x Interval) Interior(y Interval) bool {
	if x.IsEmpty() || y.IsEmpty() {
		return false
	}
	return y.Lo < x.Lo && x.Hi < y.Hi
}

// Hull returns the smallest interval holding x and y.
//
// Special cases:
//
//	Hull(Empty, y) = y;  Hull(x, Empty) = x
func Hull(x, y Interval) Interval {
	switch {
	case x.IsEmpty():
		return y
	case y.IsEmpty():
		return x
	}
	return Interval{math.Min(x.Lo, y.Lo), math.Max(x.Hi, y.Hi)}
}

// Intersect returns the intersection of x and y (Empty if they are
// disjoint or either is empty).
func Intersect(x, y Interval) Interval {
	if x.IsEmpty() || y.IsEmpty() {
		return Empty()
	}
	lo, hi := math.Max(x.Lo, y.Lo), math.Min(x.Hi, y.Hi)
	if lo > hi {
		return Empty()
	}
	return Interval{lo, hi}
}

// String formats x as "[lo, hi]" with the shortest decimal that reads back
// as each float64 ("[empty]" for the empty set), so reading the ends back
// gives the same interval.
func (x Interval) String() string {
	if x.IsEmpty() {
		return "[empty]"
	}
	return "[" + strconv.FormatFloat(x.Lo, 'g', -1, 64) + ", " + strconv.FormatFloat(x.Hi, 'g', -1, 64) + "]"
}
