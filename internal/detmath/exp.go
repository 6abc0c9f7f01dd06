package detmath

import "math"

// Exp returns e^x, within 1.5 ulp for normal results (measured against
// math/big at 200 bits, see TestExp), with the special cases of math.Exp:
// Exp(+Inf) = +Inf, Exp(-Inf) = 0, Exp(NaN) = NaN; it overflows to +Inf
// above ln(MaxFloat64) and underflows to 0 (through subnormals) below.
//
// Method: x = k·ln 2 + r with k the nearest integer to x/ln 2 and r
// computed as (x - k·ln2Hi) - k·ln2Lo (exact first part, Cody & Waite),
// so |r| <= 0.3466; e^r by its Taylor polynomial of degree 13 (the next
// term is below 2^-57 of the sum, 0.02 ulp) in Horner form; e^x = 2^k·e^r by the
// exponent field (math.Ldexp, exact).
//
// References:
//
//	W. J. Cody, W. Waite, Software Manual for the Elementary Functions,
//	  Prentice-Hall 1980 (argument reduction, the split of ln 2).
func Exp(x float64) float64 {
	const (
		overflow  = 7.09782712893383973096e+02  // ln(MaxFloat64)
		underflow = -7.45133219101941108420e+02 // ln(2^-1075)
	)
	switch {
	case math.IsNaN(x) || math.IsInf(x, 1):
		return x
	case math.IsInf(x, -1):
		return 0
	case x > overflow:
		return math.Inf(1)
	case x < underflow:
		return 0
	}
	kf := math.Round(float64(x * math.Log2E))
	r := (x - float64(kf*ln2Hi)) - float64(kf*ln2Lo)
	// e^r = 1 + r + r²/2! + ... + r^13/13!, Horner from the top.
	p := 1.0 / 6227020800 // 1/13!
	p = 1.0/479001600 + float64(r*p)
	p = 1.0/39916800 + float64(r*p)
	p = 1.0/3628800 + float64(r*p)
	p = 1.0/362880 + float64(r*p)
	p = 1.0/40320 + float64(r*p)
	p = 1.0/5040 + float64(r*p)
	p = 1.0/720 + float64(r*p)
	p = 1.0/120 + float64(r*p)
	p = 1.0/24 + float64(r*p)
	p = 1.0/6 + float64(r*p)
	p = 0.5 + float64(r*p)
	// 1 + r + r²·p: the small part added last keeps the rounding of 1 + r
	// out of the sum.
	er := 1 + (r + float64(float64(r*r)*p))
	return math.Ldexp(er, int(kf))
}
