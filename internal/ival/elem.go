package ival

import (
	"math"
	"math/big"
)

// Elementary functions of intervals built on the point kernels (kernels.go):
// each monotone piece is evaluated at its ends, the kernel's 128-bit
// enclosure is rounded outward to float64, and the extremes inside the
// interval are added where the function turns.

func bigOf(x float64) *big.Float { return new(big.Float).SetFloat64(x) }

var maxBig = new(big.Float).SetFloat64(expLimit)

// expDown returns a float64 <= e^v for a finite v (big), clamping beyond
// expLimit: e^v >= e^1000 > MaxFloat64 there, and e^v > 0 always.
func expDown(v *big.Float) float64 {
	switch {
	case v.Cmp(maxBig) >= 0:
		return math.MaxFloat64
	case new(big.Float).Neg(v).Cmp(maxBig) >= 0:
		return 0
	}
	return down64(expK(v, kprec).lo)
}

// expUp returns a float64 >= e^v (e^v <= e^-1000 < SmallestNonzeroFloat64
// for v <= -expLimit).
func expUp(v *big.Float) float64 {
	switch {
	case v.Cmp(maxBig) >= 0:
		return math.Inf(1)
	case new(big.Float).Neg(v).Cmp(maxBig) >= 0:
		return math.SmallestNonzeroFloat64
	}
	return up64(expK(v, kprec).hi)
}

// Exp returns an enclosure of {e^a : a in x}.
//
// It rests on argument reduction by ln 2 and a Taylor series with its
// Lagrange remainder: in float64 interval arithmetic with ln 2 split into
// an exact part and an enclosed tail (fast.go), or, when that result is
// more than 8 steps wide or |a| > 700, in 128-bit interval arithmetic with
// ten squarings (the exp kernel), then rounded outward to float64.
//
// Special cases:
//
//	Exp([-Inf, b]) = [0, ...];  Exp([a, +Inf]) = [..., +Inf]
//	Exp(Point(0)) = [1, 1]
//	results beyond MaxFloat64 have the upper end +Inf
func Exp(x Interval) Interval {
	if x.IsEmpty() {
		return Empty()
	}
	lo, hi := 0.0, math.Inf(1)
	if !math.IsInf(x.Lo, 0) {
		lo = expPoint(x.Lo).Lo
	}
	if !math.IsInf(x.Hi, 0) {
		hi = expPoint(x.Hi).Hi
	}
	return Interval{lo, hi}
}

// expPoint encloses e^v for a finite v: the fast path when it is narrow
// enough, else the 128-bit kernel (with the clamps of expDown and expUp).
func expPoint(v float64) Interval {
	if r, ok := expFast(v); ok && withinUlps(r, fastMaxUlps) {
		return r
	}
	if math.Abs(v) < expLimit {
		return expK(bigOf(v), kprec).toInterval()
	}
	b := bigOf(v)
	return Interval{expDown(b), expUp(b)}
}

// Log returns an enclosure of {log a : a in x} (natural logarithm).
//
// It rests on x = m 2^e, log m = 2 atanh((m-1)/(m+1)) by its series with
// a geometric remainder bound, plus e ln 2: in float64 interval arithmetic
// (fast.go), or in 128-bit interval arithmetic when that is more than 8
// steps wide.
//
// Special cases:
//
//	Log(x) = Empty()   if x.Lo <= 0 (x not inside the domain (0, +Inf))
//	Log([a, +Inf]) = [..., +Inf];  Log(Point(1)) = [0, 0]
func Log(x Interval) Interval {
	if x.IsEmpty() || x.Lo <= 0 {
		return Empty()
	}
	hi := math.Inf(1)
	if !math.IsInf(x.Hi, 1) {
		hi = logPoint(x.Hi).Hi
	}
	return Interval{logPoint(x.Lo).Lo, hi}
}

// logPoint encloses log v for finite v > 0 (fast path or 128-bit kernel).
func logPoint(v float64) Interval {
	if r, ok := logFast(v); ok && withinUlps(r, fastMaxUlps) {
		return r
	}
	return logK(bigOf(v), kprec).toInterval()
}

// sinhDown returns a float64 <= sinh v, sinhUp one >= sinh v, for any v.
func sinhDown(v float64) float64 {
	switch {
	case v <= -expLimit:
		return math.Inf(-1)
	case v >= expLimit:
		return math.MaxFloat64 // sinh v >= sinh 1000 > MaxFloat64
	}
	return sinhPoint(v).Lo
}

// sinhPoint encloses sinh v for |v| < expLimit: the fast series for |v| <
// 1, (e^v - e^-v)/2 from the fast exp for 1 <= |v| <= 700 (no cancellation
// beyond a factor 1.2), when narrow enough; else the 128-bit kernel.
func sinhPoint(v float64) Interval {
	var r Interval
	ok := false
	switch a := math.Abs(v); {
	case a < 1:
		r, ok = sinhFastSeries(v), true
	case a <= 700:
		var e Interval
		if e, ok = expFast(v); ok {
			r = Scale(Sub(e, Recip(e)), 0.5)
		}
	}
	if ok && withinUlps(r, fastMaxUlps) {
		return r
	}
	return sinhK(bigOf(v), kprec).toInterval()
}

func sinhUp(v float64) float64 { return -sinhDown(-v) }

// Sinh returns an enclosure of {sinh a : a in x} (increasing).
//
// It rests on the odd Taylor series with a remainder bound of twice the
// first omitted term for |a| < 1, and on (e^a - e^-a)/2 from Exp's
// enclosures otherwise: in float64 interval arithmetic (fast.go), or at 128
// bits when that is more than 8 steps wide or |a| > 700.
func Sinh(x Interval) Interval {
	if x.IsEmpty() {
		return Empty()
	}
	return Interval{sinhDown(x.Lo), sinhUp(x.Hi)}
}

// coshDown returns a float64 <= cosh v, coshUp one >= cosh v.
func coshDown(v float64) float64 {
	if math.Abs(v) >= expLimit {
		return math.MaxFloat64
	}
	return coshPoint(v).Lo
}

// coshPoint encloses cosh v for |v| < expLimit ((e^v + e^-v)/2 from the
// fast exp when narrow enough, else the 128-bit kernel).
func coshPoint(v float64) Interval {
	if e, ok := expFast(v); ok {
		if r := Scale(Add(e, Recip(e)), 0.5); withinUlps(r, fastMaxUlps) {
			return r
		}
	}
	return coshK(bigOf(v), kprec).toInterval()
}

func coshUp(v float64) float64 {
	if math.Abs(v) >= expLimit {
		return math.Inf(1)
	}
	return coshPoint(v).Hi
}

// Cosh returns an enclosure of {cosh a : a in x}: decreasing below 0,
// increasing above, with minimum cosh 0 = 1.
//
// It rests on cosh a = (e^a + e^-a)/2 from Exp's enclosures, in float64
// interval arithmetic (fast.go) or at 128 bits when that is more than 8
// steps wide or |a| > 700.
func Cosh(x Interval) Interval {
	switch {
	case x.IsEmpty():
		return Empty()
	case x.Lo >= 0:
		return Interval{coshDown(x.Lo), coshUp(x.Hi)}
	case x.Hi <= 0:
		return Interval{coshDown(x.Hi), coshUp(x.Lo)}
	}
	return Interval{1, math.Max(coshUp(x.Lo), coshUp(x.Hi))}
}

// tanhCut: for |v| >= 40, 1 > tanh|v| = 1 - 2/(e^(2|v|)+1) > 1 - 2e^-80 >
// 1 - 2^-53, so tanh|v| lies in [1 - 2^-53, 1], whose lower end is the
// float64 below 1.
const tanhCut = 40

func tanhDown(v float64) float64 {
	switch {
	case v <= -tanhCut:
		return -1
	case v >= tanhCut:
		return math.Nextafter(1, 0)
	}
	return math.Max(-1, tanhPoint(v).Lo)
}

// tanhPoint encloses tanh v for |v| < tanhCut: M/(M+2) with M = e^(2|v|) - 1
// from a cancellation-free series for |v| < 1, and ±(1 - 2/(e^(2|v|) + 1))
// for larger |v| (the small quotient's rounding
// barely shows next to 1), from the fast paths when narrow enough, else
// the 128-bit kernel.
func tanhPoint(v float64) Interval {
	r := Empty()
	if math.Abs(v) < 1 {
		r = tanhSmallFast(v)
	} else if e, ok := expFast(2 * math.Abs(v)); ok {
		r = Sub(Point(1), Div(Point(2), Add(e, Point(1))))
		if v < 0 {
			r = Neg(r)
		}
	}
	if !r.IsEmpty() && withinUlps(r, fastMaxUlps) {
		return r
	}
	return tanhK(bigOf(v), kprec).toInterval()
}

func tanhUp(v float64) float64 { return -tanhDown(-v) }

// Tanh returns an enclosure of {tanh a : a in x} (increasing, inside
// [-1, 1]).
//
// It rests on M/(M+2) with M = e^(2|a|) - 1 from a cancellation-free
// series for |a| < 1, on 1 - 2/(e^(2|a|) + 1) for 1 <= |a| < 40 (float64
// interval arithmetic, or the 128-bit kernel when more than 8 steps wide),
// and on the bound 1 - 2^-53 < tanh|a| < 1 beyond.
func Tanh(x Interval) Interval {
	if x.IsEmpty() {
		return Empty()
	}
	return Interval{tanhDown(x.Lo), tanhUp(x.Hi)}
}
