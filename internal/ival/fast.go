package ival

import (
	"math"
	"sync"
)

// Fast paths: the same reductions and series as the 128-bit kernels, but
// evaluated in this package's own float64 interval arithmetic (whose
// operations are rigorous, doc.go), with the constants split so that the
// reduction keeps its accuracy:
//
//	ln 2 = L1 + L2,        L1 the 32 leading bits (an exact float64), L2 enclosed;
//	π/2  = P1 + P2 + P3,   P1, P2 32-bit float64 values, P3 enclosed.
//
// k*L1, k*P1 and k*P2 are exact for |k| < 2^21 (at most 53 significant
// bits; the multiplication's residual test also proves it at run time).
// The splits are derived once from the 200-bit enclosures of consts.go,
// never typed in. The series are evaluated by Horner's rule in intervals,
// and the truncation bound (Lagrange or geometric, as in kernels.go) is
// added as a pad, so a fast result is an enclosure by the inclusion
// property alone. It is used when it is at most fastMaxUlps float64 steps
// wide; otherwise (rare: arguments whose reduction cancels deeply, results
// near underflow) the 128-bit kernel decides.

// fastMaxUlps is the widest fast result accepted, in float64 steps (a
// relative width below 2e-15). Measured on 20000 random arguments each, the
// fast exp is 3-5 steps wide, log 2-7, sin and cos 3-9 (about 2% above 8
// fall back to the kernel).
const fastMaxUlps = 8

// fastLimit bounds the arguments of the fast sin/cos reduction: |k| < 2^20.
const fastLimit = 0x1p20

type splitConsts struct {
	l1       float64
	l2       Interval
	p1, p2   float64
	p3       Interval
	halfPi   Interval
	invLn2   float64     // about 1/ln 2 (only picks k)
	twoOverP float64     // about 2/π (only picks k)
	atanC    [9]Interval // atan(i/8), i = 0..8
}

var (
	fastOnce sync.Once
	fastC    splitConsts
)

// trunc32 returns v with its significand cut to 32 bits, toward zero.
func trunc32(v float64) float64 {
	return math.Float64frombits(math.Float64bits(v) &^ (1<<21 - 1))
}

func fastConsts() *splitConsts {
	fastOnce.Do(func() {
		const p = 200
		ln2 := ln2Const(p)
		c := &fastC
		c.l1 = trunc32(down64(ln2.lo)) // <= ln 2
		c.l2 = ln2.sub(bf64(c.l1, p), p).toInterval()
		hp := piEnc(p).ldexp(-1)
		c.halfPi = hp.toInterval()
		c.p1 = trunc32(down64(hp.lo))
		rest := hp.sub(bf64(c.p1, p), p)
		c.p2 = trunc32(down64(rest.lo))
		c.p3 = rest.sub(bf64(c.p2, p), p).toInterval()
		c.invLn2 = 1 / c.l1
		c.twoOverP = 1 / c.p1
		for i := range c.atanC {
			c.atanC[i] = atanK(bigOf(float64(i)/8), p).toInterval()
		}
	})
	return &fastC
}

// withinUlps reports whether x is at most n float64 steps wide.
func withinUlps(x Interval, n int) bool {
	v := x.Lo
	for range n {
		v = math.Nextafter(v, math.Inf(1))
	}
	return x.Hi <= v
}

// pad widens x by [-r, r] rounded outward.
func pad(x Interval, r float64) Interval { return Interval{subDown(x.Lo, r), addUp(x.Hi, r)} }

// powFactBound returns an upper bound of m^n / d! for m >= 0.
func powFactBound(m float64, n, d int) float64 {
	b := 1.0
	for range n {
		b = mulUp(b, m)
	}
	for i := 2; i <= d; i++ {
		b = divUp(b, float64(i))
	}
	return b
}

// expFastN is the number of Taylor terms of the fast exp: with |r| <= 0.35,
// the remainder 2|r|^16/16! < 2^-60, far below a float64 ulp of e^r >= 0.7.
const expFastN = 16

// expFast encloses e^x for |x| <= 700 (results normal, no overflow).
func expFast(x float64) (Interval, bool) {
	if !(math.Abs(x) <= 700) {
		return Interval{}, false
	}
	c := fastConsts()
	k := math.Round(x * c.invLn2) // any integer k is correct
	kk := Point(k)
	r := Sub(Sub(Point(x), Mul(kk, Point(c.l1))), Mul(kk, c.l2))
	// e^r = Σ_{n<N} r^n/n! + R, |R| <= 2|r|^N/N! (e^|r| <= 2).
	s := Point(1)
	for j := expFastN - 1; j >= 1; j-- {
		s = Add(Point(1), Div(Mul(r, s), Point(float64(j))))
	}
	s = pad(s, mulUp(2, powFactBound(r.Mag(), expFastN, expFastN)))
	return Mul(s, Point(math.Ldexp(1, int(k)))), true // 2^k is normal for |k| <= 1010
}

// logFastN: with |z| <= 0.177, w = z² <= 0.0314, the remainder of
// Σ w^j/(2j+1) after N = 12 terms is below 2 w^12/25 < 2^-62.
const logFastN = 12

// logFast encloses log x for finite x > 0.
func logFast(x float64) (Interval, bool) {
	if !(x > 0) || math.IsInf(x, 1) {
		return Interval{}, false
	}
	c := fastConsts()
	m, e := math.Frexp(x) // exact: x = m 2^e, m in [0.5, 1)
	if m < 0.7 {
		m *= 2
		e--
	}
	mi := Point(m)
	z := Div(Sub(mi, Point(1)), Add(mi, Point(1)))
	w := Sqr(z)
	// log m = 2 z P(w), P(w) = Σ_{j>=0} w^j/(2j+1); the omitted tail is
	// at most w^N/((2N+1)(1-w)) <= 2 w^N/(2N+1).
	p := Div(Point(1), Point(2*logFastN-1))
	for j := logFastN - 2; j >= 0; j-- {
		p = Add(Div(Point(1), Point(float64(2*j+1))), Mul(w, p))
	}
	p = pad(p, mulUp(2, divUp(powFactBound(w.Hi, logFastN, 1), 2*logFastN+1)))
	lm := Scale(Mul(z, p), 2)
	ef := Point(float64(e))
	return Add(Add(Mul(ef, Point(c.l1)), lm), Mul(ef, c.l2)), true
}

// trigFastN: with |r| <= 0.79, |r|^20/20! < 2^-64.
const trigFastN = 10

// sinCosFast encloses sin x and cos x for |x| <= fastLimit.
func sinCosFast(x float64) (s, co Interval, ok bool) {
	if !(math.Abs(x) <= fastLimit) {
		return Interval{}, Interval{}, false
	}
	c := fastConsts()
	k := math.Round(x * c.twoOverP)
	kk := Point(k)
	r := Sub(Sub(Sub(Point(x), Mul(kk, Point(c.p1))), Mul(kk, Point(c.p2))), Mul(kk, c.p3))
	w := Sqr(r)
	// sin r = r S(w), S = 1 - w/(2·3) (1 - w/(4·5) (1 - ...));
	// cos r = C(w),   C = 1 - w/(1·2) (1 - w/(3·4) (1 - ...)).
	// Lagrange: |sin r - r S_N| <= |r|^(2N+1)/(2N+1)!, |cos r - C_N| <= |r|^(2N)/(2N)!.
	sp, cp := Point(1), Point(1)
	for j := trigFastN - 1; j >= 1; j-- {
		sp = Sub(Point(1), Div(Mul(w, sp), Point(float64(2*j*(2*j+1)))))
		cp = Sub(Point(1), Div(Mul(w, cp), Point(float64((2*j-1)*(2*j)))))
	}
	rm := r.Mag()
	sin := pad(Mul(r, sp), powFactBound(rm, 2*trigFastN+1, 2*trigFastN+1))
	cos := pad(cp, powFactBound(rm, 2*trigFastN, 2*trigFastN))
	switch int64(k) & 3 { // k mod 4 (two's complement keeps it for k < 0)
	case 1:
		sin, cos = cos, Neg(sin)
	case 2:
		sin, cos = Neg(sin), Neg(cos)
	case 3:
		sin, cos = Neg(cos), sin
	}
	return sin, cos, true
}

// sinhFastSeries encloses sinh x for |x| < 1: x S(x²) with S = 1 + w/(2·3)
// (1 + w/(4·5) (1 + ...)); the tail is at most 2|x|^(2N+1)/(2N+1)!.
func sinhFastSeries(x float64) Interval {
	w := Sqr(Point(x))
	sp := Point(1)
	for j := trigFastN - 1; j >= 1; j-- {
		sp = Add(Point(1), Div(Mul(w, sp), Point(float64(2*j*(2*j+1)))))
	}
	return pad(Mul(Point(x), sp), mulUp(2, powFactBound(math.Abs(x), 2*trigFastN+1, 2*trigFastN+1)))
}

// atanFastN: with |t| <= 1/16 + tiny, w = t² < 0.0040, the alternating
// tail after N = 8 terms is below w^8/17 < 2^-66 relative to t.
const atanFastN = 8

// atanSmallFast encloses atan a for 0 <= a <= 1:
//
//	atan a = atan c + atan t,  c = i/8 nearest a,  t = (a - c)/(1 + a c),
//	|t| <= 1/16; atan t = t Q(t²), Q(w) = Σ_{j>=0} (-1)^j w^j/(2j+1), an
//	alternating series with decreasing terms: the tail after N terms is at
//	most w^N/(2N+1).
func atanSmallFast(a float64) Interval {
	c := fastConsts()
	i := math.Round(a * 8)
	ci := Point(i / 8)
	t := Div(Sub(Point(a), ci), Add(Point(1), Mul(Point(a), ci)))
	w := Sqr(t)
	q := Div(Point(1), Point(2*atanFastN-1))
	for j := atanFastN - 2; j >= 0; j-- {
		q = Sub(Div(Point(1), Point(float64(2*j+1))), Mul(w, q))
	}
	q = pad(q, divUp(powFactBound(w.Hi, atanFastN, 1), 2*atanFastN+1))
	return Add(c.atanC[int(i)], Mul(t, q))
}

// atanFast encloses atan x for finite x: atan(-x) = -atan x and, for
// |x| > 1, atan|x| = π/2 - atan(1/|x|), with atan increasing applied to the
// ends of the enclosure of 1/|x|.
func atanFast(x float64) (Interval, bool) {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return Interval{}, false
	}
	a := math.Abs(x)
	var r Interval
	if a <= 1 {
		r = atanSmallFast(a)
	} else {
		inv := Div(Point(1), Point(a)) // inside [0, 1]
		r = Sub(fastConsts().halfPi, Interval{atanSmallFast(inv.Lo).Lo, atanSmallFast(inv.Hi).Hi})
	}
	if x < 0 {
		r = Neg(r)
	}
	return r, true
}

// expm1FastN: for |u| <= 2 the tail of Σ_{n>=N} u^n/(n+1)! after N = 26
// terms is below 2·2^26/27! < 2^-66, against a sum of at least 0.43.
const expm1FastN = 26

// expm1Fast encloses e^u - 1 for |u| <= 2 without the cancellation of
// e^u - 1: u P(u), P(u) = Σ_{n>=0} u^n/(n+1)! = 1 + u/2 (1 + u/3 (1 + ...)),
// whose tail after N terms is at most 2|u|^N/(N+1)! (each further term
// shrinks by |u|/(n+2) <= 1/2).
func expm1Fast(u float64) Interval {
	ui := Point(u)
	p := Point(1)
	for n := expm1FastN; n >= 2; n-- {
		p = Add(Point(1), Div(Mul(ui, p), Point(float64(n))))
	}
	p = pad(p, mulUp(2, powFactBound(math.Abs(u), expm1FastN, expm1FastN+1)))
	return Mul(ui, p)
}

// tanhSmallFast encloses tanh v for |v| < 1: with M = e^(2|v|) - 1 >= 0,
// tanh|v| = M/(M + 2), increasing in M, so it is evaluated at the two ends
// of the enclosure of M; tanh is odd.
func tanhSmallFast(v float64) Interval {
	m := expm1Fast(2 * math.Abs(v))
	f := func(e float64) Interval { return Div(Point(e), Add(Point(e), Point(2))) }
	r := Interval{f(m.Lo).Lo, f(m.Hi).Hi}
	if v < 0 {
		r = Neg(r)
	}
	return r
}
