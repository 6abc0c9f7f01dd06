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
// It rests on the exp kernel: argument reduction by ln 2 (enclosed by a
// series with a remainder bound), a Taylor series with its Lagrange
// remainder, ten squarings, all in 128-bit interval arithmetic with
// directed rounding, then outward rounding to float64.
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
		lo = expDown(bigOf(x.Lo))
	}
	if !math.IsInf(x.Hi, 0) {
		hi = expUp(bigOf(x.Hi))
	}
	return Interval{lo, hi}
}

// Log returns an enclosure of {log a : a in x} (natural logarithm).
//
// It rests on the log kernel: x = m 2^e, log m = 2 atanh((m-1)/(m+1)) by
// its series with a geometric remainder bound, plus e ln 2, in 128-bit
// interval arithmetic.
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
		hi = up64(logK(bigOf(x.Hi), kprec).hi)
	}
	return Interval{down64(logK(bigOf(x.Lo), kprec).lo), hi}
}

// sinhDown returns a float64 <= sinh v, sinhUp one >= sinh v, for any v.
func sinhDown(v float64) float64 {
	switch {
	case v <= -expLimit:
		return math.Inf(-1)
	case v >= expLimit:
		return math.MaxFloat64 // sinh v >= sinh 1000 > MaxFloat64
	}
	return down64(sinhK(bigOf(v), kprec).lo)
}

func sinhUp(v float64) float64 { return -sinhDown(-v) }

// Sinh returns an enclosure of {sinh a : a in x} (increasing).
//
// It rests on the sinh kernel: for |a| < 1 the odd Taylor series with a
// remainder bound of twice the first omitted term, otherwise (e^a - e^-a)/2
// from the exp kernel, in 128-bit interval arithmetic.
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
	return down64(coshK(bigOf(v), kprec).lo)
}

func coshUp(v float64) float64 {
	if math.Abs(v) >= expLimit {
		return math.Inf(1)
	}
	return up64(coshK(bigOf(v), kprec).hi)
}

// Cosh returns an enclosure of {cosh a : a in x}: decreasing below 0,
// increasing above, with minimum cosh 0 = 1.
//
// It rests on the exp kernel: cosh a = (e^a + e^-a)/2 in 128-bit interval
// arithmetic.
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
	return math.Max(-1, down64(tanhK(bigOf(v), kprec).lo))
}

func tanhUp(v float64) float64 { return -tanhDown(-v) }

// Tanh returns an enclosure of {tanh a : a in x} (increasing, inside
// [-1, 1]).
//
// It rests on the kernels: sinh/cosh for |a| < 1, (e^(2a)-1)/(e^(2a)+1)
// for 1 <= |a| < 40, and the bound 1 - 2^-53 < tanh|a| < 1 beyond.
func Tanh(x Interval) Interval {
	if x.IsEmpty() {
		return Empty()
	}
	return Interval{tanhDown(x.Lo), tanhUp(x.Hi)}
}
