package ival

import (
	"math"
	"math/big"
)

// Point kernels of the elementary functions: each takes an exact finite
// argument and returns a benc enclosure of the function value, built from
// benc arithmetic (rigorous rounding) plus an explicit bound of the series
// truncation added as a pad. The enclosure is narrow (about 2^-p relative)
// so that rounding it outward to float64 usually gives two adjacent float64
// values.

// kprec is the working precision of the kernels: 128 bits, 75 more than
// float64, so that the enclosure's width is far below one float64 ulp.
const kprec = 128

// expLimit bounds the arguments the exp kernel accepts. e^1000 > MaxFloat64
// and e^-1000 < SmallestNonzeroFloat64, so callers clamp beyond it.
const expLimit = 1000

// tiny2 returns 2^e.
func tiny2(e int) *big.Float { return new(big.Float).SetMantExp(big.NewFloat(1), e) }

// expK encloses e^x for |x| <= expLimit.
//
//	x = k ln2 + r, |r| <= ln2/2 (up to the rounding of k); r' = r/2^s;
//	e^r' = Σ_{n<N} r'^n/n! + R,  |R| <= 2 |r'|^N / N!  (Lagrange, e^|r'| <= 2);
//	e^x = (e^r')^(2^s) 2^k.
//
// The s = 10 squarings magnify the relative width by 2^s; the working
// precision carries s + 32 guard bits for that.
func expK(x *big.Float, p uint) benc {
	if x.Sign() == 0 {
		return bint(1, p)
	}
	const s = 10
	w := p + s + 32
	xf, _ := x.Float64()
	k := math.Round(xf / math.Ln2) // any integer k is correct; this one makes r small
	r := bexact(x, w).sub(ln2Const(w).mul(bf64(k, w), w), w).ldexp(-s)
	rm := r.mag(w)
	// Horner from the highest term, after choosing N with |r'|^N/N! < 2^-w.
	tol := tiny2(-int(w) - 4)
	n := 1
	t := bHi(w).Set(rm)
	for t.Cmp(tol) >= 0 {
		n++
		t = bHi(w).Quo(bHi(w).Mul(t, rm), new(big.Float).SetInt64(int64(n)))
	}
	// t >= |r'|^n/n!: the remainder after the terms of degree < n.
	sum := bint(1, w)
	for j := n - 1; j >= 1; j-- {
		sum = bint(1, w).add(r.mul(sum, w).divInt(int64(j), w), w)
	}
	sum = sum.pad(bHi(w).Mul(t, big.NewFloat(2)), w)
	for range s {
		sum = sum.sqr(w)
	}
	return sum.ldexp(int(k)).round(p)
}

// round rounds a outward to p bits.
func (a benc) round(p uint) benc { return benc{bLo(p).Set(a.lo), bHi(p).Set(a.hi)} }

// logK encloses log x for finite x > 0.
//
//	x = m 2^e, m in [0.7, 1.4);  z = (m-1)/(m+1), |z| <= 0.177;
//	log m = 2 atanh z = 2 Σ_{k>=0} z^(2k+1)/(2k+1);
//	remainder after N terms <= 2 |z|^(2N+1)/((2N+1)(1-z²)) <= 3 |z|^(2N+1)/(2N+1).
func logK(x *big.Float, p uint) benc {
	w := p + 32
	m := new(big.Float)
	e := x.MantExp(m) // m in [0.5, 1)
	if m.Cmp(big.NewFloat(0.7)) < 0 {
		m.SetMantExp(m, 1)
		e--
	}
	mm := bexact(m, w)
	one := bint(1, w)
	z := mm.sub(one, w).quo(mm.add(one, w), w)
	z2 := z.sqr(w)
	sum := bint(0, w)
	t := z // z^(2k+1)
	tol := tiny2(-int(w) - 4)
	for k := int64(0); ; k++ {
		term := t.divInt(2*k+1, w)
		if term.mag(w).Cmp(tol) < 0 {
			sum = sum.pad(bHi(w).Mul(term.mag(w), big.NewFloat(3)), w)
			break
		}
		sum = sum.add(term, w)
		t = t.mul(z2, w)
	}
	res := sum.ldexp(1)
	if e != 0 {
		res = res.add(ln2Const(w).mul(bint(int64(e), w), w), w)
	}
	return res.round(p)
}

// halfPiQuotient returns the enclosure of x/(π/2) and the precision used,
// which grows with the exponent of x so that the reduction x - k π/2 keeps
// p bits relative to the result.
func halfPiQuotient(x *big.Float, p uint) (benc, uint) {
	w := p + 64 + uint(max(x.MantExp(nil), 0))
	halfPi := piEnc(w).ldexp(-1)
	return bexact(x, w).quo(halfPi, w), w
}

// sinCosK encloses sin x and cos x for finite x.
//
//	x = k π/2 + r with the integer k nearest x/(π/2) (k is exact; r is
//	enclosed with π to p + 64 + exponent(x) bits, so r keeps its relative
//	accuracy even when x is near a multiple of π/2);
//	sin r = Σ (-1)^j r^(2j+1)/(2j+1)!, cos r = Σ (-1)^j r^(2j)/(2j)!;
//	the remainder after the terms below degree n is at most |r|^n/n!
//	(Lagrange: every derivative of sin and cos is bounded by 1).
//
// The quadrant k mod 4 maps (sin r, cos r) to (sin x, cos x).
func sinCosK(x *big.Float, p uint) (sin, cos benc) {
	if x.Sign() == 0 {
		return bint(0, p), bint(1, p)
	}
	q, w := halfPiQuotient(x, p)
	// k = q.lo rounded to an integer (any integer k is correct: r below is
	// x - k π/2 enclosed exactly as written; the nearest one keeps |r| small).
	half := big.NewFloat(0.5)
	if q.lo.Sign() < 0 {
		half.Neg(half)
	}
	kInt, _ := new(big.Float).SetPrec(2*w).Add(q.lo, half).Int(nil)
	halfPi := piEnc(w).ldexp(-1)
	kEnc := bexact(new(big.Float).SetPrec(w).SetInt(kInt), w)
	r := bexact(x, w).sub(halfPi.mul(kEnc, w), w)
	// The reduction needed the exponent's extra bits; the series does not.
	w = p + 64
	r = r.round(w)
	r2 := r.sqr(w)
	rm := r.mag(w)
	tol := bLo(w).Mul(tiny2(-int(w)-4), bLo(w).Abs(rm))
	if r.containsZero() {
		tol = tiny2(-int(w) - 4)
	}
	s, c := r, bint(1, w)
	ts, tc := r, bint(1, w) // current terms r^(2j+1)/(2j+1)!, r^(2j)/(2j)!
	for n := int64(1); ; n += 2 {
		tc = tc.mul(r2, w).divInt(n*(n+1), w)     // degree n+1
		ts = ts.mul(r2, w).divInt((n+1)*(n+2), w) // degree n+2
		if tc.mag(w).Cmp(tol) < 0 && ts.mag(w).Cmp(tol) < 0 {
			// tc, ts enclose the first omitted terms; |r|^d/d! <= their mags.
			c = c.pad(tc.mag(w), w)
			s = s.pad(ts.mag(w), w)
			break
		}
		if (n/2)%2 == 0 { // n = 1, 5, 9, ...: subtract
			c, s = c.sub(tc, w), s.sub(ts, w)
		} else {
			c, s = c.add(tc, w), s.add(ts, w)
		}
	}
	switch new(big.Int).Mod(kInt, big.NewInt(4)).Int64() {
	case 1:
		s, c = c, s.neg()
	case 2:
		s, c = s.neg(), c.neg()
	case 3:
		s, c = c.neg(), s
	}
	return s.round(p), c.round(p)
}

// atanK encloses atan x for finite x.
//
//	atan(-x) = -atan x;  atan x = π/2 - atan(1/x) for x > 1;
//	atan x = 2 atan(x/(1 + sqrt(1 + x²))) (three times: |a| <= tan(π/32) < 0.1);
//	atan a = Σ (-1)^j a^(2j+1)/(2j+1), alternating with decreasing terms
//	for |a| < 1, so the remainder is at most the first omitted term.
func atanK(x *big.Float, p uint) benc {
	if x.Sign() < 0 {
		return atanK(new(big.Float).Neg(x), p).neg()
	}
	if x.Sign() == 0 {
		return bint(0, p)
	}
	w := p + 32
	one := bint(1, w)
	if x.Cmp(big.NewFloat(1)) > 0 {
		inv := one.quo(bexact(x, w), w)
		// atan is increasing: atan(inv) lies between the kernel at its ends.
		lo, hi := atanK(inv.lo, w), atanK(inv.hi, w)
		return piEnc(w).ldexp(-1).sub(benc{lo.lo, hi.hi}, w).round(p)
	}
	a := bexact(x, w)
	for range 3 {
		a = a.quo(one.add(one.add(a.sqr(w), w).sqrt(w), w), w)
	}
	a2 := a.sqr(w)
	sum := bint(0, w)
	t := a
	tol := bLo(w).Mul(tiny2(-int(w)-4), a.lo)
	for j := int64(0); ; j++ {
		term := t.divInt(2*j+1, w)
		if term.mag(w).Cmp(tol) < 0 {
			sum = sum.pad(term.mag(w), w)
			break
		}
		if j%2 == 0 {
			sum = sum.add(term, w)
		} else {
			sum = sum.sub(term, w)
		}
		t = t.mul(a2, w)
	}
	return sum.ldexp(3).round(p)
}

// sinhK encloses sinh x for |x| <= expLimit.
//
//	|x| < 1:  sinh x = Σ x^(2j+1)/(2j+1)!, terms of one sign; the remainder
//	          after the terms below degree n is at most 2 |x|^n/n! (the
//	          omitted terms shrink by a factor below 1/((n+1)(n+2)) <= 1/2);
//	|x| >= 1: sinh x = (e^x - e^-x)/2, no cancellation beyond one bit.
func sinhK(x *big.Float, p uint) benc {
	if x.Sign() == 0 {
		return bint(0, p)
	}
	w := p + 32
	if new(big.Float).Abs(x).Cmp(big.NewFloat(1)) >= 0 {
		e := expK(x, w)
		return e.sub(bint(1, w).quo(e, w), w).ldexp(-1).round(p)
	}
	xx := bexact(x, w)
	x2 := xx.sqr(w)
	sum, t := xx, xx
	tol := bLo(w).Mul(tiny2(-int(w)-4), bLo(w).Abs(x))
	for n := int64(1); ; n += 2 {
		t = t.mul(x2, w).divInt((n+1)*(n+2), w)
		if t.mag(w).Cmp(tol) < 0 {
			sum = sum.pad(bHi(w).Mul(t.mag(w), big.NewFloat(2)), w)
			break
		}
		sum = sum.add(t, w)
	}
	return sum.round(p)
}

// coshK encloses cosh x = (e^x + e^-x)/2 for |x| <= expLimit.
func coshK(x *big.Float, p uint) benc {
	w := p + 32
	e := expK(x, w)
	return e.add(bint(1, w).quo(e, w), w).ldexp(-1).round(p)
}

// tanhK encloses tanh x for |x| <= 40 (beyond, callers use the bound
// 1 - 2e^(-2|x|) > 1 - 2^-54).
//
//	|x| < 1:  sinh x / cosh x;   |x| >= 1: (e^(2x) - 1)/(e^(2x) + 1).
func tanhK(x *big.Float, p uint) benc {
	w := p + 32
	if new(big.Float).Abs(x).Cmp(big.NewFloat(1)) < 0 {
		return sinhK(x, w).quo(coshK(x, w), w).round(p)
	}
	e := expK(new(big.Float).SetMantExp(x, 1), w)
	one := bint(1, w)
	return e.sub(one, w).quo(e.add(one, w), w).round(p)
}
