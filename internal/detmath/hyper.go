package detmath

import "math"

// Sinh returns the hyperbolic sine of x, within 2 ulp for normal results
// (0.53 ulp measured against math/big at 200 bits, see TestSinh); it
// overflows to ±Inf beyond |x| = 710.4758 as math.Sinh does.
//
// Special cases are:
//
//	Sinh(±0) = ±0
//	Sinh(±Inf) = ±Inf
//	Sinh(NaN) = NaN
//
// Method: for |x| < 1/4 the Taylor series x + x³/3! + ... + x^13/13!
// (the next term is below 2^-68 of the sum), so there is no
// cancellation; for 1/4 <= |x| <= 22, (E - 1/E)/2 with E = e^|x| and 1/E
// both as double-doubles (expDD, 2^-58 relative) and their difference
// exact (TwoSum); above 22, e^-|x| is below 2^-63 of e^|x| and sinh = E/2.
//
// References:
//
//	W. J. Cody, W. Waite, Software Manual for the Elementary Functions,
//	  Prentice-Hall 1980 (the ranges of the hyperbolic functions).
//	T. J. Dekker, A floating-point technique for extending the available
//	  precision, Numer. Math. 18 (1971) 224–242.
func Sinh(x float64) float64 {
	ax := math.Abs(x)
	switch {
	case math.IsNaN(x):
		return x
	case ax > 711: // e^711/2 > MaxFloat64 (also ±Inf)
		return math.Copysign(math.Inf(1), x)
	case ax < 0x1p-27: // x³/6 < 2^-55·|x| (and the sign of zero kept)
		return x
	case ax < 0.25:
		z := float64(x * x)
		// (sinh(x) - x)/x³ = 1/3! + z/5! + ... + z^5/13! by Horner.
		q := 1.0 / 6227020800
		q = 1.0/39916800 + float64(z*q)
		q = 1.0/362880 + float64(z*q)
		q = 1.0/5040 + float64(z*q)
		q = 1.0/120 + float64(z*q)
		q = 1.0/6 + float64(z*q)
		return x + float64(float64(x*z)*q)
	case ax > 22:
		h, l, k := expDD(ax, 0)
		return math.Copysign(math.Ldexp(h+l, k-1), x)
	}
	eh, el, bh, bl := expPair(ax)
	s, e := twoSum(eh, -bh)
	r := s + (e + (el - bl))
	return math.Copysign(float64(0.5*r), x)
}

// Cosh returns the hyperbolic cosine of x, within 2 ulp (0.50 ulp measured
// against math/big at 200 bits, see TestCosh); it overflows to +Inf beyond |x| =
// 710.4758 as math.Cosh does.
//
// Special cases are:
//
//	Cosh(±0) = 1
//	Cosh(±Inf) = +Inf
//	Cosh(NaN) = NaN
//
// Method: for |x| <= 22, (E + 1/E)/2 with E = e^|x| and 1/E as
// double-doubles (expDD) and their sum exact (TwoSum); above, E/2.
//
// References: as for Sinh.
func Cosh(x float64) float64 {
	ax := math.Abs(x)
	switch {
	case math.IsNaN(x):
		return x
	case ax > 711:
		return math.Inf(1)
	case ax > 22:
		h, l, k := expDD(ax, 0)
		return math.Ldexp(h+l, k-1)
	}
	eh, el, bh, bl := expPair(ax)
	s, e := twoSum(eh, bh)
	return float64(0.5 * (s + (e + (el + bl))))
}

// Tanh returns the hyperbolic tangent of x, within 2 ulp (0.53 ulp measured
// against math/big at 200 bits, see TestTanh); it is ±1 exactly for |x| > 22
// (where 1 - tanh|x| < 2^-63).
//
// Special cases are:
//
//	Tanh(±0) = ±0
//	Tanh(±Inf) = ±1
//	Tanh(NaN) = NaN
//
// Method: for |x| < 1/4 the Taylor series x + a1·x³ + ... + a11·x^23,
// whose coefficients a_k are exact rationals from tanh' = 1 - tanh²,
// (2k+1)·a_k = -Σ_{i+j=k-1} a_i·a_j with a_0 = 1 (the first omitted term
// is below 2^-64 of the sum); for 1/4 <= |x| <= 22, 1 - 2/(E + 1) with E
// = e^(2|x|) a double-double (expDD), the quotient carried as a
// double-double (its exact remainder by Dekker's product) and the
// difference from 1 exact (TwoSum), so the cancellation loses nothing.
//
// References:
//
//	W. J. Cody, W. Waite, Software Manual for the Elementary Functions,
//	  Prentice-Hall 1980 (the ranges of the hyperbolic functions).
//	M. Abramowitz, I. A. Stegun, Handbook of Mathematical Functions, NBS
//	  1964, sec. 4.5 (the Taylor series of tanh).
//	T. J. Dekker, A floating-point technique for extending the available
//	  precision, Numer. Math. 18 (1971) 224–242.
func Tanh(x float64) float64 {
	ax := math.Abs(x)
	switch {
	case math.IsNaN(x):
		return x
	case ax > 22:
		return math.Copysign(1, x)
	case ax < 0x1p-27: // x³/3 < 2^-55·|x| (and the sign of zero kept)
		return x
	case ax < 0.25:
		z := float64(x * x)
		// (tanh(x) - x)/x³ = a1 + a2·z + ... + a11·z^10 by Horner.
		q := -113927491862.0 / 2900518163668125
		q = 18888466084.0/194896477400625 + float64(z*q)
		q = -443861162.0/1856156927625 + float64(z*q)
		q = 6404582.0/10854718875 + float64(z*q)
		q = -929569.0/638512875 + float64(z*q)
		q = 21844.0/6081075 + float64(z*q)
		q = -1382.0/155925 + float64(z*q)
		q = 62.0/2835 + float64(z*q)
		q = -17.0/315 + float64(z*q)
		q = 2.0/15 + float64(z*q)
		q = -1.0/3 + float64(z*q)
		return x + float64(float64(x*z)*q)
	}
	h, l, k := expDD(2*ax, 0)
	sc := math.Float64frombits(uint64(1023+k) << 52) // 2^k, 1 <= k <= 64
	eh, el := float64(h*sc), float64(l*sc)
	dh, dl := fastTwoSum(eh, 1) // E + 1, E > 1
	dl += el
	wh := 2 / dh
	p, pe := twoProd(wh, dh)
	wl := (((2 - p) - pe) - float64(wh*dl)) / dh // 2/(E+1) = wh + wl
	t, te := twoSum(1, -wh)
	return math.Copysign(t+(te-wl), x)
}

// expPair returns E = e^x = eh + el and 1/E = bh + bl as double-doubles
// (relative error about 2^-58) for 0 <= x <= 22.
func expPair(x float64) (eh, el, bh, bl float64) {
	h, l, k := expDD(x, 0)
	// 1/(h + l) = q·(1 + ρ), ρ = 1 - q·(h + l) (one Newton step).
	q := 1 / h
	p, pe := twoProd(q, h)
	rho := ((1 - p) - pe) - float64(q*l)
	sc := math.Float64frombits(uint64(1023+k) << 52) // 2^k, 0 <= k <= 32
	isc := math.Float64frombits(uint64(1023-k) << 52)
	return float64(h * sc), float64(l * sc), float64(q * isc), float64(float64(q*rho) * isc)
}

// expDD returns hi, lo and k with e^(xh+xl) = 2^k·(hi + lo) to about 2^-58
// relative (2^-58.5 at most measured, see TestExpDD), for |xh| <= 746 and |xl| <=
// 2^-40 (the low part of a double-double, or 0); hi + lo is in [0.7, 1.42].
//
// Method: the reduction of Exp, x = k·ln 2 + r, with the rounding of
// r = (x - k·ln2Hi) - k·ln2Lo kept (TwoSum) together with xl; e^r = 1 + r
// + r²/2 + r²·(r/3! + ... + r^13/15!) with r² exact (Dekker's product), so
// only the last part (at most 2^-4 of the sum) rounds in float64; the
// first omitted term, r^16/16!, is below 2^-68. The polynomial is split by
// parity into two Horner chains in r², evaluated side by side in a fixed
// order (Estrin's idea, for a shorter dependency chain).
func expDD(xh, xl float64) (hi, lo float64, k int) {
	kf := math.Round(float64(xh * math.Log2E))
	u := xh - float64(kf*ln2Hi) // exact: kf·ln2Hi has 32+11 bits, near xh
	r, rl := twoSum(u, -float64(kf*ln2Lo))
	rl += xl
	rr, rre := twoProd(r, r)
	// (e^r - 1 - r - r²/2)/r² = r·(1/3! + r/4! + ... + r^12/15!), the
	// bracket split by parity into two Horner chains in w = r² (even and
	// odd powers, evaluated side by side, in a fixed order).
	w := rr
	pe := 1.0 / 1307674368000 // 1/15!
	pe = 1.0/6227020800 + float64(w*pe)
	pe = 1.0/39916800 + float64(w*pe)
	pe = 1.0/362880 + float64(w*pe)
	pe = 1.0/5040 + float64(w*pe)
	pe = 1.0/120 + float64(w*pe)
	pe = 1.0/6 + float64(w*pe)
	po := 1.0 / 87178291200 // 1/14!
	po = 1.0/479001600 + float64(w*po)
	po = 1.0/3628800 + float64(w*po)
	po = 1.0/40320 + float64(w*po)
	po = 1.0/720 + float64(w*po)
	po = 1.0/24 + float64(w*po)
	p := float64(r * (pe + float64(r*po)))
	s, sl := fastTwoSum(r, float64(0.5*rr)) // |r| >= r²/2 for |r| <= 0.35
	s, e := twoSum(s, float64(rr*p))
	sl += e + float64(0.5*rre) // e^r - 1 = s + sl
	hi, lo = fastTwoSum(1, s)  // |s| < 0.42
	// e^(r+rl) = e^r·(1 + rl) to within rl²; rl <= 2^-52·|xh| + |xl|.
	lo += sl + (rl + float64(rl*s))
	hi, lo = fastTwoSum(hi, lo)
	return hi, lo, int(kf)
}
