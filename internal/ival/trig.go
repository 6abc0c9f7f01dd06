package ival

import (
	"math"
	"math/big"
)

// fullTurn is a width beyond one period 2π of sin and cos (7 > 2π), above
// which the range is all of [-1, 1] without further work.
const fullTurn = 7

// quarterRange describes the integers n for which x.Lo <= n π/2 <= x.Hi may
// hold: every n from the ceiling of the lower end of the enclosure of
// x.Lo/(π/2) to the floor of the upper end of the enclosure of x.Hi/(π/2).
// Some may lie just outside x (when an enclosure straddles an integer);
// none inside is missing. It returns the first such n modulo 4 and their
// count (0 if none). x is bounded and narrower than fullTurn, so the count
// is at most 6.
func quarterRange(x Interval) (first4 int, count int) {
	if math.Abs(x.Lo) <= fastLimit && math.Abs(x.Hi) <= fastLimit {
		// float64 enclosures of x/(π/2) (|n| < 2^20, exact in float64);
		// used only when neither straddles an integer, so that the answer
		// is the same as with the exact quotients.
		hp := fastConsts().halfPi
		qa, qb := Div(Point(x.Lo), hp), Div(Point(x.Hi), hp)
		if math.Ceil(qa.Lo) == math.Ceil(qa.Hi) && math.Floor(qb.Lo) == math.Floor(qb.Hi) {
			first, last := int64(math.Ceil(qa.Lo)), int64(math.Floor(qb.Hi))
			return int(first & 3), int(max(last-first+1, 0))
		}
	}
	qa, _ := halfPiQuotient(bigOf(x.Lo), kprec)
	qb, _ := halfPiQuotient(bigOf(x.Hi), kprec)
	first, last := ceilInt(qa.lo), floorInt(qb.hi)
	n := new(big.Int).Sub(last, first).Int64() + 1
	return int(mod4(first)), int(max(n, 0))
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
	pick := func(v float64) Interval {
		s, c := sinCosPoint(v)
		if cos {
			return c
		}
		return s
	}
	r := pick(x.Lo)
	if x.Hi != x.Lo {
		r = Hull(r, pick(x.Hi))
	}
	if x.Hi != x.Lo {
		first4, count := quarterRange(x)
		for i := range count {
			m := (first4 + i) % 4
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
// It rests on the reduction x = k π/2 + r and Taylor series with Lagrange
// remainder: for |x| <= 2^20 in float64 interval arithmetic with π/2 split
// into two exact parts and an enclosed tail (fast.go); otherwise, or when
// that is more than 8 steps wide, in 128-bit interval arithmetic with π
// enclosed to 192 bits plus the exponent of x (so r keeps its accuracy
// near the zeros and at huge x). The turning points n π/2 inside x are
// found from enclosures of x/(π/2), and an unsure one is included (wider,
// never wrong).
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
// It rests on tan = sin/cos in interval arithmetic, from the fast sin/cos
// (kept when at most 16 steps wide) or the 128-bit kernel.
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
	if first4, count := quarterRange(x); count >= 2 || count == 1 && first4%2 == 1 {
		return Entire() // an odd n, a pole, may be inside
	}
	lo, okLo := tanK(x.Lo)
	hi, okHi := tanK(x.Hi)
	if !okLo || !okHi {
		return Entire()
	}
	return Interval{lo.Lo, hi.Hi}
}

// sinCosPoint encloses sin v and cos v for a finite v: the fast path when
// both are narrow enough, else the 128-bit kernel.
func sinCosPoint(v float64) (sin, cos Interval) {
	if s, c, ok := sinCosFast(v); ok && withinUlps(s, fastMaxUlps) && withinUlps(c, fastMaxUlps) {
		return s, c
	}
	s, c := sinCosK(bigOf(v), kprec)
	return s.toInterval(), c.toInterval()
}

// tanK encloses tan v; ok is false if the cosine enclosure holds 0.
func tanK(v float64) (Interval, bool) {
	if s, c, ok := sinCosFast(v); ok && !c.Contains(0) {
		// sin/cos of two enclosures up to 8 steps wide each: accepted up to
		// 16 (measured: 99% of random arguments in [-20, 20]).
		if t := Div(s, c); withinUlps(t, 2*fastMaxUlps) {
			return t, true
		}
	}
	w := uint(kprec + 32)
	s, c := sinCosK(bigOf(v), w)
	if c.containsZero() {
		return Interval{}, false
	}
	return s.quo(c, w).toInterval(), true
}

// Atan returns an enclosure of {atan a : a in x} (increasing, inside
// (-π/2, π/2)).
//
// It rests on atan a = π/2 - atan(1/a) for a > 1 and the alternating
// Taylor series, whose remainder is at most the first omitted term: after
// a reduction by a table of atan(i/8) in float64 interval arithmetic
// (fast.go), or, when that is more than 8 steps wide, after three halvings
// a/(1+sqrt(1+a²)) with verified square roots in 128-bit interval
// arithmetic.
//
// Special cases:
//
//	Atan([-Inf, b]) = [-π/2 rounded down, ...];  Atan([a, +Inf]) = [..., π/2 rounded up]
func Atan(x Interval) Interval {
	if x.IsEmpty() {
		return Empty()
	}
	hp := fastConsts().halfPi
	lo, hi := -hp.Hi, hp.Hi
	if !math.IsInf(x.Lo, 0) {
		lo = atanPoint(x.Lo).Lo
	}
	if !math.IsInf(x.Hi, 0) {
		hi = atanPoint(x.Hi).Hi
	}
	return Interval{lo, hi}
}

// atanPoint encloses atan v for a finite v: the fast path (fast.go) when
// it is narrow enough, else the 128-bit kernel.
func atanPoint(v float64) Interval {
	if r, ok := atanFast(v); ok && withinUlps(r, fastMaxUlps) {
		return r
	}
	return atanK(bigOf(v), kprec).toInterval()
}

// atan2Point encloses the angle of the point (x, y) != (0, 0) in (-π, π]:
//
//	x > 0: atan(y/x);  x < 0: atan(y/x) + π (y >= 0) or - π (y < 0);
//	x = 0: π/2 or -π/2 by the sign of y.
//
// atan is increasing, so it is applied to the ends of the enclosure of y/x
// (an end that overflows to ±Inf maps to ±π/2).
func atan2Point(y, x float64) Interval {
	hp := fastConsts().halfPi
	if x == 0 {
		if y > 0 {
			return hp
		}
		return Neg(hp)
	}
	end := func(v float64) Interval {
		switch {
		case math.IsInf(v, 1):
			return hp
		case math.IsInf(v, -1):
			return Neg(hp)
		}
		return atanPoint(v)
	}
	q := Div(Point(y), Point(x))
	a := Interval{end(q.Lo).Lo, end(q.Hi).Hi}
	pi := Scale(hp, 2)
	switch {
	case x > 0:
		return a
	case y >= 0:
		return Add(a, pi)
	}
	return Sub(a, pi)
}

// Atan2 returns an enclosure of the angles {atan2(b, a) : b in y, a in x}
// of the points (a, b) of the box x × y, in [-π, π]. The ends are real
// numbers, so -0 is 0: the angle of (a, 0) with a < 0 is π (where the
// float64 function gives -π for b = -0).
//
// Where the box holds no point of the cut (the half-line b = 0, a < 0 is
// not crossed: y >= 0 or y < 0 there) and not the origin, the angle is
// continuous on the box and the box is convex, so its extremes are at the
// corners, each enclosed by atan (fast path or kernel) of the enclosure of
// b/a plus an enclosure of π.
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
	pi := Scale(fastConsts().halfPi, 2)
	whole := Interval{-pi.Hi, pi.Hi}
	switch {
	case !x.IsBounded() || !y.IsBounded():
		return whole
	case x.Contains(0) && y.Contains(0):
		return whole
	case x.Lo < 0 && y.Lo < 0 && y.Hi >= 0:
		return whole
	}
	r := atan2Point(y.Lo, x.Lo)
	for _, c := range [3][2]float64{{y.Lo, x.Hi}, {y.Hi, x.Lo}, {y.Hi, x.Hi}} {
		r = Hull(r, atan2Point(c[0], c[1]))
	}
	return Interval{math.Max(r.Lo, whole.Lo), math.Min(r.Hi, whole.Hi)}
}
