package ival

import (
	"math"
	"math/big"
)

// fullTurn is a width beyond one period 2π of sin and cos (7 > 2π), above
// which the range is all of [-1, 1] without further work.
const fullTurn = 7

// quarterRange returns the integers n for which x.Lo <= n π/2 <= x.Hi may
// hold: every n from the ceiling of the lower end of the enclosure of
// x.Lo/(π/2) to the floor of the upper end of the enclosure of x.Hi/(π/2).
// Some returned n may lie just outside x (when an enclosure straddles an
// integer); none inside is missing. x is bounded and narrower than
// fullTurn, so there are at most 5 of them.
func quarterRange(x Interval) []*big.Int {
	qa, _ := halfPiQuotient(bigOf(x.Lo), kprec)
	qb, _ := halfPiQuotient(bigOf(x.Hi), kprec)
	first := ceilInt(qa.lo)
	last := floorInt(qb.hi)
	var ns []*big.Int
	for n := first; n.Cmp(last) <= 0; n = new(big.Int).Add(n, big.NewInt(1)) {
		ns = append(ns, n)
	}
	return ns
}

// floorInt returns floor(v) and ceilInt ceil(v) as big.Int.
func floorInt(v *big.Float) *big.Int {
	n, acc := v.Int(nil)  // truncates toward zero
	if acc == big.Above { // v < 0 was truncated up
		n.Sub(n, big.NewInt(1))
	}
	return n
}

func ceilInt(v *big.Float) *big.Int {
	n, acc := v.Int(nil)
	if acc == big.Below {
		n.Add(n, big.NewInt(1))
	}
	return n
}

func mod4(n *big.Int) int64 { return new(big.Int).Mod(n, big.NewInt(4)).Int64() }

// sinCos returns the enclosure of sin (cos when cos is true) over x, from
// the kernel at the ends and the turning points n π/2 inside x: for sin the
// odd n (n mod 4 = 1 a maximum 1, 3 a minimum -1), for cos the even n (0 a
// maximum, 2 a minimum). Between turning points the function is monotone,
// so the range is the hull of the end values and the turning values.
func sinCos(x Interval, cos bool) Interval {
	if x.IsEmpty() {
		return Empty()
	}
	if !x.IsBounded() || subDown(x.Hi, x.Lo) >= fullTurn {
		return Interval{-1, 1}
	}
	pick := func(v float64) benc {
		s, c := sinCosK(bigOf(v), kprec)
		if cos {
			return c
		}
		return s
	}
	e := pick(x.Lo)
	if x.Hi != x.Lo {
		e = e.hull(pick(x.Hi))
	}
	r := e.toInterval()
	if x.Hi != x.Lo {
		for _, n := range quarterRange(x) {
			m := mod4(n)
			if cos {
				m = (m + 1) % 4 // cos a = sin(a + π/2): shift the quadrant
			}
			switch m {
			case 1:
				r.Hi = 1
			case 3:
				r.Lo = -1
			}
		}
	}
	return Interval{math.Max(r.Lo, -1), math.Min(r.Hi, 1)}
}

// Sin returns an enclosure of {sin a : a in x}.
//
// It rests on the sin/cos kernel: reduction x = k π/2 + r with π enclosed
// to 192 bits plus the exponent of x (so r keeps its accuracy near the
// zeros and at huge x), Taylor series with Lagrange remainder in interval
// arithmetic; the turning points n π/2 inside x are found from enclosures
// of x/(π/2), and an unsure one is included (wider, never wrong).
//
// Special cases:
//
//	Sin(x) = [-1, 1]   if x is unbounded or wider than 7 (> 2π)
//	Sin(Point(0)) = [0, 0]
func Sin(x Interval) Interval { return sinCos(x, false) }

// Cos returns an enclosure of {cos a : a in x}, as Sin.
//
// Special cases:
//
//	Cos(x) = [-1, 1]   if x is unbounded or wider than 7 (> 2π)
//	Cos(Point(0)) = [1, 1]
func Cos(x Interval) Interval { return sinCos(x, true) }

// Tan returns an enclosure of {tan a : a in x}.
//
// It rests on the sin/cos kernel (tan = sin/cos in interval arithmetic).
// tan is increasing between its poles (2n+1) π/2; if x holds a pole, or
// possibly holds one (an enclosure of x/(π/2) straddles an odd integer), the
// result is Entire().
//
// Special cases:
//
//	Tan(x) = Entire()   if x is unbounded, wider than 4 (> π) or holds a pole
func Tan(x Interval) Interval {
	if x.IsEmpty() {
		return Empty()
	}
	if !x.IsBounded() || subDown(x.Hi, x.Lo) >= 4 {
		return Entire()
	}
	for _, n := range quarterRange(x) {
		if n.Bit(0) == 1 {
			return Entire()
		}
	}
	lo, okLo := tanK(x.Lo)
	hi, okHi := tanK(x.Hi)
	if !okLo || !okHi {
		return Entire()
	}
	return Interval{down64(lo.lo), up64(hi.hi)}
}

// tanK encloses tan v; ok is false if the cosine enclosure holds 0.
func tanK(v float64) (benc, bool) {
	w := uint(kprec + 32)
	s, c := sinCosK(bigOf(v), w)
	if c.containsZero() {
		return benc{}, false
	}
	return s.quo(c, w), true
}

// halfPiEnc returns an enclosure of π/2.
func halfPiEnc(p uint) benc { return piEnc(p).ldexp(-1) }

// Atan returns an enclosure of {atan a : a in x} (increasing, inside
// (-π/2, π/2)).
//
// It rests on the atan kernel: atan a = π/2 - atan(1/a) for a > 1, three
// halvings a/(1+sqrt(1+a²)) with verified square roots, and the
// alternating Taylor series, whose remainder is at most the first omitted
// term, in 128-bit interval arithmetic.
//
// Special cases:
//
//	Atan([-Inf, b]) = [-π/2 rounded down, ...];  Atan([a, +Inf]) = [..., π/2 rounded up]
func Atan(x Interval) Interval {
	if x.IsEmpty() {
		return Empty()
	}
	hp := halfPiEnc(kprec)
	lo, hi := down64(hp.neg().lo), up64(hp.hi)
	if !math.IsInf(x.Lo, 0) {
		lo = down64(atanK(bigOf(x.Lo), kprec).lo)
	}
	if !math.IsInf(x.Hi, 0) {
		hi = up64(atanK(bigOf(x.Hi), kprec).hi)
	}
	return Interval{lo, hi}
}

// atan2K encloses the angle of the point (x, y) != (0, 0) in (-π, π]:
//
//	x > 0: atan(y/x);  x < 0: atan(y/x) + π (y >= 0) or - π (y < 0);
//	x = 0: π/2 or -π/2 by the sign of y.
func atan2K(y, x float64) benc {
	w := uint(kprec + 32)
	hp := halfPiEnc(w)
	if x == 0 {
		if y > 0 {
			return hp
		}
		return hp.neg()
	}
	q := bf64(y, w).quo(bf64(x, w), w)
	a := benc{atanK(q.lo, w).lo, atanK(q.hi, w).hi} // atan is increasing
	switch {
	case x > 0:
		return a
	case y >= 0:
		return a.add(hp.ldexp(1), w)
	}
	return a.sub(hp.ldexp(1), w)
}

// Atan2 returns an enclosure of the angles {atan2(b, a) : b in y, a in x}
// of the points (a, b) of the box x × y, in [-π, π].
//
// Where the box holds no point of the cut (the half-line b = 0, a < 0 is
// not crossed: y >= 0 or y < 0 there) and not the origin, the angle is
// continuous on the box and the box is convex, so its extremes are at the
// corners, each enclosed by the atan kernel plus an enclosure of π.
//
// Special cases:
//
//	Atan2(y, x) = [-π, π] (rounded outward)   if the box holds the origin
//	              (where the angle is undefined; the float evaluator's 0 is
//	              inside), crosses the cut (x.Lo < 0 and y.Lo < 0 <= y.Hi),
//	              or is unbounded (a simple, wider enclosure)
func Atan2(y, x Interval) Interval {
	if x.IsEmpty() || y.IsEmpty() {
		return Empty()
	}
	pi := piEnc(kprec)
	whole := Interval{down64(pi.neg().lo), up64(pi.hi)}
	switch {
	case !x.IsBounded() || !y.IsBounded():
		return whole
	case x.Contains(0) && y.Contains(0):
		return whole
	case x.Lo < 0 && y.Lo < 0 && y.Hi >= 0:
		return whole
	}
	e := atan2K(y.Lo, x.Lo)
	for _, c := range [3][2]float64{{y.Lo, x.Hi}, {y.Hi, x.Lo}, {y.Hi, x.Hi}} {
		e = e.hull(atan2K(c[0], c[1]))
	}
	r := e.toInterval()
	return Interval{math.Max(r.Lo, whole.Lo), math.Min(r.Hi, whole.Hi)}
}
