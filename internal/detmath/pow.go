package detmath

import "math"

// Pow returns x**y, the base-x exponential of y, with the special cases of
// math.Pow. For an integer y with |y| <= 64 it is computed by repeated
// squaring in double-double arithmetic (a fixed sequence of exact-product
// steps, rounded once at the end, so within 1 ulp for normal results; 0.5
// measured); otherwise as e^(y·ln x) with ln x carried to about 2^-63
// relative and the product y·ln x exact, so that the result is within 2
// ulp for |y·ln x| <= 709, the whole range of normal results (0.83 ulp
// measured against math/big at 200 bits, see TestPow). Subnormal results
// are rounded twice and may be one unit of their (reduced) precision
// further off.
//
// Special cases are (in order):
//
//	Pow(x, ±0) = 1 for any x
//	Pow(1, y) = 1 for any y
//	Pow(x, 1) = x for any x
//	Pow(NaN, y) = NaN
//	Pow(x, NaN) = NaN
//	Pow(±0, y) = ±Inf for y an odd integer < 0
//	Pow(±0, -Inf) = +Inf
//	Pow(±0, +Inf) = +0
//	Pow(±0, y) = +Inf for finite y < 0 and not an odd integer
//	Pow(±0, y) = ±0 for y an odd integer > 0
//	Pow(±0, y) = +0 for finite y > 0 and not an odd integer
//	Pow(-1, ±Inf) = 1
//	Pow(x, +Inf) = +Inf for |x| > 1
//	Pow(x, -Inf) = +0 for |x| > 1
//	Pow(x, +Inf) = +0 for |x| < 1
//	Pow(x, -Inf) = +Inf for |x| < 1
//	Pow(+Inf, y) = +Inf for y > 0
//	Pow(+Inf, y) = +0 for y < 0
//	Pow(-Inf, y) = Pow(-0, -y)
//	Pow(x, y) = NaN for finite x < 0 and finite non-integer y
//
// and Pow(x, 0.5) = math.Sqrt(x) for x > 0 (correctly rounded).
//
// Method: ln x = (hi, lo) by logDD, y·ln x as a double-double by Dekker's
// exact product, e^(hi+lo) by expDD (the reduction of Exp, keeping the
// low parts), scaled by 2^k with math.Ldexp.
//
// References:
//
//	T. J. Dekker, A floating-point technique for extending the available
//	  precision, Numer. Math. 18 (1971) 224–242 (the split and the exact
//	  product, the exact sum of two floats).
//	D. E. Knuth, The Art of Computer Programming, vol. 2, 3rd ed.,
//	  Addison-Wesley 1997, sec. 4.2.2 (the exact sum TwoSum) and 4.6.3
//	  (evaluation of powers by repeated squaring).
//	W. J. Cody, W. Waite, Software Manual for the Elementary Functions,
//	  Prentice-Hall 1980 (the reductions of ln and exp).
func Pow(x, y float64) float64 {
	switch {
	case y == 0 || x == 1:
		return 1
	case y == 1:
		return x
	case math.IsNaN(x) || math.IsNaN(y):
		return math.NaN()
	case x == 0:
		odd := isOddInt(y)
		switch {
		case y < 0 && odd:
			return math.Copysign(math.Inf(1), x)
		case y < 0:
			return math.Inf(1)
		case odd:
			return x
		default:
			return 0
		}
	case math.IsInf(y, 0):
		switch {
		case x == -1:
			return 1
		case (math.Abs(x) < 1) == math.IsInf(y, 1):
			return 0
		default:
			return math.Inf(1)
		}
	case math.IsInf(x, 0):
		if math.IsInf(x, -1) {
			return Pow(1/x, -y) // Pow(-0, -y)
		}
		if y < 0 {
			return 0
		}
		return math.Inf(1)
	case y == 0.5:
		if x > 0 {
			return math.Sqrt(x)
		}
		return math.NaN()
	}
	yInt := y == math.Trunc(y)
	if yInt && math.Abs(y) <= 64 {
		return powInt(x, int(y))
	}
	if x < 0 && !yInt {
		return math.NaN()
	}
	neg := x < 0 && isOddInt(y)
	lh, ll := logDD(math.Abs(x))
	var r float64
	switch ph := float64(y * lh); {
	case ph > 710: // beyond ln(MaxFloat64) = 709.78 even with the low part
		r = math.Inf(1)
	case ph < -746: // below ln(2^-1075) = -745.13
		r = 0
	default:
		ph, pl := twoProd(y, lh)
		pl += float64(y * ll)
		ph, pl = fastTwoSum(ph, pl)
		eh, el, k := expDD(ph, pl)
		r = scale2(eh+el, k)
	}
	if neg {
		return -r
	}
	return r
}

// scale2 returns x·2^k: by one exact product with 2^k when the result is
// safely normal (x in [0.5, 2), |k| <= 1020), else by math.Ldexp (overflow
// to ±Inf, rounding to subnormals).
func scale2(x float64, k int) float64 {
	if k < -1020 || k > 1020 {
		return math.Ldexp(x, k)
	}
	return float64(x * math.Float64frombits(uint64(1023+k)<<52))
}

// isOddInt reports whether y is an odd integer (every float64 of
// magnitude >= 2^53 is even).
func isOddInt(y float64) bool {
	if math.Abs(y) >= 0x1p53 || y != math.Trunc(y) {
		return false
	}
	return int64(y)&1 != 0
}

// powInt returns x^n for 0 < |n| <= 64 and finite nonzero x: x = m·2^e
// with m in [1/2, 1), m^|n| by right-to-left binary powering in
// double-double (the factors stay in [2^-64, 1], so no step overflows or
// underflows), its reciprocal by one Newton correction when n < 0, and the
// scaling by 2^(e·n) with math.Ldexp (exact for normal results,
// overflowing to ±Inf and rounding subnormals as math.Ldexp does).
func powInt(x float64, n int) float64 {
	m, e := math.Frexp(math.Abs(x))
	u := n
	if u < 0 {
		u = -u
	}
	rh, rl := 1.0, 0.0
	bh, bl := m, 0.0
	for {
		if u&1 != 0 {
			rh, rl = ddMul(rh, rl, bh, bl)
		}
		u >>= 1
		if u == 0 {
			break
		}
		bh, bl = ddMul(bh, bl, bh, bl)
	}
	var r float64
	if n > 0 {
		r = math.Ldexp(rh+rl, e*n)
	} else {
		q := 1 / rh
		p, pe := twoProd(q, rh)
		rem := ((1 - p) - pe) - float64(q*rl) // 1 - q·(rh+rl)
		r = math.Ldexp(q+float64(q*rem), e*n)
	}
	if x < 0 && n&1 != 0 {
		return -r
	}
	return r
}

// logDD returns ln x = hi + lo to about 2^-63 relative (2^-63.8 measured,
// see TestLogDD) for finite x > 0 (subnormals included).
//
// Method: as Log, x = 2^k·m with m in [1/√2, √2) and s = (m-1)/(m+1), but
// s is carried as a double-double (the exact remainder of the division,
// Dekker's product, and the rounding of m+1), s³ likewise, s³/3 with its exact remainder, and only
// the rest of 2·atanh(s) = 2(s + s³/3 + s⁵/5 + ... + s^25/25) (at most
// 2^-12 of the sum; the first omitted term is below 2^-70 of it) is
// summed in float64; then ln x = k·ln2Hi + (ln m + k·ln2Lo) with the
// leading sum exact (TwoSum).
func logDD(x float64) (hi, lo float64) {
	k, m := splitLog(x)
	f := m - 1 // exact (Sterbenz)
	dh, dl := twoSum(m, 1)
	inv := 1 / dh
	sh := float64(f * inv) // within an ulp of s; the remainder restores the rest
	p, pe := twoProd(sh, dh)
	sl := float64((((f - p) - pe) - float64(sh*dl)) * inv) // s = sh + sl
	sh, sl = fastTwoSum(sh, sl)                            // sh the float64 nearest s
	wh, wl := twoProd(sh, sh)                              // s² ≈ wh + wl
	ch, cl := twoProd(sh, wh)
	cl += float64(sh*wl) + float64(3*float64(wh*sl)) // s³ ≈ ch + cl
	ah := float64(ch * (1.0 / 3))
	p, pe = twoProd(ah, 3)
	al := float64((((ch - p) - pe) + cl) * (1.0 / 3)) // s³/3 ≈ ah + al
	// (atanh(s) - s - s³/3)/(s³·z) = 1/5 + z/7 + ... + z^10/25, z = s².
	z := wh + (wl + float64(2*float64(sh*sl))) // s² to half an ulp
	q := 1.0 / 25
	q = 1.0/23 + float64(z*q)
	q = 1.0/21 + float64(z*q)
	q = 1.0/19 + float64(z*q)
	q = 1.0/17 + float64(z*q)
	q = 1.0/15 + float64(z*q)
	q = 1.0/13 + float64(z*q)
	q = 1.0/11 + float64(z*q)
	q = 1.0/9 + float64(z*q)
	q = 1.0/7 + float64(z*q)
	q = 1.0/5 + float64(z*q)
	rest := float64(float64((ch+cl)*z) * q)
	h, l := fastTwoSum(sh, ah)
	l += sl + (al + rest)
	h, l = float64(2*h), float64(2*l) // ln m
	kf := float64(k)
	hi, lo = twoSum(float64(kf*ln2Hi), h)
	lo += l + float64(kf*ln2Lo)
	return fastTwoSum(hi, lo)
}

// Double-double helpers (used by Atan2, the hyperbolic functions and Pow).
// Each product is rounded explicitly, so no fused multiply-add is formed.

// twoSum returns s = fl(a+b) and e with s + e = a + b exactly (Knuth).
func twoSum(a, b float64) (s, e float64) {
	s = a + b
	bb := s - a
	e = (a - (s - bb)) + (b - bb)
	return s, e
}

// fastTwoSum returns s = fl(a+b) and e with s + e = a + b exactly, for
// |a| >= |b| or a == 0 (Dekker).
func fastTwoSum(a, b float64) (s, e float64) {
	s = a + b
	e = b - (s - a)
	return s, e
}

// split returns hi + lo = a with hi holding the upper 26 bits (Veltkamp's
// splitting, as used by Dekker); |a| must be below 2^995.
func split(a float64) (hi, lo float64) {
	c := float64(134217729 * a) // 2^27 + 1
	hi = c - (c - a)
	return hi, a - hi
}

// twoProd returns p = fl(a·b) and e with p + e = a·b exactly, barring
// underflow (Dekker's product, without math.FMA).
func twoProd(a, b float64) (p, e float64) {
	p = float64(a * b)
	ah, al := split(a)
	bh, bl := split(b)
	e = ((float64(ah*bh) - p) + float64(ah*bl) + float64(al*bh)) + float64(al*bl)
	return p, e
}

// ddMul returns the double-double product of ah + al and bh + bl
// (relative error about 2^-104).
func ddMul(ah, al, bh, bl float64) (float64, float64) {
	p, e := twoProd(ah, bh)
	e += float64(ah*bl) + float64(al*bh)
	return fastTwoSum(p, e)
}
